// A Moderato project: the data sources (with their import options and a
// SHA-256 of each file), derived-column recipes, analyses (roles, options,
// probe and figure settings) and saved figures. Stored as one JSON document
// with a schema_version (extension .moderato). Reading never touches the
// data files; a newer schema is refused, an older one is migrated.
#pragma once

#include <cstddef>
#include <cstdint>
#include <limits>
#include <map>
#include <string>
#include <vector>

#include "moderato/estimation/model.hpp"
#include "moderato/probing/multiplicity.hpp"
#include "moderato/probing/scale.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/data_source.hpp"

namespace moderato {

// Schema 2 (this version) stores the probe scale as "model"/"outcome" and the
// standard errors under "standard_errors" ("model-based", "hc0"…"hc4",
// "cluster-robust"); schemas 0 and 1 are migrated when read.
inline constexpr int kProjectSchemaVersion = 2;

// The project-level kinds. Their words in project files (and where the
// workbench shows a key, e.g. in an undo step's name) come from to_string;
// everything else compares the enums.

// A derived column's recipe: centre at the mean, the median or `value`;
// standardise; log(x); log(1 + x); x²; 1 where x equals `level`; x × `other`.
enum class RecipeKind { CentreMean, CentreMedian, CentreValue, Standardise, Log, Log1p, Square, Dummy, Product };
// None: columns as they are; Mean: the focal predictor and moderators
// (numeric, not 0/1) centred at their means for the coefficient table.
enum class Centring { None, Mean };
// Figure sizes: Memo 6.5 x 4 in, SingleColumn 3.5 x 2.6 in, TwoColumn
// 7 x 4.3 in, Slide 10 x 5.63 in, Custom (the width and height given).
enum class SizePreset { Memo, SingleColumn, TwoColumn, Slide, Custom };
// The plots a figure can be kept from; the last three are the model checks.
enum class FigurePlot { Lines, Effect, Surface, Cells, Residuals, QQ, Influence };

// "centre-mean", "centre-median", "centre-value", "standardise", "log",
// "log1p", "square", "dummy", "product".
const char* to_string(RecipeKind kind);
const char* to_string(Centring centring);  // "none", "mean"
// "memo", "single-column", "two-column", "slide", "custom".
const char* to_string(SizePreset preset);
// "lines", "effect", "surface", "cells", "residuals", "qq", "influence":
// also the key of the workbench's plot (FigureSource::figureKey).
const char* to_string(FigurePlot plot);
// Residuals, QQ, Influence: drawn by the model checks, not the probe.
bool is_check_plot(FigurePlot plot);

struct DataSource {
    std::string id;      // stable key, e.g. "spend"
    std::string path;    // relative to the project file ('/' separators), or absolute
    std::string sha256;  // lower-case hex of the file when the project was saved; empty: unknown
    // Where in the file the table is (saved as "source" only when not a text
    // file, so projects of text files read and write as before): a workbook's
    // sheet, an SQLite table or query. Never a password.
    SourceKind kind = SourceKind::TextFile;
    std::string sheet, table, query;
    CsvOptions import;  // delimiter, header, missing tokens, decimal comma, column kinds
    // Kinds changed after import (reading/retype.hpp), applied to the table
    // as read, before the derived columns. Saved only when not empty.
    std::map<std::string, ColumnKind> retyped;
    // PostgreSQL only: linear fits run inside the server over every row, and
    // the table read is a reproducible sample (kPlotSampleRows) for plots
    // and checks. Saved as "fits": "in-database" in "source".
    bool in_database = false;
    // Every saved field (CsvOptions::threads is not saved and not compared).
    bool operator==(const DataSource&) const;
};

// A derived column added to a dataset. CentreValue uses `value`, Dummy uses
// `level`, Product uses `other`.
struct DerivedRecipe {
    std::string dataset;  // DataSource::id
    std::string name;     // the new column
    RecipeKind kind = RecipeKind::CentreMean;
    std::string source;  // the column it is computed from
    std::string other;   // second column (product)
    std::string level;   // dummy
    double value = 0;    // centre-value
    bool operator==(const DerivedRecipe&) const = default;
};

// The roles of an analysis, filled in the Specify section. The model is the
// focal predictor, the moderator (and second moderator), their product terms
// (a three-way product with a second moderator) and the controls as main effects.
struct Roles {
    std::string outcome;
    std::string focal;
    std::string moderator;
    std::string second_moderator;  // empty: none
    std::vector<std::string> controls;
    std::string weights;   // empty: none
    std::string clusters;  // empty: none
    std::string exposure;  // count models: each row's exposure (time, area, ...); empty: none
    bool operator==(const Roles&) const = default;
};

struct ProbeSettings {
    // Moderator value under the slider (NaN: the mean; the median of a moderator probed at percentiles).
    double current = std::numeric_limits<double>::quiet_NaN();
    std::vector<double> pinned;                                      // pinned moderator values, in the order pinned
    double second_value = std::numeric_limits<double>::quiet_NaN();  // second moderator held at (NaN: mean)
    ProbeScale scale = ProbeScale::Model;                            // Outcome: probabilities (logistic)
    Averaging averaging = Averaging::Sample;                         // outcome scale: over the rows, or at values
    bool simultaneous_band = false;                                  // show the simultaneous band instead of pointwise
    bool show_points = true;                                         // data points on the Lines plot
    // A discrete focal predictor (a few whole values): its data points are
    // spread a little sideways so they do not hide one another (written to
    // the file only when off).
    bool jitter = true;
    bool show_gaps = true;  // shade where two groups' (or lines') predictions differ
    // Categorical moderator: how the pairwise differences' p-values are
    // adjusted (written to the file only when not Holm).
    Adjustment adjustment = Adjustment::Holm;
    // The Effect plot's moderator axis takes in Johnson–Neyman boundaries
    // beyond the data (never below 0 for a moderator observed only >= 0);
    // false: the observed range plus a margin, with boundaries beyond it
    // written as notes. Written to the file only when true.
    bool extend_to_boundaries = false;
    // The straight-line check on the Effect plot (continuous moderator and
    // numeric focal predictor; not for multilevel models): the binned
    // estimates with `bins` bins (2 to 50), and the smooth (kernel) curve
    // with its bandwidth (NaN: chosen by cross-validation; else > 0), the
    // bootstrap replicates of its band (0: no band, else 100 to 100,000) and
    // the seed of its folds and bootstrap. Each written to the file only
    // when not at its default.
    bool show_binned = false;
    int bins = 3;
    bool show_smooth = false;
    double smooth_bandwidth = std::numeric_limits<double>::quiet_NaN();
    int smooth_replicates = 200;
    std::uint64_t smooth_seed = 1;
    bool operator==(const ProbeSettings&) const;
};

// How a figure is exported (the preset names its size, see SizePreset).
// The figures Moderato draws: the export dialog offers these ranges, and a
// project file must keep to them (a hand-edited 0.00001-inch figure or a 0 pt
// font has nothing sensible to draw).
//
// Pixels: each side and the resolution have their own range, but 40 in at
// 1200 DPI is 48,000 px a side, a 9 GB image. A raster figure (PNG, the
// clipboard image) may hold at most 200 megapixels: 800 MB as 32-bit pixels,
// drawn once and converted once, so under 2 GB at the peak; a letter page
// (8.5 × 11 in) at 1200 DPI is 135 megapixels, so every printable figure
// fits. The loader, the export dialog and the renderer all ask pixels_fit().
struct FigureLimits {
    static constexpr double min_inches = 0.5, max_inches = 40;
    static constexpr int min_dpi = 72, max_dpi = 1200;
    static constexpr double min_font_pt = 4, max_font_pt = 48;
    static constexpr double max_pixels = 200e6;

