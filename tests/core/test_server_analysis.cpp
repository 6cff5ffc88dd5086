// An analysis whose dataset's fits run in the database (ServerFit): the
// sample read for plots is reproducible and named as such, the model's
// numbers are those of every row (compared with core's own fit of all the
// rows read into memory, within 1e-9 relative, the target), the
// checks' fit is that of the sample, and what a fit in the database cannot
// do is refused by name. The project file records the choice.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "common/pg_cluster.hpp"
#include "common/pg_fit_data.hpp"
#include "common/temp_dir.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"

namespace moderato {
namespace {

using test::shared_cluster;

class ServerAnalysis : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        db_ = test::fresh_database("serveranalysis");
        shared_cluster().exec(std::string("CREATE TABLE sales ") + test::fit_columns_sql(), db_);
        shared_cluster().copy_in("sales", test::fit_rows(2000, 77), db_);
    }
    static SourceSpec source() { return {SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "sales", ""}; }
    static Analysis analysis() {
        Analysis a;
        a.id = "a";
        a.name = "x by m";
        a.dataset = "sales";
        a.roles.outcome = "y";
        a.roles.focal = "x";
        a.roles.moderator = "m";
        a.roles.weights = "w";
        a.se = SeKind::HC3;
        return a;
    }
    static std::string db_;
};
std::string ServerAnalysis::db_;

TEST_F(ServerAnalysis, TheSampleIsTheSameEachTimeAndNamesItsTotal) {
    std::size_t total = 0, again_total = 0;
    const Table first = read_postgres_sample(source(), 300, &total);
    const Table again = read_postgres_sample(source(), 300, &again_total);
    EXPECT_EQ(total, 2000u);  // the rows copied in above
    EXPECT_EQ(again_total, 2000u);
    ASSERT_EQ(first.rows(), 300u);
    EXPECT_EQ(first.at("id").numbers, again.at("id").numbers);
    // Not simply the first rows the server returns.
    const Table head = read_postgres(source(), {}, {}, {}, nullptr, 300);
    EXPECT_NE(first.at("id").numbers, head.at("id").numbers);
    // A source with fewer rows than asked for is read whole.
    std::size_t small = 0;
    EXPECT_EQ(read_postgres_sample(source(), 5000, &small).rows(), 2000u);
    EXPECT_EQ(small, 2000u);
}

TEST_F(ServerAnalysis, EstimatesUseEveryRowAndChecksTheSample) {
    std::size_t total = 0;
    const auto sample = std::make_shared<const Table>(read_postgres_sample(source(), 400, &total));
    const ServerFit server{source(), {}, {}};
    const AnalysisRun run = run_analysis(sample, analysis(), {}, &server);
    // Reference: core's own fit of every row, read into memory (a different route: QR of the rows).
    const AnalysisRun all = run_analysis(std::make_shared<const Table>(read_postgres(source())), analysis());
    test::expect_same_fit(run.fit, all.fit, 1e-9, "in the database vs every row read");
    ASSERT_TRUE(run.sample_fit);
    EXPECT_LE(run.sample_fit->n, 400u);
    EXPECT_GT(run.fit.n, run.sample_fit->n);
    ASSERT_TRUE(run.probe);
    const bool named = std::any_of(run.cautions.begin(), run.cautions.end(), [&](const std::string& c) {
        return c.find("all " + format_count(static_cast<long long>(run.fit.n)) + " complete rows in the database") !=
                   std::string::npos &&
               c.find("random sample of " + format_count(static_cast<long long>(run.sample_fit->n))) !=
                   std::string::npos;
    });
    EXPECT_TRUE(named);
    // Johnson-Neyman boundaries depend on the coefficients, their covariance
    // and df only: those of every row (the moderator values probed come from
    // the sample's design, so the effects themselves are at other values).
    ASSERT_TRUE(all.probe && all.probe->johnson_neyman && run.probe->johnson_neyman);
    const auto &got = run.probe->johnson_neyman->boundaries, &want = all.probe->johnson_neyman->boundaries;
    ASSERT_EQ(got.size(), want.size());
    for (std::size_t i = 0; i < got.size(); ++i) EXPECT_NEAR(got[i], want[i], 1e-7 * (1 + std::abs(want[i])));
}

TEST_F(ServerAnalysis, WhatAFitInTheDatabaseCannotDoIsNamed) {
    const auto sample = std::make_shared<const Table>(read_postgres_sample(source(), 400, nullptr));
    const ServerFit server{source(), {}, {}};
    Analysis a = analysis();
    a.family = Family::Probit;
    a.roles.outcome = "cl";
    try {
        run_analysis(sample, a, {}, &server);
        FAIL() << "a probit model fitted in the database";
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("a fit in the database is a linear model"), std::string::npos) << e.what();
    }
}

TEST(ServerProject, TheFileRecordsFitsInTheDatabase) {
    DataSource d;
    d.id = "sales";
    d.kind = SourceKind::PostgreSQL;
    d.path = "postgresql:///shop?host=/run/pg";
    d.table = "sales";
    d.in_database = true;
    Project p;
    p.datasets = {d};
    test::TempDir dir("server-project");
    const std::string path = (dir / "p.moderato").string();
    write_project_file(p, path);
    EXPECT_TRUE(read_project_file(path).dataset("sales")->in_database);
    EXPECT_EQ(read_project_file(path).datasets[0], d);
}

}  // namespace
}  // namespace moderato
