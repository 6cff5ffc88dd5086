// The bootstrap engine: seeded replicates identical for any thread count,
// bootstrap SE against the classical SE on a large homoskedastic sample
// (simulation with known truth), closed-form checks of the percentile and
// BCa machinery, failures counted by reason, cancellation, and cluster
// resampling that keeps clusters whole. Data are generated in memory with a
// portable generator (raw mt19937_64 output; no std:: distributions).
#include <gtest/gtest.h>

#include <cmath>
#include <map>
#include <numbers>
#include <random>
#include <set>

#include "common/table_builder.hpp"
#include "moderato/estimation/bootstrap.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe_bootstrap.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {

// Uniform on [0, 1) from the top 53 bits: the same numbers on every platform.
double unit(std::mt19937_64& g) { return static_cast<double>(g() >> 11) * 0x1.0p-53; }
double uniform(std::mt19937_64& g, double lo, double hi) { return lo + (hi - lo) * unit(g); }
double normal(std::mt19937_64& g) {  // Box–Muller
    const double u1 = 1.0 - unit(g), u2 = unit(g);
    return std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * std::numbers::pi * u2);
}

// y = 1 + 0.5 g + 0.8 x + 0.4 g x + e, g = i mod 2, x ~ U(-1, 1).
Table linear_data(std::size_t n, std::uint64_t seed, bool uniform_errors = false) {
    std::mt19937_64 rng(seed);
    std::vector<double> y, x, g;
    for (std::size_t i = 0; i < n; ++i) {
        const double xi = uniform(rng, -1, 1), gi = static_cast<double>(i % 2);
        const double e = uniform_errors ? uniform(rng, -std::sqrt(3.0), std::sqrt(3.0)) : normal(rng);
        x.push_back(xi);
        g.push_back(gi);
        y.push_back(1 + 0.5 * gi + 0.8 * xi + 0.4 * gi * xi + e);
    }
    return make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("g", g)});
}

ModelSpec interaction_spec() {
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"g", "x"};
    s.interactions = {{"g", "x"}};
    return s;
}

BootstrapStatistic coefficients(std::vector<std::string> labels) {
    return [labels](const Design&, const FitResult& f) {
        Eigen::VectorXd v(static_cast<Eigen::Index>(labels.size()));
        for (std::size_t k = 0; k < labels.size(); ++k) v[static_cast<Eigen::Index>(k)] = f.beta[f.index_of(labels[k])];
        return v;
    };
}

bool same_bits(const Eigen::MatrixXd& a, const Eigen::MatrixXd& b) {
    if (a.rows() != b.rows() || a.cols() != b.cols()) return false;
    for (Eigen::Index i = 0; i < a.size(); ++i) {
        const double u = a.data()[i], v = b.data()[i];
        if (std::isnan(u) != std::isnan(v) || (!std::isnan(u) && u != v)) return false;
    }
    return true;
}

int failures_with(const BootstrapResult& r, const std::string& prefix) {
    int count = 0;
    for (const auto& [why, k] : r.failures)
        if (why.rfind(prefix, 0) == 0) count += k;
    return count;
}

}  // namespace

// ---- the interval machinery on fixed numbers --------------------------------

TEST(BootstrapIntervals, Type7QuantilesAndPercentileInterval) {
    std::vector<double> v;
    for (int i = 1; i <= 100; ++i) v.push_back(i);
    // Closed form, Hyndman & Fan (1996) type 7: h = (N - 1) p; 1 + h for 1..N.
    EXPECT_DOUBLE_EQ(quantile_type7(v, 0.025), 3.475);
    EXPECT_DOUBLE_EQ(quantile_type7(v, 0.975), 97.525);
    EXPECT_DOUBLE_EQ(quantile_type7(v, 0.0), 1.0);
    EXPECT_DOUBLE_EQ(quantile_type7(v, 1.0), 100.0);
    EXPECT_DOUBLE_EQ(quantile_type7(v, 0.5), 50.5);

    // Shuffled input and a non-finite value (an undefined replicate) change nothing.
    std::vector<double> shuffled;
    for (int i = 0; i < 100; ++i) shuffled.push_back(static_cast<double>((i * 37) % 100 + 1));
    shuffled.push_back(std::numeric_limits<double>::quiet_NaN());
    const BootstrapInterval iv = bootstrap_interval(shuffled, 50.5, 0.0, 0.95);
    EXPECT_EQ(iv.valid_replicates, 100);
    // Closed form, as above ((1 - 0.95) / 2 is 0.025 only to within rounding).
    EXPECT_NEAR(iv.percentile_lower, 3.475, 1e-12);
    EXPECT_NEAR(iv.percentile_upper, 97.525, 1e-12);
    // Closed form: the variance of 1..N with divisor N - 1 is N (N + 1) / 12.
    EXPECT_NEAR(iv.std_error, std::sqrt(100.0 * 101.0 / 12.0), 1e-12);
    // 50 of 100 replicates below the estimate: z0 = Phi^-1(1/2) = 0 (Efron 1987),
    // and with a = 0 the BCa levels are the percentile levels.
    EXPECT_DOUBLE_EQ(iv.bias_correction_z0, 0.0);
    EXPECT_DOUBLE_EQ(iv.bca_lower, iv.percentile_lower);
    EXPECT_DOUBLE_EQ(iv.bca_upper, iv.percentile_upper);
}

