// Running a shell command and reading what it printed, for the tests that
// read our output back with an outside program (Python, pdflatex, cmark-gfm).
#pragma once

#include <array>
#include <cstdio>
#include <string>

namespace moderato::test {

// The standard output of `command` run by /bin/sh ("" when it cannot run).
// `status`, when given, receives pclose()'s status (-1 when it could not start).
inline std::string run_command(const std::string& command, int* status = nullptr) {
    std::string out;
    FILE* pipe = ::popen(command.c_str(), "r");
    if (!pipe) {
        if (status) *status = -1;
        return out;
    }
    std::array<char, 65536> buffer{};
    std::size_t got;
    while ((got = std::fread(buffer.data(), 1, buffer.size(), pipe)) > 0) out.append(buffer.data(), got);
    const int st = ::pclose(pipe);
    if (status) *status = st;
    return out;
}

// `s` as one word for /bin/sh: in single quotes, each ' written as '\''.
inline std::string shell_quote(const std::string& s) {
    std::string q = "'";
    for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

}  // namespace moderato::test
