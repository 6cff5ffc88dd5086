// The memo of an analysis: the model in mathematical notation, the tables,
// plain-language sentences generated from the numbers (region of
// significance with the observed range, crossover point, model comparison,
// effects at chosen moderator values), the figures, the cautions a reader
// must not overlook, and a reproducibility footer (data checksum, software
// version, every option). Written as one self-contained HTML file (figures
// embedded, nothing fetched from elsewhere) or as Markdown with the figures
// beside it. Every user-supplied string (column, analysis and file names,
// levels, notes) is escaped for the format. No dates or clocks: the same
// inputs give the same bytes.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"
#include "moderato/reporting/analysis_tables.hpp"

namespace moderato {

struct MemoFigure {
    std::string title;      // "Lines plot"
    std::string file;       // PNG file name beside a Markdown memo, e.g. "lines-plot.png"
    std::string png;        // the PNG bytes (embedded in the HTML memo)
    double width_in = 6.5;  // printed size
    double height_in = 4.0;
};

// What the memo needs beyond the analysis and its run.
struct MemoContext {
    std::string caption;          // model, SE kind, level, n (as under the figures)
    std::string project_file;     // the project file's name
    std::string data_file;        // the data file's path as the project records it
    std::string data_sha256;      // SHA-256 of the data bytes the results come from
    std::string recorded_sha256;  // the SHA-256 the project recorded ("" unknown)
    std::string software = "Moderato " MODERATO_VERSION;
};

struct Memo {
    std::string title;
    std::string subtitle;               // the caption
    std::string notes;                  // the analyst's own notes (plain text)
    std::vector<std::string> findings;  // plain-language sentences
    std::string equation_text;          // "weekly_spend = b₀ + b₁·discount_pct + …"
    std::string equation_html;          // the same with <i>/<sub> markup (escaped names)
    std::string equation_latex;         // for the Markdown memo ($$ … $$)
    std::string fitted_text;            // the equation with the estimates
    std::vector<NamedTable> tables;
    std::vector<MemoFigure> figures;
    std::vector<std::string> cautions;
    std::vector<std::pair<std::string, std::string>> footer;  // label, value
};

// The sentences alone (also used by the workbench's Memo section); a
// multilevel analysis adds its random part (groups, variances, the
// intraclass correlation, the random slopes' tests, the df) and never
// mentions R²; the straight-line check, when on, adds its bins, its test,
// the smooth curve's bandwidth and where the data are thin.
std::vector<std::string> memo_findings(const Analysis& analysis, const AnalysisRun& run);

// Where the focal predictor's effect differs from zero, as the memo says it
// and the Probe section repeats it (one wording): "Among the observed values
// of z (0 to 25), the effect of x on y is positive and differs from zero for
// z above 3.2 (95% pointwise intervals)." and, when Johnson–Neyman
// boundaries lie beyond the data, "The Johnson–Neyman boundary at −7 lies
// beyond the data (z observed from 0 to 25): an extrapolation, not a
// finding." Empty without a Johnson–Neyman region (groups, a 0/1 moderator).
std::vector<std::string> region_sentences(const Analysis& analysis, const AnalysisRun& run);
// The same for the simultaneous band ("With the simultaneous band, which
// keeps the chance of any false region at 5% (critical value 2.455), the
// effect of x on y …."); empty when the run has no simultaneous band.
std::string simultaneous_region_sentence(const Analysis& analysis, const AnalysisRun& run);

// The cautions: the run's own, then those of the usual list that apply and
// were not said yet (association, beyond the data, multiple testing, sample
// size, log-odds vs probability; for a multilevel fit: a typical group, few
// groups, a singular fit, extrapolation across groups; with the straight-line
// check: its test's limited power, thin data, its scale).
std::vector<std::string> memo_cautions(const Analysis& analysis, const AnalysisRun& run);

// Every saved option of the analysis, its dataset's import options and
// derived columns, as "roles.outcome" = "weekly_spend" rows (from the project JSON).
std::vector<std::pair<std::string, std::string>> analysis_options(const Project& project, const Analysis& analysis);

Memo build_memo(const Project& project, const Analysis& analysis, const AnalysisRun& run, const MemoContext& context,
                std::vector<MemoFigure> figures = {});

// One self-contained HTML document (UTF-8): styles inline in the head,
// figures as data: URIs, no scripts, no links to other files or sites.
// With embed_figures false the images name their files instead, with a
// width in pixels at 96 per inch, and the styles are the subset Qt's
// rich-text engine reads (for the workbench's editor and printing to PDF).
std::string memo_to_html(const Memo& memo, bool embed_figures = true);
// Markdown (GitHub flavour, with a $$ math block); figures by file name.
std::string memo_to_markdown(const Memo& memo);

// RFC 4648 base64.
std::string base64_encode(const std::string& bytes);

}  // namespace moderato
