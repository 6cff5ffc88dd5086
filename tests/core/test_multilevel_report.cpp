// What a multilevel analysis reports beyond its fit: the memo's sentences
// on the random part and its cautions, the variance components and random
// slope tests in the exported tables (no R² anywhere), the checks of a
// multilevel fit (conditional residuals, no least-squares influence), and
// grand-mean centring beside group-mean centring. The numbers the sentences
// cite are read back and compared with statsmodels MixedLM
// (tests/reference/make_mixed_reference.py, fixtures mixed_slope.json and
// mixed_intercept.json), with counts made here from the CSV, and with the
// closed forms named beside each check.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <memory>
#include <regex>
#include <string>
#include <vector>

#include "common/reference_fixtures.hpp"
#include "moderato/estimation/diagnostics.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reporting/analysis_tables.hpp"
#include "moderato/reporting/memo.hpp"

using namespace moderato;

namespace {

std::shared_ptr<const Table> teams() {
    CsvOptions o;
    o.column_kinds["team"] = ColumnKind::Categorical;
    return std::make_shared<const Table>(read_csv(test::reference_fixture("mixed_teams.csv").string(), o));
}

// hours by climate, teams as groups; a random slope of hours when `slope`.
Analysis teams_analysis(bool slope) {
    Analysis a;
    a.id = a.name = "teams";
    a.dataset = "teams";
    a.roles.outcome = "score";
    a.roles.focal = "hours";
    a.roles.moderator = "climate";
    a.multilevel.groups = "team";
    if (slope) a.multilevel.random_slopes = {"hours"};
    return a;
}

// The number as written (U+2212 minus, "1,200" commas) as a double.
double read_number(std::string text) {
    for (std::size_t at; (at = text.find("\xE2\x88\x92")) != std::string::npos;) text.replace(at, 3, "-");
    text.erase(std::remove(text.begin(), text.end(), ','), text.end());
    return std::stod(text);
}

// `text` is `value` rounded to the digits written, give or take `rel` of it
// (the fit's own agreement with the reference).
void expect_written(const std::string& text, double value, double rel, const std::string& what) {
    const auto dot = text.find('.');
    const int decimals = dot == std::string::npos ? 0 : static_cast<int>(text.size() - dot - 1);
    const double half = 0.5 * std::pow(10.0, -decimals) * (1 + 1e-9);
    EXPECT_NEAR(read_number(text), value, half + rel * std::fabs(value)) << what << ": written \"" << text << "\"";
}

const char* const kNum = "((?:\xE2\x88\x92)?[0-9][0-9,]*(?:\\.[0-9]+)?)";

// The first sentence matching `pattern` (with kNum for each number), or an empty match.
std::smatch find(const std::vector<std::string>& sentences, const std::string& pattern) {
    const std::regex re(pattern);
    for (const auto& s : sentences) {
        std::smatch m;
        if (std::regex_search(s, m, re)) return m;
    }
    return {};
}

std::string with_numbers(std::string pattern) {
    for (std::size_t at; (at = pattern.find("#")) != std::string::npos;) pattern.replace(at, 1, kNum);
    return pattern;
}

bool mentions(const std::vector<std::string>& texts, const std::string& words) {
    return std::any_of(texts.begin(), texts.end(),
                       [&](const std::string& s) { return s.find(words) != std::string::npos; });
}

// Every text of the tables: titles, headers, cells, notes.
std::vector<std::string> table_texts(const std::vector<NamedTable>& tables) {
    std::vector<std::string> out;
    for (const auto& nt : tables) {
        out.push_back(nt.table.title);
        out.insert(out.end(), nt.table.columns.begin(), nt.table.columns.end());
        for (const auto& row : nt.table.rows)
            for (const auto& c : row) out.push_back(c.text);
        out.insert(out.end(), nt.table.notes.begin(), nt.table.notes.end());
    }
    return out;
}

const ExportTable* table_of(const std::vector<NamedTable>& tables, const std::string& key) {
    for (const auto& nt : tables)
        if (nt.key == key) return &nt.table;
    return nullptr;
}

// statsmodels 0.13 MixedLM, REML with a full covariance (fixture mixed_slope.json).
nlohmann::json statsmodels_reml_full() {
    const auto doc = test::read_fixture_json(test::reference_fixture("mixed_slope.json"));
    for (const auto& f : doc.at("fits"))
        if (f.at("estimation") == "reml" && f.at("covariance") == "full") return f;
    ADD_FAILURE() << "no REML full fit in mixed_slope.json";
    return {};
}

}  // namespace

