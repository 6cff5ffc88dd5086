// Multilevel fits through fit_model (estimation/mixed_model): the random
// part built from a specification, the fixed effects against statsmodels
// MixedLM (tests/reference/make_mixed_reference.py), Satterthwaite's df
// against an independent dense finite-difference computation, the
// between–within df and the groups' conditional modes against their
// definitions, the centring options against columns made here, and the
// messages for specifications a multilevel model cannot take.
#include <gtest/gtest.h>

#include <Eigen/Dense>
#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "common/input_error.hpp"
#include "common/reference_fixtures.hpp"
#include "common/table_builder.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/multilevel_probe.hpp"
#include "moderato/reading/csv.hpp"

using namespace moderato;

namespace {

Table teams_table() {
    CsvOptions o;
    o.column_kinds["team"] = ColumnKind::Categorical;
    return read_csv(test::reference_fixture("mixed_teams.csv").string(), o);
}

ModelSpec teams_spec(bool slope, MixedEstimation estimation = MixedEstimation::Reml) {
    ModelSpec s;
    s.outcome = "score";
    s.interactions = {{"hours", "climate"}};
    s.multilevel.groups = "team";
    if (slope) s.multilevel.random_slopes = {"hours"};
    s.multilevel.estimation = estimation;
    return s;
}

bool contains(const std::vector<std::string>& texts, const std::string& part) {
    for (const auto& t : texts)
        if (t.find(part) != std::string::npos) return true;
    return false;
}

// Each group's rows, in the order the fit numbered the groups.
std::vector<std::vector<Eigen::Index>> group_rows(const Design& d) {
    std::vector<std::vector<Eigen::Index>> rows(d.group_names.size());
    for (std::size_t i = 0; i < d.group.size(); ++i) rows[d.group[i]].push_back(static_cast<Eigen::Index>(i));
    return rows;
}

// The dense textbook forms, group by group (no Woodbury identity, nothing
// profiled): V_g = sigma2 I + Z_g T Z_g'.
struct Dense {
    Eigen::MatrixXd X, Z;
    Eigen::VectorXd y;
    std::vector<std::vector<Eigen::Index>> rows;
    Eigen::MatrixXd block(const Eigen::MatrixXd& M, const std::vector<Eigen::Index>& r) const {
        Eigen::MatrixXd out(static_cast<Eigen::Index>(r.size()), M.cols());
        for (std::size_t i = 0; i < r.size(); ++i) out.row(static_cast<Eigen::Index>(i)) = M.row(r[i]);
        return out;
    }
    Eigen::MatrixXd V(const Eigen::MatrixXd& Zg, const Eigen::MatrixXd& T, double sigma2) const {
        return sigma2 * Eigen::MatrixXd::Identity(Zg.rows(), Zg.rows()) + Zg * T * Zg.transpose();
    }
    // (X' V^-1 X)^-1 and the REML log-likelihood (without its constant).
    Eigen::MatrixXd phi(const Eigen::MatrixXd& T, double sigma2) const {
        Eigen::MatrixXd A = Eigen::MatrixXd::Zero(X.cols(), X.cols());
        for (const auto& r : rows) {
            const Eigen::MatrixXd Xg = block(X, r);
            A += Xg.transpose() * V(block(Z, r), T, sigma2).inverse() * Xg;
        }
        return A.inverse();
    }
    double reml(const Eigen::MatrixXd& T, double sigma2) const {
        Eigen::MatrixXd A = Eigen::MatrixXd::Zero(X.cols(), X.cols());
        Eigen::VectorXd b = Eigen::VectorXd::Zero(X.cols());
        double logdet = 0;
        for (const auto& r : rows) {
            const Eigen::MatrixXd Xg = block(X, r), Vi = V(block(Z, r), T, sigma2).inverse();
            A += Xg.transpose() * Vi * Xg;
            b += Xg.transpose() * Vi * block(y, r);
            logdet -= std::log(Vi.determinant());
        }
        const Eigen::VectorXd beta = A.ldlt().solve(b);
        double qf = 0;
        for (const auto& r : rows) {
            const Eigen::VectorXd e = block(y, r) - block(X, r) * beta;
            qf += e.dot(V(block(Z, r), T, sigma2).ldlt().solve(e));
        }
        return -0.5 * (logdet + std::log(A.determinant()) + qf);
    }
};

Dense dense_of(const Design& d, const FitResult& f) {
    Dense x{d.X, Eigen::MatrixXd(d.X.rows(), 2), d.y, group_rows(d)};
    x.Z.col(0).setOnes();
    x.Z.col(1) = d.X.col(d.main_column(f.multilevel->terms[1]));
    return x;
}

}  // namespace

