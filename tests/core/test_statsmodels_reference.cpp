// Estimates, standard errors and fit statistics against statsmodels, the
// reference library (tests/reference/make_statsmodels_reference.py). The
// script runs live into the build folder when Debian's python3-statsmodels is
// installed; otherwise the committed fixtures in tests/reference/fixtures are
// used. Each fixture names the statsmodels version and call that produced it.
//
// Tolerances (relative): estimates 1e-8, standard errors and covariances 1e-8
// (1e-6 for the negative binomial, whose alpha both sides find by iteration),
// R², residual SD, log-likelihood, AIC, BIC, F 1e-8; p-values 1e-6 (their
// tails come from different special-function code).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/reading/csv.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

constexpr double kEstimateTol = 1e-8;
constexpr double kSeTol = 1e-8;
constexpr double kStatTol = 1e-8;

// The live run's folder when it produced results, else the committed one.
fs::path fixture_dir() { return reference_fixture_dir("ols_binary_continuous.json"); }

std::vector<fs::path> cases(const fs::path& dir) {
    std::vector<fs::path> out;
    if (!fs::exists(dir)) return out;
    // The fixtures of make_statsmodels_reference.py: JSON files with a model
    // specification and covariances (other scripts share the folder).
    for (const auto& e : fs::directory_iterator(dir)) {
        if (e.path().extension() != ".json") continue;
        const json j = json::parse(std::ifstream(e.path()));
        if (j.is_object() && j.contains("spec") && j.contains("covariances")) out.push_back(e.path());
    }
    std::sort(out.begin(), out.end());
    return out;
}

struct Loaded {
    Table table;
    ModelSpec spec;
};

Loaded load_case(const fs::path& json_path, const json& j) {
    const json& s = j.at("spec");
    CsvOptions o;
    ModelSpec spec;
    if (s.contains("categorical") && s.at("categorical").is_object())
        for (const auto& [col, ref] : s.at("categorical").items()) {
            o.column_kinds[col] = ColumnKind::Categorical;
            spec.reference_levels[col] = ref.get<std::string>();
        }
    Loaded l{read_csv((json_path.parent_path() / j.at("data").get<std::string>()).string(), o), {}};
    spec.outcome = s.at("outcome").get<std::string>();
    spec.predictors = s.at("predictors").get<std::vector<std::string>>();
    if (s.contains("interactions"))
        spec.interactions = s.at("interactions").get<std::vector<std::vector<std::string>>>();
    spec.family = parse_family(s.at("family").get<std::string>());
    spec.intercept = s.value("intercept", true);
    if (s.contains("weights") && !s.at("weights").is_null()) spec.weights = s.at("weights").get<std::string>();
    if (s.contains("cluster") && !s.at("cluster").is_null()) spec.cluster = s.at("cluster").get<std::string>();
    if (s.contains("exposure") && !s.at("exposure").is_null()) spec.exposure = s.at("exposure").get<std::string>();
    l.spec = spec;
    return l;
}

