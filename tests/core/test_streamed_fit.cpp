// Streamed fits (streamed_fit.hpp) against the in-memory fit of the same
// table, which is the reference for every agreement check here (fit_model is
// itself checked against NIST StRD and statsmodels elsewhere): 1e-9 relative
// on the NIST StRD datasets, the statsmodels reference fixtures and a
// generated table with categorical columns, weights, clusters and missing
// cells, read in chunks of a few rows so that chunk and block boundaries fall
// everywhere (inside quoted fields, between CR and LF). On ill-conditioned
// problems (NIST Filip; the near-collinear fixture) a quantity that rounding
// moves by more than 1e-9 in the in-memory fit itself, as measured by fitting
// the same rows in reverse order and by its double-precision path
// (FitOptions::extended_budget = 0), may differ by up to ten times that; one
// that rounding leaves undetermined there (NaN in either) is not compared.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <random>
#include <string>

#include "common/input_error.hpp"
#include "common/nist.hpp"
#include "common/nist_spec.hpp"
#include "common/reference_fixtures.hpp"
#include "common/temp_dir.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/streamed_fit.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/csv_stream.hpp"
#include "moderato/support/file_util.hpp"

namespace fs = std::filesystem;
using namespace moderato;
using moderato::test::input_error_of;
using moderato::test::rel;