// The groups sentence against counts made here from the CSV: 45 teams,
// sizes from the smallest to the largest and their median (common practice:
// the middle value, or the mean of the two middle ones).
TEST(MultilevelMemo, SaysHowRowsAreNestedInGroups) {
    const auto table = teams();
    const AnalysisRun run = run_analysis(table, teams_analysis(true));
    std::map<std::string, int> size;
    const Column& team = table->at("team");
    for (std::size_t r = 0; r < table->rows(); ++r) ++size[team.levels[static_cast<std::size_t>(team.codes[r])]];
    std::vector<int> sizes;
    for (const auto& [name, n] : size) sizes.push_back(n);
    std::sort(sizes.begin(), sizes.end());
    const std::size_t g = sizes.size();
    const double median = g % 2 ? sizes[g / 2] : 0.5 * (sizes[g / 2 - 1] + sizes[g / 2]);

    const auto findings = memo_findings(teams_analysis(true), run);
    const auto m = find(findings, with_numbers("nested in # groups of team \\(# to # rows each, median #\\); each "
                                               "group has its own intercept and its own slope of hours \\(REML"));
    ASSERT_FALSE(m.empty()) << "no groups sentence";
    EXPECT_EQ(read_number(m[1]), static_cast<double>(g));
    EXPECT_EQ(read_number(m[2]), sizes.front());
    EXPECT_EQ(read_number(m[3]), sizes.back());
    expect_written(m[4], median, 0, "median group size");
}

// The variances, SDs (their square roots) and the correlation
// tau10 / sqrt(tau00 tau11) (definitions) against statsmodels' REML fit; the
// fit agrees with it to 1e-3 of the variances (test_mixed_model.cpp).
TEST(MultilevelMemo, CitesTheVariancesBetweenAndWithinGroups) {
    const auto ref = statsmodels_reml_full();
    const double t00 = ref["random_covariance"][0][0], t10 = ref["random_covariance"][1][0],
                 t11 = ref["random_covariance"][1][1], s2 = ref["residual_variance"];
    const AnalysisRun run = run_analysis(teams(), teams_analysis(true));
    const auto findings = memo_findings(teams_analysis(true), run);
    const auto m = find(findings, with_numbers("Between groups the intercept varies with SD # \\(variance #\\) and "
                                               "the slope of hours varies with SD # \\(variance #\\); the intercept "
                                               "and the slope of hours correlate at #; within groups the residual "
                                               "SD is # \\(variance #\\)\\."));
    ASSERT_FALSE(m.empty()) << "no variances sentence";
    expect_written(m[1], std::sqrt(t00), 1e-3, "SD of the intercept");
    expect_written(m[2], t00, 1e-3, "variance of the intercept");
    expect_written(m[3], std::sqrt(t11), 1e-3, "SD of the slope");
    expect_written(m[4], t11, 1e-3, "variance of the slope");
    expect_written(m[5], t10 / std::sqrt(t00 * t11), 1e-3, "correlation");
    expect_written(m[6], std::sqrt(s2), 1e-4, "residual SD");
    expect_written(m[7], s2, 1e-4, "residual variance");
}

