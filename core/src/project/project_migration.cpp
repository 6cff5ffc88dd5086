#include "project/project_migration.hpp"

#include "moderato/project/project.hpp"

namespace moderato::detail {

using nlohmann::json;

namespace {

// Applies `change` to every analysis object of the document.
template <class F>
void for_each_analysis(json& doc, F change) {
    const auto list = doc.find("analyses");
    if (list == doc.end() || !list->is_array()) return;
    for (auto& a : *list)
        if (a.is_object()) change(a);
}

// Replaces the text value of `key` in `object` by its new word, if it has one.
void rename_value(json& object, const char* key, const std::vector<std::pair<const char*, const char*>>& words) {
    const auto it = object.find(key);
    if (it == object.end() || !it->is_string()) return;
    for (const auto& [old_word, new_word] : words)
        if (*it == old_word) {
            *it = new_word;
            return;
        }
}

// Schema 0 (the draft format before schema_version 1) kept the roles at the
// top level of each analysis; version 1 groups them under "roles".
void migrate_from_0(json& doc, std::vector<std::string>& changes) {
    for_each_analysis(doc, [](json& a) {
        if (a.contains("roles")) return;
        json roles = json::object();
        for (const char* key : {"outcome", "focal", "moderator", "second_moderator", "controls", "weights", "clusters"})
            if (a.contains(key)) {
                roles[key] = a[key];
                a.erase(key);
            }
        a["roles"] = roles;
    });
    changes.push_back("the roles of each analysis are grouped under \"roles\"");
}

// Schema 1 stored the probe scale as "link"/"response" and the standard
// errors as "se": "classical"/"cluster"…; version 2 uses the words of our
// own output contract (ARCHITECTURE.md, docs/cli-output.md).
void migrate_from_1(json& doc, std::vector<std::string>& changes) {
    for_each_analysis(doc, [](json& a) {
        if (const auto probe = a.find("probe"); probe != a.end() && probe->is_object())
            rename_value(*probe, "scale", {{"link", "model"}, {"response", "outcome"}});
        if (const auto se = a.find("se"); se != a.end()) {
            json value = *se;
            a.erase(se);
            a["standard_errors"] = value;
            rename_value(a, "standard_errors", {{"classical", "model-based"}, {"cluster", "cluster-robust"}});
        }
    });
    changes.push_back("the probe scale \"link\" is now \"model\" and \"response\" is now \"outcome\"");
    changes.push_back(
        "\"se\" is now \"standard_errors\", with \"classical\" as \"model-based\" and \"cluster\" as "
        "\"cluster-robust\"");
}

}  // namespace

void migrate_project(json& doc, long long version, std::vector<std::string>& notes) {
    std::vector<std::string> changes;
    if (version < 1) migrate_from_0(doc, changes);
    if (version < 2) migrate_from_1(doc, changes);
    doc["schema_version"] = kProjectSchemaVersion;
    std::string note = "The project was saved by an older Moderato (schema " + std::to_string(version) +
                       ") and was brought up to schema " + std::to_string(kProjectSchemaVersion) + ": ";
    for (std::size_t i = 0; i < changes.size(); ++i) note += (i ? "; " : "") + changes[i];
    note += ". The file is unchanged until the project is saved, which writes schema " +
            std::to_string(kProjectSchemaVersion) + ".";
    notes.push_back(note);
}

}  // namespace moderato::detail