namespace {

constexpr double kTol = 1e-9;  // the agreement the issue asks for

detail::CsvTuning blocks_of(std::size_t bytes) {
    detail::CsvTuning t;
    t.block_size = bytes;
    t.min_piece = 1;
    return t;
}

// The table's rows in reverse order (the same fit, summed in another order).
Table reversed(Table t) {
    std::reverse(t.row_lines.begin(), t.row_lines.end());
    for (Column& c : t.columns) {
        std::reverse(c.numbers.begin(), c.numbers.end());
        std::reverse(c.codes.begin(), c.codes.end());
    }
    return t;
}

// The in-memory fit's own rounding, measured (see the top of the file).
// The in-memory fit of the rows reversed, and by its double-precision path.
std::vector<FitResult> in_memory_variants(const Table& t, const ModelSpec& spec) {
    FitOptions blocked;
    blocked.extended_budget = 0;
    return {fit_model(reversed(t), spec), fit_model(t, spec, blocked)};
}

// |a - b| within kTol of |b|, or of `floor` where b is rounding noise around
// zero (an exact fit's RSS and standard errors: 1e-12 of the quantity's
// scale), or within ten times the in-memory fit's own movement |b - r| (r:
// the same quantity from the other in-memory fits, see the top of the file).
void expect_close(double a, double b, double floor, const std::string& what, std::vector<double> r = {}) {
    if (std::isnan(b)) {
        EXPECT_TRUE(std::isnan(a)) << what;
        return;
    }
    double own = 0;
    for (const double v : r) {
        if (std::isnan(v)) return;  // undetermined by rounding in the in-memory fit itself
        own = std::max(own, 10 * std::abs(b - v));
    }
    EXPECT_LE(std::abs(a - b), std::max(kTol * std::max(std::abs(b), floor), own)) << what << ": " << a << " vs " << b;
}

// Every number the two fits report, compared (`r`: the other in-memory fits).
void expect_agree(const FitResult& s, const FitResult& m, const std::vector<FitResult>& r = {}) {
    const auto other = [&](auto get) {
        std::vector<double> v;
        for (const FitResult& f : r) v.push_back(get(f));
        return v;
    };
    ASSERT_EQ(s.coefficients.size(), m.coefficients.size());
    EXPECT_EQ(s.n, m.n);
    EXPECT_EQ(s.n_excluded, m.n_excluded);
    EXPECT_EQ(s.rank, m.rank);
    EXPECT_EQ(s.aliased, m.aliased);
    double scale = 0;
    for (const auto& c : m.coefficients)
        if (!c.aliased) scale = std::max(scale, std::abs(c.estimate));
    for (std::size_t j = 0; j < m.coefficients.size(); ++j) {
        const auto& a = s.coefficients[j];
        const auto& b = m.coefficients[j];
        EXPECT_EQ(a.term, b.term);
        expect_close(a.estimate, b.estimate, 1e-3 * scale, b.term + " estimate",
                     other([&](const FitResult& f) { return f.coefficients[j].estimate; }));
        expect_close(a.std_error, b.std_error, 1e-3 * scale, b.term + " se",
                     other([&](const FitResult& f) { return f.coefficients[j].std_error; }));
        expect_close(a.vif, b.vif, 0, b.term + " vif",
                     other([&](const FitResult& f) { return f.coefficients[j].vif; }));
    }
    const double noise = 1e-3 * m.tss;  // an exact fit's RSS is rounding noise
    expect_close(s.rss, m.rss, noise, "rss");
    expect_close(s.tss, m.tss, 0, "tss");
    expect_close(s.r_squared, m.r_squared, 0, "r2");
    expect_close(s.adj_r_squared, m.adj_r_squared, 0, "adjusted r2");
    if (m.rss > 1e-9 * m.tss) {  // not an exact fit: the F and likelihood are meaningful
        expect_close(s.f_statistic, m.f_statistic, 0, "F", other([](const FitResult& f) { return f.f_statistic; }));
        expect_close(s.log_likelihood, m.log_likelihood, 0, "log-likelihood");
        expect_close(s.aic, m.aic, 0, "aic");
    }
    EXPECT_EQ(s.f_df1, m.f_df1);
    EXPECT_EQ(s.df_inference, m.df_inference);
    ASSERT_EQ(s.comparison.has_value(), m.comparison.has_value());
    if (m.comparison) {
        expect_close(s.comparison->f_statistic, m.comparison->f_statistic, 0, "nested F");
        expect_close(s.comparison->r_squared_change, m.comparison->r_squared_change, 0, "R2 change");
        expect_close(s.comparison->wald.statistic, m.comparison->wald.statistic, 0, "nested Wald",
                     other([](const FitResult& f) { return f.comparison->wald.statistic; }));
        EXPECT_EQ(s.comparison->df1, m.comparison->df1);
    }
    ASSERT_EQ(s.wald_tests.size(), m.wald_tests.size());
    for (std::size_t k = 0; k < m.wald_tests.size(); ++k)
        expect_close(s.wald_tests[k].statistic, m.wald_tests[k].statistic, 0, "Wald test",
                     other([&](const FitResult& f) { return f.wald_tests[k].statistic; }));
    EXPECT_TRUE(s.streamed.has_value());
    EXPECT_TRUE(s.fitted.size() == 0 && s.residuals.size() == 0);
    EXPECT_EQ(s.warnings, m.warnings);
}

FitResult streamed_file(const std::string& path, const CsvOptions& o, const ModelSpec& spec, std::size_t chunk,
                        std::size_t block) {
    CsvStream stream(path, o, chunk);
    stream.set_tuning(blocks_of(block));
    return fit_streamed(stream, spec);
}

const SeKind kAllKinds[] = {SeKind::Classical, SeKind::HC0, SeKind::HC1, SeKind::HC2, SeKind::HC3, SeKind::HC4};

}  // namespace

TEST(StreamedFit, NistDatasetsAgreeWithTheInMemoryFit) {
    ASSERT_TRUE(test::nist_available()) << test::nist_missing_message();
    for (const std::string& name : test::nist_datasets()) {
        const test::NistCase c = test::load_nist(name);
        ModelSpec spec = test::nist_spec(c);
        const Table t = read_csv(c.csv.string());
        for (const SeKind se : kAllKinds) {
            spec.se = se;
            SCOPED_TRACE(name + " " + to_string(se));
            const FitResult m = fit_model(t, spec);  // reference: the in-memory fit
            expect_agree(streamed_file(c.csv.string(), {}, spec, 7, 50), m, in_memory_variants(t, spec));
        }
    }
}

