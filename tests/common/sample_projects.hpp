// The sample projects in the repository (sample-projects/<name>/), for the
// core and command-line suites: their paths and a copy to work on. The
// workbench tests have QString versions in tests/ui/ui_test_util.hpp.
#pragma once

#include <filesystem>
#include <string>

namespace moderato::test {

// sample-projects/ beside tests/ (found from MODERATO_TEST_DATA_DIR, tests/data).
inline std::filesystem::path samples_dir() {
    return std::filesystem::path(MODERATO_TEST_DATA_DIR) / ".." / ".." / "sample-projects";
}

// A sample's project file: sample-projects/<name>/<name>.moderato.
inline std::filesystem::path sample_project(const std::string& name) {
    return samples_dir() / name / (name + ".moderato");
}

// A file in a sample's folder (its data file, say).
inline std::filesystem::path sample_file(const std::string& name, const std::string& file) {
    return samples_dir() / name / file;
}

// Copies the files of sample-projects/<name>/ into `into` (created when
// missing); returns the copied project file.
inline std::filesystem::path copy_sample(const std::string& name, const std::filesystem::path& into) {
    std::filesystem::create_directories(into);
    for (const auto& e : std::filesystem::directory_iterator(samples_dir() / name))
        if (e.is_regular_file()) std::filesystem::copy_file(e.path(), into / e.path().filename());
    return into / (name + ".moderato");
}

}  // namespace moderato::test
