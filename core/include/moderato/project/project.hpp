// A Moderato project: the data sources (with their import options and a
// SHA-256 of each file), derived-column recipes, analyses (roles, options,
// probe and figure settings) and saved figures. Stored as one JSON document
// with a schema_version (extension .moderato). Reading never touches the
// data files; a newer schema is refused, an older one is migrated.
#pragma once

#include <cstddef>
#include <limits>
#include <map>
#include <string>
#include <vector>

#include "moderato/estimation/model.hpp"
#include "moderato/reading/csv.hpp"

namespace moderato {

inline constexpr int kProjectSchemaVersion = 1;

struct DataSource {
    std::string id;      // stable key, e.g. "spend"
    std::string path;    // relative to the project file ('/' separators), or absolute
    std::string sha256;  // lower-case hex of the file when the project was saved; empty: unknown
    CsvOptions import;   // delimiter, header, missing tokens, decimal comma, column kinds
    // Every saved field (CsvOptions::threads is not saved and not compared).
    bool operator==(const DataSource&) const;
};

// A derived column added to a dataset. Kinds: "centre-mean", "centre-median",
// "centre-value" (uses `value`), "standardise", "log", "log1p", "square",
// "dummy" (uses `level`), "product" (uses `other`).
struct DerivedRecipe {
    std::string dataset;  // DataSource::id
    std::string name;     // the new column
    std::string kind;
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
    bool operator==(const Roles&) const = default;
};

struct ProbeSettings {
    // Moderator value under the slider (NaN: the moderator's mean).
    double current = std::numeric_limits<double>::quiet_NaN();
    std::vector<double> pinned;                                      // pinned moderator values, in the order pinned
    double second_value = std::numeric_limits<double>::quiet_NaN();  // second moderator held at (NaN: mean)
    std::string scale = "link";                                      // "link" or "response" (logistic: probability)
    std::string averaging = "sample";                                // response scale: "sample" or "values"
    bool simultaneous_band = false;                                  // show the simultaneous band instead of pointwise
    bool show_points = true;                                         // data points on the Lines plot
    bool show_gaps = true;  // shade where two groups' (or lines') predictions differ
    bool operator==(const ProbeSettings&) const;
};

// How a figure is exported. Presets: "memo" 6.5 x 4 in, "single-column"
// 3.5 x 2.6 in, "two-column" 7 x 4.3 in, "slide" 10 x 5.63 in, "custom".
struct FigureSettings {
    std::string preset = "memo";
    double width_in = 6.5, height_in = 4.0;
    int dpi = 300;
    std::string font_family = "DejaVu Sans";
    double font_pt = 9;
    bool greyscale = false;
    bool caption = true;
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
    // "none": columns as they are; "mean": the focal predictor and moderators
    // (numeric, not 0/1) centred at their means for the coefficient table.
    // Centring changes the meaning of lower-order terms, not the fit or the probe.
    std::string centring = "none";
    ProbeSettings probe;
    FigureSettings figure;
    std::string memo_notes;  // the analyst's own words, printed at the top of the memo
    bool operator==(const Analysis&) const;
};

// A figure kept in the Project sidebar: which plot of which analysis.
// Plots: "lines", "effect", "surface", "cells", "residuals", "qq", "influence".
struct FigureEntry {
    std::string id;
    std::string name;
    std::string analysis;  // Analysis::id
    std::string plot;
    bool operator==(const FigureEntry&) const = default;
};

struct Project {
    int schema_version = kProjectSchemaVersion;
    std::vector<DataSource> datasets;
    std::vector<DerivedRecipe> derived;
    std::vector<Analysis> analyses;
    std::vector<FigureEntry> figures;
    std::vector<std::string> migration_notes;  // filled when an older schema was read (not saved)

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

// Parses a project. InputError naming `name` and what is wrong for: text that
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
// maps a column to the name of its centred copy (for centring = "mean").
ModelSpec model_spec(const Analysis& analysis, const std::map<std::string, std::string>& centred = {});

// The data file of a source resolved against the project file's folder.
std::string resolve_data_path(const DataSource& source, const std::string& project_path);

// `path` relative to the project file's folder when it lies inside it or
// next to it (generic '/' separators), else absolute.
std::string relative_data_path(const std::string& data_path, const std::string& project_path);

}  // namespace moderato
