// The linear mixed model's criterion (estimation/mixed_criterion): the
// profiled REML and ML log-likelihoods, the GLS fixed effects and the
// profiled residual variance at given random-effects covariances, checked
// against statsmodels MixedLM (tests/reference/make_mixed_reference.py, which
// also checks statsmodels against a dense numpy computation) and against the
// ordinary least-squares log-likelihood when the random effects have no
// variance.
#include <gtest/gtest.h>

#include <Eigen/Dense>
#include <cmath>
#include <numbers>
#include <string>
#include <vector>

#include "common/reference_fixtures.hpp"
#include "moderato/estimation/mixed_criterion.hpp"
#include "moderato/estimation/mixed_fit.hpp"

using namespace moderato;

namespace {

struct MixedCase {
    nlohmann::json doc;
    Eigen::MatrixXd X, Z;
    Eigen::VectorXd y;
    std::vector<std::size_t> group;
};

// The fixture's data as the model sees them: X = [1, hours, climate,
// hours × climate], Z = [1] or [1, hours], one group per team.
MixedCase load_case(const std::string& name) {
    MixedCase c;
    const auto path = test::reference_fixture(name + ".json");
    c.doc = test::read_fixture_json(path);
    CsvOptions o;
    o.column_kinds["team"] = ColumnKind::Categorical;
    const Table t = read_csv((path.parent_path() / c.doc.at("data").get<std::string>()).string(), o);
    const auto& hours = t.at("hours").numbers;
    const auto& climate = t.at("climate").numbers;
    const auto n = static_cast<Eigen::Index>(hours.size());
    const auto q = static_cast<Eigen::Index>(c.doc.at("spec").at("random").size());
    c.X.resize(n, 4);
    c.Z.resize(n, q);
    c.y.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const auto k = static_cast<std::size_t>(i);
        c.X.row(i) << 1, hours[k], climate[k], hours[k] * climate[k];
        c.Z(i, 0) = 1;
        if (q == 2) c.Z(i, 1) = hours[k];
        c.y[i] = t.at("score").numbers[k];
        c.group.push_back(static_cast<std::size_t>(t.at("team").codes[k]));
    }
    return c;
}

Eigen::MatrixXd matrix(const nlohmann::json& rows) {
    Eigen::MatrixXd m(static_cast<Eigen::Index>(rows.size()), static_cast<Eigen::Index>(rows.size()));
    for (std::size_t i = 0; i < rows.size(); ++i)
        for (std::size_t j = 0; j < rows.size(); ++j)
            m(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = rows[i][j].get<double>();
    return m;
}

void expect_matches_statsmodels(const std::string& name) {
    const MixedCase c = load_case(name);
    const MixedCrossproducts data(c.X, c.Z, c.y, c.group);
    ASSERT_EQ(data.rows(), c.doc.at("n").get<std::size_t>());
    ASSERT_EQ(data.groups(), c.doc.at("groups_count").get<std::size_t>());
    ASSERT_GE(c.doc.at("points").size(), 3u);
    for (const auto& point : c.doc.at("points")) {
        const Eigen::MatrixXd psi = matrix(point.at("psi"));
        const Eigen::MatrixXd L = Eigen::LLT<Eigen::MatrixXd>(psi).matrixL();
        for (const char* key : {"reml", "ml"}) {
            SCOPED_TRACE(name + " " + key + " psi " + point.at("psi").dump());
            const nlohmann::json& ref = point.at(key);  // statsmodels 0.13 MixedLM, named in the fixture's "source"
            const MixedCriterion got =
                mixed_criterion(data, L, std::string(key) == "reml" ? MixedEstimation::Reml : MixedEstimation::Ml);
            EXPECT_NEAR(got.value, ref.at("criterion").get<double>(), 1e-8);
            EXPECT_NEAR(got.sigma2, ref.at("scale").get<double>(), 1e-9 * got.sigma2);
            const auto& fe = ref.at("fixed_effects");
            ASSERT_EQ(static_cast<std::size_t>(got.beta.size()), fe.size());
            for (std::size_t k = 0; k < fe.size(); ++k)
                EXPECT_NEAR(got.beta[static_cast<Eigen::Index>(k)], fe[k].get<double>(),
                            1e-8 * (1 + std::abs(fe[k].get<double>())));
        }
    }
}

}  // namespace