// The teams data with a random intercept and a random slope for hours
// (REML and ML, full and diagonal covariance) against statsmodels 0.13
// MixedLM's fits: the criterion no worse than statsmodels'; where
// statsmodels reached the same optimum (to 1e-6; both full fits), fixed
// effects to 1e-5, their SEs (sigma2 (X'V^-1X)^-1 at statsmodels' estimate,
// numpy in the script) to 1e-4 and the variances to 1e-3.
TEST(MixedModel, ACrossLevelInteractionMatchesStatsmodels) {
    const Table t = teams_table();
    const auto doc = test::read_fixture_json(test::reference_fixture("mixed_slope.json"));
    int detailed = 0;
    for (const auto& ref : doc.at("fits")) {
        const bool reml = ref.at("estimation") == "reml";
        SCOPED_TRACE(ref.at("estimation").get<std::string>() + " " + ref.at("covariance").get<std::string>());
        ModelSpec spec = teams_spec(true, reml ? MixedEstimation::Reml : MixedEstimation::Ml);
        spec.multilevel.covariance = parse_random_covariance(ref.at("covariance").get<std::string>());
        const FitResult f = fit_model(t, spec);
        ASSERT_TRUE(f.multilevel);
        const double criterion = ref.at("criterion").get<double>();
        EXPECT_GE(f.log_likelihood, criterion - 1e-6);
        if (std::abs(f.log_likelihood - criterion) > 1e-6) continue;
        ++detailed;
        for (std::size_t k = 0; k < 4; ++k) {
            const double b = ref.at("fixed_effects")[k].get<double>(), se = ref.at("std_errors_gls")[k].get<double>();
            EXPECT_NEAR(f.coefficients[k].estimate, b, 1e-5 * (1 + std::abs(b))) << f.coefficients[k].term;
            EXPECT_NEAR(f.coefficients[k].std_error, se, 1e-4 * se) << f.coefficients[k].term;
        }
        const auto& m = *f.multilevel;
        EXPECT_EQ(m.groups_count, doc.at("groups_count").get<std::size_t>());
        EXPECT_EQ(m.terms, (std::vector<std::string>{"intercept", "hours"}));
        for (Eigen::Index i = 0; i < 2; ++i)
            for (Eigen::Index j = 0; j < 2; ++j) {
                const double tau = ref.at("random_covariance")[i][j].get<double>();
                EXPECT_NEAR(m.covariance(i, j), tau, 1e-3 * std::abs(ref.at("random_covariance")[0][0].get<double>()));
            }
        EXPECT_NEAR(m.residual_variance, ref.at("residual_variance").get<double>(), 1e-4 * m.residual_variance);
        EXPECT_FALSE(m.singular);
        EXPECT_EQ(m.size_min, 1u);  // the generator's four one-member teams
    }
    EXPECT_GE(detailed, 1);
}

// A random-intercept model: the criterion maximised over its one parameter
// by scipy (the fixture's profile_maximum; statsmodels' own fit stops
// short) to 1e-7, and the ICC from its variance ratio psi: psi / (1 + psi).
TEST(MixedModel, ARandomInterceptModelReportsItsIcc) {
    const auto doc = test::read_fixture_json(test::reference_fixture("mixed_intercept.json"));
    const auto& best = doc.at("profile_maximum").at("reml");
    const FitResult f = fit_model(teams_table(), teams_spec(false));
    EXPECT_NEAR(f.log_likelihood, best.at("criterion").get<double>(), 1e-7);
    const double psi = best.at("psi").get<double>();
    EXPECT_NEAR(f.multilevel->icc, psi / (1 + psi), 1e-4);
    EXPECT_TRUE(f.multilevel->slope_tests.empty());
}

