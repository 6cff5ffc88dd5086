// A fresh folder under the system's temporary folder for one test, removed
// with everything in it afterwards.
#pragma once

#include <stdlib.h>  // mkdtemp

#include <filesystem>
#include <stdexcept>
#include <string>

#include "common/file_bytes.hpp"

namespace moderato::test {

class TempDir {
public:
    // `tag` goes into the folder's name ("moderato-<tag>-XXXXXX"), to tell whose it is.
    explicit TempDir(const std::string& tag = "test") {
        std::string pattern = (std::filesystem::temp_directory_path() / ("moderato-" + tag + "-XXXXXX")).string();
        if (!::mkdtemp(pattern.data())) throw std::runtime_error("cannot create a temporary folder " + pattern);
        path_ = pattern;
    }
    // A test may have made the folder read-only: it is made writable again first.
    ~TempDir() {
        std::error_code ec;
        std::filesystem::permissions(path_, std::filesystem::perms::owner_all, std::filesystem::perm_options::add, ec);
        std::filesystem::remove_all(path_, ec);
    }
    TempDir(const TempDir&) = delete;
    TempDir& operator=(const TempDir&) = delete;

    const std::filesystem::path& path() const { return path_; }
    std::filesystem::path operator/(const std::string& name) const { return path_ / name; }

    // Writes a file in the folder (folders in `name` are created); returns its path.
    std::filesystem::path write(const std::string& name, const std::string& bytes) const {
        const std::filesystem::path file = path_ / name;
        write_file(file, bytes);
        return file;
    }

private:
    std::filesystem::path path_;
};

}  // namespace moderato::test
