// Invented data whose interaction is exactly a straight line, with no noise:
// y = 1 + 2·x + 0.5·z + 0.3·x·z for 240 rows of seeded uniform x in [0, 4]
// and z in [0, 10]. By construction the effect of x at z = m is 2 + 0.3·m,
// so every local or per-bin estimate of it (each of them fits a model that
// holds this one exactly) equals that line; the tests of the straight-line
// check compare with it. Also the bins' medians re-derived from their
// definition (binned_effects.hpp: cuts at the j/K quantiles, type 7).
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <fstream>
#include <random>
#include <string>
#include <vector>

#include "common/table_builder.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::test {

struct ExactLine {
    static constexpr double focal_slope = 2.0, product = 0.3;  // the effect of x: 2 + 0.3·z
    static double effect_at(double z) { return focal_slope + product * z; }
    std::vector<double> x, z, y;

    ExactLine() {
        std::mt19937_64 rng(20240915);
        std::uniform_real_distribution<double> ux(0, 4), uz(0, 10);
        for (int i = 0; i < 240; ++i) {
            const double xi = std::round(ux(rng) * 1000) / 1000, zi = std::round(uz(rng) * 1000) / 1000;
            x.push_back(xi);
            z.push_back(zi);
            y.push_back(1 + focal_slope * xi + 0.5 * zi + product * xi * zi);
        }
    }
    Table table() const { return make_table({numeric_column("x", x), numeric_column("z", z), numeric_column("y", y)}); }
    // The same as CSV, every digit kept (17 significant digits read back exactly).
    void write_csv(const std::string& path) const {
        std::ofstream out(path);
        out.precision(17);
        out << "x,z,y\n";
        for (std::size_t i = 0; i < x.size(); ++i) out << x[i] << ',' << z[i] << ',' << y[i] << '\n';
    }
};

// Type-7 quantile of sorted values (Hyndman & Fan 1996): linear interpolation at (n − 1)p.
inline double quantile7(const std::vector<double>& sorted, double p) {
    const double h = (static_cast<double>(sorted.size()) - 1) * p;
    const auto lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, sorted.size() - 1);
    return sorted[lo] + (h - std::floor(h)) * (sorted[hi] - sorted[lo]);
}

inline double median_of(std::vector<double> v) {
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

// The medians of the moderator in K bins: the first [min, c₁], then (c_{j−1}, c_j].
inline std::vector<double> bin_medians(std::vector<double> z, int bins) {
    std::sort(z.begin(), z.end());
    std::vector<double> cuts;
    for (int j = 1; j < bins; ++j) cuts.push_back(quantile7(z, static_cast<double>(j) / bins));
    std::vector<double> out;
    for (int j = 0; j < bins; ++j) {
        std::vector<double> in;
        for (const double v : z) {
            const bool above = j == 0 || v > cuts[static_cast<std::size_t>(j - 1)];
            const bool below = j == bins - 1 || v <= cuts[static_cast<std::size_t>(j)];
            if (above && below) in.push_back(v);
        }
        out.push_back(median_of(in));
    }
    return out;
}

}  // namespace moderato::test
