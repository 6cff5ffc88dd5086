// Every entry under a folder, to show that an operation wrote, added or
// removed nothing there (a failed open, a refused save, an atomic write that
// leaves no temporary file behind).
#pragma once

#include <filesystem>
#include <map>
#include <string>

#include "common/file_bytes.hpp"

namespace moderato::test {

// A file with its bytes and modification time, or a folder by its name.
struct FolderEntry {
    bool directory = false;
    std::string bytes;
    std::filesystem::file_time_type mtime;
    bool operator==(const FolderEntry&) const = default;
};

// Path -> entry for everything under a folder, hidden entries included.
using FolderSnapshot = std::map<std::string, FolderEntry>;

inline FolderSnapshot snapshot_folder(const std::filesystem::path& dir) {
    FolderSnapshot out;
    for (const auto& e : std::filesystem::recursive_directory_iterator(dir)) {
        FolderEntry s;
        s.directory = e.is_directory();
        if (!s.directory) s.bytes = read_file(e.path());
        s.mtime = std::filesystem::last_write_time(e.path());
        out[e.path().string()] = s;
    }
    return out;
}

// What differs between two snapshots, a line each ("added", "changed" or
// "removed" and the path); "" when nothing does.
inline std::string folder_changes(const FolderSnapshot& before, const FolderSnapshot& after) {
    std::string out;
    for (const auto& [path, e] : after)
        if (!before.count(path)) out += "added " + path + "\n";
        else if (!(before.at(path) == e)) out += "changed " + path + "\n";
    for (const auto& [path, e] : before)
        if (!after.count(path)) out += "removed " + path + "\n";
    return out;
}

}  // namespace moderato::test
