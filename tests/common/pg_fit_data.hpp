// An invented table for the in-database fit tests (seeded), loaded into
// PostgreSQL with COPY, and the check that two fits agree.
#pragma once

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <random>
#include <string>

#include "common/pg_cluster.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"

namespace moderato::test {

// COPY text for `rows` rows of (id, y, x, m, g, w, cl, store): y depends on x, m, x·m and the
// group g ("east", "north", "south"); w in (0.5, 2); 25 clusters; store 1..4.
// About 3% of x are NULL and 3% of g are 'NA' (a missing token). Values are
// written with 17 significant digits, so the server holds exactly these doubles.
inline std::string fit_rows(std::size_t rows, unsigned seed = 20240229) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> z(0.0, 1.0);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    const char* groups[] = {"east", "north", "south"};
    std::string out;
    char buf[512];
    for (std::size_t i = 0; i < rows; ++i) {
        const double x = 10 + 2 * z(rng), m = 3 + z(rng), w = 0.5 + 1.5 * u(rng);
        const int g = static_cast<int>(rng() % 3), cl = static_cast<int>(rng() % 25),
                  store = 1 + static_cast<int>(i % 4);
        const double y = 1.5 + 0.8 * x - 0.6 * m + 0.25 * x * m + 0.7 * g + (1 + 0.2 * m * m) * z(rng) / std::sqrt(w);
        const bool x_missing = rng() % 33 == 0, g_missing = rng() % 33 == 0;
        std::string xs = x_missing ? "\\N" : "";
        if (!x_missing) {
            std::snprintf(buf, sizeof buf, "%.17g", x);
            xs = buf;
        }
        std::snprintf(buf, sizeof buf, "%zu\t%.17g\t%s\t%.17g\t%s\t%.17g\t%d\t%d\n", i + 1, y, xs.c_str(), m,
                      g_missing ? "NA" : groups[g], w, cl, store);
        out += buf;
    }
    return out;
}

inline const char* fit_columns_sql() {
    return "(id integer, y double precision, x double precision, m double precision, g text, w double precision, "
           "cl integer, store integer)";
}

// Every number of the two fits agrees within `tol` relative: coefficients
// and standard errors relative to the larger of the value and its SE, the
// covariance relative to sqrt(V_ii V_jj), the fit statistics relative to themselves.
inline void expect_same_fit(const FitResult& got, const FitResult& want, double tol, const std::string& what) {
    SCOPED_TRACE(what);
    ASSERT_EQ(got.coefficients.size(), want.coefficients.size());
    EXPECT_EQ(got.n, want.n);
    EXPECT_EQ(got.n_excluded, want.n_excluded);
    EXPECT_EQ(got.aliased, want.aliased);
    const auto p = static_cast<Eigen::Index>(want.coefficients.size());
    for (Eigen::Index j = 0; j < p; ++j) {
        const auto& a = got.coefficients[static_cast<std::size_t>(j)];
        const auto& b = want.coefficients[static_cast<std::size_t>(j)];
        EXPECT_EQ(a.term, b.term);
        if (b.aliased) {
            EXPECT_TRUE(a.aliased) << b.term;
            continue;
        }
        const double scale = std::max(std::abs(b.estimate), b.std_error);
        EXPECT_LT(std::abs(a.estimate - b.estimate) / scale, tol) << b.term << " " << a.estimate << " " << b.estimate;
        EXPECT_LT(rel(a.std_error, b.std_error), tol) << b.term << " " << a.std_error << " " << b.std_error;
        EXPECT_LT(std::abs(a.p_value - b.p_value), tol) << b.term;
        for (Eigen::Index k = 0; k < p; ++k) {
            if (want.coefficients[static_cast<std::size_t>(k)].aliased) continue;
            const double s = std::sqrt(want.covariance(j, j) * want.covariance(k, k));
            EXPECT_LT(std::abs(got.covariance(j, k) - want.covariance(j, k)) / s, tol) << j << "," << k;
        }
    }
    EXPECT_LT(rel(got.rss, want.rss), tol);
    EXPECT_LT(rel(got.r_squared, want.r_squared), tol);
    EXPECT_LT(rel(got.adj_r_squared, want.adj_r_squared), tol);
    EXPECT_LT(rel(got.log_likelihood, want.log_likelihood), tol);
    EXPECT_LT(rel(got.f_statistic, want.f_statistic), tol);
    EXPECT_EQ(got.df_residual, want.df_residual);
    EXPECT_EQ(got.df_inference, want.df_inference);
    EXPECT_EQ(got.n_clusters, want.n_clusters);
    ASSERT_EQ(got.comparison.has_value(), want.comparison.has_value());
    if (want.comparison) {
        EXPECT_LT(rel(got.comparison->f_statistic, want.comparison->f_statistic), tol);
    }
}

}  // namespace moderato::test
