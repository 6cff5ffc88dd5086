// The memo and the tables of Poisson, negative binomial and probit analyses:
// their sentences, equation, cautions and tables in each family's words, and
// every number they cite against the statsmodels fixtures of
// tests/reference/make_count_reference.py (statsmodels 0.13.5; the call is
// named in each fixture's "source"): rate ratios (relative 1e-8), the
// negative binomial's alpha (1e-6), Poisson overdispersion statistics and
// outcome-scale effects (1e-7). Written numbers are checked to be the value
// correctly rounded to the digits shown.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <memory>
#include <nlohmann/json.hpp>
#include <regex>
#include <string>
#include <vector>

#include "common/reference_fixtures.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reporting/analysis_tables.hpp"
#include "moderato/reporting/memo.hpp"

namespace fs = std::filesystem;
using namespace moderato;
using nlohmann::json;

namespace {

struct Fixture {
    json j;
    std::shared_ptr<const Table> table;
    Analysis analysis;
};

// A fixture's data and model as an analysis: outcome, focal and moderator
// from its one product, the other predictors as controls.
Fixture load(const std::string& name, Family family) {
    const fs::path path = test::reference_fixture(name + ".json");
    Fixture f;
    f.j = test::read_fixture_json(path);
    f.table =
        std::make_shared<const Table>(read_csv((path.parent_path() / f.j.at("data").get<std::string>()).string()));
    const json& s = f.j.at("spec");
    Analysis& a = f.analysis;
    a.id = "a";
    a.name = name;
    a.roles.outcome = s.at("outcome").get<std::string>();
    const auto product = s.at("interactions").at(0).get<std::vector<std::string>>();
    a.roles.focal = product.at(0);
    a.roles.moderator = product.at(1);
    for (const auto& p : s.at("predictors").get<std::vector<std::string>>())
        if (p != a.roles.focal && p != a.roles.moderator) a.roles.controls.push_back(p);
    if (!s.at("exposure").is_null()) a.roles.exposure = s.at("exposure").get<std::string>();
    a.family = family;
    return f;
}

double read_number(std::string text) {
    for (std::size_t at; (at = text.find("\xE2\x88\x92")) != std::string::npos;) text.replace(at, 3, "-");
    text.erase(std::remove(text.begin(), text.end(), ','), text.end());
    return std::stod(text);
}

// `text` is `value` correctly rounded to the digits it shows.
void expect_written(const std::string& text, double value, const std::string& what) {
    const auto dot = text.find('.');
    const int decimals = dot == std::string::npos ? 0 : static_cast<int>(text.size() - dot - 1);
    EXPECT_NEAR(read_number(text), value, 0.5 * std::pow(10.0, -decimals) * (1 + 1e-9)) << what << ": " << text;
}

const char* const kNum = "((?:\xE2\x88\x92)?[0-9][0-9,]*(?:\\.[0-9]+)?)";

std::string sentence_with(const std::vector<std::string>& sentences, const std::string& words) {
    for (const auto& s : sentences)
        if (s.find(words) != std::string::npos) return s;
    ADD_FAILURE() << "no sentence holds: " << words;
    return {};
}

const ExportTable& table_named(const std::vector<NamedTable>& tables, const std::string& key) {
    for (const auto& t : tables)
        if (t.key == key) return t.table;
    throw std::runtime_error("no table " + key);
}

int column_of(const ExportTable& t, const std::string& name) {
    const auto it = std::find(t.columns.begin(), t.columns.end(), name);
    EXPECT_NE(it, t.columns.end()) << "no column " << name;
    return static_cast<int>(it - t.columns.begin());
}

double relative(double a, double b) { return std::fabs(a - b) / std::max(1e-300, std::fabs(b)); }

// The fixture's rate-ratio row at this moderator value.
const json& ratio_row(const json& fixture, double at) {
    for (const json& r : fixture.at("rate_ratios").at("rows"))
        if (std::fabs(r.at("at").get<double>() - at) <= 1e-9 * (1 + std::fabs(at))) return r;
    throw std::runtime_error("no rate ratio at " + std::to_string(at));
}

}  // namespace

