// Small private helpers for messages.
#pragma once

#include <string>
#include <vector>

namespace moderato::detail {

inline std::string join(const std::vector<std::string>& parts, const std::string& sep) {
    std::string out;
    for (std::size_t i = 0; i < parts.size(); ++i) {
        if (i) out += sep;
        out += parts[i];
    }
    return out;
}

// "a", "a and b", "a, b and c".
inline std::string join_and(const std::vector<std::string>& parts) {
    std::string out;
    for (std::size_t i = 0; i < parts.size(); ++i) {
        if (i) out += i + 1 == parts.size() ? " and " : ", ";
        out += parts[i];
    }
    return out;
}

inline std::string quoted(const std::string& s) { return "'" + s + "'"; }

// Display width of a UTF-8 string (code points).
inline std::size_t display_width(const std::string& s) {
    std::size_t w = 0;
    for (unsigned char c : s)
        if ((c & 0xC0) != 0x80) ++w;
    return w;
}

}  // namespace moderato::detail
