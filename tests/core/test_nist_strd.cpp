// Accuracy on the NIST StRD linear least-squares datasets through the core
// API (read_csv + fit_model). Check values: NIST StRD certified values
// (../shared/reference/nist-strd/*.json, read at run time).
#include <gtest/gtest.h>

#include <cstdio>
#include <iostream>

#include "common/nist.hpp"
#include "common/nist_spec.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/reading/csv.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {

struct Scores {
    double coef = 15, se = 15, sd = 15, r2 = 15;
};

Scores score_core(const NistCase& c) {
    const Table t = read_csv(c.csv.string());
    const FitResult f = fit_model(t, nist_spec(c));
    Scores sc;
    EXPECT_EQ(f.coefficients.size(), c.coefficients.size()) << c.name;
    EXPECT_TRUE(f.aliased.empty()) << c.name << ": no NIST design is rank deficient";
    for (std::size_t k = 0; k < c.coefficients.size(); ++k) {
        const int j = f.index_of(nist_term(c, k));
        EXPECT_GE(j, 0) << c.name << " term " << nist_term(c, k);
        if (j < 0) return {0, 0, 0, 0};
        sc.coef = std::min(sc.coef, lre(f.coefficients[static_cast<std::size_t>(j)].estimate, c.coefficients[k]));
        sc.se = std::min(sc.se, lre(f.coefficients[static_cast<std::size_t>(j)].std_error, c.standard_errors[k]));
    }
    sc.sd = lre(f.residual_sd, c.residual_sd);
    sc.r2 = lre(f.r_squared, c.r_squared);
    return sc;
}

}  // namespace

TEST(NistStrd, CoreApiMeetsCertifiedDigits) {
    ASSERT_TRUE(nist_available()) << nist_missing_message();
    std::printf("\nNIST StRD through the core API: minimum LRE (correct significant digits)\n");
    std::printf("%-9s %7s %7s %7s %7s %9s\n", "dataset", "coef", "SE", "res.SD", "R²", "required");
    for (const auto& name : nist_datasets()) {
        const NistCase c = load_nist(name);
        const Scores sc = score_core(c);
        const double need = nist_required_lre(name);
        std::printf("%-9s %7.2f %7.2f %7.2f %7.2f %9.0f\n", name.c_str(), sc.coef, sc.se, sc.sd, sc.r2, need);
        EXPECT_GE(sc.coef, need) << name << " coefficients";
        EXPECT_GE(sc.se, need) << name << " standard errors";
        EXPECT_GE(sc.sd, need) << name << " residual SD";
        EXPECT_GE(sc.r2, need) << name << " R-squared";
    }
}

// The large-data path (tall-skinny QR in double) on the well-conditioned
// datasets: the answer must not depend on the path, to the digits double
// precision can carry on these problems. Source: NIST StRD certified values.
TEST(NistStrd, BlockedDoublePathOnModerateProblems) {
    ASSERT_TRUE(nist_available()) << nist_missing_message();
    for (const std::string name : {"Norris", "NoInt1", "NoInt2", "Longley"}) {
        const NistCase c = load_nist(name);
        const Design d = build_design(read_csv(c.csv.string()), nist_spec(c));
        LeastSquaresOptions o;
        o.extended_budget = 0;  // force the double-precision blocked path
        const auto ls = least_squares(d.X, d.y, {}, o);
        EXPECT_FALSE(ls.extended_precision);
        for (std::size_t k = 0; k < c.coefficients.size(); ++k)
            EXPECT_GE(lre(ls.coef[static_cast<Eigen::Index>(k)], c.coefficients[k]), 9.0) << name << " b" << k;
    }
}