TEST(BootstrapIntervals, BcaAdjustedLevels) {
    std::vector<double> v;
    for (int i = 1; i <= 1000; ++i) v.push_back(i);
    // Efron (1987) BCa levels Phi(z0 + (z0 + z_q) / (1 - a (z0 + z_q))), evaluated
    // with scipy 1.10 (norm.ppf / norm.cdf) and numpy.quantile (type 7) on 1..1000:
    //   z0 = norm.ppf(0.6) = 0.2533471031357997; a = -0.05; level 0.95
    //   -> levels 0.053428481444445806, 0.9876520368321869 -> 54.37505296300136, 987.6643847953547
    const BootstrapInterval a = bootstrap_interval(v, 600.5, -0.05, 0.95);
    EXPECT_NEAR(a.bias_correction_z0, 0.2533471031357997, 1e-12);
    EXPECT_NEAR(a.bca_lower, 54.37505296300136, 1e-8);
    EXPECT_NEAR(a.bca_upper, 987.6643847953547, 1e-8);
    //   z0 = 0, a = 0.1, level 0.90 -> levels 0.07889911470164473, 0.9755045713193511
    //   -> 79.82021558694309, 975.5290667480317
    const BootstrapInterval b = bootstrap_interval(v, 500.5, 0.1, 0.90);
    EXPECT_DOUBLE_EQ(b.bias_correction_z0, 0.0);
    EXPECT_NEAR(b.bca_lower, 79.82021558694309, 1e-8);
    EXPECT_NEAR(b.bca_upper, 975.5290667480317, 1e-8);
    EXPECT_NEAR(b.bca_lower_level, 0.07889911470164473, 1e-12);
    EXPECT_NEAR(b.bca_upper_level, 0.9755045713193511, 1e-12);
    // The percentile interval ignores z0 and a (closed form, type 7: 1 + 999 q).
    EXPECT_NEAR(b.percentile_lower, 1 + 999 * 0.05, 1e-9);
    EXPECT_NEAR(b.percentile_upper, 1 + 999 * 0.95, 1e-9);

    // The estimate beyond every replicate: z0 is infinite and BCa undefined
    // (Efron 1987: z0 = Phi^-1 of the share below); percentile still given.
    const BootstrapInterval c = bootstrap_interval(v, 2000.0, 0.0, 0.95);
    EXPECT_TRUE(std::isinf(c.bias_correction_z0));
    EXPECT_TRUE(std::isnan(c.bca_lower));
    EXPECT_TRUE(std::isnan(c.bca_upper));
    EXPECT_NEAR(c.percentile_lower, 1 + 999 * 0.025, 1e-9);  // closed form, type 7
}

TEST(BootstrapIntervals, JackknifeAcceleration) {
    // Closed form: values {0,0,0,1}: mean 1/4, u = (1/4, 1/4, 1/4, -3/4),
    // sum u^3 = -3/8, sum u^2 = 3/4, a = (-3/8) / (6 (3/4)^1.5) (Efron 1987).
    EXPECT_NEAR(jackknife_acceleration({0, 0, 0, 1}), -0.375 / (6 * std::pow(0.75, 1.5)), 1e-15);
    // Closed form: the acceleration is odd in the values and 0 for symmetric ones.
    EXPECT_NEAR(jackknife_acceleration({0, 0, 0, -1}), 0.375 / (6 * std::pow(0.75, 1.5)), 1e-15);
    EXPECT_DOUBLE_EQ(jackknife_acceleration({-2, -1, 0, 1, 2}), 0.0);
    EXPECT_DOUBLE_EQ(jackknife_acceleration({3, 3, 3}), 0.0);
    // Non-finite values (failed jackknife fits) are left out.
    EXPECT_NEAR(jackknife_acceleration({0, std::numeric_limits<double>::quiet_NaN(), 0, 0, 1}),
                -0.375 / (6 * std::pow(0.75, 1.5)), 1e-15);
    EXPECT_TRUE(std::isnan(jackknife_acceleration({1.0})));
}

