// Small file helpers: atomic writes, reading a whole file. (SHA-256 is in sha256.hpp.)
#pragma once

#include <string>
#include <string_view>

namespace moderato {

// Writes `content` to `path` atomically: a temporary file in the same folder,
// flushed and synced, then renamed over `path`. On failure the temporary file
// is removed, `path` is left as it was, and InputError names the file.
void write_file_atomically(const std::string& path, std::string_view content);

// The whole file as bytes; InputError naming the file when unreadable.
std::string read_file_bytes(const std::string& path);

}  // namespace moderato