// Satterthwaite's df (Giesbrecht and Burns 1985) for each coefficient and
// for a conditional effect b_hours + 1.5 b_hours×climate, against the same
// formula computed here with dense V matrices group by group: dPhi/dtheta
// and the Hessian of the REML log-likelihood by central differences in
// (tau00, tau10, tau11, sigma2). Agreement to 0.5 % (finite differences).
TEST(MixedModel, SatterthwaiteDfMatchADenseFiniteDifferenceComputation) {
    const Table t = teams_table();
    const ModelSpec spec = teams_spec(true);
    const Design d = build_design(t, spec);
    const FitResult f = fit_design(d, spec);
    ASSERT_TRUE(f.multilevel && f.multilevel->satterthwaite);
    const Dense dense = dense_of(d, f);
    const auto& m = *f.multilevel;
    Eigen::Vector4d theta(m.covariance(0, 0), m.covariance(1, 0), m.covariance(1, 1), m.residual_variance);
    const auto unpack = [](const Eigen::Vector4d& th) {
        Eigen::Matrix2d T;
        T << th[0], th[1], th[1], th[2];
        return std::make_pair(Eigen::MatrixXd(T), th[3]);
    };
    const Eigen::Vector4d h = 1e-4 * Eigen::Vector4d(theta[0], std::sqrt(theta[0] * theta[2]), theta[2], theta[3]);
    const auto reml = [&](const Eigen::Vector4d& th) {
        auto [T, s2] = unpack(th);
        return dense.reml(T, s2);
    };
    Eigen::Matrix4d H;
    for (int a = 0; a < 4; ++a)
        for (int b = 0; b < 4; ++b) {
            const auto at = [&](double da, double db) {
                Eigen::Vector4d x = theta;
                x[a] += da * h[a];
                x[b] += db * h[b];
                return reml(x);
            };
            H(a, b) = (at(1, 1) - at(1, -1) - at(-1, 1) + at(-1, -1)) / (4 * h[a] * h[b]);
        }
    const Eigen::Matrix4d A = (-H).inverse();
    auto [T0, s0] = unpack(theta);
    const Eigen::MatrixXd phi = dense.phi(T0, s0);
    const auto df_of = [&](const Eigen::Vector4d& c) {
        Eigen::Vector4d g;
        for (int k = 0; k < 4; ++k) {
            Eigen::Vector4d up = theta, down = theta;
            up[k] += h[k];
            down[k] -= h[k];
            auto [Tu, su] = unpack(up);
            auto [Td, sd] = unpack(down);
            g[k] = c.dot((dense.phi(Tu, su) - dense.phi(Td, sd)) * c) / (2 * h[k]);
        }
        const double v = c.dot(phi * c);
        return 2 * v * v / g.dot(A * g);
    };
    for (int j = 0; j < 4; ++j) {
        const double want = df_of(Eigen::Vector4d::Unit(j));
        EXPECT_NEAR(f.coefficients[static_cast<std::size_t>(j)].df, want, 5e-3 * want) << f.coefficients[j].term;
    }
    const Eigen::Vector4d effect(0, 1, 0, 1.5);
    EXPECT_NEAR(m.df_of(effect, 0), df_of(effect), 5e-3 * df_of(effect));
    // Probing uses the product term's df.
    EXPECT_DOUBLE_EQ(f.df_inference, f.coefficients[3].df);
}

// Between–within df by hand (common practice): 45 teams, 302 rows. With a
// random slope for hours, hours and hours×climate belong to the slope's
// equation (2 columns: 45 − 2), the intercept and climate to the groups'
// (45 − 2). Without it, hours and hours×climate vary within teams:
// 302 − 45 − 2.
TEST(MixedModel, BetweenWithinDfCountGroupsAndColumns) {
    const Table t = teams_table();
    ModelSpec spec = teams_spec(true);
    spec.multilevel.df = FixedEffectDf::BetweenWithin;
    const FitResult slope = fit_model(t, spec);
    for (const auto& c : slope.coefficients) EXPECT_EQ(c.df, 43) << c.term;
    spec.multilevel.random_slopes.clear();
    const FitResult intercept = fit_model(t, spec);
    EXPECT_EQ(intercept.coefficients[0].df, 43);
    EXPECT_EQ(intercept.coefficients[1].df, 255);
    EXPECT_EQ(intercept.coefficients[2].df, 43);
    EXPECT_EQ(intercept.coefficients[3].df, 255);
    EXPECT_EQ(intercept.df_inference, 255);
    spec.multilevel.df = FixedEffectDf::Normal;
    const FitResult z = fit_model(t, spec);
    EXPECT_TRUE(std::isinf(z.df_inference));
    // z: the 97.5 % normal quantile, 1.959963984540054 (from memory).
    EXPECT_NEAR(z.coefficients[1].ci_upper - z.coefficients[1].estimate,
                1.959963984540054 * z.coefficients[1].std_error, 1e-12);
}