// ---- the engine -------------------------------------------------------------

TEST(Bootstrap, SameNumbersForAnyThreadCountAndSeedMatters) {
    const Table t = linear_data(150, 7);
    const ModelSpec spec = interaction_spec();
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 120;
    o.seed = 42;
    o.threads = 1;
    const auto stat = coefficients({"g", "x", "g×x"});
    const BootstrapResult one = bootstrap(d, spec, stat, o);
    o.threads = 2;
    const BootstrapResult two = bootstrap(d, spec, stat, o);
    o.threads = 3;
    const BootstrapResult three = bootstrap(d, spec, stat, o);
    ASSERT_EQ(one.replicates.rows(), 120);
    ASSERT_EQ(one.replicates.cols(), 3);
    EXPECT_TRUE(same_bits(one.replicates, two.replicates));  // common practice: one stream per replicate
    EXPECT_TRUE(same_bits(one.replicates, three.replicates));
    for (std::size_t k = 0; k < 3; ++k) {
        EXPECT_EQ(one.intervals[k].bca_lower, two.intervals[k].bca_lower);
        EXPECT_EQ(one.intervals[k].acceleration, two.intervals[k].acceleration);
    }
    o.seed = 43;
    const BootstrapResult other = bootstrap(d, spec, stat, o);
    EXPECT_FALSE(same_bits(one.replicates, other.replicates));
    // Another seed gives other replicates but the same estimate (full sample).
    EXPECT_EQ(one.intervals[0].estimate, other.intervals[0].estimate);
    EXPECT_EQ(one.completed, 120);
    EXPECT_TRUE(one.failures.empty());
    EXPECT_EQ(one.resampling, Resampling::Cases);
    EXPECT_EQ(resampling_text(one), "cases");
    EXPECT_EQ(jackknife_text(one), "leave one row out (n = 150)");
}

TEST(Bootstrap, StandardErrorMatchesClassicalInLargeHomoskedasticSample) {
    // Simulation with known truth: homoskedastic errors, so the classical SE
    // is right and the case-resampling SE estimates the same quantity. The
    // statistics are the conditional effect of g at x = 0 (the coefficient
    // of g) and the intercept; with x ~ U(-1, 1) and light-tailed (uniform)
    // errors the sample-to-sample noise of the bootstrap SE is about 0.7 %
    // and the Monte Carlo noise with B = 1500 about 1.8 % (1/sqrt(2B)), so 5 %
    // is a wide margin (common practice).
    const Table t = linear_data(4000, 2024, /*uniform_errors=*/true);
    const ModelSpec spec = interaction_spec();
    const Design d = build_design(t, spec);
    const FitResult fit = fit_design(d, spec);
    BootstrapOptions o;
    o.replicates = 1500;
    o.seed = 5;
    const BootstrapResult r = bootstrap(d, spec, coefficients({"g", "intercept"}), o);
    ASSERT_EQ(r.completed, 1500);
    const double se_g = fit.coefficients[static_cast<std::size_t>(fit.index_of("g"))].std_error;
    const double se_0 = fit.coefficients[static_cast<std::size_t>(fit.index_of("intercept"))].std_error;
    EXPECT_NEAR(r.intervals[0].std_error / se_g, 1.0, 0.05);
    EXPECT_NEAR(r.intervals[1].std_error / se_0, 1.0, 0.05);
    // The estimate is the full-sample coefficient.
    EXPECT_EQ(r.intervals[0].estimate, fit.beta[fit.index_of("g")]);
    // Large sample, near-normal statistic: percentile and BCa endpoints agree
    // with estimate -/+ 1.96 SE to within a fraction of an SE (common practice).
    for (const auto& iv : r.intervals) {
        EXPECT_NEAR(iv.percentile_lower, iv.estimate - 1.96 * iv.std_error, 0.25 * iv.std_error);
        EXPECT_NEAR(iv.percentile_upper, iv.estimate + 1.96 * iv.std_error, 0.25 * iv.std_error);
        EXPECT_NEAR(iv.bca_lower, iv.percentile_lower, 0.25 * iv.std_error);
        EXPECT_NEAR(iv.bca_upper, iv.percentile_upper, 0.25 * iv.std_error);
        // Grouped jackknife: the acceleration of a near-linear statistic with
        // symmetric errors is about 0 (from memory: a is of order 1/sqrt(n),
        // Efron & Tibshirani 1993, ch. 14).
        EXPECT_LT(std::abs(iv.acceleration), 0.05);
    }
    EXPECT_EQ(r.jackknife_groups, 200);
    EXPECT_EQ(jackknife_text(r), "grouped: 200 groups (row i in group i mod 200)");
}

