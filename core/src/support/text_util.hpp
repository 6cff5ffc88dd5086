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

inline std::string quoted(const std::string& s) { return "'" + s + "'"; }

}  // namespace moderato::detail
