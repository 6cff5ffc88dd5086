// Everything an analysis shows, computed from a dataset and the analysis
// settings: the table with its derived columns, the design and fit, the
// probe (link or probability scale), the cell table for two categorical
// predictors, and the fit with centred columns when centring is asked for.
// The workbench and the headless renderer both call this.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/cells.hpp"
#include "moderato/probing/probe.hpp"
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
};

// Fits and probes. `table` must already hold the derived columns. Throws
// InputError naming the analysis and the role for a column that is not in
// the dataset, a missing outcome/focal/moderator, and everything fit_model
// and probe refuse.
AnalysisRun run_analysis(std::shared_ptr<const Table> table, const Analysis& analysis);

// Recomputes only the probing part of a run (pinned values, held second
// moderator, scale) on its cached design and fit.
void probe_analysis(AnalysisRun& run, const Analysis& analysis);

// Whether two analyses describe the same model (dataset, roles, family, SE
// kind, level, centring), so a fit can be reused.
bool same_model(const Analysis& a, const Analysis& b);

// Whether two analyses ask for the same probe (and the same model).
bool same_probe(const Analysis& a, const Analysis& b);

// Which probe an analysis gets, or InputError naming the role.
ProbeKind probe_kind(const Table& table, const Analysis& analysis);

}  // namespace moderato