TEST(StreamedFit, FoldedPassesAgreeOnTheDoublePrecisionPath) {
    // Large problems (n (p + 1)^2 over FitOptions::extended_budget; 0 here)
    // without a categorical factor fold pass B into pass A; reference: the
    // in-memory fit on its double-precision path.
    ASSERT_TRUE(test::nist_available()) << test::nist_missing_message();
    FitOptions blocked;
    blocked.extended_budget = 0;
    for (const std::string name : {"Longley", "Norris", "Pontius", "NoInt1", "Wampler4"}) {
        const test::NistCase c = test::load_nist(name);
        ModelSpec spec = test::nist_spec(c);
        const Table t = read_csv(c.csv.string());
        for (const SeKind se : {SeKind::Classical, SeKind::HC3}) {
            spec.se = se;
            SCOPED_TRACE(name + " " + to_string(se));
            CsvStream stream(c.csv.string(), {}, 6);
            stream.set_tuning(blocks_of(40));
            const FitResult f = fit_streamed(stream, spec, blocked);
            expect_agree(f, fit_model(t, spec, blocked), {fit_model(reversed(t), spec, blocked)});
            EXPECT_EQ(f.streamed->passes, streamed_passes(se) - 1);  // streamed_fit.hpp: one pass fewer
        }
    }
}

TEST(StreamedFit, StatsmodelsFixturesAgreeWithTheInMemoryFit) {
    const fs::path dir = test::reference_fixture_dir("ols_binary_continuous.json");
    std::size_t fitted = 0;
    for (const auto& e : fs::directory_iterator(dir)) {
        if (e.path().extension() != ".json") continue;
        const nlohmann::json j = test::read_fixture_json(e.path());
        if (!j.contains("spec") || !j.contains("data") || j.at("spec").value("family", "") != "linear") continue;
        const nlohmann::json& sp = j.at("spec");
        std::vector<SeKind> kinds(std::begin(kAllKinds), std::end(kAllKinds));
        if (sp.contains("cluster") && !sp.at("cluster").is_null()) kinds.push_back(SeKind::Cluster);
        for (const SeKind se : kinds) {
            SCOPED_TRACE(e.path().filename().string() + " " + to_string(se));
            test::FixtureModel fm = test::fixture_model(j, e.path(), se);
            if (sp.contains("weights") && !sp.at("weights").is_null()) fm.spec.weights = sp.at("weights");
            if (sp.contains("intercept")) fm.spec.intercept = sp.at("intercept").get<bool>();
            CsvOptions o;
            for (const auto& [col, ref] : sp.at("categorical").items()) o.column_kinds[col] = ColumnKind::Categorical;
            const FitResult m = fit_model(fm.table, fm.spec);  // reference: the in-memory fit
            expect_agree(
                streamed_file((e.path().parent_path() / j.at("data").get<std::string>()).string(), o, fm.spec, 5, 97),
                m, in_memory_variants(fm.table, fm.spec));
            ++fitted;
        }
    }
    EXPECT_GE(fitted, 60u);  // ten or more linear fixtures, six kinds each
}

namespace {

// A seeded table: a categorical moderator with a level held only by rows that
// are left out, weights, 12 clusters, missing cells in every column, quoted
// level text with line breaks and CRLF line ends.
std::string generated_table() {
    std::mt19937_64 rng(20261205);
    std::normal_distribution<double> z;
    std::uniform_int_distribution<int> pick(0, 2), cl(0, 11), gap(0, 24);
    const char* regions[] = {"\"north\r\nshore\"", "south", "\"east, \"\"old\"\"\""};
    std::string text = "y,x,region,w,site\r\n";
    for (int i = 0; i < 600; ++i) {
        const int r = pick(rng);
        const double x = z(rng), w = 0.5 + std::abs(z(rng));
        const double y = 1 + 0.5 * x + 0.3 * r + 0.4 * x * r + z(rng) * (1 + std::abs(x));
        auto cell = [&](const std::string& v) { return gap(rng) == 0 ? std::string("NA") : v; };
        text += cell(std::to_string(y)) + "," + cell(std::to_string(x)) + "," +
                (gap(rng) == 0 ? std::string("") : std::string(regions[r])) + "," + cell(std::to_string(w)) + ",s" +
                std::to_string(cl(rng)) + "\r\n";
    }
    text += "NA,1,west,1,s1\r\n";  // a level only an excluded row holds
    return text;
}

}  // namespace

