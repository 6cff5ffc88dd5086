// Project documents: JSON reading (with schema checks and migration) and writing.
#include "moderato/project/project.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <optional>
#include <set>

#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "moderato/support/report_text.hpp"
#include "project/project_migration.hpp"
#include "support/json_document.hpp"

namespace moderato {

namespace fs = std::filesystem;

long long FigureLimits::side_pixels(double inches, int dpi) { return std::llround(inches * dpi); }

int FigureLimits::max_dpi_for(double width_in, double height_in) {
    int dpi = static_cast<int>(std::floor(std::sqrt(max_pixels / (width_in * height_in))));
    dpi = std::clamp(dpi, min_dpi, max_dpi);
    while (dpi > min_dpi && !pixels_fit(width_in, height_in, dpi)) --dpi;  // rounding to whole pixels
    return dpi;
}
using nlohmann::json;

namespace {

bool same_number(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

// NaN (meaning "the default") is stored as null.
json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

// ------------------------------------------------------------ stored words

// An enum value and its word in project files (schema 2).
template <class E>
struct Word {
    E value;
    const char* text;
};

template <class E, std::size_t N>
const char* word_of(const Word<E> (&words)[N], E value) {
    for (const auto& w : words)
        if (w.value == value) return w.text;
    return "";
}

constexpr Word<RecipeKind> kRecipeWords[] = {{RecipeKind::CentreMean, "centre-mean"},
                                             {RecipeKind::CentreMedian, "centre-median"},
                                             {RecipeKind::CentreValue, "centre-value"},
                                             {RecipeKind::Standardise, "standardise"},
                                             {RecipeKind::Log, "log"},
                                             {RecipeKind::Log1p, "log1p"},
                                             {RecipeKind::Square, "square"},
                                             {RecipeKind::Dummy, "dummy"},
                                             {RecipeKind::Product, "product"}};
constexpr Word<Centring> kCentringWords[] = {{Centring::None, "none"}, {Centring::Mean, "mean"}};
constexpr Word<SizePreset> kPresetWords[] = {{SizePreset::Memo, "memo"},
                                             {SizePreset::SingleColumn, "single-column"},
                                             {SizePreset::TwoColumn, "two-column"},
                                             {SizePreset::Slide, "slide"},
                                             {SizePreset::Custom, "custom"}};
constexpr Word<FigurePlot> kPlotWords[] = {{FigurePlot::Lines, "lines"},         {FigurePlot::Effect, "effect"},
                                           {FigurePlot::Surface, "surface"},     {FigurePlot::Cells, "cells"},
                                           {FigurePlot::Residuals, "residuals"}, {FigurePlot::QQ, "qq"},
                                           {FigurePlot::Influence, "influence"}};
constexpr Word<ProbeScale> kScaleWords[] = {{ProbeScale::Model, "model"}, {ProbeScale::Outcome, "outcome"}};
constexpr Word<Adjustment> kAdjustmentWords[] = {
    {Adjustment::Holm, "holm"}, {Adjustment::Bonferroni, "bonferroni"}, {Adjustment::None, "none"}};
constexpr Word<Averaging> kAveragingWords[] = {{Averaging::Sample, "sample"}, {Averaging::AtValues, "values"}};
constexpr Word<MixedEstimation> kEstimationWords[] = {{MixedEstimation::Reml, "reml"}, {MixedEstimation::Ml, "ml"}};
constexpr Word<RandomCovariance> kRandomCovarianceWords[] = {{RandomCovariance::Full, "full"},
                                                             {RandomCovariance::Diagonal, "diagonal"}};
constexpr Word<FixedEffectDf> kDfWords[] = {{FixedEffectDf::Satterthwaite, "satterthwaite"},
                                            {FixedEffectDf::BetweenWithin, "between-within"},
                                            {FixedEffectDf::Normal, "z"}};
constexpr Word<Family> kFamilyWords[] = {{Family::Linear, "linear"},
                                         {Family::Logistic, "logistic"},
                                         {Family::Probit, "probit"},
                                         {Family::Poisson, "poisson"},
                                         {Family::NegativeBinomial, "negative-binomial"}};
constexpr Word<SeKind> kSeWords[] = {{SeKind::Classical, "model-based"},
                                     {SeKind::HC0, "hc0"},
                                     {SeKind::HC1, "hc1"},
                                     {SeKind::HC2, "hc2"},
                                     {SeKind::HC3, "hc3"},
                                     {SeKind::HC4, "hc4"},
                                     {SeKind::Cluster, "cluster-robust"}};

// Reading with messages that name the project, the field and what was expected.
class Reader {
public:
    explicit Reader(std::string name) : name_(std::move(name)) {}

    [[noreturn]] void fail(const std::string& where, const std::string& what) const {
        throw InputError(name_ + ": " + where + ": " + what);
    }

    const json& object(const json& parent, const char* key, const std::string& where, bool required) const {
        static const json empty = json::object();
        const auto it = parent.find(key);
        if (it == parent.end()) {
            if (required) fail(where, "the field \"" + std::string(key) + "\" is missing");
            return empty;
        }
        if (!it->is_object()) fail(where + "." + key, "expected an object");
        return *it;
    }

    const json& array(const json& parent, const char* key, const std::string& where) const {
        static const json empty = json::array();
        const auto it = parent.find(key);
        if (it == parent.end()) return empty;
        if (!it->is_array()) fail(where + "." + key, "expected a list");
        return *it;
    }

    std::string text(const json& parent, const char* key, const std::string& where, bool required,
                     const std::string& fallback = {}) const {
        const auto it = parent.find(key);
        if (it == parent.end() || it->is_null()) {
            if (required) fail(where, "the field \"" + std::string(key) + "\" is missing");
            return fallback;
        }
        if (!it->is_string()) fail(where + "." + key, "expected text");
        return checked(it->get_ref<const std::string&>(), where + "." + key);
    }

    // Text without NUL characters: a name or setting holding one would be cut
    // short by file paths and other programs.
    const std::string& checked(const std::string& s, const std::string& where) const {
        if (s.find('\0') != std::string::npos)
            fail(where, "contains a NUL character (\\u0000), which no name or setting may hold");
        return s;
    }

    double number(const json& parent, const char* key, const std::string& where, double fallback) const {
        const auto it = parent.find(key);
        if (it == parent.end() || it->is_null()) return fallback;
        if (!it->is_number()) fail(where + "." + key, "expected a number");
        return it->get<double>();
    }

    bool boolean(const json& parent, const char* key, const std::string& where, bool fallback) const {
        const auto it = parent.find(key);
        if (it == parent.end()) return fallback;
        if (!it->is_boolean()) fail(where + "." + key, "expected true or false");
        return it->get<bool>();
    }

    std::vector<std::string> texts(const json& parent, const char* key, const std::string& where) const {
        std::vector<std::string> out;
        const json& list = array(parent, key, where);
        for (std::size_t i = 0; i < list.size(); ++i) {
            if (!list[i].is_string()) fail(where + "." + key + "[" + std::to_string(i) + "]", "expected text");
            out.push_back(
                checked(list[i].get_ref<const std::string&>(), where + "." + key + "[" + std::to_string(i) + "]"));
        }
        return out;
    }

    std::vector<double> numbers(const json& parent, const char* key, const std::string& where) const {
        std::vector<double> out;
        const json& list = array(parent, key, where);
        for (std::size_t i = 0; i < list.size(); ++i) {
            if (!list[i].is_number()) fail(where + "." + key + "[" + std::to_string(i) + "]", "expected a number");
            out.push_back(list[i].get<double>());
        }
        return out;
    }

    // The enum whose word `key` holds (`fallback` when absent); the message
    // lists the words allowed.
    template <class E, std::size_t N>
    E choice(const json& parent, const char* key, const std::string& where, const Word<E> (&words)[N],
             std::optional<E> fallback) const {
        const std::string v = text(parent, key, where, false, fallback ? word_of(words, *fallback) : "");
        for (const auto& w : words)
            if (v == w.text) return w.value;
        std::string list;
        for (const auto& w : words) list += (list.empty() ? "" : ", ") + std::string(w.text);
        fail(where + "." + key, "\"" + v + "\" is not one of: " + list);
    }

private:
    std::string name_;
};

json kinds_to_json(const std::map<std::string, ColumnKind>& kinds) {
    json j = json::object();
    for (const auto& [col, kind] : kinds) j[col] = kind == ColumnKind::Numeric ? "numeric" : "categorical";
    return j;
}

// An object of column name -> "numeric" | "categorical" (`where` names it).
std::map<std::string, ColumnKind> kinds_from_json(const Reader& r, const json& kinds, const std::string& where) {
    std::map<std::string, ColumnKind> out;
    for (auto it = kinds.begin(); it != kinds.end(); ++it) {
        r.checked(it.key(), where);
        if (!it->is_string() || (*it != "numeric" && *it != "categorical"))
            r.fail(where + "." + it.key(), "expected \"numeric\" or \"categorical\"");
        out[it.key()] = *it == "numeric" ? ColumnKind::Numeric : ColumnKind::Categorical;
    }
    return out;
}

json import_to_json(const CsvOptions& o) {
    json j;
    j["delimiter"] = o.delimiter == 0 ? json(nullptr) : json(std::string(1, o.delimiter));
    j["header"] = o.header;
    j["missing_tokens"] = o.missing_tokens;
    j["decimal_comma"] = o.decimal_comma;
    j["column_kinds"] = kinds_to_json(o.column_kinds);
    if (!o.text_as_missing.empty()) j["text_as_missing"] = o.text_as_missing;
    return j;
}

CsvOptions import_from_json(const Reader& r, const json& j, const std::string& where) {
    CsvOptions o;
    const std::string delim = r.text(j, "delimiter", where, false);
    if (delim.size() > 1) r.fail(where + ".delimiter", "expected one character");
    o.delimiter = delim.empty() ? 0 : delim[0];
    o.header = r.boolean(j, "header", where, true);
    if (j.contains("missing_tokens")) o.missing_tokens = r.texts(j, "missing_tokens", where);
    o.decimal_comma = r.boolean(j, "decimal_comma", where, false);
    // The same rules the CSV reader keeps, reported here with the project's path.
    if (o.delimiter == '"' || o.delimiter == '\n' || o.delimiter == '\r')
        r.fail(where + ".delimiter", "cannot be a quote or a line break; expected e.g. \",\", \";\" or a tab");
    if (o.delimiter == ',' && o.decimal_comma)
        r.fail(where + ".delimiter", "cannot be ',' when decimal_comma is true; expected e.g. \";\" or a tab");
    o.column_kinds = kinds_from_json(r, r.object(j, "column_kinds", where, false), where + ".column_kinds");
    if (j.contains("text_as_missing")) {
        for (const auto& name : r.texts(j, "text_as_missing", where)) {
            const auto kind = o.column_kinds.find(name);
            if (kind != o.column_kinds.end() && kind->second == ColumnKind::Categorical)
                r.fail(where + ".text_as_missing", "'" + name + "' is also in column_kinds as categorical");
            o.text_as_missing.insert(name);
        }
    }
    return o;
}

// Pinned values: a non-finite one means nothing on a slider (and JSON has no
// number for it), so it is left out rather than written as an unreadable null.
json finite_only(const std::vector<double>& values) {
    json out = json::array();
    for (const double v : values)
        if (std::isfinite(v)) out.push_back(v);
    return out;
}

// ------------------------------------------------------------ writing

json recipe_to_json(const DerivedRecipe& r) {
    json j{{"dataset", r.dataset}, {"name", r.name}, {"kind", to_string(r.kind)}, {"source", r.source}};
    if (!r.other.empty()) j["other"] = r.other;
    if (!r.level.empty()) j["level"] = r.level;
    if (r.kind == RecipeKind::CentreValue || r.value != 0) j["value"] = number_or_null(r.value);
    return j;
}

json probe_to_json(const ProbeSettings& p) {
    json j{{"current", number_or_null(p.current)},
           {"pinned", finite_only(p.pinned)},
           {"second_value", number_or_null(p.second_value)},
           {"scale", word_of(kScaleWords, p.scale)},
           {"averaging", word_of(kAveragingWords, p.averaging)},
           {"simultaneous_band", p.simultaneous_band},
           {"show_points", p.show_points},
           {"show_gaps", p.show_gaps}};
    // Written only when not the default, so projects keep their bytes.
    if (p.adjustment != Adjustment::Holm) j["adjustment"] = word_of(kAdjustmentWords, p.adjustment);
    if (p.extend_to_boundaries) j["extend_to_boundaries"] = true;
    if (!p.jitter) j["jitter"] = false;
    const ProbeSettings d;
    if (p.show_binned) j["binned_estimates"] = true;
    if (p.bins != d.bins) j["bins"] = p.bins;
    if (p.show_smooth) j["smooth_curve"] = true;
    if (std::isfinite(p.smooth_bandwidth)) j["smooth_bandwidth"] = p.smooth_bandwidth;
    if (p.smooth_replicates != d.smooth_replicates) j["smooth_replicates"] = p.smooth_replicates;
    if (p.smooth_seed != d.smooth_seed) j["smooth_seed"] = p.smooth_seed;
    return j;
}

json figure_to_json(const FigureSettings& f) {
    json j{
        {"preset", to_string(f.preset)}, {"width_in", f.width_in}, {"height_in", f.height_in}, {"dpi", f.dpi},
        {"font_family", f.font_family},  {"font_pt", f.font_pt},   {"greyscale", f.greyscale}, {"caption", f.caption}};
    // Written only when on, so projects keep their bytes.
    if (f.mark_slider) j["mark_slider"] = true;
    return j;
}

json analysis_to_json(const Analysis& a) {
    json roles{{"outcome", a.roles.outcome},     {"focal", a.roles.focal},
               {"moderator", a.roles.moderator}, {"second_moderator", a.roles.second_moderator},
               {"controls", a.roles.controls},   {"weights", a.roles.weights},
               {"clusters", a.roles.clusters}};
    json j{{"id", a.id},
           {"name", a.name},
           {"dataset", a.dataset},
           {"roles", roles},
           {"family", word_of(kFamilyWords, a.family)},
           {"standard_errors", word_of(kSeWords, a.se)},
           {"level", a.level},
           {"centring", to_string(a.centring)},
           {"probe", probe_to_json(a.probe)},
           {"figure", figure_to_json(a.figure)}};
    // Written only when there are notes, so projects without them keep their bytes.
    if (!a.memo_notes.empty()) j["memo_notes"] = a.memo_notes;
    if (!a.reference_levels.empty()) j["reference_levels"] = a.reference_levels;
    // Written only when set, so single-level projects keep their bytes; the
    // settings stay when the Groups role is emptied, for when it returns.
    const MultilevelSpec& m = a.multilevel;
    if (m.active()) j["roles"]["groups"] = m.groups;
    // Written only when set, so projects without an exposure keep their bytes.
    if (!a.roles.exposure.empty()) j["roles"]["exposure"] = a.roles.exposure;
    MultilevelSpec settings = m;
    settings.groups.clear();
    settings.group_effects = false;  // a command-line request, not a project setting
    if (!(settings == MultilevelSpec{})) {
        j["multilevel"] = json{{"random_slopes", m.random_slopes},
                               {"estimation", word_of(kEstimationWords, m.estimation)},
                               {"random_covariance", word_of(kRandomCovarianceWords, m.covariance)},
                               {"df", word_of(kDfWords, m.df)},
                               {"centre_within", m.centre_within},
                               {"group_means", m.group_means}};
    }
    return j;
}

// ------------------------------------------------------------ reading

// The document, or InputError with the line, column and JSON path where it
// stops being a JSON document we can hold.
json parse_document(const std::string& text, const std::string& name) {
    return detail::parse_json_document(text, name, "a Moderato project");
}

// The schema version; InputError for a missing, malformed, negative or newer one.
long long schema_version(const Reader& r, const json& doc, const std::string& name) {
    if (!doc.is_object()) r.fail("top level", "not a Moderato project (expected a JSON object)");
    const auto sv = doc.find("schema_version");
    if (sv == doc.end()) r.fail("top level", "not a Moderato project (no schema_version)");
    if (!sv->is_number_integer()) r.fail("schema_version", "expected a whole number");
    const bool unsigned_version = sv->is_number_unsigned();
    const std::string version_text =
        unsigned_version ? std::to_string(sv->get<unsigned long long>()) : std::to_string(sv->get<long long>());
    if (unsigned_version ? sv->get<unsigned long long>() > static_cast<unsigned long long>(kProjectSchemaVersion)
                         : sv->get<long long>() > kProjectSchemaVersion)
        throw InputError(name + ": made by a newer Moderato (project schema " + version_text +
                         "; this version reads up to schema " + std::to_string(kProjectSchemaVersion) +
                         "). Open it with a newer Moderato; the file was not changed.");
    const long long version =
        unsigned_version ? static_cast<long long>(sv->get<unsigned long long>()) : sv->get<long long>();
    if (version < 0) r.fail("schema_version", "must not be negative");
    return version;
}

// "source": {"kind": "workbook", "sheet": "..."} / {"kind": "sqlite",
// "table" or "query": "..."}; absent for a text file.
json source_place_to_json(const DataSource& d) {
    json j = {{"kind", to_string(d.kind)}};
    if (!d.sheet.empty()) j["sheet"] = d.sheet;
    if (!d.table.empty()) j["table"] = d.table;
    if (!d.query.empty()) j["query"] = d.query;
    if (d.in_database) j["fits"] = "in-database";
    return j;
}

void read_source_place(const Reader& r, const json& j, const std::string& where, DataSource& s) {
    if (j.is_null() || j.empty()) return;
    const std::string kind = r.text(j, "kind", where, true);
    if (!source_kind_from_string(kind, s.kind))
        r.fail(where + ".kind",
               "unknown source kind \"" + kind + "\" (expected text-file, workbook, sqlite or postgresql)");
    s.sheet = r.text(j, "sheet", where, false);
    s.table = r.text(j, "table", where, false);
    s.query = r.text(j, "query", where, false);
    const bool database = s.kind == SourceKind::SQLite || s.kind == SourceKind::PostgreSQL;
    if (!s.sheet.empty() && s.kind != SourceKind::Workbook) r.fail(where + ".sheet", "only a workbook has sheets");
    if (database && s.table.empty() == s.query.empty())
        r.fail(where, "a database source needs exactly one of \"table\" and \"query\"");
    if (!database && (!s.table.empty() || !s.query.empty())) r.fail(where, "only a database has tables and queries");
    const std::string fits = r.text(j, "fits", where, false);
    if (!fits.empty() && fits != "in-database")
        r.fail(where + ".fits", "unknown value \"" + fits + "\" (expected in-database, or no \"fits\")");
    s.in_database = !fits.empty();
    if (s.in_database && s.kind != SourceKind::PostgreSQL)
        r.fail(where + ".fits", "only a PostgreSQL source fits in the database");
}

void read_datasets(const Reader& r, const json& doc, Project& p) {
    const json& datasets = r.array(doc, "datasets", "top level");
    for (std::size_t i = 0; i < datasets.size(); ++i) {
        const std::string where = "datasets[" + std::to_string(i) + "]";
        const json& d = datasets[i];
        if (!d.is_object()) r.fail(where, "expected an object");
        DataSource s;
        s.id = r.text(d, "id", where, true);
        s.path = r.text(d, "path", where, true);
        s.sha256 = r.text(d, "sha256", where, false);
        s.import = import_from_json(r, r.object(d, "import", where, false), where + ".import");
        s.retyped = kinds_from_json(r, r.object(d, "retyped", where, false), where + ".retyped");
        read_source_place(r, r.object(d, "source", where, false), where + ".source", s);
        if (p.dataset(s.id)) r.fail(where + ".id", "the id \"" + s.id + "\" is used twice");
        p.datasets.push_back(std::move(s));
    }
}

void read_recipes(const Reader& r, const json& doc, Project& p) {
    const json& derived = r.array(doc, "derived_columns", "top level");
    for (std::size_t i = 0; i < derived.size(); ++i) {
        const std::string where = "derived_columns[" + std::to_string(i) + "]";
        const json& d = derived[i];
        if (!d.is_object()) r.fail(where, "expected an object");
        DerivedRecipe rec;
        rec.dataset = r.text(d, "dataset", where, true);
        rec.name = r.text(d, "name", where, true);
        rec.kind = r.choice(d, "kind", where, kRecipeWords, std::optional<RecipeKind>());
        rec.source = r.text(d, "source", where, true);
        rec.other = r.text(d, "other", where, false);
        rec.level = r.text(d, "level", where, false);
        rec.value = r.number(d, "value", where, 0.0);
        if (!p.dataset(rec.dataset)) r.fail(where + ".dataset", "no dataset has the id \"" + rec.dataset + "\"");
        p.derived.push_back(std::move(rec));
    }
}

Roles read_roles(const Reader& r, const json& j, const std::string& where) {
    const json& roles = r.object(j, "roles", where, false);
    const std::string rw = where + ".roles";
    Roles out;
    out.outcome = r.text(roles, "outcome", rw, false);
    out.focal = r.text(roles, "focal", rw, false);
    out.moderator = r.text(roles, "moderator", rw, false);
    out.second_moderator = r.text(roles, "second_moderator", rw, false);
    out.controls = r.texts(roles, "controls", rw);
    out.weights = r.text(roles, "weights", rw, false);
    out.clusters = r.text(roles, "clusters", rw, false);
    out.exposure = r.text(roles, "exposure", rw, false);
    return out;
}

// A whole number in [lo, hi] (or the fallback when absent), naming the key when not.
double whole_number(const Reader& r, const json& j, const char* key, const std::string& where, double fallback,
                    double lo, double hi, const std::string& rule) {
    const double v = r.number(j, key, where, fallback);
    if (v != std::floor(v)) r.fail(where + "." + key, "expected a whole number");
    if (!(v >= lo && v <= hi)) r.fail(where + "." + key, rule);
    return v;
}

// The straight-line check's switches (binned estimates, smooth curve).
void read_straight_line_check(const Reader& r, const json& probe, const std::string& pw, ProbeSettings& out) {
    out.show_binned = r.boolean(probe, "binned_estimates", pw, false);
    out.bins = static_cast<int>(whole_number(r, probe, "bins", pw, out.bins, 2, 50, "must lie between 2 and 50 bins"));
    out.show_smooth = r.boolean(probe, "smooth_curve", pw, false);
    out.smooth_bandwidth = r.number(probe, "smooth_bandwidth", pw, out.smooth_bandwidth);
    if (!std::isnan(out.smooth_bandwidth) && !(out.smooth_bandwidth > 0 && std::isfinite(out.smooth_bandwidth)))
        r.fail(pw + ".smooth_bandwidth", "must be a positive number (leave it out to choose it by cross-validation)");
    const double reps = whole_number(r, probe, "smooth_replicates", pw, out.smooth_replicates, 0, 100000,
                                     "must be 0 (no band) or between 100 and 100,000 replicates");
    if (reps > 0 && reps < 100)
        r.fail(pw + ".smooth_replicates", "must be 0 (no band) or between 100 and 100,000 replicates");
    out.smooth_replicates = static_cast<int>(reps);
    const auto seed = probe.find("smooth_seed");
    if (seed != probe.end()) {
        if (!seed->is_number_unsigned()) r.fail(pw + ".smooth_seed", "expected a whole number of at least 0");
        out.smooth_seed = seed->get<std::uint64_t>();
    }
}

ProbeSettings read_probe(const Reader& r, const json& j, const std::string& where) {
    const json& probe = r.object(j, "probe", where, false);
    const std::string pw = where + ".probe";
    ProbeSettings out;
    out.current = r.number(probe, "current", pw, out.current);
    out.pinned = r.numbers(probe, "pinned", pw);
    out.second_value = r.number(probe, "second_value", pw, out.second_value);
    out.scale = r.choice(probe, "scale", pw, kScaleWords, std::optional(ProbeScale::Model));
    out.averaging = r.choice(probe, "averaging", pw, kAveragingWords, std::optional(Averaging::Sample));
    out.simultaneous_band = r.boolean(probe, "simultaneous_band", pw, false);
    out.show_points = r.boolean(probe, "show_points", pw, true);
    out.show_gaps = r.boolean(probe, "show_gaps", pw, true);
    out.jitter = r.boolean(probe, "jitter", pw, true);
    out.adjustment = r.choice(probe, "adjustment", pw, kAdjustmentWords, std::optional(Adjustment::Holm));
    out.extend_to_boundaries = r.boolean(probe, "extend_to_boundaries", pw, false);
    read_straight_line_check(r, probe, pw, out);
    return out;
}

FigureSettings read_figure(const Reader& r, const json& j, const std::string& where) {
    const json& fig = r.object(j, "figure", where, false);
    const std::string fw = where + ".figure";
    FigureSettings f;
    f.preset = r.choice(fig, "preset", fw, kPresetWords, std::optional(SizePreset::Memo));
    f.width_in = r.number(fig, "width_in", fw, f.width_in);
    f.height_in = r.number(fig, "height_in", fw, f.height_in);
    using L = FigureLimits;
    const double dpi = r.number(fig, "dpi", fw, f.dpi);
    if (!(dpi >= L::min_dpi && dpi <= L::max_dpi))
        r.fail(fw + ".dpi", "must lie between " + std::to_string(L::min_dpi) + " and " + std::to_string(L::max_dpi));
    if (dpi != std::floor(dpi)) r.fail(fw + ".dpi", "expected a whole number");
    f.dpi = static_cast<int>(dpi);
    f.font_family = r.text(fig, "font_family", fw, false, f.font_family);
    f.font_pt = r.number(fig, "font_pt", fw, f.font_pt);
    if (!(f.font_pt >= L::min_font_pt && f.font_pt <= L::max_font_pt))
        r.fail(fw + ".font_pt",
               "must lie between " + exact_text(L::min_font_pt) + " and " + exact_text(L::max_font_pt) + " points");
    f.greyscale = r.boolean(fig, "greyscale", fw, false);
    f.caption = r.boolean(fig, "caption", fw, true);
    f.mark_slider = r.boolean(fig, "mark_slider", fw, false);
    const auto inches = [](double v) { return v >= L::min_inches && v <= L::max_inches; };
    if (!(inches(f.width_in) && inches(f.height_in)))
        r.fail(fw, "width and height must lie between " + exact_text(L::min_inches) + " and " +
                       exact_text(L::max_inches) + " inches");
    if (!L::pixels_fit(f.width_in, f.height_in, f.dpi))
        r.fail(fw, exact_text(f.width_in) + " × " + exact_text(f.height_in) + " in at " + std::to_string(f.dpi) +
                       " DPI is " + format_count(L::side_pixels(f.width_in, f.dpi)) + " × " +
                       format_count(L::side_pixels(f.height_in, f.dpi)) + " pixels, over the limit of " +
                       format_count(static_cast<long long>(L::max_pixels)) + " pixels for a figure; at this size " +
                       "the DPI may be at most " + std::to_string(L::max_dpi_for(f.width_in, f.height_in)));
    return f;
}

// The Groups role and the multilevel settings (defaults when absent).
MultilevelSpec read_multilevel(const Reader& r, const json& j, const std::string& where) {
    MultilevelSpec m;
    m.groups = r.text(r.object(j, "roles", where, false), "groups", where + ".roles", false);
    const json& ml = r.object(j, "multilevel", where, false);
    const std::string mw = where + ".multilevel";
    m.random_slopes = r.texts(ml, "random_slopes", mw);
    m.estimation = r.choice(ml, "estimation", mw, kEstimationWords, std::optional(MixedEstimation::Reml));
    m.covariance = r.choice(ml, "random_covariance", mw, kRandomCovarianceWords, std::optional(RandomCovariance::Full));
    m.df = r.choice(ml, "df", mw, kDfWords, std::optional(FixedEffectDf::Satterthwaite));
    m.centre_within = r.texts(ml, "centre_within", mw);
    m.group_means = r.texts(ml, "group_means", mw);
    return m;
}

Analysis read_analysis(const Reader& r, const json& j, const std::string& where, const Project& p) {
    if (!j.is_object()) r.fail(where, "expected an object");
    Analysis a;
    a.id = r.text(j, "id", where, true);
    a.name = r.text(j, "name", where, false, a.id);
    a.dataset = r.text(j, "dataset", where, true);
    if (!p.dataset(a.dataset)) r.fail(where + ".dataset", "no dataset has the id \"" + a.dataset + "\"");
    if (p.analysis(a.id)) r.fail(where + ".id", "the id \"" + a.id + "\" is used twice");
    a.roles = read_roles(r, j, where);
    a.multilevel = read_multilevel(r, j, where);
    a.family = r.choice(j, "family", where, kFamilyWords, std::optional(Family::Linear));
    a.se = r.choice(j, "standard_errors", where, kSeWords, std::optional(SeKind::Classical));
    a.level = r.number(j, "level", where, 0.95);
    if (!(a.level > 0 && a.level < 1)) r.fail(where + ".level", "must lie strictly between 0 and 1");
    a.centring = r.choice(j, "centring", where, kCentringWords, std::optional(Centring::None));
    a.probe = read_probe(r, j, where);
    a.figure = read_figure(r, j, where);
    a.memo_notes = r.text(j, "memo_notes", where, false);
    const json& refs = r.object(j, "reference_levels", where, false);
    for (auto it = refs.begin(); it != refs.end(); ++it)
        a.reference_levels[it.key()] = r.text(refs, it.key().c_str(), where + ".reference_levels", true);
    return a;
}

void read_figures(const Reader& r, const json& doc, Project& p) {
    const json& figures = r.array(doc, "figures", "top level");
    for (std::size_t i = 0; i < figures.size(); ++i) {
        const std::string where = "figures[" + std::to_string(i) + "]";
        const json& j = figures[i];
        if (!j.is_object()) r.fail(where, "expected an object");
        FigureEntry f;
        f.id = r.text(j, "id", where, true);
        f.name = r.text(j, "name", where, false, f.id);
        f.analysis = r.text(j, "analysis", where, true);
        f.plot = r.choice(j, "plot", where, kPlotWords, std::optional(FigurePlot::Lines));
        if (!p.analysis(f.analysis)) r.fail(where + ".analysis", "no analysis has the id \"" + f.analysis + "\"");
        for (const auto& other : p.figures)
            if (other.id == f.id) r.fail(where + ".id", "the id \"" + f.id + "\" is used twice");
        p.figures.push_back(std::move(f));
    }
}

}  // namespace

const char* to_string(RecipeKind kind) { return word_of(kRecipeWords, kind); }
const char* to_string(Centring centring) { return word_of(kCentringWords, centring); }
const char* to_string(SizePreset preset) { return word_of(kPresetWords, preset); }
const char* to_string(FigurePlot plot) { return word_of(kPlotWords, plot); }
bool is_check_plot(FigurePlot plot) {
    return plot == FigurePlot::Residuals || plot == FigurePlot::QQ || plot == FigurePlot::Influence;
}

bool ProbeSettings::operator==(const ProbeSettings& o) const {
    return same_number(current, o.current) && pinned == o.pinned && same_number(second_value, o.second_value) &&
           scale == o.scale && averaging == o.averaging && simultaneous_band == o.simultaneous_band &&
           show_points == o.show_points && show_gaps == o.show_gaps && adjustment == o.adjustment &&
           extend_to_boundaries == o.extend_to_boundaries && jitter == o.jitter && show_binned == o.show_binned &&
           bins == o.bins && show_smooth == o.show_smooth && same_number(smooth_bandwidth, o.smooth_bandwidth) &&
           smooth_replicates == o.smooth_replicates && smooth_seed == o.smooth_seed;
}

bool DataSource::operator==(const DataSource& o) const {
    return id == o.id && path == o.path && sha256 == o.sha256 && import.delimiter == o.import.delimiter &&
           import.header == o.import.header && import.missing_tokens == o.import.missing_tokens &&
           import.decimal_comma == o.import.decimal_comma && import.column_kinds == o.import.column_kinds &&
           import.text_as_missing == o.import.text_as_missing && retyped == o.retyped && kind == o.kind &&
           sheet == o.sheet && table == o.table && query == o.query && in_database == o.in_database;
}

bool Project::operator==(const Project& o) const {
    return schema_version == o.schema_version && datasets == o.datasets && derived == o.derived &&
           analyses == o.analyses && figures == o.figures;
}

bool Analysis::operator==(const Analysis& o) const {
    return id == o.id && name == o.name && dataset == o.dataset && roles == o.roles && family == o.family &&
           se == o.se && level == o.level && centring == o.centring && reference_levels == o.reference_levels &&
           multilevel == o.multilevel && probe == o.probe && figure == o.figure && memo_notes == o.memo_notes;
}

const DataSource* Project::dataset(const std::string& id) const {
    for (const auto& d : datasets)
        if (d.id == id) return &d;
    return nullptr;
}

const Analysis* Project::analysis(const std::string& id) const {
    for (const auto& a : analyses)
        if (a.id == id) return &a;
    return nullptr;
}

Analysis* Project::analysis(const std::string& id) {
    for (auto& a : analyses)
        if (a.id == id) return &a;
    return nullptr;
}

std::vector<DerivedRecipe> Project::recipes_for(const std::string& dataset_id) const {
    std::vector<DerivedRecipe> out;
    for (const auto& r : derived)
        if (r.dataset == dataset_id) out.push_back(r);
    return out;
}

std::string Project::unique_id(const std::string& base) const {
    std::set<std::string> used;
    for (const auto& d : datasets) used.insert(d.id);
    for (const auto& a : analyses) used.insert(a.id);
    for (const auto& f : figures) used.insert(f.id);
    const std::string stem = base.empty() ? std::string("item") : base;
    if (!used.count(stem)) return stem;
    for (int k = 2;; ++k) {
        const std::string candidate = stem + "-" + std::to_string(k);
        if (!used.count(candidate)) return candidate;
    }
}

std::string project_to_json(const Project& p) {
    json doc;
    doc["schema_version"] = kProjectSchemaVersion;
    doc["program"] = "Moderato " MODERATO_VERSION;
    json datasets = json::array();
    for (const auto& d : p.datasets) {
        json entry = {{"id", d.id}, {"path", d.path}, {"sha256", d.sha256}, {"import", import_to_json(d.import)}};
        if (!d.retyped.empty()) entry["retyped"] = kinds_to_json(d.retyped);
        if (d.kind != SourceKind::TextFile) entry["source"] = source_place_to_json(d);
        datasets.push_back(std::move(entry));
    }
    doc["datasets"] = datasets;
    json derived = json::array();
    for (const auto& r : p.derived) derived.push_back(recipe_to_json(r));
    doc["derived_columns"] = derived;
    json analyses = json::array();
    for (const auto& a : p.analyses) analyses.push_back(analysis_to_json(a));
    doc["analyses"] = analyses;
    json figures = json::array();
    for (const auto& f : p.figures)
        figures.push_back({{"id", f.id}, {"name", f.name}, {"analysis", f.analysis}, {"plot", to_string(f.plot)}});
    doc["figures"] = figures;
    // Text that is not UTF-8 (none should reach here: the CSV reader and the
    // project reader refuse it) is written with U+FFFD rather than failing the save.
    return doc.dump(2, ' ', false, json::error_handler_t::replace) + "\n";
}

Project project_from_json(const std::string& text, const std::string& name) {
    json doc = parse_document(text, name);
    const Reader r(name);
    try {
        const long long version = schema_version(r, doc, name);
        Project p;
        if (version < kProjectSchemaVersion) detail::migrate_project(doc, version, p.migration_notes);
        read_datasets(r, doc, p);
        read_recipes(r, doc, p);
        const json& analyses = r.array(doc, "analyses", "top level");
        for (std::size_t i = 0; i < analyses.size(); ++i)
            p.analyses.push_back(read_analysis(r, analyses[i], "analyses[" + std::to_string(i) + "]", p));
        read_figures(r, doc, p);
        return p;
    } catch (const json::exception& e) {
        // The readers check each value's type before taking it; should one be
        // missed, the file is still what is wrong, so it is reported as such.
        throw InputError(name + ": a value of an unexpected kind (" + std::string(e.what()) +
                         "); the file was not changed");
    }
}

Project read_project_file(const std::string& path) {
    // A project holds settings, never data: a file far larger than any
    // project is refused before it is read into memory.
    constexpr std::uintmax_t kMaxBytes = std::uintmax_t{64} << 20;
    std::error_code ec;
    const std::uintmax_t size = fs::file_size(path, ec);
    if (!ec && size > kMaxBytes)
        throw InputError(path + ": " + std::to_string(size >> 20) +
                         " MB is too large for a Moderato project (at most 64 MB: a project holds settings, not "
                         "data); the file was not changed");
    return project_from_json(read_file_bytes(path), path);
}

void write_project_file(const Project& project, const std::string& path) {
    write_file_atomically(path, project_to_json(project));
}

ModelSpec model_spec(const Analysis& a, const std::map<std::string, std::string>& centred) {
    const auto name = [&](const std::string& col) {
        const auto it = centred.find(col);
        return it == centred.end() ? col : it->second;
    };
    ModelSpec spec;
    spec.outcome = a.roles.outcome;
    spec.family = a.family;
    spec.se = a.se;
    spec.level = a.level;
    spec.weights = a.roles.weights;
    spec.cluster = a.roles.clusters;
    spec.exposure = a.roles.exposure;
    const std::string f = name(a.roles.focal), m = name(a.roles.moderator), w = name(a.roles.second_moderator);
    if (!f.empty()) spec.predictors.push_back(f);
    if (!m.empty()) spec.predictors.push_back(m);
    if (!w.empty()) spec.predictors.push_back(w);
    for (const auto& c : a.roles.controls) spec.predictors.push_back(name(c));
    if (!f.empty() && !m.empty()) {
        if (w.empty()) spec.interactions.push_back({f, m});
        else spec.interactions.push_back({f, m, w});
    }
    // The multilevel options name the model's columns, so they follow a
    // centred copy: centring within groups or taking group means of x − c
    // gives the same within-group deviations, and group means shifted by c.
    spec.multilevel = a.multilevel;
    for (auto* list : {&spec.multilevel.random_slopes, &spec.multilevel.centre_within, &spec.multilevel.group_means})
        for (auto& s : *list) s = name(s);
    // A reference level chosen for a column that has since left the model is kept for when it returns.
    for (const auto& [column, level] : a.reference_levels)
        if (std::find(spec.predictors.begin(), spec.predictors.end(), column) != spec.predictors.end())
            spec.reference_levels[column] = level;
    return spec;
}

std::string resolve_data_path(const DataSource& source, const std::string& project_path) {
    if (source.kind == SourceKind::PostgreSQL) return source.path;  // an address, not a file
    const fs::path p(source.path);
    if (p.is_absolute()) return p.lexically_normal().string();
    return (fs::path(project_path).parent_path() / p).lexically_normal().string();
}

SourceSpec source_spec(const DataSource& source, const std::string& file) {
    return {source.kind, file, source.sheet, source.table, source.query};
}

std::string relative_data_path(const std::string& data_path, const std::string& project_path) {
    std::error_code ec;
    const fs::path data = fs::absolute(data_path, ec).lexically_normal();
    const fs::path dir = fs::absolute(fs::path(project_path), ec).parent_path().lexically_normal();
    const fs::path rel = data.lexically_relative(dir);
    if (rel.empty()) return data.generic_string();
    // Inside the folder, or one level out (a sibling folder): keep it relative.
    int ups = 0;
    for (const auto& part : rel)
        if (part == "..") ++ups;
    return ups <= 1 ? rel.generic_string() : data.generic_string();
}

}  // namespace moderato