    // Pixels a side: the inches times the DPI, rounded to the nearest pixel.
    static long long side_pixels(double inches, int dpi);
    static double pixels(double width_in, double height_in, int dpi) {
        return static_cast<double>(side_pixels(width_in, dpi)) * static_cast<double>(side_pixels(height_in, dpi));
    }
    static bool pixels_fit(double width_in, double height_in, int dpi) {
        return pixels(width_in, height_in, dpi) <= max_pixels;
    }
    // The highest DPI in [min_dpi, max_dpi] whose image fits (min_dpi when
    // none does; the largest size at min_dpi, 40 × 40 in, is 10.4 megapixels).
    static int max_dpi_for(double width_in, double height_in);
};

struct FigureSettings {
    SizePreset preset = SizePreset::Memo;
    double width_in = 6.5, height_in = 4.0;
    int dpi = 300;
    std::string font_family = "DejaVu Sans";
    double font_pt = 9;
    bool greyscale = false;
    bool caption = true;
    // Exports show where the moderator slider stands (its handle or line,
    // labelled "wind = 8.0"); off, they show no slider at all. Written to the
    // file only when on, so projects keep their bytes.
    bool mark_slider = false;
    bool operator==(const FigureSettings&) const = default;
};

struct Analysis {
    std::string id;       // stable key
    std::string name;     // shown in the Project sidebar
    std::string dataset;  // DataSource::id
    Roles roles;
    Family family = Family::Linear;
    SeKind se = SeKind::Classical;
    double level = 0.95;
    // Centring changes the meaning of lower-order terms, not the fit or the probe.
    Centring centring = Centring::None;
    // Categorical column -> its reference level; a column not listed uses
    // its first level in text order (written only when not empty).
    std::map<std::string, std::string> reference_levels;
    // A multilevel model: its "groups" is the Groups role (written, with the
    // rest, only when a Groups column is chosen).
    MultilevelSpec multilevel;
    ProbeSettings probe;
    FigureSettings figure;
    std::string memo_notes;  // the analyst's own words, printed at the top of the memo
    bool operator==(const Analysis&) const;
};

// A figure kept in the Project sidebar: which plot of which analysis.
struct FigureEntry {
    std::string id;
    std::string name;
    std::string analysis;  // Analysis::id
    FigurePlot plot = FigurePlot::Lines;
    bool operator==(const FigureEntry&) const = default;
};

struct Project {
    int schema_version = kProjectSchemaVersion;
    std::vector<DataSource> datasets;
    std::vector<DerivedRecipe> derived;
    std::vector<Analysis> analyses;
    std::vector<FigureEntry> figures;
    std::vector<std::string> migration_notes;  // what was migrated when an older schema was read (not saved)