TEST(MixedCriterion, RandomSlopeMatchesStatsmodels) { expect_matches_statsmodels("mixed_slope"); }

TEST(MixedCriterion, RandomInterceptMatchesStatsmodels) { expect_matches_statsmodels("mixed_intercept"); }

// With no variance in the random effects (L = 0) V = I: the ML criterion is
// the least-squares log-likelihood -n/2 (log(2 pi RSS / n) + 1) and beta the
// least-squares fit (common practice, from memory); REML uses n - p and
// subtracts 1/2 log|X'X|.
TEST(MixedCriterion, NoRandomVarianceIsLeastSquares) {
    const MixedCase c = load_case("mixed_slope");
    const MixedCrossproducts data(c.X, c.Z, c.y, c.group);
    const Eigen::VectorXd beta = c.X.colPivHouseholderQr().solve(c.y);
    const double rss = (c.y - c.X * beta).squaredNorm();
    const double n = static_cast<double>(c.y.size()), p = 4;
    const Eigen::MatrixXd zero = Eigen::MatrixXd::Zero(2, 2);
    const MixedCriterion ml = mixed_criterion(data, zero, MixedEstimation::Ml);
    EXPECT_NEAR(ml.value, -n / 2 * (std::log(2 * std::numbers::pi * rss / n) + 1), 1e-9);
    EXPECT_NEAR(ml.sigma2, rss / n, 1e-12 * rss);
    for (Eigen::Index k = 0; k < 4; ++k) EXPECT_NEAR(ml.beta[k], beta[k], 1e-9 * (1 + std::abs(beta[k])));
    const MixedCriterion reml = mixed_criterion(data, zero, MixedEstimation::Reml);
    const double logdet_xtx = std::log((c.X.transpose() * c.X).determinant());
    EXPECT_NEAR(reml.value, -(n - p) / 2 * (std::log(2 * std::numbers::pi * rss / (n - p)) + 1) - 0.5 * logdet_xtx,
                1e-8);
}

// The rows' order and the groups' numbering do not matter: the data enter as
// per-group sums.
TEST(MixedCriterion, RowOrderDoesNotMatter) {
    const MixedCase c = load_case("mixed_slope");
    const Eigen::Index n = c.y.size();
    Eigen::MatrixXd X(n, 4), Z(n, 2);
    Eigen::VectorXd y(n);
    std::vector<std::size_t> group(static_cast<std::size_t>(n));
    const std::size_t G = 45;
    for (Eigen::Index i = 0; i < n; ++i) {
        const Eigen::Index from = n - 1 - i;  // reversed rows, groups renumbered backwards
        X.row(i) = c.X.row(from);
        Z.row(i) = c.Z.row(from);
        y[i] = c.y[from];
        group[static_cast<std::size_t>(i)] = G - 1 - c.group[static_cast<std::size_t>(from)];
    }
    Eigen::MatrixXd L(2, 2);
    L << 0.7, 0, 0.1, 0.3;
    for (MixedEstimation e : {MixedEstimation::Reml, MixedEstimation::Ml}) {
        const MixedCriterion a = mixed_criterion(MixedCrossproducts(c.X, c.Z, c.y, c.group), L, e);
        const MixedCriterion b = mixed_criterion(MixedCrossproducts(X, Z, y, group), L, e);
        EXPECT_NEAR(a.value, b.value, 1e-9 * std::abs(a.value));
    }
}

// Bad shapes and a design with collinear fixed effects are refused with a reason.
TEST(MixedCriterion, RefusesWhatItCannotEvaluate) {
    const MixedCase c = load_case("mixed_intercept");
    EXPECT_THROW(MixedCrossproducts(c.X, c.Z, c.y.head(10), c.group), std::invalid_argument);
    const MixedCrossproducts data(c.X, c.Z, c.y, c.group);
    EXPECT_THROW(mixed_criterion(data, Eigen::MatrixXd::Identity(2, 2), MixedEstimation::Reml), std::invalid_argument);
    Eigen::MatrixXd twice(c.X.rows(), 5);
    twice << c.X, c.X.col(1);
    const MixedCrossproducts collinear(twice, c.Z, c.y, c.group);
    EXPECT_THROW(mixed_criterion(collinear, Eigen::MatrixXd::Identity(1, 1), MixedEstimation::Ml), std::domain_error);
}