// The random slope's test equals the two fits' criteria by hand, with the
// 50:50 mixture of chi-square(1) and chi-square(2) from the closed forms
// P(X1 > s) = erfc(sqrt(s / 2)) and P(X2 > s) = exp(−s / 2).
TEST(MixedModel, TheRandomSlopeTestComparesTheTwoFitsByHand) {
    const Table t = teams_table();
    const FitResult with = fit_model(t, teams_spec(true)), without = fit_model(t, teams_spec(false));
    ASSERT_EQ(with.multilevel->slope_tests.size(), 1u);
    const auto& test = with.multilevel->slope_tests[0];
    EXPECT_EQ(test.term, "hours");
    const double s = 2 * (with.log_likelihood - without.log_likelihood);
    EXPECT_NEAR(test.statistic, s, 1e-9);
    EXPECT_NEAR(test.p_value, 0.5 * (std::erfc(std::sqrt(s / 2)) + std::exp(-s / 2)), 1e-12);
}

// Each team's conditional modes are T Z_g' V_g^-1 (y_g − X_g beta) and their
// conditional covariance T − T Z_g' V_g^-1 Z_g T (the usual BLUP forms,
// from memory), computed here densely; the fitted values add them.
TEST(MixedModel, GroupEffectsAreTheDenseBlups) {
    const Table t = teams_table();
    const ModelSpec spec = teams_spec(true);
    const Design d = build_design(t, spec);
    const FitResult f = fit_design(d, spec);
    const Dense dense = dense_of(d, f);
    const auto& m = *f.multilevel;
    ASSERT_EQ(m.group_effects.size(), m.groups_count);
    for (std::size_t g = 0; g < dense.rows.size(); ++g) {
        const auto& r = dense.rows[g];
        const Eigen::MatrixXd Zg = dense.block(dense.Z, r);
        const Eigen::MatrixXd Vi = dense.V(Zg, m.covariance, m.residual_variance).inverse();
        const Eigen::VectorXd e = dense.block(dense.y, r) - dense.block(dense.X, r) * f.beta;
        const Eigen::VectorXd u = m.covariance * Zg.transpose() * Vi * e;
        const Eigen::MatrixXd C = m.covariance - m.covariance * Zg.transpose() * Vi * Zg * m.covariance;
        EXPECT_LT((m.group_effects[g].mode - u).cwiseAbs().maxCoeff(), 1e-9 * (1 + u.cwiseAbs().maxCoeff()));
        EXPECT_LT((m.group_effects[g].covariance - C).cwiseAbs().maxCoeff(), 1e-9 * m.covariance.norm());
        EXPECT_EQ(m.group_effects[g].rows, r.size());
        EXPECT_EQ(m.group_effects[g].group, d.group_names[g]);
        const Eigen::Index i = r.front();
        EXPECT_NEAR(f.fitted[i], d.X.row(i).dot(f.beta) + Zg.row(0).dot(u), 1e-9 * std::abs(f.fitted[i]));
    }
}

// Group-mean centring and group means give the same fit as the columns
// made here by hand: hours minus its team mean, and the team mean as a
// predictor (Enders and Tofighi 2007). A row with a missing outcome is not
// part of its team's mean.
TEST(MixedModel, CentringOptionsEqualColumnsMadeByHand) {
    Table t = teams_table();
    t.find("score")->numbers[0] = missing_value();
    const auto& hours = t.at("hours").numbers;
    const auto& team = t.at("team").codes;
    std::vector<double> sum(t.at("team").levels.size()), count(sum.size());
    for (std::size_t r = 1; r < hours.size(); ++r) sum[team[r]] += hours[r], count[team[r]] += 1;
    Table by_hand = t;
    std::vector<double> within(hours.size()), mean(hours.size());
    for (std::size_t r = 0; r < hours.size(); ++r) {
        mean[r] = sum[team[r]] / count[team[r]];
        within[r] = hours[r] - mean[r];
    }
    by_hand.find("hours")->numbers = within;
    by_hand.columns.push_back(test::numeric_column("hours_group_mean", mean));
    ModelSpec spec = teams_spec(true);
    spec.interactions = {{"hours", "climate"}};
    spec.multilevel.centre_within = {"hours"};
    spec.multilevel.group_means = {"hours"};
    const FitResult options = fit_model(t, spec);
    ModelSpec plain = teams_spec(true);
    plain.predictors = {"hours_group_mean"};
    const FitResult manual = fit_model(by_hand, plain);
    ASSERT_EQ(options.coefficients.size(), manual.coefficients.size());
    for (std::size_t k = 0; k < manual.coefficients.size(); ++k) {
        EXPECT_EQ(options.coefficients[k].term, manual.coefficients[k].term);
        EXPECT_NEAR(options.coefficients[k].estimate, manual.coefficients[k].estimate, 1e-9);
    }
    EXPECT_TRUE(contains(options.notes, "hours is centred within groups by 'team'"));
    EXPECT_TRUE(contains(options.notes, "hours_group_mean is the mean of hours"));
    EXPECT_EQ(t.at("hours").numbers, hours);  // the table itself is untouched
}