TEST(Bootstrap, FailuresAreCountedByReasonAndLeftOutOfIntervals) {
    // A rare level with 2 of 60 rows: a resample misses both with probability
    // (58/60)^60 = 0.1307 (closed form); its dummy is then constant.
    const std::size_t n = 60;
    std::mt19937_64 rng(11);
    std::vector<double> y, x;
    std::vector<std::string> grp;
    for (std::size_t i = 0; i < n; ++i) {
        const std::string level = i == 7 || i == 41 ? "r" : (i % 2 ? "a" : "b");
        const double xi = uniform(rng, 0, 4);
        x.push_back(xi);
        grp.push_back(level);
        y.push_back(2 + 0.7 * xi + (level == "r" ? 1.5 : level == "b" ? 0.5 : 0) + normal(rng));
    }
    const Table t = make_table({numeric_column("y", y), numeric_column("x", x), categorical_column("grp", grp)});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "grp"};
    const Design d = build_design(t, spec);
    const int rare = d.column_index("grp=r");
    ASSERT_GE(rare, 0);
    // The statistic: the slope of x, and how many rows of the rare level the replicate holds.
    BootstrapStatistic stat = [rare](const Design& rd, const FitResult& f) {
        Eigen::VectorXd v(2);
        v[0] = f.beta[f.index_of("x")];
        v[1] = rd.X.col(rare).sum();
        return v;
    };
    BootstrapOptions o;
    o.replicates = 400;
    o.seed = 3;
    const BootstrapResult r = bootstrap(d, spec, stat, o);
    const int constant = failures_with(r, "constant column in the resample ('grp=r')");
    // Binomial(400, 0.1307): mean 52.3, SD 6.7; 4 SD either side (closed form).
    EXPECT_GT(constant, 25);
    EXPECT_LT(constant, 79);
    int failed = 0;
    for (const auto& [why, k] : r.failures) failed += k;
    EXPECT_EQ(failed, constant);  // no other reason here
    EXPECT_EQ(r.completed + failed, r.requested);
    EXPECT_EQ(r.intervals[0].valid_replicates, r.completed);
    int nan_rows = 0;
    for (Eigen::Index i = 0; i < r.replicates.rows(); ++i) {
        if (std::isnan(r.replicates(i, 0))) {
            ++nan_rows;
            continue;
        }
        EXPECT_GE(r.replicates(i, 1), 1.0);  // every successful replicate drew the rare level
    }
    EXPECT_EQ(nan_rows, failed);
    EXPECT_TRUE(std::isfinite(r.intervals[0].percentile_lower));
    EXPECT_TRUE(std::isfinite(r.intervals[0].bca_upper));
    EXPECT_TRUE(r.warnings.empty() || r.warnings.front().find("only") == std::string::npos);
}

TEST(Bootstrap, WarnsWhenMostReplicatesFail) {
    // Three single-row levels among 40 rows: a replicate draws all three with
    // probability about (1 - (39/40)^40)^3 = 0.25 (closed form), so most fail.
    std::vector<double> y, x;
    std::vector<std::string> grp;
    std::mt19937_64 rng(5);
    for (int i = 0; i < 40; ++i) {
        x.push_back(uniform(rng, 0, 1));
        grp.push_back(i == 3 ? "p" : i == 4 ? "q" : i == 5 ? "s" : "main");
        y.push_back(x.back() + normal(rng));
    }
    const Table t = make_table({numeric_column("y", y), numeric_column("x", x), categorical_column("grp", grp)});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "grp"};
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 100;
    const BootstrapResult r = bootstrap(d, spec, coefficients({"x"}), o);
    EXPECT_LT(r.completed, 50);
    EXPECT_GT(r.completed, 5);
    bool warned = false;
    for (const auto& w : r.warnings) warned |= w.find("only " + std::to_string(r.completed) + " of 100") == 0;
    EXPECT_TRUE(warned);
    EXPECT_TRUE(std::isfinite(r.intervals[0].percentile_lower));  // still given
}