// The fit: our optimum is at least as good as statsmodels' own MixedLM.fit
// (criterion >= theirs − 1e-6); where statsmodels reaches the same optimum, the
// fixed effects agree within 1e-5, their SEs within 1e-4 (relative; the
// usual GLS form at statsmodels' optimum) and the variance components within
// 1e-3 (relative to the largest).
namespace {

// Returns how many of statsmodels' fits reached our optimum and were compared in detail.
int expect_fit_as_good(const std::string& name) {
    const MixedCase c = load_case(name);
    const MixedCrossproducts data(c.X, c.Z, c.y, c.group);
    EXPECT_FALSE(c.doc.at("fits").empty());
    int detailed = 0;
    for (const auto& ref : c.doc.at("fits")) {  // statsmodels 0.13 MixedLM.fit, named in the fixture's "source"
        SCOPED_TRACE(name + " " + ref.at("estimation").get<std::string>() + " " +
                     ref.at("covariance").get<std::string>());
        MixedFitOptions o;
        o.estimation = ref.at("estimation") == "reml" ? MixedEstimation::Reml : MixedEstimation::Ml;
        o.covariance = ref.at("covariance") == "full" ? RandomCovariance::Full : RandomCovariance::Diagonal;
        const MixedFit fit = fit_mixed(data, o);
        EXPECT_TRUE(fit.converged);
        EXPECT_GE(fit.criterion, ref.at("criterion").get<double>() - 1e-6);
        // Where statsmodels stopped short of the optimum only the criterion compares. Its own
        // "converged" flag is no guide: one build's run of the same fit says True below the optimum.
        if (fit.criterion - ref.at("criterion").get<double>() > 1e-6) continue;
        ++detailed;
        for (std::size_t k = 0; k < 4; ++k) {
            const auto K = static_cast<Eigen::Index>(k);
            const double b = ref.at("fixed_effects")[k].get<double>();
            EXPECT_NEAR(fit.beta[K], b, 1e-5 * (1 + std::abs(b))) << "fixed effect " << k;
            // The usual sigma2 (X' V^-1 X)^-1 at statsmodels' optimum (numpy, in the script) to 1e-4;
            // statsmodels' bse_fe inverts the observed information of every parameter, within 1 %.
            const double se = std::sqrt(fit.beta_covariance(K, K));
            const double gls = ref.at("std_errors_gls")[k].get<double>(), bse = ref.at("std_errors")[k].get<double>();
            EXPECT_NEAR(se, gls, 1e-4 * gls) << "SE " << k;
            EXPECT_NEAR(se, bse, 1e-2 * bse) << "SE " << k;
        }
        const Eigen::MatrixXd tau = matrix(ref.at("random_covariance"));
        EXPECT_LE((fit.random_covariance - tau).cwiseAbs().maxCoeff(), 1e-3 * tau.cwiseAbs().maxCoeff());
        EXPECT_NEAR(fit.residual_variance, ref.at("residual_variance").get<double>(), 1e-4 * fit.residual_variance);
        EXPECT_FALSE(fit.singular);
    }
    return detailed;
}

}  // namespace

// statsmodels reaches the optimum of both full random-slope fits (REML and ML): both compare in detail.
TEST(MixedFit, RandomSlopeIsAtLeastAsGoodAsStatsmodels) { EXPECT_GE(expect_fit_as_good("mixed_slope"), 2); }

// For the random intercept MixedLM.fit can stop short; the criterion maximised over its one
// parameter by scipy (in the fixture) is the reference for both REML and ML, to 1e-7.
TEST(MixedFit, RandomInterceptIsAtLeastAsGoodAsStatsmodels) {
    expect_fit_as_good("mixed_intercept");
    const MixedCase c = load_case("mixed_intercept");
    const MixedCrossproducts data(c.X, c.Z, c.y, c.group);
    for (const char* key : {"reml", "ml"}) {
        SCOPED_TRACE(key);
        MixedFitOptions o;
        o.estimation = std::string(key) == "reml" ? MixedEstimation::Reml : MixedEstimation::Ml;
        EXPECT_NEAR(fit_mixed(data, o).criterion, c.doc.at("profile_maximum").at(key).at("criterion").get<double>(),
                    1e-7);
    }
}