void compare_case(const fs::path& path) {
    SCOPED_TRACE(path.filename().string());
    const json j = json::parse(std::ifstream(path));
    Loaded l = load_case(path, j);
    const auto terms = j.at("terms").get<std::vector<std::string>>();
    const auto estimates = j.at("estimates").get<std::vector<double>>();
    int compared = 0, effects_checked = 0;
    // The negative binomial's alpha comes from an optimiser on both sides: 1e-6.
    const double est_tol = l.spec.family == Family::NegativeBinomial ? 1e-6 : kEstimateTol;
    const double se_tol = l.spec.family == Family::NegativeBinomial ? 1e-6 : kSeTol;
    for (const auto& [kind_name, ref] : j.at("covariances").items()) {
        SCOPED_TRACE("covariance " + kind_name + ": " + ref.value("source", std::string()));
        ModelSpec spec = l.spec;
        spec.se = parse_se_kind(kind_name);
        if (spec.se != SeKind::Cluster) spec.cluster.clear();
        const Design design = build_design(l.table, spec);
        const FitResult f = fit_design(design, spec);
        ASSERT_EQ(f.coefficients.size(), terms.size());
        const auto ses = ref.at("std_errors").get<std::vector<double>>();
        std::vector<int> idx;
        for (std::size_t k = 0; k < terms.size(); ++k) {
            const int j2 = f.index_of(terms[k]);
            ASSERT_GE(j2, 0) << "term " << terms[k] << " missing";
            idx.push_back(j2);
            EXPECT_LE(rel(f.coefficients[static_cast<std::size_t>(j2)].estimate, estimates[k]), est_tol) << terms[k];
            EXPECT_LE(rel(f.coefficients[static_cast<std::size_t>(j2)].std_error, ses[k]), se_tol) << terms[k];
        }
        if (ref.contains("covariance")) {
            const auto V = ref.at("covariance").get<std::vector<std::vector<double>>>();
            for (std::size_t a = 0; a < terms.size(); ++a)
                for (std::size_t b = 0; b < terms.size(); ++b)
                    EXPECT_LE(std::abs(f.covariance(idx[a], idx[b]) - V[a][b]),
                              se_tol * std::sqrt(std::abs(V[a][a] * V[b][b])))
                        << terms[a] << "," << terms[b];
        }
        if (ref.contains("df")) {
            if (ref.at("df").is_null()) {
                EXPECT_TRUE(std::isinf(f.df_inference)) << "normal (z) inference";
            } else {
                EXPECT_EQ(f.df_inference, ref.at("df").get<double>());
            }
        }
        // Conditional effects from the probing engine vs statsmodels t_test of
        // the same linear combination.
        if (j.contains("conditional_effects"))
            for (const auto& ce : j.at("conditional_effects")) {
                if (ce.at("se").get<std::string>() != kind_name) continue;
                const std::string focal = ce.at("focal"), mod = ce.at("moderator");
                std::map<std::string, double> values;
                for (const auto& [col, sm] : design.summaries) values[col] = sm.mean;
                for (const auto& c : design.categoricals) values[c.column] = 0;
                for (const auto& [col, v] : ce.at("fixed").items()) values[col] = v.get<double>();
                double at = 0;
                std::string free = mod;
                if (ce.at("at").is_string()) {
                    values[mod] = design.level_index(mod, ce.at("at").get<std::string>());
                    free.clear();
                } else {
                    at = ce.at("at").get<double>();
                }
                EffectFunction ef;
                if (const auto eq = focal.find('='); eq != std::string::npos) {
                    // the effect of a dummy: the gap between its level and the reference
                    const std::string col = focal.substr(0, eq);
                    ef = contrast_function(design, f, col, 0, design.level_index(col, focal.substr(eq + 1)), free,
                                           values);
                } else {
                    ef = effect_function(design, f, focal, free, values);
                }
                SCOPED_TRACE(focal + " at " + ce.at("at_label").get<std::string>());
                EXPECT_LE(rel(ef.effect(at), ce.at("estimate").get<double>()), est_tol);
                EXPECT_LE(rel(std::sqrt(ef.variance(at)), ce.at("std_error").get<double>()), se_tol);
                ++effects_checked;
            }
        if (kind_name == "classical") {
            const json& fit = j.at("fit");
            auto check = [&](const char* key, double ours, double tol) {
                if (fit.contains(key) && !fit.at(key).is_null()) {
                    EXPECT_LE(rel(ours, fit.at(key).get<double>()), tol) << key;
                }
            };
            if (spec.family == Family::Linear) {
                check("r_squared", f.r_squared, kStatTol);
                check("adj_r_squared", f.adj_r_squared, kStatTol);
                check("residual_sd", f.residual_sd, kStatTol);
                check("f_statistic", f.f_statistic, kStatTol);
                check("f_p_value", f.f_p_value, 1e-6);
            } else {
                check("llnull", f.null_log_likelihood, kStatTol);
                check("mcfadden_r2", f.mcfadden_r2, kStatTol);
                check("deviance", f.deviance, kStatTol);
            }
            check("log_likelihood", f.log_likelihood, kStatTol);
            check("aic", f.aic, kStatTol);
            check("bic", f.bic, kStatTol);
        }
        ++compared;
    }
    EXPECT_GT(compared, 0);
    const std::size_t expected_effects = j.contains("conditional_effects") ? j.at("conditional_effects").size() : 0;
    EXPECT_EQ(static_cast<std::size_t>(effects_checked), expected_effects);
}

}  // namespace

TEST(StatsmodelsReference, EveryCaseMatches) {
    const fs::path dir = fixture_dir();
    const auto all = cases(dir);
    ASSERT_GE(all.size(), 8u) << "no statsmodels fixtures in " << dir;
    std::printf("statsmodels reference cases from %s\n", dir.string().c_str());
    for (const auto& p : all) compare_case(p);
}

// The committed fixtures must be what the script produces today (when the
// script could run live): a stale fixture would test against old numbers.
TEST(StatsmodelsReference, CommittedFixturesMatchLiveRun) {
    const fs::path live = fixture_dir();
    if (live == committed_fixture_dir())
        GTEST_SKIP() << "statsmodels not installed here: only the committed fixtures are used";
    for (const auto& p : cases(committed_fixture_dir())) {
        SCOPED_TRACE(p.filename().string());
        const fs::path q = live / p.filename();
        ASSERT_TRUE(fs::exists(q));
        const json a = json::parse(std::ifstream(p)), b = json::parse(std::ifstream(q));
        const auto ea = a.at("estimates").get<std::vector<double>>(), eb = b.at("estimates").get<std::vector<double>>();
        ASSERT_EQ(ea.size(), eb.size());
        for (std::size_t k = 0; k < ea.size(); ++k) EXPECT_LE(rel(ea[k], eb[k]), 1e-10);
    }
}
