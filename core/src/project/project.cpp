// Project documents: JSON reading (with schema checks and migration) and writing.
#include "moderato/project/project.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <set>

#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"

namespace moderato {

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

bool same_number(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

// NaN (meaning "the default") is stored as null.
json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

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
        return it->get<std::string>();
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
            out.push_back(list[i].get<std::string>());
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

    std::string one_of(const json& parent, const char* key, const std::string& where,
                       const std::vector<std::string>& allowed, const std::string& fallback) const {
        const std::string v = text(parent, key, where, false, fallback);
        for (const auto& a : allowed)
            if (v == a) return v;
        std::string list;
        for (const auto& a : allowed) list += (list.empty() ? "" : ", ") + a;
        fail(where + "." + key, "\"" + v + "\" is not one of: " + list);
    }

private:
    std::string name_;
};

json import_to_json(const CsvOptions& o) {
    json j;
    j["delimiter"] = o.delimiter == 0 ? json(nullptr) : json(std::string(1, o.delimiter));
    j["header"] = o.header;
    j["missing_tokens"] = o.missing_tokens;
    j["decimal_comma"] = o.decimal_comma;
    json kinds = json::object();
    for (const auto& [col, kind] : o.column_kinds) kinds[col] = kind == ColumnKind::Numeric ? "numeric" : "categorical";
    j["column_kinds"] = kinds;
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
    const json& kinds = r.object(j, "column_kinds", where, false);
    for (auto it = kinds.begin(); it != kinds.end(); ++it) {
        if (!it->is_string() || (*it != "numeric" && *it != "categorical"))
            r.fail(where + ".column_kinds." + it.key(), "expected \"numeric\" or \"categorical\"");
        o.column_kinds[it.key()] = *it == "numeric" ? ColumnKind::Numeric : ColumnKind::Categorical;
    }
    return o;
}

const std::vector<std::string> kRecipeKinds{"centre-mean", "centre-median", "centre-value", "standardise", "log",
                                            "log1p",       "square",        "dummy",        "product"};
const std::vector<std::string> kPresets{"memo", "single-column", "two-column", "slide", "custom"};
const std::vector<std::string> kPlots{"lines", "effect", "surface", "cells", "residuals", "qq", "influence"};

// Schema 0 (the draft format before schema_version 1) kept the roles at the
// top level of each analysis; version 1 groups them under "roles".
void migrate_from_0(json& doc, std::vector<std::string>& notes) {
    const auto list = doc.find("analyses");
    if (list != doc.end() && list->is_array()) {
        for (auto& a : *list) {
            if (!a.is_object() || a.contains("roles")) continue;
            json roles = json::object();
            for (const char* key :
                 {"outcome", "focal", "moderator", "second_moderator", "controls", "weights", "clusters"})
                if (a.contains(key)) {
                    roles[key] = a[key];
                    a.erase(key);
                }
            a["roles"] = roles;
        }
    }
    doc["schema_version"] = 1;
    notes.push_back(
        "The project was saved by an older Moderato (schema 0) and was brought up to schema 1; "
        "saving it writes schema 1.");
}

// Pinned values: a non-finite one means nothing on a slider (and JSON has no
// number for it), so it is left out rather than written as an unreadable null.
json finite_only(const std::vector<double>& values) {
    json out = json::array();
    for (const double v : values)
        if (std::isfinite(v)) out.push_back(v);
    return out;
}

// Line and column (1-based; the column counts characters, not bytes) of the
// character at byte offset `at`.
std::pair<std::size_t, std::size_t> line_and_column(const std::string& text, std::size_t at) {
    at = std::min(at, text.size());
    std::size_t line = 1, column = 1;
    for (std::size_t i = 0; i < at; ++i) {
        const auto c = static_cast<unsigned char>(text[i]);
        if (c == '\n') {
            ++line;
            column = 1;
        } else if ((c & 0xC0) != 0x80) {  // not a UTF-8 continuation byte
            ++column;
        }
    }
    return {line, column};
}

}  // namespace