// What a multilevel model cannot take gets a message naming the column.
TEST(MixedModel, BadSpecificationsAreNamed) {
    const Table t = teams_table();
    const auto error = [&](const std::function<void(ModelSpec&)>& edit) {
        ModelSpec s = teams_spec(true);
        edit(s);
        return test::input_error_of([&] { fit_model(t, s); });
    };
    EXPECT_NE(error([](ModelSpec& s) { s.multilevel.groups = "shift"; }).find("grouping column 'shift' not found"),
              std::string::npos);
    EXPECT_NE(error([](ModelSpec& s) { s.multilevel.random_slopes = {"team"}; }).find("random slope for 'team'"),
              std::string::npos);
    EXPECT_NE(error([](ModelSpec& s) {
                  s.multilevel.random_slopes = {"climate"};
              }).find("does not vary within any group of 'team'"),
              std::string::npos);
    EXPECT_NE(error([](ModelSpec& s) { s.multilevel.random_slopes = {"score"}; }).find("not a predictor"),
              std::string::npos);
    EXPECT_NE(error([](ModelSpec& s) { s.se = SeKind::HC3; }).find("takes its standard errors from the model"),
              std::string::npos);
    EXPECT_NE(error([](ModelSpec& s) { s.multilevel.centre_within = {"team"}; }).find("categorical"),
              std::string::npos);
    EXPECT_NE(error([](ModelSpec& s) {
                  s.multilevel.groups.clear();
                  s.multilevel.group_means = {"hours"};
              }).find("need a grouping column"),
              std::string::npos);
}

// Groups that cannot carry a multilevel model: one group; every group a
// single row (with or without a random slope); a constant slope column.
TEST(MixedModel, GroupsThatCannotCarryTheModelAreNamed) {
    const std::vector<double> x{1, 2, 3, 4, 5, 6, 7, 8}, y{2, 1, 4, 3, 6, 5, 8, 9};
    const auto fit_with = [&](const std::vector<std::string>& g, const std::vector<double>& slope_column) {
        ModelSpec s;
        s.outcome = "y";
        s.predictors = {"x", "c"};
        s.multilevel.groups = "g";
        s.multilevel.random_slopes = {"c"};
        const Table t = test::make_table({test::numeric_column("y", y), test::numeric_column("x", x),
                                          test::numeric_column("c", slope_column), test::categorical_column("g", g)});
        return test::input_error_of([&] { fit_model(t, s); });
    };
    const std::vector<double> varying{3, 1, 4, 1, 5, 9, 2, 6};
    EXPECT_NE(fit_with({"a", "a", "a", "a", "a", "a", "a", "a"}, varying).find("has a single group ('a')"),
              std::string::npos);
    EXPECT_NE(fit_with({"a", "b", "c", "d", "e", "f", "g", "h"}, varying).find("every group of 'g' has a single"),
              std::string::npos);
    EXPECT_NE(fit_with({"a", "a", "b", "b", "c", "c", "d", "d"}, std::vector<double>(8, 2.0)).find("constant"),
              std::string::npos);
}

// Cautions: a random slope's moderator that varies within groups, rows with
// no group, and few groups.
TEST(MixedModel, WarnsAboutModeratorsGroupsAndMissingIds) {
    Table t = teams_table();
    t.find("team")->codes[5] = kMissingCode;
    ModelSpec s = teams_spec(true);
    s.interactions = {{"hours", "climate"}, {"hours", "score_lag"}};
    std::vector<double> lag(t.rows());
    for (std::size_t r = 0; r < lag.size(); ++r) lag[r] = std::fmod(37.0 * static_cast<double>(r), 11.0);
    t.columns.push_back(test::numeric_column("score_lag", lag));
    const FitResult f = fit_model(t, s);
    EXPECT_TRUE(contains(f.warnings, "'score_lag' varies within groups of 'team' but moderates the random slope"));
    EXPECT_FALSE(contains(f.warnings, "'climate' varies"));
    EXPECT_TRUE(contains(f.warnings, "1 row has no group in 'team'"));
    EXPECT_FALSE(contains(f.warnings, "groups of 'team': variance components"));
    Table few = teams_table();
    auto& codes = few.find("team")->codes;
    for (auto& c : codes) c = c % 12;
    EXPECT_TRUE(contains(fit_model(few, teams_spec(false)).warnings, "only 12 groups of 'team'"));
}