TEST(Bootstrap, UndefinedStatisticIsAFailureWithItsReason) {
    const Table t = linear_data(80, 9);
    const ModelSpec spec = interaction_spec();
    const Design d = build_design(t, spec);
    // NaN whenever the replicate's slope of x is below the full-sample one
    // (about half the replicates, common practice), else the slope.
    const FitResult full = fit_design(d, spec);
    const double b = full.beta[full.index_of("x")];
    BootstrapStatistic stat = [b](const Design&, const FitResult& f) {
        Eigen::VectorXd v(2);
        v[0] = f.beta[f.index_of("x")];
        v[1] = v[0] < b ? std::numeric_limits<double>::quiet_NaN() : v[0];
        return v;
    };
    BootstrapOptions o;
    o.replicates = 200;
    const BootstrapResult r = bootstrap(d, spec, stat, o);
    const int undefined = failures_with(r, "statistic undefined");
    EXPECT_EQ(r.completed + undefined, 200);
    EXPECT_EQ(r.intervals[1].valid_replicates, r.completed);
    EXPECT_EQ(r.intervals[0].valid_replicates, 200);  // the defined value keeps every replicate
    EXPECT_GT(undefined, 60);                         // Binomial(200, 1/2): 100 +- 7 (closed form)
    EXPECT_LT(undefined, 140);
}

TEST(Bootstrap, CancelFromProgressCallback) {
    const Table t = linear_data(100, 3);
    const ModelSpec spec = interaction_spec();
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 500;
    o.threads = 2;
    int calls = 0, last_done = 0, seen_total = 0;
    o.progress = [&](int done, int total) {
        ++calls;
        EXPECT_GT(done, last_done);  // increasing
        last_done = done;
        seen_total = total;
        return done < 100;
    };
    EXPECT_THROW(bootstrap(d, spec, coefficients({"x"}), o), Cancelled);
    EXPECT_GE(last_done, 100);
    EXPECT_LT(last_done, 300);         // stopped long before the end
    EXPECT_EQ(seen_total, 500 + 100);  // replicates + leave-one-out jackknife fits
    EXPECT_GE(calls, 2);

    // Without cancelling, the last report is done == total.
    o.replicates = 100;
    last_done = 0;
    o.progress = [&](int done, int total) {
        last_done = done;
        seen_total = total;
        return true;
    };
    bootstrap(d, spec, coefficients({"x"}), o);
    EXPECT_EQ(last_done, seen_total);
}

