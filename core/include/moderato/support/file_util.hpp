// Small file helpers: SHA-256 of a file or a string, atomic writes.
#pragma once

#include <string>
#include <string_view>

namespace moderato {

// Lower-case hex SHA-256 (FIPS 180-4) of bytes / of a file's contents.
// InputError naming the file when it cannot be read.
std::string sha256_hex(std::string_view bytes);
std::string sha256_file(const std::string& path);

// Writes `content` to `path` atomically: a temporary file in the same folder,
// flushed and synced, then renamed over `path`. On failure the temporary file
// is removed, `path` is left as it was, and InputError names the file.
void write_file_atomically(const std::string& path, std::string_view content);

// The whole file as bytes; InputError naming the file when unreadable.
std::string read_file_bytes(const std::string& path);

namespace detail {
// For tests: SHA-256 by the portable code only (sha256_hex uses the x86 SHA
// extensions where the processor has them), and whether it does.
std::string sha256_hex_portable(std::string_view bytes);
bool sha256_uses_cpu_extensions();
}  // namespace detail

}  // namespace moderato
