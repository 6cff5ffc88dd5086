// The seeded benchmark table: one row at a time, from a known linear model
// with a three-way interaction and heteroskedastic noise. Shared by the CSV
// generator (make_bench_table) and the in-memory micro-benchmark so both see
// the same data.
//
// Only the raw 64-bit outputs of std::mt19937_64 are used (their sequence is
// fixed by the C++ standard); uniforms and normals are derived here rather
// than with std::*_distribution, whose algorithms are implementation-defined.
#pragma once

#include <array>
#include <cmath>
#include <cstdint>
#include <numbers>
#include <random>

namespace moderato::bench {

inline constexpr std::uint64_t kDefaultSeed = 20240917;

inline constexpr std::array<const char*, 5> kRegions{"North", "South", "East", "West", "Central"};
inline constexpr int kClusters = 500;

// The true model (invented for the benchmark):
//   y = b0 + b1 x1 + b2 x2 + b3 x3 + b12 x1x2 + b13 x1x3 + b23 x2x3 + b123 x1x2x3
//       + g1 c1 + ... + g5 c5 + 0.5 treated + u_cluster + region shift + e,
//   e ~ N(0, (1 + 0.5 |x1|)^2).
// treated, the cluster effect and the region shift are not in the benchmarked
// model; they are independent of its regressors and only add noise there.
struct TrueModel {
    double b0 = 2.0, b1 = 0.5, b2 = -0.3, b3 = 0.25;
    double b12 = 0.15, b13 = -0.1, b23 = 0.08, b123 = 0.05;
    std::array<double, 5> g{0.4, -0.2, 0.1, 0.03, -0.5};
    double treated = 0.5;
};

struct Row {
    double y = 0, x1 = 0, x2 = 0, x3 = 0;
    int treated = 0;
    std::array<double, 5> c{};  // c4 and c5 hold whole numbers
    int cluster_id = 0;         // 1..kClusters
    int region = 0;             // index into kRegions
};

class Generator {
public:
    explicit Generator(std::uint64_t seed = kDefaultSeed) : rng_(seed) {
        // Cluster effects come first from the same stream, so a row depends
        // only on the seed and its position.
        for (double& u : cluster_effect_) u = 0.5 * normal();
    }

    Row next() {
        Row r;
        const double z1 = normal(), z2 = normal();
        r.x1 = z1;                                     // N(0, 1)
        r.x2 = 0.3 * z1 + std::sqrt(1.0 - 0.09) * z2;  // N(0, 1), corr 0.3 with x1
        r.x3 = 10.0 * uniform();                       // U(0, 10): not centred
        r.treated = uniform() < 0.4 ? 1 : 0;
        r.c[0] = normal();                             // N(0, 1)
        r.c[1] = std::exp(0.5 * normal());             // lognormal
        r.c[2] = 2.0 * uniform() - 1.0;                // U(-1, 1)
        r.c[3] = std::floor(18.0 + 50.0 * uniform());  // whole numbers 18..67 ("age")
        r.c[4] = std::floor(4.0 * uniform());          // whole numbers 0..3 ("count")
        r.cluster_id = 1 + static_cast<int>(below(kClusters));
        r.region = static_cast<int>(below(kRegions.size()));
        static constexpr double kRegionShift[5] = {0.0, 0.2, -0.1, 0.3, -0.2};
        const TrueModel& m = model_;
        double mean = m.b0 + m.b1 * r.x1 + m.b2 * r.x2 + m.b3 * r.x3 + m.b12 * r.x1 * r.x2 + m.b13 * r.x1 * r.x3 +
                      m.b23 * r.x2 * r.x3 + m.b123 * r.x1 * r.x2 * r.x3;
        for (int k = 0; k < 5; ++k) mean += m.g[static_cast<std::size_t>(k)] * r.c[static_cast<std::size_t>(k)];
        mean += m.treated * r.treated + cluster_effect_[static_cast<std::size_t>(r.cluster_id - 1)] +
                kRegionShift[r.region];
        r.y = mean + (1.0 + 0.5 * std::abs(r.x1)) * normal();
        return r;
    }

    const TrueModel& model() const { return model_; }

private:
    // Uniform on [0, 1) with 53 random bits.
    double uniform() { return static_cast<double>(rng_() >> 11) * 0x1.0p-53; }
    // Uniform integer in [0, n) (n small: the modulo bias is below 1e-16).
    std::uint64_t below(std::uint64_t n) { return rng_() % n; }
    // Standard normal by Box-Muller, both values used.
    double normal() {
        if (have_spare_) {
            have_spare_ = false;
            return spare_;
        }
        double u1 = 0;
        do u1 = uniform();
        while (u1 <= 0.0);
        const double u2 = uniform();
        const double radius = std::sqrt(-2.0 * std::log(u1));
        const double angle = 2.0 * std::numbers::pi * u2;
        spare_ = radius * std::sin(angle);
        have_spare_ = true;
        return radius * std::cos(angle);
    }

    std::mt19937_64 rng_;
    TrueModel model_;
    std::array<double, kClusters> cluster_effect_{};
    double spare_ = 0;
    bool have_spare_ = false;
};

}  // namespace moderato::bench
