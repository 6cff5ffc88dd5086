// Small private helpers for messages.
#pragma once

#include <cstdio>
#include <string>
#include <vector>

namespace moderato::detail {

inline std::string fmt_num(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.10g", v);
    return buf;
}

// Four significant digits, for prose.
inline std::string fmt_short(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.4g", v);
    return buf;
}

inline std::string join(const std::vector<std::string>& parts, const std::string& sep) {
    std::string out;
    for (std::size_t i = 0; i < parts.size(); ++i) {
        if (i) out += sep;
        out += parts[i];
    }
    return out;
}

inline std::string quoted(const std::string& s) { return "'" + s + "'"; }

}  // namespace moderato::detail
