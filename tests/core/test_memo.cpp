// The memo: its sentences are parsed back and every number they cite is
// compared with an outside value (statsmodels fixtures, closed forms computed
// here from the data and the fitted coefficients); escaping of user strings;
// base64. The number formats have their own tests (test_report_text.cpp).
#include <gtest/gtest.h>

#include <algorithm>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <functional>
#include <map>
#include <memory>
#include <nlohmann/json.hpp>
#include <regex>
#include <sstream>

#include "common/reference_fixtures.hpp"
#include "common/sample_run.hpp"
#include "common/straight_line_data.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reporting/memo.hpp"
#include "moderato/reporting/probe_report.hpp"
#include "moderato/support/report_text.hpp"

namespace fs = std::filesystem;
using namespace moderato;
using moderato::test::run_sample;
using moderato::test::SampleRun;

namespace {

// The number as written in a sentence (U+2212 minus, "1,200" commas) as a double.
double read_number(std::string text) {
    for (std::size_t at; (at = text.find("\xE2\x88\x92")) != std::string::npos;) text.replace(at, 3, "-");
    text.erase(std::remove(text.begin(), text.end(), ','), text.end());
    return std::stod(text);
}

// Half a unit in the last digit written: how far a correctly rounded text may be from the value.
double rounding(const std::string& text) {
    const auto dot = text.find('.');
    const int decimals = dot == std::string::npos ? 0 : static_cast<int>(text.size() - dot - 1);
    return 0.5 * std::pow(10.0, -decimals) * (1 + 1e-9);
}

// Checks that `text` is `value` correctly rounded.
void expect_written(const std::string& text, double value, const std::string& what) {
    EXPECT_NEAR(read_number(text), value, rounding(text)) << what << ": written \"" << text << "\"";
}

const char* const kNum = "((?:\xE2\x88\x92)?[0-9][0-9,]*(?:\\.[0-9]+)?)";

std::smatch find(const std::vector<std::string>& sentences, const std::string& pattern) {
    const std::regex re(pattern);
    for (const auto& s : sentences) {
        std::smatch m;
        if (std::regex_search(s, m, re)) return m;
    }
    ADD_FAILURE() << "no sentence matches " << pattern;
    return {};
}

std::string joined(const std::vector<std::string>& v) {
    std::string out;
    for (const auto& s : v) out += s + "\n";
    return out;
}

nlohmann::json orchard_reference() {
    std::ifstream in(moderato::test::committed_fixture_dir() / "ui_estimates_orchard.json");
    return nlohmann::json::parse(in)["cases"]["sample_analysis"];
}

double column_mean(const Table& t, const std::string& name) {
    const auto& c = t.at(name).numbers;
    double s = 0;
    for (double v : c) s += v;
    return s / static_cast<double>(c.size());
}

double column_sd(const Table& t, const std::string& name) {
    const auto& c = t.at(name).numbers;
    const double m = column_mean(t, name);
    double s = 0;
    for (double v : c) s += (v - m) * (v - m);
    return std::sqrt(s / static_cast<double>(c.size() - 1));
}

// Roots of a x^2 + b x + c = 0, sorted (empty if none).
std::vector<double> quadratic_roots(double a, double b, double c) {
    const double d = b * b - 4 * a * c;
    if (d < 0) return {};
    const double q = -0.5 * (b + std::copysign(std::sqrt(d), b));
    std::vector<double> r{q / a, c / q};
    std::sort(r.begin(), r.end());
    return r;
}

}  // namespace