// The random slope's test: twice the difference of the REML criteria of the
// fits with and without the slope (computed here), and p from the 50:50
// mixture of chi-square(1) and chi-square(2): 0.5 erfc(sqrt(s/2)) +
// 0.5 exp(−s/2) (closed forms, from memory).
TEST(MultilevelMemo, ReportsTheRandomSlopeTestWithItsMixture) {
    const auto table = teams();
    const AnalysisRun with = run_analysis(table, teams_analysis(true));
    const AnalysisRun without = run_analysis(table, teams_analysis(false));
    const double s = 2 * (with.fit.log_likelihood - without.fit.log_likelihood);
    const double p = 0.5 * (std::erfc(std::sqrt(s / 2)) + std::exp(-s / 2));
    const auto findings = memo_findings(teams_analysis(true), with);
    const auto m = find(findings, with_numbers("slope of hours varies between groups: likelihood ratio #, p = #, "
                                               "referred to a 50:50 mixture of χ²\\(1\\) and χ²\\(2\\)"));
    ASSERT_FALSE(m.empty()) << "no slope test sentence";
    expect_written(m[1], s, 0, "likelihood ratio");
    expect_written(m[2], p, 0, "p");
}

// The interaction's test: one term, so the Wald F is t² of the product
// coefficient (closed form) on 1 and that term's own df.
TEST(MultilevelMemo, TestsTheInteractionWithoutRSquared) {
    const Analysis a = teams_analysis(true);
    const AnalysisRun run = run_analysis(teams(), a);
    const Coefficient& product = run.fit.coefficients.at(static_cast<std::size_t>(run.fit.index_of("hours×climate")));
    const auto findings = memo_findings(a, run);
    const auto m = find(findings, with_numbers("test of the interaction term is a Wald test: F\\(1, #\\) = #, p"));
    ASSERT_FALSE(m.empty()) << "no interaction test";
    expect_written(m[1], product.df, 0, "denominator df");
    const double t = product.estimate / product.std_error;
    expect_written(m[2], t * t, 0, "F");

    // A multilevel fit has no R² (common practice: no single variance to explain); nothing says one.
    const std::vector<NamedTable> tables = analysis_tables(a, run);
    EXPECT_FALSE(mentions(findings, "R²"));
    EXPECT_FALSE(mentions(memo_cautions(a, run), "R²"));
    EXPECT_FALSE(mentions(table_texts(tables), "R²"));
}

// A random-intercept model: the ICC psi / (1 + psi) from the REML maximum
// of the profiled criterion (fixture mixed_intercept.json, found by scipy).
TEST(MultilevelMemo, GivesTheIntraclassCorrelationOfARandomInterceptModel) {
    const auto doc = test::read_fixture_json(test::reference_fixture("mixed_intercept.json"));
    const double psi = doc.at("profile_maximum").at("reml").at("psi").get<double>();
    const Analysis a = teams_analysis(false);
    const AnalysisRun run = run_analysis(teams(), a);
    const auto findings = memo_findings(a, run);
    const auto m = find(findings, with_numbers("The intraclass correlation is #:"));
    ASSERT_FALSE(m.empty()) << "no ICC";
    expect_written(m[1], psi / (1 + psi), 1e-3, "ICC");
    // With a random slope the ICC depends on the slope's column: it is not given (common practice).
    EXPECT_TRUE(
        find(memo_findings(teams_analysis(true), run_analysis(teams(), teams_analysis(true))), "intraclass").empty());
}

