// Reading and writing a whole file as bytes, for tests that compare what a
// program wrote or prepare its input.
#pragma once

#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>

namespace moderato::test {

// The file's bytes ("" when it cannot be read).
inline std::string read_file(const std::filesystem::path& path) {
    std::ifstream in(path, std::ios::binary);
    return std::string(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
}

// Writes `bytes` as the whole file, creating the folders above it.
inline void write_file(const std::filesystem::path& path, const std::string& bytes) {
    if (path.has_parent_path()) std::filesystem::create_directories(path.parent_path());
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
}

}  // namespace moderato::test