// No group differs from the others (the outcome is pure noise around the
// fixed part, the same in every group): the random-intercept variance goes
// to its boundary, zero, and the fit says it is singular (common practice).
TEST(MixedFit, AVarianceAtZeroIsReportedAsSingular) {
    const MixedCase c = load_case("mixed_intercept");
    Eigen::VectorXd y(c.y.size());
    std::vector<std::size_t> within(c.group.size());
    // The same 12 residual patterns repeat in every group: no between-group variation at all.
    for (Eigen::Index i = 0; i < y.size(); ++i) {
        y[i] = c.X.row(i).dot(Eigen::Vector4d(1, 0.5, 2, 0.1)) + std::sin(1.7 * static_cast<double>(i));
        within[static_cast<std::size_t>(i)] = static_cast<std::size_t>(i % 30);
    }
    const MixedFit fit = fit_mixed(MixedCrossproducts(c.X, c.Z, y, within));
    EXPECT_TRUE(fit.converged);
    EXPECT_TRUE(fit.singular) << fit.random_covariance;
    EXPECT_LT(fit.random_covariance(0, 0), 1e-6 * fit.residual_variance);
}

// The random slope's likelihood-ratio test on the teams data: its statistic
// from our two REML fits equals the one from statsmodels' criteria at their
// maxima (in the fixtures) within 1e-5, and its p-value is the 50:50
// mixture of chi-square(1) and chi-square(2), computed here by hand from the
// closed forms P(X1 > s) = erfc(sqrt(s / 2)) and P(X2 > s) = exp(−s / 2)
// (Self and Liang 1987).
TEST(MixedFit, RandomSlopeTestUsesTheBoundaryMixture) {
    const MixedCase slope = load_case("mixed_slope");
    const MixedCase intercept = load_case("mixed_intercept");
    const MixedFit with = fit_mixed(MixedCrossproducts(slope.X, slope.Z, slope.y, slope.group));
    const MixedFit without = fit_mixed(MixedCrossproducts(intercept.X, intercept.Z, intercept.y, intercept.group));
    const RandomEffectTest t = added_random_effect_test(without, with, 1);
    // statsmodels MixedLM.fit for the slope (REML, full; it converged), and for the intercept its
    // criterion maximised by scipy (MixedLM.fit stops short there and says so).
    ASSERT_EQ(slope.doc.at("fits")[0].at("estimation"), "reml");
    ASSERT_TRUE(slope.doc.at("fits")[0].at("converged").get<bool>());
    const double sm_slope = slope.doc.at("fits")[0].at("criterion").get<double>();
    const double sm_intercept = intercept.doc.at("profile_maximum").at("reml").at("criterion").get<double>();
    EXPECT_NEAR(without.criterion, sm_intercept, 1e-7);
    EXPECT_NEAR(t.statistic, 2 * (sm_slope - sm_intercept), 1e-5);
    const double s = t.statistic;
    EXPECT_NEAR(t.p_value, 0.5 * (std::erfc(std::sqrt(s / 2)) + std::exp(-s / 2)), 1e-12);
    EXPECT_EQ(t.df_low, 1);
    EXPECT_EQ(t.df_high, 2);
    // A fit that came out a little worse (an optimiser's noise) is no evidence: statistic 0, p = 1.
    const RandomEffectTest none = added_random_effect_test(with, without, 1);
    EXPECT_EQ(none.statistic, 0);
    EXPECT_DOUBLE_EQ(none.p_value, 1);
}

// Units do not matter: hours in thousandths of an hour gives the same
// maximised criterion (REML: up to log|X'V^-1X|'s change of units,
// 2 log 1000 for the two rescaled columns), and the small slope variance is
// not mistaken for a boundary.
TEST(MixedFit, TheUnitsOfAPredictorDoNotMatter) {
    const MixedCase c = load_case("mixed_slope");
    Eigen::MatrixXd X = c.X, Z = c.Z;
    X.col(1) *= 1000;
    X.col(3) *= 1000;
    Z.col(1) *= 1000;
    MixedFitOptions ml;
    ml.estimation = MixedEstimation::Ml;
    const MixedFit a = fit_mixed(MixedCrossproducts(c.X, c.Z, c.y, c.group), ml);
    const MixedFit b = fit_mixed(MixedCrossproducts(X, Z, c.y, c.group), ml);
    EXPECT_NEAR(b.criterion, a.criterion, 1e-6);
    EXPECT_NEAR(b.beta[1] * 1000, a.beta[1], 1e-5 * std::abs(a.beta[1]));
    EXPECT_FALSE(a.singular);
    EXPECT_FALSE(b.singular);
}
