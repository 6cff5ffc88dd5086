// Bringing an older project document up to the current schema, in memory:
// the JSON is rewritten step by step (0 → 1 → 2) before it is read, and a
// note says what changed. The file on disk is never touched here.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace moderato::detail {

// `doc` holds a project of schema `version` (0 ≤ version < current); on
// return it holds the current schema, and one note in `notes` names the old
// and new schema and every kind of change made.
void migrate_project(nlohmann::json& doc, long long version, std::vector<std::string>& notes);

}  // namespace moderato::detail
