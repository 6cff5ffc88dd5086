// Where the outside reference values are read from: the files the reference
// scripts (tests/reference/*.py) wrote in this build's live run (ctest's
// reference.statsmodels_live puts them in $MODERATO_REFERENCE_OUT when the
// Python libraries are installed), else the committed copies in
// tests/reference/fixtures. For the core and CLI suites (MODERATO_REFERENCE_DIR).
#pragma once

#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>

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

}  // namespace moderato::test