TEST(MemoSentences, OrchardNumbersMatchStatsmodelsAndClosedForms) {
    const SampleRun s = run_sample("orchard-nitrogen");
    const auto findings = memo_findings(s.analysis, s.run);
    SCOPED_TRACE(joined(findings));
    const auto ref = orchard_reference();

    // The product coefficient with its HC3 interval: statsmodels 0.13.5 OLS cov_type='HC3', use_t
    // (fixture ui_estimates_orchard.json).
    auto m = find(findings, std::string("changes the effect of nitrogen_kg_ha on yield_t_ha by ") + kNum +
                                " \\(95% CI " + kNum + " to " + kNum + ", p < 0\\.001\\)");
    ASSERT_EQ(m.size(), 4u);
    expect_written(m[1], ref["estimates"][4].get<double>(), "product estimate");
    expect_written(m[2], ref["ci_lower_95"][4].get<double>(), "product CI lower");
    expect_written(m[3], ref["ci_upper_95"][4].get<double>(), "product CI upper");
    EXPECT_LT(ref["p_values"][4].get<double>(), 0.001);

    // The observed range: min and max of the column, read here from the table.
    const Table& table = *s.run.table;
    const auto& z = table.at("soil_moisture_pct").numbers;
    m = find(findings,
             std::string("Among the observed values of soil_moisture_pct \\(") + kNum + " to " + kNum + "\\)");
    ASSERT_EQ(m.size(), 3u);
    expect_written(m[1], *std::min_element(z.begin(), z.end()), "observed minimum");
    expect_written(m[2], *std::max_element(z.begin(), z.end()), "observed maximum");

    // Johnson–Neyman boundaries: closed form, the roots of
    // (b1 + b3 m)^2 = t^2 (V11 + 2 m V13 + m^2 V33), t the 97.5 % quantile of t(n - p) from Boost.Math.
    const int i1 = s.run.fit.index_of("nitrogen_kg_ha"), i3 = s.run.fit.index_of("nitrogen_kg_ha×soil_moisture_pct");
    ASSERT_GE(i1, 0);
    ASSERT_GE(i3, 0);
    const double b1 = s.run.fit.beta(i1), b3 = s.run.fit.beta(i3);
    const auto& V = s.run.fit.covariance;
    const double t = boost::math::quantile(boost::math::students_t(ref["df_residual"].get<double>()), 0.975);
    const auto roots =
        quadratic_roots(b3 * b3 - t * t * V(i3, i3), 2 * (b1 * b3 - t * t * V(i1, i3)), b1 * b1 - t * t * V(i1, i1));
    ASSERT_EQ(roots.size(), 2u);
    m = find(findings, std::string("Johnson–Neyman boundaries at ") + kNum + " and " + kNum + " lie beyond the data");
    ASSERT_EQ(m.size(), 3u);
    expect_written(m[1], roots[0], "first boundary");
    expect_written(m[2], roots[1], "second boundary");
    // Both below the observed minimum, so the effect is significant throughout the data.
    EXPECT_LT(roots[1], *std::min_element(z.begin(), z.end()));
    EXPECT_NE(joined(findings).find("is positive and differs from zero throughout the observed range"),
              std::string::npos);

    // Effects at mean - SD, mean, mean + SD: b1 + b3 m with the column's mean and SD computed here.
    const double mean = column_mean(table, "soil_moisture_pct"), sd = column_sd(table, "soil_moisture_pct");
    m = find(findings, std::string("effect of nitrogen_kg_ha on yield_t_ha at chosen values: ") + kNum +
                           " \\(95% CI [^)]*\\) at soil_moisture_pct = " + kNum + " \\(mean \xE2\x88\x92 1 SD\\)");
    ASSERT_EQ(m.size(), 3u);
    expect_written(m[2], mean - sd, "mean - SD");
    expect_written(m[1], b1 + b3 * (mean - sd), "effect at mean - SD");

    // R-squared with and without the product: statsmodels (fixture: rsquared, compare_f_test).
    m = find(findings, std::string("raises R² from ") + kNum + " to " + kNum + " \\(change " + kNum +
                           "; F\\(1, 475\\) = " + kNum);
    ASSERT_EQ(m.size(), 5u);
    expect_written(m[1], ref["r_squared_change"]["r_squared_reduced"].get<double>(), "R² without");
    expect_written(m[2], ref["r_squared"].get<double>(), "R² with");
    expect_written(m[3], ref["r_squared"].get<double>() - ref["r_squared_change"]["r_squared_reduced"].get<double>(),
                   "R² change");
    expect_written(m[4], ref["r_squared_change"]["f_statistic"].get<double>(), "F change");
}