// The cautions a multilevel fit needs (common practice): effects of a
// typical group; the groups, not the rows, as the sample size of anything
// between groups (fewer than about 30); a singular fit; extrapolation to
// groups unlike these.
TEST(MultilevelMemo, CautionsAboutTypicalGroupsFewGroupsAndSingularFits) {
    const Analysis a = teams_analysis(true);
    AnalysisRun run = run_analysis(teams(), a);
    auto cautions = memo_cautions(a, run);
    EXPECT_TRUE(mentions(cautions, "typical group of team"));
    EXPECT_TRUE(mentions(cautions, "extrapolation across groups"));
    EXPECT_FALSE(mentions(cautions, "Only 45 groups"));  // 45 is not few
    EXPECT_FALSE(mentions(cautions, "singular"));

    // Twelve groups: the teams folded into 12 by their codes.
    auto table = std::make_shared<Table>(*teams());
    Column& team = *table->find("team");
    for (auto& code : team.codes) code %= 12;
    AnalysisRun few = run_analysis(table, a);
    ASSERT_EQ(few.fit.multilevel->groups_count, 12u);  // 12 groups made here
    EXPECT_TRUE(mentions(memo_cautions(a, few), "Only 12 groups of team"));

    // A singular random part (a variance at its boundary): said once.
    run.fit.multilevel->singular = true;
    run.cautions.clear();
    cautions = memo_cautions(a, run);
    EXPECT_EQ(std::count_if(cautions.begin(), cautions.end(),
                            [](const std::string& s) { return s.find("singular") != std::string::npos; }),
              1);
}

// The variance-components table against statsmodels' REML fit (as in the
// memo), the slope test table against the two fits' criteria, and each
// term's df carried exactly into the estimates table.
TEST(MultilevelTables, ShowTheRandomPartAndEachTermsDf) {
    const auto ref = statsmodels_reml_full();
    const Analysis a = teams_analysis(true);
    const AnalysisRun run = run_analysis(teams(), a);
    const auto tables = analysis_tables(a, run);
    const ExportTable* vc = table_of(tables, "variance-components");
    ASSERT_TRUE(vc);
    ASSERT_EQ(vc->rows.size(), 3u);  // intercept, slope of hours, residual
    EXPECT_EQ(vc->rows[1][0].text, "slope of hours");
    const double t00 = ref["random_covariance"][0][0], t10 = ref["random_covariance"][1][0],
                 t11 = ref["random_covariance"][1][1], s2 = ref["residual_variance"];
    EXPECT_NEAR(std::stod(vc->rows[0][1].exact), t00, 1e-3 * t00);
    EXPECT_NEAR(std::stod(vc->rows[1][2].exact), std::sqrt(t11), 1e-3 * std::sqrt(t11));
    EXPECT_NEAR(std::stod(vc->rows[1][3].exact), t10 / std::sqrt(t00 * t11), 1e-3);
    EXPECT_NEAR(std::stod(vc->rows[2][1].exact), s2, 1e-4 * s2);
    EXPECT_TRUE(mentions(vc->notes, "45 groups of team"));

    const ExportTable* slopes = table_of(tables, "random-slope-tests");
    ASSERT_TRUE(slopes);
    ASSERT_EQ(slopes->rows.size(), 1u);
    EXPECT_EQ(slopes->rows[0][2].text, "50:50 mixture of χ²(1) and χ²(2)");  // one variance, one covariance more

    const ExportTable* est = table_of(tables, "estimates");
    ASSERT_TRUE(est);
    ASSERT_EQ(est->columns.back(), "df");
    for (std::size_t k = 0; k < est->rows.size(); ++k)
        EXPECT_EQ(std::stod(est->rows[k].back().exact), run.fit.coefficients[k].df) << est->rows[k][0].text;
    EXPECT_EQ(table_of(tables, "fit-statistics")->rows[2][1].text, "45");
}