// A group's own line: the fixed part at the group's climate plus its
// conditional modes, which for a group-level moderator equals the fit's
// conditional fitted value of each of the group's rows (computed here from
// the fitted values). Twelve groups spread evenly over climate.
TEST(MixedModel, GroupLinesReproduceTheConditionalFit) {
    const Table t = teams_table();
    const ModelSpec spec = teams_spec(true);
    const Design d = build_design(t, spec);
    const FitResult f = fit_design(d, spec);
    const auto lines = group_lines(d, f, "hours", "climate", 12);
    ASSERT_EQ(lines.size(), 12u);
    for (std::size_t k = 1; k < lines.size(); ++k) EXPECT_LE(lines[k - 1].moderator, lines[k].moderator);
    for (const auto& line : lines)
        for (std::size_t i = 0; i < d.group.size(); ++i) {
            if (d.group_names[d.group[i]] != line.group) continue;
            const auto r = static_cast<Eigen::Index>(i);
            const double x = d.X(r, 1), w = line.moderator;
            const double fixed = f.beta[0] + f.beta[1] * x + f.beta[2] * w + f.beta[3] * x * w;
            EXPECT_NEAR(fixed + line.intercept_shift + line.slope_shift * x, f.fitted[r], 1e-9 * std::abs(f.fitted[r]));
        }
    EXPECT_EQ(group_lines(d, f, "hours", "climate", 100).size(), 45u);
}

// Open data shipped with statsmodels: Grunfeld's investment panel
// (statsmodels/datasets/grunfeld, 11 firms × 20 years; in the fixture
// mixed_grunfeld.csv), invest ~ value + capital with a random intercept and
// a random slope of value by firm (REML, ML), and a random intercept alone
// (REML), against statsmodels 0.13 MixedLM.fit: our criterion no worse than
// statsmodels'; where statsmodels reached the same optimum (to 1e-8: its
// ML fit stops 6 short and says so, its random-intercept fit 3e-7 short on
// a flat ridge, where the SEs still move by 1.5e-4), fixed effects to 1e-5
// and their SEs to 1e-4. With 11 firms the fit warns.
TEST(MixedModel, GrunfeldPanelMatchesStatsmodels) {
    const auto doc = test::read_fixture_json(test::reference_fixture("mixed_grunfeld.json"));
    CsvOptions o;
    o.column_kinds["firm"] = ColumnKind::Categorical;
    const Table t = read_csv(test::reference_fixture("mixed_grunfeld.csv").string(), o);
    int detailed = 0;
    for (const auto& ref : doc.at("fits")) {
        ModelSpec s;
        s.outcome = "invest";
        s.predictors = {"value", "capital"};
        s.multilevel.groups = "firm";
        if (ref.at("random").size() == 2) s.multilevel.random_slopes = {"value"};
        s.multilevel.estimation = parse_mixed_estimation(ref.at("estimation").get<std::string>());
        SCOPED_TRACE(ref.at("estimation").get<std::string>() + " " + ref.at("random").dump());
        const FitResult f = fit_model(t, s);
        const double criterion = ref.at("criterion").get<double>();
        EXPECT_GE(f.log_likelihood, criterion - 1e-6);
        EXPECT_TRUE(contains(f.warnings, "only 11 groups of 'firm'"));
        if (std::abs(f.log_likelihood - criterion) > 1e-8) continue;
        ++detailed;
        for (std::size_t k = 0; k < 3; ++k) {
            const double b = ref.at("fixed_effects")[k].get<double>(), se = ref.at("std_errors_gls")[k].get<double>();
            EXPECT_NEAR(f.coefficients[k].estimate, b, 1e-5 * (1 + std::abs(b))) << f.coefficients[k].term;
            EXPECT_NEAR(f.coefficients[k].std_error, se, 1e-4 * se) << f.coefficients[k].term;
        }
    }
    EXPECT_GE(detailed, 1);
}