TEST(MemoSentences, CoffeeCrossoverAndSlopesMatchClosedForms) {
    const SampleRun s = run_sample("coffee-discount");
    const auto findings = memo_findings(s.analysis, s.run);
    SCOPED_TRACE(joined(findings));
    const FitResult& f = s.run.fit;
    const int i1 = f.index_of("discount_pct"), i2 = f.index_of("loyalty_member"),
              i3 = f.index_of("discount_pct×loyalty_member");
    ASSERT_GE(i1, 0);
    ASSERT_GE(i2, 0);
    ASSERT_GE(i3, 0);
    const double b1 = f.beta(i1), b2 = f.beta(i2), b3 = f.beta(i3);
    const auto& V = f.covariance;

    // Slopes per group: b1 (members = 0) and b1 + b3 (closed form).
    auto m = find(findings, std::string("The effect of discount_pct on weekly_spend is ") + kNum +
                                " \\(95% CI [^)]*\\) for loyalty_member = 0 and " + kNum +
                                " \\(95% CI [^)]*\\) for loyalty_member = 1");
    ASSERT_EQ(m.size(), 3u);
    expect_written(m[1], b1, "slope of non-members");
    expect_written(m[2], b1 + b3, "slope of members");

    // Crossover -b2/b3 and its Fieller interval: the roots of
    // (b2 + b3 x)^2 = t^2 (V22 + 2 x V23 + x^2 V33) (Fieller 1954; closed form here).
    const double t = boost::math::quantile(boost::math::students_t(f.df_residual), 0.975);
    const auto fieller =
        quadratic_roots(b3 * b3 - t * t * V(i3, i3), 2 * (b2 * b3 - t * t * V(i2, i3)), b2 * b2 - t * t * V(i2, i2));
    ASSERT_EQ(fieller.size(), 2u);
    m = find(findings, std::string("cross at discount_pct = ") + kNum + " \\(95% Fieller interval " + kNum + " to " +
                           kNum + "\\), inside the observed discount_pct values \\(" + kNum + " to " + kNum +
                           "\\): the interaction is disordinal there");
    ASSERT_EQ(m.size(), 6u);
    expect_written(m[1], -b2 / b3, "crossover");
    expect_written(m[2], fieller[0], "Fieller lower");
    expect_written(m[3], fieller[1], "Fieller upper");
    const auto& x = s.run.table->at("discount_pct").numbers;
    expect_written(m[4], *std::min_element(x.begin(), x.end()), "observed minimum");
    expect_written(m[5], *std::max_element(x.begin(), x.end()), "observed maximum");
    // With HC3, as the project asks: the Wald test is the one to report, the R² change F secondary.
    const std::string all = joined(findings);
    EXPECT_NE(all.find("With HC3 standard errors the test of the interaction term to report is the Wald test: F(1, "),
              std::string::npos);
    EXPECT_NE(all.find("a classical test that assumes the same error variance in every row, so it is secondary"),
              std::string::npos);
}

// Three groups: the joint test is stated once (the Wald test with HC3 SEs,
// F = the statsmodels-checked Wald F of the fit's comparison), and every
// pairwise difference with its Holm-adjusted p, equal to the probe's numbers
// (checked against statsmodels in test_slope_contrasts.cpp).
TEST(MemoSentences, ThreeGroupsStateTheJointTestOnceAndEveryPair) {
    const SampleRun s = run_sample("helpdesk-staffing");
    const auto findings = memo_findings(s.analysis, s.run);
    const std::string all = joined(findings);
    SCOPED_TRACE(all);
    std::size_t count = 0;
    for (std::size_t at = all.find("Wald"); at != std::string::npos; at = all.find("Wald", at + 1)) ++count;
    EXPECT_EQ(count, 1u);
    auto m = find(findings,
                  std::string("test of the interaction terms to report is the Wald test: F\\(2, 1188\\) = ") + kNum);
    ASSERT_EQ(m.size(), 2u);
    expect_written(m[1], s.run.fit.comparison->wald.statistic, "Wald F");
    const ProbeResult& p = *s.run.probe;
    ASSERT_EQ(p.slope_contrasts.size(), 3u);
    m = find(findings, std::string("p-values Holm-adjusted over 3 pairs\\): evening − day ") + kNum + " \\(95% CI " +
                           kNum + " to " + kNum + ", adjusted p");
    ASSERT_EQ(m.size(), 4u);
    expect_written(m[1], p.slope_contrasts[0].estimate, "evening - day");
    expect_written(m[2], p.slope_contrasts[0].ci_lower, "its lower end");
    expect_written(m[3], p.slope_contrasts[0].ci_upper, "its upper end");
    m = find(findings, std::string("\\) and night − evening ") + kNum);
    ASSERT_EQ(m.size(), 2u);
    expect_written(m[1], p.slope_contrasts[2].estimate, "night - evening");
}

TEST(MemoSentences, CellsSentenceIsTheDifferenceInDifferences) {
    const SampleRun s = run_sample("volunteer-onboarding");
    ASSERT_TRUE(s.run.cells);
    const auto findings = memo_findings(s.analysis, s.run);
    SCOPED_TRACE(joined(findings));
    const CellTable& c = *s.run.cells;
    // Closed form: (mu11 - mu01) - (mu10 - mu00) from the cells' predictions.
    const double did = (c.at(1, 1).estimate - c.at(0, 1).estimate) - (c.at(1, 0).estimate - c.at(0, 0).estimate);
    const auto m =
        find(findings, std::string("the difference in differences is ") + kNum + " \\(95% CI " + kNum + " to " + kNum);
    ASSERT_EQ(m.size(), 4u);
    expect_written(m[1], did, "difference in differences");
    const double lo = read_number(m[2]), hi = read_number(m[3]);
    EXPECT_LT(lo, did);
    EXPECT_GT(hi, did);
}

