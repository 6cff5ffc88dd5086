// Fits computed inside PostgreSQL (in_database_fit.hpp) against core's own
// fit of the same rows read with read_postgres: every number within 1e-9
// relative (the accuracy target), over OLS and WLS, every SE kind,
// a categorical moderator, missing values, clusters, no intercept, powers and
// an aliased column. The reference route (read rows, QR in long double) shares
// nothing with the database route but the design's layout.
#include <gtest/gtest.h>

#include "common/pg_cluster.hpp"
#include "common/pg_fit_data.hpp"
#include "moderato/estimation/in_database_fit.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"

namespace {

using moderato::FitResult;
using moderato::ModelSpec;
using moderato::SeKind;
using moderato::SourceKind;
using moderato::SourceSpec;
using moderato::test::shared_cluster;

constexpr double kTol = 1e-9;  // the "within 1e-9 relative"

class InDatabaseFit : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        db_ = moderato::test::fresh_database("fittest");
        shared_cluster().exec(std::string("CREATE TABLE sales ") + moderato::test::fit_columns_sql(), db_);
        shared_cluster().copy_in("sales", moderato::test::fit_rows(600), db_);
        shared_cluster().exec("ALTER TABLE sales ADD COLUMN x2 double precision; UPDATE sales SET x2 = 2 * x", db_);
    }
    static SourceSpec source() { return {SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "sales", ""}; }
    static FitResult local(const ModelSpec& spec, const SourceSpec& s = source()) {
        return moderato::fit_model(moderato::read_postgres(s), spec);
    }
    static std::string db_;
};
std::string InDatabaseFit::db_;

ModelSpec interaction_model(SeKind se) {
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "m"};
    spec.interactions = {{"x", "m"}};
    spec.se = se;
    return spec;
}

TEST_F(InDatabaseFit, EverySeKindMatchesTheLocalFit) {
    for (SeKind se : {SeKind::Classical, SeKind::HC0, SeKind::HC1, SeKind::HC2, SeKind::HC3, SeKind::HC4}) {
        const ModelSpec spec = interaction_model(se);
        moderato::InDatabaseRun run;
        const FitResult got = moderato::fit_in_database(source(), spec, {}, {}, {}, &run);
        moderato::test::expect_same_fit(got, local(spec), kTol, moderato::to_string(se));
        // The query count the header states: 2 for classical, 3 for the others (no categorical column here).
        EXPECT_EQ(run.statements.size(), moderato::in_database_queries(se));
        EXPECT_TRUE(run.partition_key.empty());
        EXPECT_GT(got.n_excluded, 0u);  // the NULL x rows, left out as the local fit leaves them out
    }
}

TEST_F(InDatabaseFit, CategoricalModeratorWithMissingTokens) {
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "g"};
    spec.interactions = {{"x", "g"}};
    spec.reference_levels["g"] = "north";
    spec.se = SeKind::HC3;
    moderato::InDatabaseRun run;
    const FitResult got = moderato::fit_in_database(source(), spec, {}, {}, {}, &run);
    moderato::test::expect_same_fit(got, local(spec), kTol, "x*g, HC3");
    EXPECT_EQ(run.statements.size(), 1 + moderato::in_database_queries(SeKind::HC3));  // + the levels of g
    // The dummies are those of the non-reference levels ("NA" is a missing token, not a level).
    EXPECT_EQ(got.coefficients[2].term, "g=east");
    EXPECT_EQ(got.coefficients[3].term, "g=south");
}

TEST_F(InDatabaseFit, WeightsAndAControlMatch) {
    for (SeKind se : {SeKind::Classical, SeKind::HC1, SeKind::HC3}) {
        ModelSpec spec = interaction_model(se);
        spec.predictors.push_back("g");
        spec.weights = "w";
        moderato::test::expect_same_fit(moderato::fit_in_database(source(), spec), local(spec), kTol,
                                        std::string("WLS ") + moderato::to_string(se));
    }
}

