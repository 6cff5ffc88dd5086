// Small file helpers: atomic writes, reading a whole file. (SHA-256 is in sha256.hpp.)
#pragma once

#include <string>
#include <string_view>

namespace moderato {

// Writes `content` to `path` atomically: a temporary file in the same folder,
// flushed and synced, then renamed over `path`. On failure the temporary file
// is removed, `path` is left as it was, and InputError names the file. The
// temporary files a killed writer left in that folder are removed first
// (remove_stale_temp_files).
void write_file_atomically(const std::string& path, std::string_view content);

// Removes from `dir` the temporary files of atomic writes whose writing
// process no longer exists (it was killed or crashed before its rename);
// another process's file that is still being written is left alone. Returns
// how many were removed; a folder that cannot be listed removes none.
int remove_stale_temp_files(const std::string& dir);

// The whole file as bytes; InputError naming the file when unreadable.
std::string read_file_bytes(const std::string& path);

}  // namespace moderato