TEST(MemoSentences, EverySampleHasFindingsAndTheUsualCautions) {
    for (const char* name :
         {"coffee-discount", "orchard-nitrogen", "volunteer-onboarding", "helpdesk-staffing", "trial-conversion"}) {
        SCOPED_TRACE(name);
        const SampleRun s = run_sample(name);
        EXPECT_GE(memo_findings(s.analysis, s.run).size(), 2u);
        const std::string cautions = joined(memo_cautions(s.analysis, s.run));
        // The cautions every memo carries (PRODUCT.md's list).
        EXPECT_NE(cautions.find("not causal"), std::string::npos);
        EXPECT_NE(cautions.find("extrapolation"), std::string::npos);
        EXPECT_NE(cautions.find("large samples"), std::string::npos);
        if (s.analysis.family == Family::Logistic) {
            EXPECT_NE(cautions.find("probability"), std::string::npos);
        }
        if (s.run.kind == ProbeKind::Continuous) {
            EXPECT_NE(cautions.find("many moderator values"), std::string::npos);
        }
        // Several pairs of lines compared: multiple testing (common practice).
        // The groups' differences follow the chosen adjustment (Holm by default).
        const std::size_t pairs = s.run.probe ? s.run.probe->crossovers.size() : 0;
        EXPECT_EQ(cautions.find("pairs of lines are each compared") != std::string::npos, pairs > 1) << cautions;
        if (std::string(name) == "helpdesk-staffing") {
            EXPECT_EQ(pairs, 3u) << "three shifts: three pairs";
            EXPECT_NE(cautions.find("The 3 pairs of lines"), std::string::npos) << cautions;
            EXPECT_NE(cautions.find("effects of " + s.run.probe->focal + " are Holm-adjusted for this"),
                      std::string::npos)
                << cautions;
            EXPECT_EQ(cautions.find("Bonferroni"), std::string::npos) << cautions;
        }
    }
}

TEST(MemoSentences, ProbabilityScaleSentencesForTheLogisticSample) {
    const SampleRun s = run_sample("trial-conversion");
    ASSERT_TRUE(s.run.probe);
    ASSERT_EQ(s.run.probe->scale, ProbeScale::Outcome);
    const auto findings = memo_findings(s.analysis, s.run);
    SCOPED_TRACE(joined(findings));
    const std::string all = joined(findings);
    EXPECT_NE(all.find("on the log-odds of converted = 1"), std::string::npos);
    EXPECT_NE(all.find("On the probability scale the interaction effect"), std::string::npos);
    EXPECT_NE(all.find("likelihood-ratio χ²(1)"), std::string::npos);
    // A skewed count (mean - SD would be negative) is probed at its percentiles, inside the data.
    EXPECT_NE(all.find("(10th percentile)"), std::string::npos);
    EXPECT_NE(all.find("(median)"), std::string::npos);
    EXPECT_NE(all.find("(90th percentile)"), std::string::npos);
    EXPECT_EQ(all.find("beyond the data"), std::string::npos);
}

namespace {

std::shared_ptr<const Table> hostile_table() {
    // A moderator column whose name is markup: it must come out as text.
    std::ostringstream csv;
    csv << "y,x,<script>alert(1)</script>\n";
    unsigned state = 7;
    for (int i = 0; i < 120; ++i) {
        state = state * 1103515245u + 12345u;
        const double x = (state >> 8) % 100 / 10.0;
        state = state * 1103515245u + 12345u;
        const double z = (state >> 8) % 50 / 10.0;
        state = state * 1103515245u + 12345u;
        const double e = ((state >> 8) % 1000 / 1000.0 - 0.5);
        csv << 1 + 0.5 * x + 0.3 * z + 0.2 * x * z + e << ',' << x << ',' << z << "\n";
    }
    return std::make_shared<Table>(read_csv_text(csv.str(), "hostile.csv"));
}

}  // namespace

