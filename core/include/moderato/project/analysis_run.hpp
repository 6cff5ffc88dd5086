// Everything an analysis shows, computed from a dataset and the analysis
// settings: the table with its derived columns, the design and fit, the
// probe (link or probability scale), the cell table for two categorical
// predictors, and the fit with centred columns when centring is asked for.
// The workbench and the headless renderer both call this.
#pragma once

#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/binned_effects.hpp"
#include "moderato/probing/cells.hpp"
#include "moderato/probing/common_support.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/smooth_effects.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/recipes.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

// Which plots an analysis offers, from the kinds of its focal predictor and moderator.
enum class ProbeKind {
    Continuous,  // numeric moderator (not 0/1): Effect plot, JN, slider
    Groups,      // categorical or 0/1 moderator, numeric focal: one line per group
    Cells,       // focal and moderator both categorical or 0/1: cell table
};

struct AnalysisRun {
    std::string analysis_id;
    std::shared_ptr<const Table> table;  // with derived columns
    ModelSpec spec;
    Design design;
    FitResult fit;
    ProbeKind kind = ProbeKind::Continuous;
    std::optional<ProbeResult> probe;       // link scale (or the probability scale when asked)
    std::optional<ProbeResult> probe_link;  // the link-scale probe when `probe` is on the probability scale
    std::optional<CellTable> cells;
    std::optional<SurfaceGrid> surface;  // both focal and moderator numeric, non-binary
    // centring = "mean": the same model with centred columns, for the coefficient table.
    std::optional<FitResult> centred_fit;
    std::map<std::string, double> centres;  // column -> centre used
    std::vector<std::string> cautions;      // association, extrapolation, multiple testing, ...
    // The straight-line check (ProbeSettings::show_binned / show_smooth): a
    // Continuous probe of a numeric focal predictor in a single-level model,
    // on the model's (log-odds) scale. Where the data are: every Continuous
    // probe. A check that cannot be computed leaves its result empty and
    // says why in `straight_line_notes` (the rest of the run stands).
    std::optional<BinnedEffects> binned;
    std::optional<SmoothEffects> smooth;
    std::optional<CommonSupport> support;
    std::vector<std::string> straight_line_notes;
    // A fit in the database (ServerFit): `fit` is over every row there
    // (fit.n), `table` and `design` are the sample read for plots, and
    // `sample_fit` is the same model fitted to the sample, for the model
    // checks; empty for every other fit.
    std::optional<FitResult> sample_fit;
};

// Where an analysis's linear model is fitted inside PostgreSQL (a dataset
// whose fits run in the database): the source, its import options and the
// password given this session (empty: the password file).
struct ServerFit {
    SourceSpec source;
    CsvOptions options;
    std::string password;
};

// Progress of long work (the smooth curve's cross-validation and bootstrap):
// (done, total); returning false cancels (the call then throws Cancelled).
using RunProgress = std::function<bool(int done, int total)>;

// Fits and probes. `table` must already hold the derived columns. Throws
// InputError naming the analysis and the role for a column that is not in
// the dataset, a missing outcome/focal/moderator, and everything fit_model
// and probe refuse. With `server`, the model is fitted in the database
// (linear, single-level models only; `table` is then the sample), and the
// centred coefficient table is left out.
AnalysisRun run_analysis(std::shared_ptr<const Table> table, const Analysis& analysis, const RunProgress& progress = {},
                         const ServerFit* server = nullptr);

// Recomputes only the probing part of a run (pinned values, held second
// moderator, scale, the straight-line check) on its cached design and fit.
// Binned estimates and a smooth curve already in `run` for the same settings
// are kept (they depend on the model and their own settings only).
void probe_analysis(AnalysisRun& run, const Analysis& analysis, const RunProgress& progress = {});

// Whether probing `run` again for `analysis` computes a smooth curve anew
// (switched on, and `run` holds none for the same settings): the slow part,
// seconds rather than milliseconds, so the workbench never does it on the UI thread.
bool smooth_work_pending(const AnalysisRun* run, const Analysis& analysis);

// Whether two analyses describe the same model (dataset, roles, family, SE
// kind, level, centring), so a fit can be reused.
bool same_model(const Analysis& a, const Analysis& b);

// Whether two analyses ask for the same probe (and the same model).
bool same_probe(const Analysis& a, const Analysis& b);

// Which probe an analysis gets, or InputError naming the role.
ProbeKind probe_kind(const Table& table, const Analysis& analysis);

}  // namespace moderato
