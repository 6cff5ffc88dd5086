// SHA-256 (FIPS 180-4) of bytes and of files, by OpenSSL's libcrypto (which
// uses the processor's SHA instructions where it has them). Projects record
// the SHA-256 of each data file so a changed file is noticed.
#pragma once

#include <atomic>
#include <string>
#include <string_view>

namespace moderato {

// Lower-case hex SHA-256 of bytes / of a file's contents. InputError naming
// the file when it cannot be read.
std::string sha256_hex(std::string_view bytes);
std::string sha256_file(const std::string& path);
// The same, giving up (with an empty result) once `stop` is set: for a hash
// computed beside other work that may be cancelled.
std::string sha256_file(const std::string& path, const std::atomic<bool>& stop);

}  // namespace moderato