TEST(MemoRender, UserStringsAreEscapedAndTheHtmlIsSelfContained) {
    Project p;
    DataSource d;
    d.id = "data";
    d.path = "hostile.csv";
    p.datasets.push_back(d);
    Analysis a;
    a.id = "a1";
    a.name = "Tom & Jerry <b>bold</b>";
    a.dataset = "data";
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "<script>alert(1)</script>";
    a.memo_notes = "Check <img src=x onerror=alert(2)> & ask\n\nSecond paragraph";
    p.analyses.push_back(a);
    const AnalysisRun run = run_analysis(hostile_table(), a);
    MemoContext ctx;
    ctx.caption = "caption with <tags>";
    ctx.project_file = "p<1>.moderato";
    ctx.data_file = "hostile.csv";
    ctx.data_sha256 = "abc";
    MemoFigure fig;
    fig.title = "Lines <plot>";
    fig.file = "lines-plot.png";
    fig.png = std::string("\x89PNG\r\n\x1a\n", 8);
    const Memo memo = build_memo(p, a, run, ctx, {fig});
    const std::string html = memo_to_html(memo);
    // Escaped as the HTML spec's five characters (& < > " ').
    EXPECT_NE(html.find("&lt;script&gt;alert(1)&lt;/script&gt;"), std::string::npos);
    EXPECT_EQ(html.find("<script"), std::string::npos);
    EXPECT_EQ(html.find("<img src=x"), std::string::npos);
    EXPECT_NE(html.find("Check &lt;img src=x onerror=alert(2)&gt; &amp; ask"), std::string::npos);
    EXPECT_NE(html.find("Tom &amp; Jerry &lt;b&gt;bold&lt;/b&gt;"), std::string::npos);
    EXPECT_EQ(html.find("<b>bold"), std::string::npos);
    // Self-contained: no address of another file or site, the figure inline.
    for (const char* outside : {"http://", "https://", "<link", "@import", "url(", "src=\"lines-plot.png"})
        EXPECT_EQ(html.find(outside), std::string::npos) << outside;
    EXPECT_NE(html.find("src=\"data:image/png;base64,iVBORw0KGgo=\""),
              std::string::npos);  // RFC 4648 of the PNG signature

    const std::string md = memo_to_markdown(memo);
    // CommonMark: a backslash before '<' makes it a literal character, so no tag can open.
    for (std::size_t at = md.find('<'); at != std::string::npos; at = md.find('<', at + 1)) {
        const bool tag_like = at + 1 < md.size() && (std::isalpha(static_cast<unsigned char>(md[at + 1])) ||
                                                     md[at + 1] == '/' || md[at + 1] == '!' || md[at + 1] == '?');
        if (tag_like) {
            EXPECT_TRUE(at > 0 && md[at - 1] == '\\') << md.substr(at, 30);
        }
    }
    EXPECT_NE(md.find("\\<script>alert(1)\\</script>"), std::string::npos);
    EXPECT_NE(md.find("](lines-plot.png)"), std::string::npos);
}

TEST(MemoRender, FooterOfAFitInTheDatabaseNamesItsSourceAndRows) {
    SampleRun s = run_sample("coffee-discount");
    // As a fit in the database leaves it (analysis_run.hpp): the full fit over
    // more rows than the sample behind the plots, and the sample's own fit.
    s.run.sample_fit = s.run.fit;
    s.run.fit.n = 400000;
    MemoContext ctx;
    ctx.data_file = "postgresql:///shop?host=/run/pg";
    ctx.data_sha256 = "pg-md5-sum:400000:42";
    ctx.recorded_sha256 = ctx.data_sha256;
    const Memo memo = build_memo(s.loaded.project, s.analysis, s.run, ctx);
    std::map<std::string, std::string> footer(memo.footer.begin(), memo.footer.end());
    EXPECT_EQ(footer["data source"], ctx.data_file);
    EXPECT_EQ(footer["data fingerprint"], ctx.data_sha256);
    EXPECT_EQ(footer["data fingerprint as saved"], "matches");
    EXPECT_EQ(footer.count("data SHA-256"), 0u);
    EXPECT_EQ(footer["rows used"],
              "every complete row in the database (400,000); plots and checks: a random sample of " +
                  format_count(static_cast<long long>(s.run.sample_fit->n)));
}