TEST(CountMemo, NegativeBinomialRateRatiosAlphaAndWordsMatchStatsmodels) {
    Fixture f = load("negbin_counts", Family::NegativeBinomial);
    const AnalysisRun run = run_analysis(f.table, f.analysis);
    ASSERT_TRUE(run.probe);
    const auto tables = analysis_tables(f.analysis, run);

    // The effects table: a rate ratio and its interval beside each effect
    // (statsmodels exp(c'b) and exp(c'b -+ z SE), the fixture's rows).
    const ExportTable& effects = table_named(tables, "conditional-effects");
    EXPECT_EQ(effects.title, "Effect of x on the log expected count of y at chosen values of w");
    const int rr = column_of(effects, "Rate ratio"), lo = column_of(effects, "RR 95% CI low"),
              hi = column_of(effects, "RR 95% CI high");
    ASSERT_EQ(effects.rows.size(), run.probe->effects.size());
    for (std::size_t k = 0; k < effects.rows.size(); ++k) {
        const json& ref = ratio_row(f.j, run.probe->effects[k].moderator_value);
        EXPECT_LT(relative(std::stod(effects.rows[k][rr].exact), ref.at("rate_ratio").get<double>()), 1e-8);
        EXPECT_LT(relative(std::stod(effects.rows[k][lo].exact), ref.at("ci_lower_95").get<double>()), 1e-8);
        EXPECT_LT(relative(std::stod(effects.rows[k][hi].exact), ref.at("ci_upper_95").get<double>()), 1e-8);
    }
    // The statistic of a generalized model is z (compared with the standard normal: common practice).
    EXPECT_EQ(std::count(effects.columns.begin(), effects.columns.end(), "z"), 1);

    // Fit statistics: alpha (statsmodels NegativeBinomial nb2, params[-1]).
    const ExportTable& fit = table_named(tables, "fit-statistics");
    bool alpha_seen = false;
    for (const auto& row : fit.rows)
        if (row[0].text.rfind("Dispersion α", 0) == 0) {
            alpha_seen = true;
            EXPECT_LT(relative(std::stod(row[1].exact), f.j.at("dispersion").at("alpha").get<double>()), 1e-6);
        }
    EXPECT_TRUE(alpha_seen);
    const ExportTable& estimates = table_named(tables, "estimates");
    EXPECT_NE(std::find(estimates.notes.begin(), estimates.notes.end(),
                        "Estimates are on the log expected count scale; exp(estimate) is the factor by which one unit "
                        "more of a term multiplies the expected count."),
              estimates.notes.end());

    // The sentence of rate ratios, each number the fixture's rounded.
    const auto findings = memo_findings(f.analysis, run);
    const std::string s =
        sentence_with(findings, "As rate ratios, one unit more of x multiplies the expected count of y");
    const std::regex each(std::string(kNum) + " \\(95% CI " + kNum + " to " + kNum + "\\) at w = " + kNum);
    std::size_t k = 0;
    for (auto it = std::sregex_iterator(s.begin(), s.end(), each); it != std::sregex_iterator(); ++it, ++k) {
        const json& ref = ratio_row(f.j, run.probe->effects.at(k).moderator_value);
        expect_written((*it)[1], ref.at("rate_ratio").get<double>(), "ratio");
        expect_written((*it)[2], ref.at("ci_lower_95").get<double>(), "low");
        expect_written((*it)[3], ref.at("ci_upper_95").get<double>(), "high");
    }
    EXPECT_EQ(k, run.probe->effects.size()) << s;
    sentence_with(findings, "changes the effect of x on the log expected count of y by");

    // Cautions: the product coefficient's scale; no Poisson overdispersion, no exposure.
    const auto cautions = memo_cautions(f.analysis, run);
    const std::string c = sentence_with(cautions, "In a negative binomial model the product coefficient");
    EXPECT_NE(c.find("(log expected count scale) gives neither the size nor the sign of the interaction in expected "
                     "counts"),
              std::string::npos)
        << c;
    for (const auto& line : cautions) EXPECT_EQ(line.find("overdispersion"), std::string::npos) << line;
    for (const auto& line : cautions) EXPECT_EQ(line.find("(exposure"), std::string::npos) << line;
}