TEST(Bootstrap, ClusterResamplingKeepsClustersWhole) {
    // 12 clusters of unequal sizes 3..14 (sum 102), each with its own shift.
    const int G = 12;
    std::mt19937_64 rng(21);
    std::vector<double> y, x, cl;
    std::vector<int> size(G);
    for (int c = 0; c < G; ++c) {
        size[c] = 3 + c;
        const double shift = normal(rng);
        for (int k = 0; k < size[c]; ++k) {
            x.push_back(uniform(rng, -1, 1));
            cl.push_back(100 + c);
            y.push_back(1 + 0.5 * x.back() + shift + normal(rng));
        }
    }
    // Interleave the rows of the clusters so that rows of one cluster are not adjacent.
    std::vector<std::size_t> perm(x.size());
    for (std::size_t i = 0; i < perm.size(); ++i) perm[i] = (i * 37) % perm.size();  // 37 coprime to 102
    std::vector<double> y2, x2, cl2;
    for (auto i : perm) {
        y2.push_back(y[i]);
        x2.push_back(x[i]);
        cl2.push_back(cl[i]);
    }
    const Table t = make_table({numeric_column("y", y2), numeric_column("x", x2), numeric_column("school", cl2)});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.cluster = "school";
    spec.se = SeKind::Cluster;
    const Design d = build_design(t, spec);
    ASSERT_EQ(d.n_clusters, G);
    const std::vector<double>& label_of_row = cl2;  // table row -> original cluster
    std::map<double, int> cluster_size;
    for (double c : cl2) ++cluster_size[c];

    // Returns: rows, clusters, 1 if every replicate cluster is exactly one whole
    // original cluster, distinct table rows, the sizes of the distinct drawn clusters.
    BootstrapStatistic stat = [&](const Design& rd, const FitResult& f) {
        std::map<int, std::vector<std::size_t>> by_new;
        for (std::size_t i = 0; i < rd.cluster.size(); ++i) by_new[rd.cluster[i]].push_back(rd.rows[i]);
        bool whole = static_cast<int>(by_new.size()) == rd.n_clusters && rd.cluster.size() == rd.n();
        std::set<double> drawn;
        for (const auto& [id, rows] : by_new) {
            const double label = label_of_row[rows.front()];
            std::set<std::size_t> distinct(rows.begin(), rows.end());
            whole = whole && distinct.size() == rows.size() && static_cast<int>(rows.size()) == cluster_size.at(label);
            for (auto r : rows) whole = whole && label_of_row[r] == label;
            drawn.insert(label);
        }
        double drawn_sizes = 0;
        for (double l : drawn) drawn_sizes += cluster_size.at(l);
        Eigen::VectorXd v(6);
        v << static_cast<double>(rd.n()), rd.n_clusters, whole ? 1.0 : 0.0,
            static_cast<double>(std::set<std::size_t>(rd.rows.begin(), rd.rows.end()).size()), drawn_sizes,
            f.beta[f.index_of("x")];
        return v;
    };
    BootstrapOptions o;
    o.replicates = 150;
    o.seed = 8;
    const BootstrapResult r = bootstrap(d, spec, stat, o);
    EXPECT_EQ(r.resampling, Resampling::Clusters);
    EXPECT_EQ(resampling_text(r), "clusters (G = 12)");
    EXPECT_EQ(jackknife_text(r), "leave one cluster out (G = 12)");
    ASSERT_EQ(r.completed, 150);
    std::set<double> sizes;
    int repeated = 0;
    for (Eigen::Index i = 0; i < r.replicates.rows(); ++i) {
        EXPECT_EQ(r.replicates(i, 1), G);                   // G clusters drawn, repeats counted apart
        EXPECT_EQ(r.replicates(i, 2), 1.0);                 // each one a whole original cluster
        EXPECT_EQ(r.replicates(i, 3), r.replicates(i, 4));  // distinct rows = sizes of distinct clusters
        sizes.insert(r.replicates(i, 0));
        if (r.replicates(i, 0) > r.replicates(i, 3)) ++repeated;
    }
    // Unequal cluster sizes: the replicate size varies (it would not under case resampling).
    EXPECT_GT(sizes.size(), 10u);
    // P(no cluster repeated) = 12!/12^12 = 5.4e-5 (closed form): nearly every replicate repeats one.
    EXPECT_GT(repeated, 140);
}

TEST(Bootstrap, ReplicateDesignHoldsDrawnRowsWithOriginalLabels) {
    const Table t = linear_data(50, 12);
    const ModelSpec spec = interaction_spec();
    const Design d = build_design(t, spec);
    std::map<std::size_t, Eigen::Index> position;  // table row -> design row
    for (std::size_t i = 0; i < d.rows.size(); ++i) position[d.rows[i]] = static_cast<Eigen::Index>(i);
    const int xj = d.column_index("x");
    // 1 if the replicate rows are copies of original rows (X and y), labels
    // match, and the summaries describe the replicate's own rows.
    BootstrapStatistic stat = [&](const Design& rd, const FitResult&) {
        bool ok = rd.n() == d.n() && rd.columns.size() == d.columns.size();
        for (std::size_t j = 0; ok && j < d.columns.size(); ++j) ok = rd.columns[j].label == d.columns[j].label;
        for (Eigen::Index i = 0; ok && i < rd.X.rows(); ++i) {
            const Eigen::Index o = position.at(rd.rows[static_cast<std::size_t>(i)]);
            ok = rd.X.row(i) == d.X.row(o) && rd.y[i] == d.y[o];
        }
        const auto& s = rd.summaries.at("x");
        const double mean = rd.X.col(xj).mean();
        ok = ok && std::abs(s.mean - mean) < 1e-12 && s.min == rd.X.col(xj).minCoeff() &&
             s.max == rd.X.col(xj).maxCoeff();
        Eigen::VectorXd v(2);
        v << (ok ? 1.0 : 0.0), s.mean;
        return v;
    };
    BootstrapOptions o;
    o.replicates = 100;
    const BootstrapResult r = bootstrap(d, spec, stat, o);
    ASSERT_EQ(r.completed, 100);
    EXPECT_EQ(r.replicates.col(0).minCoeff(), 1.0);
    // Summaries are recomputed: the replicate means of x vary (closed form:
    // SD of a resampled mean is sd(x)/sqrt(n) > 0).
    EXPECT_GT(r.replicates.col(1).maxCoeff() - r.replicates.col(1).minCoeff(), 0.01);
    EXPECT_EQ(r.intervals[1].estimate, d.summaries.at("x").mean);
}

