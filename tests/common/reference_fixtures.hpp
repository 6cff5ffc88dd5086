// Where the outside reference values are read from: the files the reference
// scripts (tests/reference/*.py) wrote in this build's live run (ctest's
// reference.statsmodels_live puts them in $MODERATO_REFERENCE_OUT when the
// Python libraries are installed), else the committed copies in
// tests/reference/fixtures. For the core and CLI suites (MODERATO_REFERENCE_DIR);
// and the data and model a fixture describes.
#pragma once

#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "moderato/estimation/model.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::test {

// tests/reference/fixtures in the source tree.
inline std::filesystem::path committed_fixture_dir() {
    return std::filesystem::path(MODERATO_REFERENCE_DIR) / "fixtures";
}

// The folder of one script's fixtures: the live run's when it wrote `marker`
// (a file that script writes), else the committed folder.
inline std::filesystem::path reference_fixture_dir(const std::string& marker) {
    if (const char* live = std::getenv("MODERATO_REFERENCE_OUT"); live && *live) {
        const std::filesystem::path dir(live);
        if (std::filesystem::exists(dir / marker)) return dir;
    }
    return committed_fixture_dir();
}

// One fixture file: the live run's when there is one, else the committed copy.
inline std::filesystem::path reference_fixture(const std::string& name) { return reference_fixture_dir(name) / name; }

// A fixture file parsed; a test failure (and an empty object) when it cannot be read.
inline nlohmann::json read_fixture_json(const std::filesystem::path& path) {
    std::ifstream in(path);
    if (!in) {
        ADD_FAILURE() << "cannot open the fixture " << path.string()
                      << " (the scripts in tests/reference write it; tests/reference/README.md)";
        return nlohmann::json::object();
    }
    return nlohmann::json::parse(in);
}

// The data and model a statsmodels fixture describes: its CSV (categorical
// columns declared), outcome, predictors, interactions, family and reference
// levels and exposure, with the standard errors `se` (and the fixture's cluster column
// for cluster-robust ones).
struct FixtureModel {
    Table table;
    ModelSpec spec;
};

inline FixtureModel fixture_model(const nlohmann::json& j, const std::filesystem::path& json_path, SeKind se) {
    const nlohmann::json& s = j.at("spec");
    CsvOptions o;
    ModelSpec spec;
    for (const auto& [col, ref] : s.at("categorical").items()) {
        o.column_kinds[col] = ColumnKind::Categorical;
        spec.reference_levels[col] = ref.get<std::string>();
    }
    spec.outcome = s.at("outcome").get<std::string>();
    spec.predictors = s.at("predictors").get<std::vector<std::string>>();
    spec.interactions = s.at("interactions").get<std::vector<std::vector<std::string>>>();
    spec.family = parse_family(s.at("family").get<std::string>());
    if (s.contains("exposure") && !s.at("exposure").is_null()) spec.exposure = s.at("exposure").get<std::string>();
    spec.se = se;
    if (se == SeKind::Cluster) spec.cluster = s.at("cluster").get<std::string>();
    return {read_csv((json_path.parent_path() / j.at("data").get<std::string>()).string(), o), std::move(spec)};
}

}  // namespace moderato::test