TEST(MemoRender, FooterStatesChecksumVersionAndEveryOption) {
    const SampleRun s = run_sample("coffee-discount");
    MemoContext ctx;
    ctx.data_file = "spend.csv";
    ctx.data_sha256 = s.loaded.sha256.at(s.analysis.dataset);
    ctx.recorded_sha256 = s.loaded.project.dataset(s.analysis.dataset)->sha256;
    const Memo memo = build_memo(s.loaded.project, s.analysis, s.run, ctx);
    std::map<std::string, std::string> footer(memo.footer.begin(), memo.footer.end());
    EXPECT_EQ(footer["software"], "Moderato " MODERATO_VERSION);
    EXPECT_EQ(footer["data SHA-256"], ctx.data_sha256);
    EXPECT_EQ(footer["data SHA-256 as saved"], "matches");
    EXPECT_EQ(footer["analysis.standard_errors"], "hc3");
    EXPECT_EQ(footer["analysis.roles.moderator"], "loyalty_member");
    EXPECT_EQ(footer["dataset.import.delimiter"], ",");
    EXPECT_EQ(footer["analysis.figure.dpi"], "300");
    // Every leaf of the analysis's JSON is in the footer.
    const auto json = nlohmann::json::parse(project_to_json(s.loaded.project));
    std::size_t leaves = 0;
    std::function<void(const nlohmann::json&)> count = [&](const nlohmann::json& j) {
        if (j.is_object())
            for (const auto& [k, v] : j.items()) count(v);
        else ++leaves;
    };
    count(json["analyses"][0]);
    std::size_t analysis_rows = 0;
    for (const auto& [k, v] : memo.footer) analysis_rows += k.rfind("analysis.", 0) == 0;
    EXPECT_EQ(analysis_rows, leaves);
    // A changed data file is said in the footer.
    ctx.recorded_sha256 = std::string(64, '0');
    const Memo changed = build_memo(s.loaded.project, s.analysis, s.run, ctx);
    std::map<std::string, std::string> f2(changed.footer.begin(), changed.footer.end());
    EXPECT_NE(f2["data SHA-256 as saved"].find("differs"), std::string::npos);
}

TEST(MemoRender, SameInputsSameBytes) {
    const SampleRun s = run_sample("helpdesk-staffing");
    MemoContext ctx;
    const std::string a = memo_to_html(build_memo(s.loaded.project, s.analysis, s.run, ctx));
    const SampleRun again = run_sample("helpdesk-staffing");
    const std::string b = memo_to_html(build_memo(again.loaded.project, again.analysis, again.run, ctx));
    EXPECT_EQ(a, b);
}

// Each figure's caption sits with its own image, numbered, so it cannot read
// as the heading of the next one (issue 12, seen in Chromium): one <figure>
// holding the image and then its <figcaption> in a browser, the image's
// paragraph and then its caption's paragraph for Qt's reader. Numbers keep
// together: "< 0.001" in a sentence has a no-break space (U+00A0, &#160;),
// and every table cell holding a number does not wrap.
TEST(MemoRender, CaptionsFollowTheirOwnFigureAndNumbersStayWhole) {
    const SampleRun s = run_sample("orchard-nitrogen");
    MemoContext ctx;
    std::vector<MemoFigure> figs(3);
    const char* titles[] = {"Lines plot", "Effect plot", "Surface plot"};
    for (std::size_t i = 0; i < figs.size(); ++i) {
        figs[i].title = titles[i];
        figs[i].file = "f" + std::to_string(i) + ".png";
        figs[i].png = std::string("\x89PNG\r\n\x1a\n", 8);
    }
    const Memo memo = build_memo(s.loaded.project, s.analysis, s.run, ctx, figs);
    for (bool embed : {true, false}) {
        SCOPED_TRACE(embed ? "embedded" : "for Qt");
        const std::string html = memo_to_html(memo, embed);
        const std::regex figure(embed ? "<figure><img alt=\"([^\"]*)\"[^>]*><figcaption>Figure ([0-9]+)\\. "
                                        "([^<]*)</figcaption></figure>"
                                      : "<p class=\"figure\"><img alt=\"([^\"]*)\"[^>]*></p>\n"
                                        "<p class=\"figcaption\">Figure ([0-9]+)\\. ([^<]*)</p>");
        std::size_t n = 0;
        for (auto it = std::sregex_iterator(html.begin(), html.end(), figure); it != std::sregex_iterator(); ++it) {
            EXPECT_EQ((*it)[1].str(), titles[n]);
            EXPECT_EQ((*it)[2].str(), std::to_string(n + 1));
            EXPECT_EQ((*it)[3].str(), titles[n]);  // the caption names the image right above it
            ++n;
        }
        EXPECT_EQ(n, figs.size()) << html.substr(html.find("Probe</h2>"), 600);
    }
    // The Markdown memo too: each image, then its numbered caption as the next paragraph
    // (CommonMark: a blank line ends a paragraph; *…* is emphasis).
    const std::string md = memo_to_markdown(memo);
    for (std::size_t i = 0; i < figs.size(); ++i) {
        const std::string expected = "![" + std::string(titles[i]) + "](" + figs[i].file + ")\n\n*Figure " +
                                     std::to_string(i + 1) + ". " + titles[i] + "*\n\n";
        EXPECT_NE(md.find(expected), std::string::npos) << md.substr(md.find("## Probe"), 400);
    }
    // The orchard's interaction has p < 0.001 (its memo says so): held together in sentences.
    const std::string html = memo_to_html(memo);
    const std::string findings = html.substr(html.find("<ul class=\"findings\">"));
    EXPECT_NE(findings.find("&lt;&#160;0.001"), std::string::npos);
    for (const std::string list : {"<ul class=\"findings\">", "<ul class=\"cautions\">"}) {
        const std::string items = html.substr(html.find(list), html.find("</ul>", html.find(list)) - html.find(list));
        EXPECT_EQ(items.find("&lt; 0"), std::string::npos) << items;
    }
    // Every table cell whose text is a number (a minus sign, "< 0.001", digits) does not wrap.
    const std::regex cell("<td([^>]*)>([^<]*)</td>");
    const std::regex number("^(\u2212|&lt; )?[0-9][0-9.,]*(, [0-9]+)?$");  // "1, 196": degrees of freedom
    const std::string tables = html.substr(0, html.find("<h2>Reproducibility"));
    std::size_t numbers = 0;
    for (auto it = std::sregex_iterator(tables.begin(), tables.end(), cell); it != std::sregex_iterator(); ++it) {
        if (!std::regex_match((*it)[2].str(), number)) continue;
        ++numbers;
        EXPECT_NE((*it)[1].str().find("white-space:nowrap"), std::string::npos) << (*it)[0].str();
    }
    EXPECT_GT(numbers, 20u);
}