bool ProbeSettings::operator==(const ProbeSettings& o) const {
    return same_number(current, o.current) && pinned == o.pinned && same_number(second_value, o.second_value) &&
           scale == o.scale && averaging == o.averaging && simultaneous_band == o.simultaneous_band &&
           show_points == o.show_points && show_gaps == o.show_gaps;
}

bool DataSource::operator==(const DataSource& o) const {
    return id == o.id && path == o.path && sha256 == o.sha256 && import.delimiter == o.import.delimiter &&
           import.header == o.import.header && import.missing_tokens == o.import.missing_tokens &&
           import.decimal_comma == o.import.decimal_comma && import.column_kinds == o.import.column_kinds;
}

bool Project::operator==(const Project& o) const {
    return schema_version == o.schema_version && datasets == o.datasets && derived == o.derived &&
           analyses == o.analyses && figures == o.figures;
}

bool Analysis::operator==(const Analysis& o) const {
    return id == o.id && name == o.name && dataset == o.dataset && roles == o.roles && family == o.family &&
           se == o.se && level == o.level && centring == o.centring && probe == o.probe && figure == o.figure &&
           memo_notes == o.memo_notes;
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
    for (const auto& d : p.datasets)
        datasets.push_back(
            {{"id", d.id}, {"path", d.path}, {"sha256", d.sha256}, {"import", import_to_json(d.import)}});
    doc["datasets"] = datasets;
    json derived = json::array();
    for (const auto& r : p.derived) {
        json j{{"dataset", r.dataset}, {"name", r.name}, {"kind", r.kind}, {"source", r.source}};
        if (!r.other.empty()) j["other"] = r.other;
        if (!r.level.empty()) j["level"] = r.level;
        if (r.kind == "centre-value" || r.value != 0) j["value"] = number_or_null(r.value);
        derived.push_back(j);
    }
    doc["derived_columns"] = derived;
    json analyses = json::array();
    for (const auto& a : p.analyses) {
        json roles{{"outcome", a.roles.outcome},     {"focal", a.roles.focal},
                   {"moderator", a.roles.moderator}, {"second_moderator", a.roles.second_moderator},
                   {"controls", a.roles.controls},   {"weights", a.roles.weights},
                   {"clusters", a.roles.clusters}};
        json probe{{"current", number_or_null(a.probe.current)},
                   {"pinned", finite_only(a.probe.pinned)},
                   {"second_value", number_or_null(a.probe.second_value)},
                   {"scale", a.probe.scale},
                   {"averaging", a.probe.averaging},
                   {"simultaneous_band", a.probe.simultaneous_band},
                   {"show_points", a.probe.show_points},
                   {"show_gaps", a.probe.show_gaps}};
        json figure{{"preset", a.figure.preset},           {"width_in", a.figure.width_in},
                    {"height_in", a.figure.height_in},     {"dpi", a.figure.dpi},
                    {"font_family", a.figure.font_family}, {"font_pt", a.figure.font_pt},
                    {"greyscale", a.figure.greyscale},     {"caption", a.figure.caption}};
        analyses.push_back({{"id", a.id},
                            {"name", a.name},
                            {"dataset", a.dataset},
                            {"roles", roles},
                            {"family", to_string(a.family)},
                            {"se", to_string(a.se)},
                            {"level", a.level},
                            {"centring", a.centring},
                            {"probe", probe},
                            {"figure", figure}});
        // Written only when there are notes, so older projects keep their bytes.
        if (!a.memo_notes.empty()) analyses.back()["memo_notes"] = a.memo_notes;
    }
    doc["analyses"] = analyses;
    json figures = json::array();
    for (const auto& f : p.figures)
        figures.push_back({{"id", f.id}, {"name", f.name}, {"analysis", f.analysis}, {"plot", f.plot}});
    doc["figures"] = figures;
    return doc.dump(2) + "\n";
}