TEST(CountMemo, PoissonWithExposureSpeaksOfRatesAndWarnsOfOverdispersion) {
    Fixture f = load("poisson_exposure", Family::Poisson);
    f.analysis.probe.scale = ProbeScale::Outcome;
    const AnalysisRun run = run_analysis(f.table, f.analysis);
    ASSERT_TRUE(run.probe);
    const auto findings = memo_findings(f.analysis, run);
    const auto cautions = memo_cautions(f.analysis, run);

    // Effects on the rate per unit of the exposure (statsmodels predictions with offset 0, averaged over the rows).
    const auto tables = analysis_tables(f.analysis, run);
    const ExportTable& effects = table_named(tables, "conditional-effects");
    EXPECT_EQ(effects.title, "Effect of g on the rate of y per unit of months at chosen values of w");
    const int e = column_of(effects, "Effect");
    for (std::size_t k = 0; k < effects.rows.size(); ++k) {
        const double at = run.probe->effects[k].moderator_value;
        bool found = false;
        for (const json& r : f.j.at("outcome_effects").at("rows"))
            if (r.at("averaging") == "sample" && r.at("se") == "classical" &&
                std::fabs(r.at("at").get<double>() - at) <= 1e-9 * (1 + std::fabs(at))) {
                found = true;
                EXPECT_LT(relative(std::stod(effects.rows[k][e].exact), r.at("estimate").get<double>()), 1e-7);
            }
        EXPECT_TRUE(found) << at;
    }
    sentence_with(findings, "the effect of g on the rate of y per unit of months");
    // A 0/1 focal predictor: the ratio of moving it from 0 to 1.
    const std::string ratios = sentence_with(findings,
                                             "As rate ratios, moving g from 0 to 1 multiplies the rate of y "
                                             "per unit of months by ");
    std::smatch m;
    ASSERT_TRUE(std::regex_search(ratios, m, std::regex(std::string("by ") + kNum)));
    expect_written(m[1], ratio_row(f.j, run.probe->effects.front().moderator_value).at("rate_ratio").get<double>(),
                   "first ratio");

    // The equation carries the exposure as its offset (coefficient 1).
    Memo memo = build_memo(Project{}, f.analysis, run, MemoContext{}, {});
    EXPECT_EQ(memo.equation_text.rfind("log E[y] = b₀ + ", 0), 0u) << memo.equation_text;
    EXPECT_EQ(memo.equation_text.substr(memo.equation_text.size() - 14), " + log(months)") << memo.equation_text;

    // Overdispersion: statsmodels' Pearson ratio 1.13 and the Cameron & Trivedi one-sided p 0.0018 make it
    // evident (p < 0.05), so the caution points to the negative binomial with both numbers.
    const json& od = f.j.at("overdispersion");
    ASSERT_LT(od.at("p").get<double>(), 0.05);
    const std::string o = sentence_with(cautions, "vary more than a Poisson model allows");
    EXPECT_NE(o.find("negative binomial family instead"), std::string::npos) << o;
    ASSERT_TRUE(std::regex_search(o, m, std::regex(std::string("Pearson χ²/df = ") + kNum)));
    expect_written(m[1], od.at("pearson_ratio").get<double>(), "Pearson ratio");
    ASSERT_TRUE(std::regex_search(o, m, std::regex(std::string("test z = ") + kNum)));
    expect_written(m[1], od.at("test_value").get<double>(), "Cameron & Trivedi z");
    // The exposure: effects are per unit of it.
    const std::string x = sentence_with(cautions, "(exposure: log(months) enters with coefficient 1)");
    EXPECT_NE(x.find("effects on the outcome scale are per unit of months"), std::string::npos) << x;
    sentence_with(cautions,
                  "(log rate scale) gives neither the size nor the sign of the interaction in rates per "
                  "unit of months");
}

TEST(CountMemo, ProbitSpeaksOfTheProbitScaleAndProbabilities) {
    Fixture f = load("probit_binary", Family::Probit);
    const AnalysisRun run = run_analysis(f.table, f.analysis);
    const auto findings = memo_findings(f.analysis, run);
    // The product coefficient (statsmodels Probit params, the fixture's estimates).
    const std::string s = sentence_with(findings, "changes the effect of x on the probit of P(y = 1) by ");
    std::smatch m;
    ASSERT_TRUE(std::regex_search(s, m, std::regex(std::string("by ") + kNum)));
    const auto terms = f.j.at("terms").get<std::vector<std::string>>();
    const auto it = std::find(terms.begin(), terms.end(), "x×w");
    ASSERT_NE(it, terms.end());
    expect_written(m[1], f.j.at("estimates").at(static_cast<std::size_t>(it - terms.begin())).get<double>(), "b3");
    sentence_with(memo_cautions(f.analysis, run), "In a probit model the product coefficient (probit scale)");
    Memo memo = build_memo(Project{}, f.analysis, run, MemoContext{}, {});
    EXPECT_EQ(memo.equation_text.rfind("probit P(y = 1) = ", 0), 0u) << memo.equation_text;
    // No rate ratios for a 0/1 outcome.
    for (const auto& line : findings) EXPECT_EQ(line.find("rate ratio"), std::string::npos) << line;
}