// Issue 12: the critical value of the simultaneous band read 2.46 in one
// place and 2.455 in another, and the probe's text report wrote intervals
// with "%.4g" ("0.077 to 0.08845", "12 to 37.9"). One formatter: the memo
// and the text report write the same strings, checked against printf here
// ("%#.4g": four significant digits with trailing zeros, common practice).
TEST(MemoRender, CriticalValueAndRangesReadTheSameInMemoAndProbeText) {
    const SampleRun s = run_sample("orchard-nitrogen");
    ASSERT_TRUE(s.run.probe && s.run.probe->simultaneous);
    char buf[64];
    std::snprintf(buf, sizeof buf, "%#.4g", s.run.probe->simultaneous->critical_value);
    const std::string critical = buf;
    EXPECT_EQ(critical, "2.455");  // docs/cli-output.md shows 2.4554858833784179 for this sample
    const Memo memo = build_memo(s.loaded.project, s.analysis, s.run, MemoContext{});
    std::string memo_text;
    for (const auto& f : memo.findings) memo_text += f + "\n";
    for (const auto& c : memo.cautions) memo_text += c + "\n";
    const std::string report = probe_to_text(*s.run.probe, s.run.fit);
    for (const std::string* text : {static_cast<const std::string*>(&memo_text), &report}) {
        std::size_t seen = 0;
        for (std::size_t at = text->find("critical value "); at != std::string::npos;
             at = text->find("critical value ", at + 1), ++seen)
            EXPECT_EQ(text->substr(at + 15, critical.size() + 1), critical + ")") << *text;
        EXPECT_GE(seen, 1u) << *text;
    }
    // The observed moderator range: 12 (a whole number) to 37.9, both ends to two decimals in both texts.
    const auto [lo, hi] = s.run.probe->observed_range;
    ASSERT_EQ(lo, 12.0);
    std::snprintf(buf, sizeof buf, "%.2f to %.2f", lo, hi);
    EXPECT_NE(report.find(std::string("observed from ") + buf), std::string::npos) << report;
    EXPECT_NE(memo_text.find(std::string("(") + buf + ")"), std::string::npos) << memo_text;
}

TEST(Base64, Rfc4648TestVectors) {
    // RFC 4648 section 10.
    EXPECT_EQ(base64_encode(""), "");
    EXPECT_EQ(base64_encode("f"), "Zg==");
    EXPECT_EQ(base64_encode("fo"), "Zm8=");
    EXPECT_EQ(base64_encode("foo"), "Zm9v");
    EXPECT_EQ(base64_encode("foob"), "Zm9vYg==");
    EXPECT_EQ(base64_encode("fooba"), "Zm9vYmE=");
    EXPECT_EQ(base64_encode("foobar"), "Zm9vYmFy");
}

TEST(ProjectFile, MemoNotesRoundTripAndAreLeftOutWhenEmpty) {
    const SampleRun s = run_sample("coffee-discount");
    Project p = s.loaded.project;
    EXPECT_EQ(project_to_json(p).find("memo_notes"), std::string::npos);
    p.analyses.front().memo_notes = "Ask the roaster <team> & \"finance\"\nline two";
    const Project back = project_from_json(project_to_json(p), "test");
    EXPECT_EQ(back.analyses.front().memo_notes, p.analyses.front().memo_notes);
    EXPECT_TRUE(back == p);
    Project other = back;
    other.analyses.front().memo_notes.clear();
    EXPECT_FALSE(other == back);
}

