// A seeded benchmark project on disk: a CSV of the rows of bench_data.hpp
// (outcome y, focal predictor x1, moderator x3 ~ U(0, 10), group region
// (text, 5 levels), controls c1 and c2) and a project for it written by core
// (one analysis: y on x1, x3, x1×x3, c1, c2, region, HC3). Shared by the
// workbench benchmarks (bench_open, bench_ui_stall).
#pragma once

#include <charconv>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <stdexcept>
#include <string>
#include <vector>

#include "bench_data.hpp"
#include "moderato/project/project.hpp"
#include "moderato/support/sha256.hpp"

namespace moderato::bench {

inline void write_csv(const std::string& path, std::uint64_t rows) {
    std::FILE* f = std::fopen(path.c_str(), "wb");
    if (!f) throw std::runtime_error("cannot write " + path);
    std::vector<char> buffer;
    buffer.reserve(1 << 21);
    const auto flush = [&] {
        if (!buffer.empty() && std::fwrite(buffer.data(), 1, buffer.size(), f) != buffer.size())
            throw std::runtime_error("cannot write " + path);
        buffer.clear();
    };
    const auto number = [&](double v) {
        char tmp[32];
        const auto r = std::to_chars(tmp, tmp + sizeof tmp, v, std::chars_format::general, 9);
        buffer.insert(buffer.end(), tmp, r.ptr);
    };
    const auto text = [&](const char* s) { buffer.insert(buffer.end(), s, s + std::strlen(s)); };
    text("y,x1,x3,region,c1,c2\n");
    moderato::bench::Generator gen;
    for (std::uint64_t i = 0; i < rows; ++i) {
        const moderato::bench::Row r = gen.next();
        number(r.y), buffer.push_back(',');
        number(r.x1), buffer.push_back(',');
        number(r.x3), buffer.push_back(',');
        text(moderato::bench::kRegions[static_cast<std::size_t>(r.region)]), buffer.push_back(',');
        number(r.c[0]), buffer.push_back(',');
        number(r.c[1]), buffer.push_back('\n');
        if (buffer.size() > (1 << 20)) flush();
    }
    flush();
    if (std::fclose(f) != 0) throw std::runtime_error("cannot write " + path);
}

inline moderato::Project make_project(const std::string& csv) {
    moderato::Project p;
    moderato::DataSource s;
    s.id = "big";
    s.path = std::filesystem::path(csv).filename().string();
    s.sha256 = moderato::sha256_file(csv);
    p.datasets.push_back(s);
    moderato::Analysis a;
    a.id = "big-model";
    a.name = "x1 × x3";
    a.dataset = "big";
    a.roles.outcome = "y";
    a.roles.focal = "x1";
    a.roles.moderator = "x3";
    a.roles.controls = {"c1", "c2", "region"};
    a.se = moderato::SeKind::HC3;
    p.analyses.push_back(a);
    return p;
}

}  // namespace moderato::bench