TEST_F(InDatabaseFit, ClusterRobustMatches) {
    ModelSpec spec = interaction_model(SeKind::Cluster);
    spec.cluster = "cl";
    spec.weights = "w";
    moderato::InDatabaseRun run;
    const FitResult got = moderato::fit_in_database(source(), spec, {}, {}, {}, &run);
    moderato::test::expect_same_fit(got, local(spec), kTol, "CR1");
    EXPECT_EQ(got.n_clusters, 25);
    EXPECT_EQ(run.statements.size(), 3u);
    EXPECT_NE(run.statements.back().find("GROUP BY c"), std::string::npos);
}

TEST_F(InDatabaseFit, NoInterceptPowersAndAliasedColumns) {
    ModelSpec none;
    none.outcome = "y";
    none.predictors = {"x", "m"};
    none.intercept = false;
    none.se = SeKind::HC2;
    moderato::test::expect_same_fit(moderato::fit_in_database(source(), none), local(none), kTol, "no intercept");

    ModelSpec poly = interaction_model(SeKind::HC3);
    poly.polynomial["m"] = 2;
    moderato::test::expect_same_fit(moderato::fit_in_database(source(), poly), local(poly), kTol, "m^2");

    ModelSpec aliased = interaction_model(SeKind::Classical);
    aliased.predictors.push_back("x2");  // x2 = 2 x: aliased in both fits
    const FitResult got = moderato::fit_in_database(source(), aliased);
    EXPECT_EQ(got.aliased, std::vector<std::string>{"x2"});
    moderato::test::expect_same_fit(got, local(aliased), kTol, "aliased x2");
}

TEST_F(InDatabaseFit, AQuerySourceMatches) {
    const SourceSpec q{SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "",
                       "SELECT y, x, m, g FROM sales WHERE store <> 2"};
    const ModelSpec spec = interaction_model(SeKind::HC3);
    moderato::test::expect_same_fit(moderato::fit_in_database(q, spec), local(spec, q), kTol, "query");
}

TEST_F(InDatabaseFit, HostileColumnNamesAreInert) {
    const std::string nasty = "m\"); DROP TABLE sales; --";
    shared_cluster().exec("CREATE TABLE hostile AS SELECT y, x, m AS \"m\"\"); DROP TABLE sales; --\" FROM sales", db_);
    ModelSpec spec = interaction_model(SeKind::HC3);
    spec.predictors = {"x", nasty};
    spec.interactions = {{"x", nasty}};
    const SourceSpec s{SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "hostile", ""};
    moderato::test::expect_same_fit(moderato::fit_in_database(s, spec), local(spec, s), kTol, "hostile name");
    EXPECT_EQ(shared_cluster().exec("SELECT count(*) FROM pg_class WHERE relname = 'sales'", db_), "1");
}

TEST_F(InDatabaseFit, RefusalsNameTheProblem) {
    ModelSpec logistic = interaction_model(SeKind::Classical);
    logistic.family = moderato::Family::Logistic;
    try {
        moderato::fit_in_database(source(), logistic);
        ADD_FAILURE() << "a logistic model was fitted in the database";
    } catch (const moderato::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("fits in the database are linear"), std::string::npos) << e.what();
    }
    ModelSpec unknown = interaction_model(SeKind::Classical);
    unknown.predictors.push_back("nope");
    try {
        moderato::fit_in_database(source(), unknown);
        ADD_FAILURE() << "an unknown column was accepted";
    } catch (const moderato::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("nope"), std::string::npos) << e.what();
    }
    ModelSpec constant = interaction_model(SeKind::Classical);
    constant.predictors.push_back("one");
    shared_cluster().exec("CREATE VIEW with_one AS SELECT *, 1.0::float8 AS one FROM sales", db_);
    try {
        moderato::fit_in_database({SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "with_one", ""}, constant);
        ADD_FAILURE() << "a constant predictor was accepted";
    } catch (const moderato::InputError& e) {
        EXPECT_NE(std::string(e.what()).find("one"), std::string::npos) << e.what();
    }
}

}  // namespace