    // Every saved field; migration_notes (not saved) are not compared.
    bool operator==(const Project&) const;

    const DataSource* dataset(const std::string& id) const;
    const Analysis* analysis(const std::string& id) const;
    Analysis* analysis(const std::string& id);
    std::vector<DerivedRecipe> recipes_for(const std::string& dataset_id) const;
    // An id not used by any dataset, analysis or figure: base, base-2, base-3, ...
    std::string unique_id(const std::string& base) const;
};

// JSON text of a project (2-space indent, numbers round-trip exactly). NaN
// ("the default") is written as null; a non-finite slider value is written as
// null too (read back as NaN) and non-finite pinned values are left out.
std::string project_to_json(const Project& project);

// Parses a project; schemas 0 and 1 are migrated in memory (migration_notes
// say what changed; the file itself is not touched). InputError naming
// `name` and what is wrong for: text that
// is not JSON (with line and column; the column counts characters), a missing or non-integer
// schema_version, a schema newer than this program reads ("made by a newer
// Moderato"), wrong field types, unknown enum values, and references to
// datasets or analyses that do not exist, and an id used twice. Messages name
// the field path, e.g. "analyses[0].probe.pinned[1]: expected a number".
Project project_from_json(const std::string& text, const std::string& name);

// Reads and parses a project file (InputError for an unreadable file).
Project read_project_file(const std::string& path);

// Writes the project atomically: a temporary file beside it, flushed, then
// renamed over the target. The old file is intact if anything fails.
void write_project_file(const Project& project, const std::string& path);

// Roles, family, SE kind and level as a model specification; `centred`
// maps a column to the name of its centred copy (for Centring::Mean).
ModelSpec model_spec(const Analysis& analysis, const std::map<std::string, std::string>& centred = {});

// The data file of a source resolved against the project file's folder.
std::string resolve_data_path(const DataSource& source, const std::string& project_path);

// The source to read: its kind, sheet, table or query, with the file at
// `file` (the resolved path, or where a moved file was found).
SourceSpec source_spec(const DataSource& source, const std::string& file);

// `path` relative to the project file's folder when it lies inside it or
// next to it (generic '/' separators), else absolute.
std::string relative_data_path(const std::string& data_path, const std::string& project_path);

}  // namespace moderato
