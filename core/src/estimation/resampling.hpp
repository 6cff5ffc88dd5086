// Random streams for resampling (private to core): replicate r of a seeded
// run draws from its own generator, so results stored by replicate index do
// not depend on the thread count or the standard library.
#pragma once

#include <cstdint>
#include <random>
#include <vector>

namespace moderato::detail {

// The SplitMix64 output function (Steele, Lea & Flood 2014).
inline std::uint64_t splitmix64_mix(std::uint64_t z) {
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

// The (r+1)-th output of a SplitMix64 generator started at `seed`: distinct
// for distinct r (the mix is a bijection), independent of the thread count.
inline std::uint64_t replicate_seed(std::uint64_t seed, std::uint64_t r) {
    constexpr std::uint64_t kGoldenGamma = 0x9E3779B97F4A7C15ULL;
    return splitmix64_mix(seed + (r + 1) * kGoldenGamma);
}

// Uniform integer in [0, n) from raw 64-bit output by rejection: the values
// at or above 2^64 mod n form a whole number of copies of [0, n).
inline std::uint64_t uniform_below(std::mt19937_64& g, std::uint64_t n) {
    const std::uint64_t threshold = (0 - n) % n;
    while (true) {
        const std::uint64_t x = g();
        if (x >= threshold) return x % n;
    }
}

// How often each of n units is drawn in replicate r (n draws with
// replacement), from the same stream the bootstrap engine uses.
inline std::vector<int> draw_counts(std::uint64_t n, std::uint64_t seed, std::uint64_t r) {
    std::mt19937_64 gen(replicate_seed(seed, r));
    std::vector<int> counts(n, 0);
    for (std::uint64_t k = 0; k < n; ++k) ++counts[uniform_below(gen, n)];
    return counts;
}

// A seeded Fisher–Yates permutation of 0..n-1.
inline std::vector<std::uint64_t> seeded_permutation(std::uint64_t n, std::uint64_t seed) {
    std::mt19937_64 gen(replicate_seed(seed, 0));
    std::vector<std::uint64_t> p(n);
    for (std::uint64_t i = 0; i < n; ++i) p[i] = i;
    for (std::uint64_t i = n; i > 1; --i) std::swap(p[i - 1], p[uniform_below(gen, i)]);
    return p;
}

}  // namespace moderato::detail