TEST(Bootstrap, LogisticModel) {
    // Simulation with known truth: logit P(y=1) = -0.3 + 0.9 x, x ~ U(-2, 2).
    // The bootstrap SE of the slope estimates the same quantity as the
    // model-based SE; with B = 200 and n = 400 they agree within 25 %
    // (Monte Carlo noise 5 %, sampling noise of the comparison below 10 %;
    // common practice).
    std::mt19937_64 rng(31);
    std::vector<double> y, x;
    for (int i = 0; i < 400; ++i) {
        const double xi = uniform(rng, -2, 2);
        x.push_back(xi);
        y.push_back(unit(rng) < 1.0 / (1.0 + std::exp(-(-0.3 + 0.9 * xi))) ? 1.0 : 0.0);
    }
    const Table t = make_table({numeric_column("y", y), numeric_column("x", x)});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.family = Family::Logistic;
    const Design d = build_design(t, spec);
    const FitResult fit = fit_design(d, spec);
    BootstrapOptions o;
    o.replicates = 200;
    const BootstrapResult r = bootstrap(d, spec, coefficients({"x"}), o);
    EXPECT_EQ(r.completed, 200);
    EXPECT_NEAR(r.intervals[0].std_error / fit.coefficients[1].std_error, 1.0, 0.25);
    EXPECT_LT(r.intervals[0].percentile_lower, r.intervals[0].estimate);
    EXPECT_GT(r.intervals[0].percentile_upper, r.intervals[0].estimate);
}

TEST(Bootstrap, LogisticSeparationInSomeReplicatesIsCounted) {
    // Binary x, 30 rows each; among the x = 1 rows only rows 1 and 3 have y = 1.
    // A resample that misses both (probability (58/60)^60 = 0.1307, closed
    // form) is quasi-completely separated by x.
    std::mt19937_64 rng(17);
    std::vector<double> y, x;
    for (int i = 0; i < 60; ++i) {
        const double xi = i % 2;
        x.push_back(xi);
        y.push_back(xi == 1 ? (i == 1 || i == 3 ? 1.0 : 0.0) : (unit(rng) < 0.5 ? 1.0 : 0.0));
    }
    const Table t = make_table({numeric_column("y", y), numeric_column("x", x)});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.family = Family::Logistic;
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 300;
    const BootstrapResult r = bootstrap(d, spec, coefficients({"x"}), o);
    const int separated = failures_with(r, "separation in the logistic fit");
    // Binomial(300, 0.1307): mean 39.2, SD 5.8 (closed form).
    EXPECT_GT(separated, 18);
    EXPECT_LT(separated, 62);
    int failed = 0;
    for (const auto& [why, k] : r.failures) failed += k;
    EXPECT_EQ(r.completed + failed, 300);
    EXPECT_EQ(r.intervals[0].valid_replicates, r.completed);
}

// ---- bad input ----------------------------------------------------------------

TEST(BootstrapInput, TooFewReplicates) {
    const Table t = linear_data(60, 1);
    const ModelSpec spec = interaction_spec();
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 99;
    try {
        bootstrap(d, spec, coefficients({"x"}), o);
        FAIL() << "expected InputError";
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("the bootstrap needs at least 100 replicates, got 99"), std::string::npos)
            << e.what();
    }
}