TEST(MemoSentences, ThreeWayFindingsSayWhereTheSecondModeratorIsHeld) {
    // y = 1 + x + z + w + 0.5 xz + 0.3 xzw + noise (a fixed LCG, invented data).
    std::ostringstream csv;
    csv << "y,x,z,w\n";
    unsigned state = 11;
    auto next = [&] {
        state = state * 1103515245u + 12345u;
        return ((state >> 8) % 10000) / 10000.0;
    };
    double w_sum = 0;
    const int n = 400;
    for (int i = 0; i < n; ++i) {
        const double x = 4 * next(), z = 3 * next(), w = 2 * next(), e = next() - 0.5;
        w_sum += w;
        csv << 1 + x + z + w + 0.5 * x * z + 0.3 * x * z * w + e << ',' << x << ',' << z << ',' << w << "\n";
    }
    Analysis a;
    a.id = "three";
    a.dataset = "d";
    a.roles = {"y", "x", "z", "w", {}, "", "", ""};
    const AnalysisRun run = run_analysis(std::make_shared<Table>(read_csv_text(csv.str(), "three.csv")), a);
    const auto findings = memo_findings(a, run);
    SCOPED_TRACE(joined(findings));
    // The mean of w, computed here from the generated values.
    const auto m = find(findings, std::string("Among the observed values of z \\(") + kNum + " to " + kNum +
                                      "\\), with w held at its mean \\(" + kNum + "\\)");
    ASSERT_EQ(m.size(), 4u);
    expect_written(m[3], w_sum / n, "mean of w");
    // Held at a chosen value, the sentence says that value.
    a.probe.second_value = 1.5;
    AnalysisRun held = run;
    probe_analysis(held, a);
    EXPECT_NE(joined(memo_findings(a, held)).find("with w held at 1.500,"), std::string::npos)
        << joined(memo_findings(a, held));
}

// The straight-line check in the memo, on data whose interaction is exactly
// a straight line (common/straight_line_data.hpp): each bin's sentence gives
// the effect at the bin's median, which by construction is 2 + 0.3·median
// (the medians re-derived here from the binning's definition), beside the
// straight line's own (the same number); the smooth curve's bandwidth is
// the one it chose; the cautions say the test is no proof. Off, the memo
// says nothing of the check.
TEST(MemoSentences, StraightLineCheckSaysEachBinAndItsCautions) {
    const test::ExactLine data;
    auto table = std::make_shared<const Table>(data.table());
    Analysis a;
    a.id = a.name = "line";
    a.dataset = "d";
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "z";
    const AnalysisRun off = run_analysis(table, a);
    for (const auto& s : memo_findings(a, off)) EXPECT_EQ(s.find("Bin 1"), std::string::npos) << s;
    for (const auto& s : memo_cautions(a, off)) EXPECT_EQ(s.find("straight-line check"), std::string::npos) << s;

    a.probe.show_binned = true;
    a.probe.bins = 4;
    a.probe.show_smooth = true;
    a.probe.smooth_replicates = 0;  // no band: the sentence says so
    const AnalysisRun run = run_analysis(table, a);
    ASSERT_TRUE(run.binned && run.smooth) << (run.straight_line_notes.empty() ? "" : run.straight_line_notes[0]);
    const std::vector<std::string> findings = memo_findings(a, run);
    const auto said = [&](const std::string& text) {
        return std::any_of(findings.begin(), findings.end(),
                           [&](const std::string& s) { return s.find(text) != std::string::npos; });
    };
    const std::vector<double> medians = test::bin_medians(data.z, 4);  // re-derived (binned_effects.hpp)
    for (std::size_t k = 0; k < medians.size(); ++k) {
        const std::string effect = format_sig(test::ExactLine::effect_at(medians[k]));  // by construction
        const std::string bin = "Bin " + std::to_string(k + 1) + " of z";
        EXPECT_TRUE(said(bin)) << bin;
        EXPECT_TRUE(said("at its median " + format_sig(medians[k]) + " the effect of x is " + effect))
            << bin << " " << effect;
        EXPECT_TRUE(said("the straight line gives " + effect + " there")) << bin;
    }
    EXPECT_TRUE(said(linearity_sentence(*run.binned)));
    EXPECT_TRUE(said("bandwidth of " + format_sig(run.smooth->bandwidth) + " in units of z"));
    EXPECT_TRUE(said("it has no band"));
    const std::vector<std::string> cautions = memo_cautions(a, run);
    EXPECT_TRUE(std::any_of(cautions.begin(), cautions.end(), [](const std::string& s) {
        return s.find("is not proof of a straight-line effect") != std::string::npos;
    }));
}