TEST(StreamedFit, GeneratedTableWithEveryComplicationAgrees) {
    test::TempDir dir("streamfit");
    const fs::path p = dir.write("gen.csv", generated_table());
    const Table t = read_csv(p.string());
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "region"};
    spec.interactions = {{"x", "region"}};
    spec.weights = "w";
    spec.wald_tests = {{"x×region"}};
    std::vector<SeKind> kinds(std::begin(kAllKinds), std::end(kAllKinds));
    kinds.push_back(SeKind::Cluster);
    for (const SeKind se : kinds) {
        spec.se = se;
        spec.cluster = se == SeKind::Cluster ? "site" : "";
        for (const bool weighted : {true, false}) {
            ModelSpec s = spec;
            if (!weighted) s.weights.clear();
            SCOPED_TRACE(std::string(to_string(se)) + (weighted ? " weighted" : ""));
            const FitResult m = fit_model(t, s);  // reference: the in-memory fit
            ASSERT_GT(m.n_excluded, 0u);
            for (const std::size_t chunk : {1u, 3u, 1000u}) {
                const FitResult f = streamed_file(p.string(), {}, s, chunk, 11);
                expect_agree(f, m);
                EXPECT_EQ(f.streamed->passes, streamed_passes(se));  // 2 classical, 3 sandwich kinds
                EXPECT_EQ(f.exclusions.size(), m.exclusions.size());
                EXPECT_EQ(f.notes.front(), m.notes.front());
            }
        }
    }
}

TEST(StreamedFit, RefusesWhatIsNotStreamed) {
    test::TempDir dir("streamfit");
    const fs::path p = dir.write("b.csv", "y,x\n0,1\n1,2\n0,3\n1,5\n");
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.family = Family::Logistic;
    CsvStream s(p.string(), {});
    EXPECT_EQ(input_error_of([&] { fit_streamed(s, spec); }),
              p.string() +
                  ": streamed fits are linear (OLS or WLS) for now; a logistic model needs the table in memory. Fit "
                  "it without streaming (drop --stream, or raise --memory-budget), or keep only the rows and columns "
                  "it needs");
}

TEST(StreamedFit, BadCellsFoundLateNameTheFileAndLine) {
    test::TempDir dir("streamfit");
    std::string text = "y,x,w\n";
    for (int i = 0; i < 100; ++i) text += std::to_string(i % 9) + "," + std::to_string(i) + ",1\n";
    const fs::path p = dir.write("w.csv", text + "4,5,-2\n");  // line 102: header + 100 rows, then this one
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.weights = "w";
    const std::string want = input_error_of([&] { fit_model(read_csv(p.string()), spec); });
    EXPECT_NE(want.find("line 102 of " + p.string()), std::string::npos) << want;
    EXPECT_EQ(input_error_of([&] { streamed_file(p.string(), {}, spec, 8, 64); }), want);  // the in-memory words
    const fs::path q = dir.write("t.csv", text + "4,five,1\n");
    CsvOptions o;
    o.column_kinds["x"] = ColumnKind::Numeric;
    EXPECT_EQ(input_error_of([&] { streamed_file(q.string(), o, spec, 8, 64); }),
              q.string() +
                  ": line 102, column 2 ('x'): 'five' is not a number, but the column is set to numeric; correct the "
                  "cell, add 'five' to the missing tokens, or read the column as categorical");
}