TEST(BootstrapInput, TooFewRows) {
    ModelSpec spec = interaction_spec();
    BootstrapOptions o;
    o.replicates = 100;
    {
        const Design d = build_design(linear_data(9, 1), spec);  // n = 9 < 10
        try {
            bootstrap(d, spec, coefficients({"x"}), o);
            FAIL() << "expected InputError";
        } catch (const InputError& e) {
            EXPECT_NE(std::string(e.what()).find("n = 9 rows for p = 4 coefficients"), std::string::npos) << e.what();
        }
    }
    {
        // p = 7 with two more numeric predictors and their products: n = 12 < 2p.
        std::mt19937_64 rng(2);
        std::vector<double> y, a, b, c;
        for (int i = 0; i < 12; ++i) {
            a.push_back(unit(rng));
            b.push_back(unit(rng));
            c.push_back(unit(rng));
            y.push_back(unit(rng));
        }
        const Table t = make_table(
            {numeric_column("y", y), numeric_column("a", a), numeric_column("b", b), numeric_column("c", c)});
        ModelSpec s;
        s.outcome = "y";
        s.interactions = {{"a", "b"}, {"a", "c"}, {"b", "c"}};
        const Design d = build_design(t, s);
        ASSERT_EQ(d.p(), 7u);
        try {
            bootstrap(d, s, coefficients({"a"}), o);
            FAIL() << "expected InputError";
        } catch (const InputError& e) {
            EXPECT_NE(std::string(e.what()).find("n = 12 rows for p = 7 coefficients"), std::string::npos) << e.what();
        }
    }
}

TEST(BootstrapInput, TooFewClusters) {
    const Table base = linear_data(40, 4);
    std::vector<double> cl;
    for (int i = 0; i < 40; ++i) cl.push_back(i % 4);
    Table t = base;
    t.columns.push_back(numeric_column("site", cl));
    ModelSpec spec = interaction_spec();
    spec.cluster = "site";
    spec.se = SeKind::Cluster;
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 100;
    try {
        bootstrap(d, spec, coefficients({"x"}), o);
        FAIL() << "expected InputError";
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("cluster resampling needs at least 5 clusters, but 'site' has G = 4"),
                  std::string::npos)
            << e.what();
    }
}

TEST(BootstrapInput, AliasedFullSampleIsRefused) {
    Table t = linear_data(60, 4);
    t.columns.push_back(numeric_column("x_copy", t.at("x").numbers));
    ModelSpec spec = interaction_spec();
    spec.predictors.push_back("x_copy");
    const Design d = build_design(t, spec);
    BootstrapOptions o;
    o.replicates = 100;
    try {
        bootstrap(d, spec, coefficients({"g"}), o);
        FAIL() << "expected InputError";
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("aliased terms"), std::string::npos) << e.what();
    }
}

TEST(Bootstrap, ProbabilityScaleProbeWithACategoricalSecondModerator) {
    // A three-way logistic model whose second moderator is categorical: left
    // at its default, it is held at its reference level (index 0), so the
    // bootstrap's full-sample statistics equal core probability_effect with
    // region = 0 (the same formula, evaluated independently here).
    std::mt19937_64 rng(47);
    std::vector<double> y, x, z;
    std::vector<std::string> region;
    const char* levels[] = {"east", "north", "west"};
    for (int i = 0; i < 600; ++i) {
        const double xi = uniform(rng, -1, 1), zi = uniform(rng, 0, 2);
        const int g = static_cast<int>(rng() % 3);
        const double eta = -0.2 + 0.8 * xi + 0.3 * zi - 0.4 * xi * zi + 0.3 * g;
        x.push_back(xi);
        z.push_back(zi);
        region.push_back(levels[g]);
        y.push_back(unit(rng) < 1.0 / (1.0 + std::exp(-eta)) ? 1.0 : 0.0);
    }
    const Table t = make_table(
        {numeric_column("y", y), numeric_column("x", x), numeric_column("z", z), categorical_column("region", region)});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "z", "region"};
    spec.interactions = {{"x", "z", "region"}};
    spec.family = Family::Logistic;
    const Design d = build_design(t, spec);
    const FitResult fit = fit_design(d, spec);
    ProbeSpec ps;
    ps.focal = "x";
    ps.moderator = "z";
    ps.second_moderator = "region";
    ps.at = {0.5, 1.5};
    const ProbeResult pr = probe_response(d, fit, ps, Averaging::Sample);
    ScaleRequest req;
    req.focal = "x";
    req.moderator = "z";
    req.values["region"] = 0;
    for (std::size_t k = 0; k < ps.at.size(); ++k)
        EXPECT_NEAR(pr.effects[k].estimate, probability_effect(d, fit, req, ps.at[k]).estimate, 1e-12);
    BootstrapOptions o;
    o.replicates = 100;
    const ProbeBootstrap b = bootstrap_probe(d, spec, ps, pr, o);
    ASSERT_GE(b.result.intervals.size(), 2u);
    EXPECT_NEAR(b.result.intervals[0].estimate, pr.effects[0].estimate, 1e-9);
    EXPECT_GT(b.result.completed, 90);
}