Project project_from_json(const std::string& text, const std::string& name) {
    json doc;
    try {
        doc = json::parse(text);
    } catch (const json::parse_error& e) {
        // e.byte counts the bytes read up to and including the offending one
        // (one past the end for text that stops too early).
        const auto [line, column] = line_and_column(text, e.byte > 0 ? e.byte - 1 : 0);
        // The parser's own reason, without its prefix and its own position.
        std::string reason = e.what();
        const auto colon = reason.find(": ");
        if (colon != std::string::npos && reason.find("parse error") != std::string::npos)
            reason = reason.substr(colon + 2);
        throw InputError(name + ": line " + std::to_string(line) + ", column " + std::to_string(column) +
                         ": the file is not valid JSON, so it is not a Moderato project (" + reason + ")");
    }
    const Reader r(name);
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
    Project p;
    if (version == 0) migrate_from_0(doc, p.migration_notes);

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
        if (p.dataset(s.id)) r.fail(where + ".id", "the id \"" + s.id + "\" is used twice");
        p.datasets.push_back(std::move(s));
    }
    const json& derived = r.array(doc, "derived_columns", "top level");
    for (std::size_t i = 0; i < derived.size(); ++i) {
        const std::string where = "derived_columns[" + std::to_string(i) + "]";
        const json& d = derived[i];
        if (!d.is_object()) r.fail(where, "expected an object");
        DerivedRecipe rec;
        rec.dataset = r.text(d, "dataset", where, true);
        rec.name = r.text(d, "name", where, true);
        rec.kind = r.one_of(d, "kind", where, kRecipeKinds, "");
        rec.source = r.text(d, "source", where, true);
        rec.other = r.text(d, "other", where, false);
        rec.level = r.text(d, "level", where, false);
        rec.value = r.number(d, "value", where, 0.0);
        if (!p.dataset(rec.dataset)) r.fail(where + ".dataset", "no dataset has the id \"" + rec.dataset + "\"");
        p.derived.push_back(std::move(rec));
    }
    const json& analyses = r.array(doc, "analyses", "top level");
    for (std::size_t i = 0; i < analyses.size(); ++i) {
        const std::string where = "analyses[" + std::to_string(i) + "]";
        const json& j = analyses[i];
        if (!j.is_object()) r.fail(where, "expected an object");
        Analysis a;
        a.id = r.text(j, "id", where, true);
        a.name = r.text(j, "name", where, false, a.id);
        a.dataset = r.text(j, "dataset", where, true);
        if (!p.dataset(a.dataset)) r.fail(where + ".dataset", "no dataset has the id \"" + a.dataset + "\"");
        if (p.analysis(a.id)) r.fail(where + ".id", "the id \"" + a.id + "\" is used twice");
        const json& roles = r.object(j, "roles", where, false);
        const std::string rw = where + ".roles";
        a.roles.outcome = r.text(roles, "outcome", rw, false);
        a.roles.focal = r.text(roles, "focal", rw, false);
        a.roles.moderator = r.text(roles, "moderator", rw, false);
        a.roles.second_moderator = r.text(roles, "second_moderator", rw, false);
        a.roles.controls = r.texts(roles, "controls", rw);
        a.roles.weights = r.text(roles, "weights", rw, false);
        a.roles.clusters = r.text(roles, "clusters", rw, false);
        a.family = parse_family(r.one_of(j, "family", where, {"linear", "logistic"}, "linear"));
        a.se = parse_se_kind(
            r.one_of(j, "se", where, {"classical", "hc0", "hc1", "hc2", "hc3", "hc4", "cluster"}, "classical"));
        a.level = r.number(j, "level", where, 0.95);
        if (!(a.level > 0 && a.level < 1)) r.fail(where + ".level", "must lie strictly between 0 and 1");
        a.centring = r.one_of(j, "centring", where, {"none", "mean"}, "none");
        const json& probe = r.object(j, "probe", where, false);
        const std::string pw = where + ".probe";
        a.probe.current = r.number(probe, "current", pw, a.probe.current);
        a.probe.pinned = r.numbers(probe, "pinned", pw);
        a.probe.second_value = r.number(probe, "second_value", pw, a.probe.second_value);
        a.probe.scale = r.one_of(probe, "scale", pw, {"link", "response"}, "link");
        a.probe.averaging = r.one_of(probe, "averaging", pw, {"sample", "values"}, "sample");
        a.probe.simultaneous_band = r.boolean(probe, "simultaneous_band", pw, false);
        a.probe.show_points = r.boolean(probe, "show_points", pw, true);
        a.probe.show_gaps = r.boolean(probe, "show_gaps", pw, true);
        const json& fig = r.object(j, "figure", where, false);
        const std::string fw = where + ".figure";
        a.figure.preset = r.one_of(fig, "preset", fw, kPresets, "memo");
        a.figure.width_in = r.number(fig, "width_in", fw, a.figure.width_in);
        a.figure.height_in = r.number(fig, "height_in", fw, a.figure.height_in);
        const double dpi = r.number(fig, "dpi", fw, a.figure.dpi);
        if (!(dpi >= 36 && dpi <= 2400)) r.fail(fw + ".dpi", "must lie between 36 and 2400");
        if (dpi != std::floor(dpi)) r.fail(fw + ".dpi", "expected a whole number");
        a.figure.dpi = static_cast<int>(dpi);
        a.figure.font_family = r.text(fig, "font_family", fw, false, a.figure.font_family);
        a.figure.font_pt = r.number(fig, "font_pt", fw, a.figure.font_pt);
        a.figure.greyscale = r.boolean(fig, "greyscale", fw, false);
        a.figure.caption = r.boolean(fig, "caption", fw, true);
        if (!(a.figure.width_in > 0 && a.figure.width_in <= 100 && a.figure.height_in > 0 && a.figure.height_in <= 100))
            r.fail(fw, "width and height must lie between 0 and 100 inches");
        a.memo_notes = r.text(j, "memo_notes", where, false);
        p.analyses.push_back(std::move(a));
    }
    const json& figures = r.array(doc, "figures", "top level");
    for (std::size_t i = 0; i < figures.size(); ++i) {
        const std::string where = "figures[" + std::to_string(i) + "]";
        const json& j = figures[i];
        if (!j.is_object()) r.fail(where, "expected an object");
        FigureEntry f;
        f.id = r.text(j, "id", where, true);
        f.name = r.text(j, "name", where, false, f.id);
        f.analysis = r.text(j, "analysis", where, true);
        f.plot = r.one_of(j, "plot", where, kPlots, "lines");
        if (!p.analysis(f.analysis)) r.fail(where + ".analysis", "no analysis has the id \"" + f.analysis + "\"");
        for (const auto& other : p.figures)
            if (other.id == f.id) r.fail(where + ".id", "the id \"" + f.id + "\" is used twice");
        p.figures.push_back(std::move(f));
    }
    return p;
}

Project read_project_file(const std::string& path) { return project_from_json(read_file_bytes(path), path); }

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
    const std::string f = name(a.roles.focal), m = name(a.roles.moderator), w = name(a.roles.second_moderator);
    if (!f.empty()) spec.predictors.push_back(f);
    if (!m.empty()) spec.predictors.push_back(m);
    if (!w.empty()) spec.predictors.push_back(w);
    for (const auto& c : a.roles.controls) spec.predictors.push_back(name(c));
    if (!f.empty() && !m.empty()) {
        if (w.empty()) spec.interactions.push_back({f, m});
        else spec.interactions.push_back({f, m, w});
    }
    return spec;
}

std::string resolve_data_path(const DataSource& source, const std::string& project_path) {
    const fs::path p(source.path);
    if (p.is_absolute()) return p.lexically_normal().string();
    return (fs::path(project_path).parent_path() / p).lexically_normal().string();
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