// The checks of a multilevel fit: the residuals are y minus the fixed part
// and the row's group modes (the conditional residual, definition), scaled by
// the residual SD; no leverage or Cook's distance; rows flagged by
// |e / sigma| > 3 alone (the rule, common practice).
TEST(MultilevelChecks, UseConditionalResidualsAndNoLeastSquaresInfluence) {
    const AnalysisRun run = run_analysis(teams(), teams_analysis(true));
    const Diagnostics d = diagnostics(run.design, run.fit);
    ASSERT_TRUE(d.multilevel);
    const auto& m = *run.fit.multilevel;
    const double sigma = std::sqrt(m.residual_variance);
    std::size_t flagged = 0;
    const int hours = run.design.main_column("hours");
    for (Eigen::Index i = 0; i < run.design.X.rows(); ++i) {
        const auto& e = m.group_effects[run.design.group[static_cast<std::size_t>(i)]];
        const double fixed = run.design.X.row(i).dot(run.fit.beta);
        const double conditional = run.design.y[i] - fixed - e.mode[0] - e.mode[1] * run.design.X(i, hours);
        EXPECT_NEAR(d.residuals[i], conditional, 1e-9 * (1 + std::fabs(run.design.y[i])));
        EXPECT_NEAR(d.check_residual()[i], conditional / sigma, 1e-9);
        EXPECT_NEAR(d.quantile_residual()[i], conditional / sigma, 1e-9);
        EXPECT_TRUE(std::isnan(d.leverage[i]) && std::isnan(d.cooks_distance[i]));
        if (std::fabs(conditional / sigma) > 3) ++flagged;
    }
    EXPECT_EQ(d.flagged.size(), flagged);
    for (const auto& r : d.flagged) EXPECT_EQ(r.flags, static_cast<unsigned>(FlagResidual));
}

// Grand-mean centring beside group-mean centring and group means: the
// centred fit is the same model, so the product coefficient does not move
// (common practice: shifting a factor of a product by a constant changes only
// the lower-order terms).
TEST(MultilevelTables, GrandMeanCentringKeepsGroupCentringAndTheProduct) {
    Analysis a = teams_analysis(true);
    a.multilevel.centre_within = {"hours"};
    a.multilevel.group_means = {"hours"};
    a.centring = Centring::Mean;
    const AnalysisRun run = run_analysis(teams(), a);
    ASSERT_TRUE(run.centred_fit);
    const int j = run.fit.index_of("hours×climate");
    const int k = run.centred_fit->index_of("hours_centred×climate_centred");
    ASSERT_GE(j, 0);
    ASSERT_GE(k, 0);
    const auto& b = run.fit.coefficients[static_cast<std::size_t>(j)];
    const auto& c = run.centred_fit->coefficients[static_cast<std::size_t>(k)];
    EXPECT_NEAR(c.estimate, b.estimate, 1e-6 * std::fabs(b.estimate));
    EXPECT_NEAR(c.std_error, b.std_error, 1e-5 * b.std_error);
    EXPECT_NEAR(run.centred_fit->log_likelihood, run.fit.log_likelihood, 1e-6 * std::fabs(run.fit.log_likelihood));
}

// Where Satterthwaite's df have no answer (a singular fit: a variance at its
// boundary) core falls back to the between–within rule and warns; the memo
// and the tables then name the rule the df came from, not the one asked for.
// The fit: the teams with `shift` (1, 2, 3 in turn, no slope of its own,
// made here) given a random slope.
TEST(MultilevelMemo, NamesTheDfRuleUsedWhenSatterthwaiteHasNoAnswer) {
    auto table = std::make_shared<Table>(*teams());
    Column shift;
    shift.name = "shift";
    for (std::size_t r = 0; r < table->rows(); ++r) shift.numbers.push_back(static_cast<double>((r + 1) % 3 + 1));
    table->columns.push_back(shift);
    Analysis a = teams_analysis(true);
    a.roles.controls = {"shift"};
    a.multilevel.random_slopes = {"hours", "shift"};
    const AnalysisRun run = run_analysis(table, a);
    ASSERT_TRUE(run.fit.multilevel->singular);
    ASSERT_TRUE(mentions(run.fit.warnings, "between–within degrees of freedom are used instead"));
    const auto findings = memo_findings(a, run);
    EXPECT_TRUE(mentions(findings, "its own between–within degrees of freedom"));
    EXPECT_FALSE(mentions(findings, "Satterthwaite"));
    EXPECT_FALSE(mentions(table_texts(analysis_tables(a, run)), "Satterthwaite"));
}
