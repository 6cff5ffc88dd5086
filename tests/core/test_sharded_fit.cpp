// Beyond one machine, on this one: a coordinator PostgreSQL whose table is
// partitioned by store over two shard servers through postgres_fdw foreign
// partitions, with partition-wise aggregation on. The in-database fit of the
// coordinator's table equals core's fit of the rows read through the
// coordinator (1e-9 relative), and the shards' statement logs
// (log_statement = all) show that they received the aggregate queries,
// grouped by the partition key, rather than requests for rows.
#include <gtest/gtest.h>

#include <sstream>

#include "common/file_bytes.hpp"
#include "common/pg_cluster.hpp"
#include "common/pg_fit_data.hpp"
#include "moderato/estimation/in_database_fit.hpp"
#include "moderato/reading/postgres_source.hpp"

namespace {

using moderato::ModelSpec;
using moderato::SeKind;
using moderato::test::PgCluster;

// The rows of fit_rows whose store (the last field) is in `stores`.
std::string rows_of_stores(const std::string& rows, const std::set<std::string>& stores) {
    std::istringstream in(rows);
    std::string line, out;
    while (std::getline(in, line))
        if (stores.count(line.substr(line.rfind('\t') + 1))) out += line + "\n";
    return out;
}

// The statements a shard's log shows: after "statement: " or "execute <name>: ",
// with their continuation lines (which start with a tab) joined by spaces.
std::vector<std::string> logged_statements(const PgCluster& shard) {
    std::istringstream in(moderato::test::read_file(shard.log_file()));
    std::vector<std::string> out;
    std::string line;
    bool open = false;
    while (std::getline(in, line)) {
        if (open && !line.empty() && line[0] == '\t') {
            out.back() += " " + line.substr(1);
            continue;
        }
        open = false;
        for (const std::string mark : {"LOG:  statement: ", "LOG:  execute "}) {
            const auto at = line.find(mark);
            if (at == std::string::npos) continue;
            std::string text = line.substr(at + mark.size());
            if (mark == "LOG:  execute ") text = text.substr(text.find(": ") + 2);
            out.push_back(text);
            open = true;
            break;
        }
    }
    return out;
}

class ShardedFit : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        shard1_ = new PgCluster("pg-shard1", {"log_statement = all"});
        shard2_ = new PgCluster("pg-shard2", {"log_statement = all"});
        coordinator_ = new PgCluster("pg-coordinator", {"enable_partitionwise_aggregate = on"});
        const std::string rows = moderato::test::fit_rows(800, 7);
        const std::string cols = moderato::test::fit_columns_sql();
        shard1_->exec("CREATE TABLE sales_s1 " + cols);
        shard2_->exec("CREATE TABLE sales_s2 " + cols);
        shard1_->copy_in("sales_s1", rows_of_stores(rows, {"1", "2"}));
        shard2_->copy_in("sales_s2", rows_of_stores(rows, {"3", "4"}));
        coordinator_->exec(
            "CREATE EXTENSION postgres_fdw;"
            "CREATE SERVER s1 FOREIGN DATA WRAPPER postgres_fdw OPTIONS (host '" +
            shard1_->socket_dir() +
            "', dbname 'postgres');"
            "CREATE SERVER s2 FOREIGN DATA WRAPPER postgres_fdw OPTIONS (host '" +
            shard2_->socket_dir() +
            "', dbname 'postgres');"
            "CREATE USER MAPPING FOR moderato SERVER s1 OPTIONS (user 'moderato');"
            "CREATE USER MAPPING FOR moderato SERVER s2 OPTIONS (user 'moderato');"
            "CREATE TABLE sales " +
            cols +
            " PARTITION BY LIST (store);"
            "CREATE FOREIGN TABLE sales_p1 PARTITION OF sales FOR VALUES IN (1, 2) SERVER s1 "
            "OPTIONS (table_name 'sales_s1');"
            "CREATE FOREIGN TABLE sales_p2 PARTITION OF sales FOR VALUES IN (3, 4) SERVER s2 "
            "OPTIONS (table_name 'sales_s2');");
    }
    static void TearDownTestSuite() {
        delete coordinator_;
        delete shard2_;
        delete shard1_;
    }
    static moderato::SourceSpec source() {
        return {moderato::SourceKind::PostgreSQL, coordinator_->uri(), "", "sales", ""};
    }
    static PgCluster *shard1_, *shard2_, *coordinator_;
};
PgCluster* ShardedFit::shard1_ = nullptr;
PgCluster* ShardedFit::shard2_ = nullptr;
PgCluster* ShardedFit::coordinator_ = nullptr;

TEST_F(ShardedFit, ShardsComputeThePartialSumsAndTheFitMatches) {
    const moderato::Table rows = moderato::read_postgres(source());
    ASSERT_EQ(rows.rows(), 800u);  // both shards' rows, through the coordinator
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "g", "m"};
    spec.interactions = {{"x", "m"}, {"x", "g"}};
    spec.weights = "w";
    for (SeKind se : {SeKind::Classical, SeKind::HC3, SeKind::Cluster}) {
        spec.se = se;
        spec.cluster = se == SeKind::Cluster ? "cl" : "";
        moderato::InDatabaseRun run;
        const auto got = moderato::fit_in_database(source(), spec, {}, {}, {}, &run);
        moderato::test::expect_same_fit(got, moderato::fit_model(rows, spec), 1e-9, moderato::to_string(se));
        EXPECT_EQ(run.partition_key, std::vector<std::string>{"store"});  // read from the catalog
        for (const auto& sql : run.statements) EXPECT_NE(sql.find("GROUP BY k0"), std::string::npos) << sql;
    }
    // Each shard received aggregate queries grouped by the key: postgres_fdw
    // sent "SELECT store, count(*), sum(...) ... GROUP BY 1" rather than the rows.
    for (const PgCluster* shard : {shard1_, shard2_}) {
        std::size_t aggregates = 0, cross_products = 0;
        for (const auto& s : logged_statements(*shard)) {
            const bool grouped = s.find("GROUP BY") != std::string::npos;
            if (grouped && s.find("sum(") != std::string::npos) ++aggregates;
            if (grouped && s.find("sum((") != std::string::npos && s.find("'NaN'") != std::string::npos)
                ++cross_products;
        }
        // At least the means, cross-products and HC/cluster passes of the three fits.
        EXPECT_GE(aggregates, 7u);
        EXPECT_GT(cross_products, 0u);
    }
}

TEST_F(ShardedFit, AnUngroupedSumFetchesTheRowsInstead) {
    // The behaviour the grouping avoids (measured for the issue): a plain
    // sum over the partitioned table makes the shards send rows, not sums.
    const auto before = logged_statements(*shard1_).size();
    coordinator_->exec("SELECT sum(y * x) FROM sales");
    const auto after = logged_statements(*shard1_);
    bool fetched_rows = false, summed_remotely = false;
    ASSERT_GT(after.size(), before);
    for (std::size_t i = before; i < after.size(); ++i) {
        if (after[i].find("sum(") != std::string::npos) summed_remotely = true;
        if (after[i].find("SELECT y, x FROM") != std::string::npos ||
            after[i].find("SELECT x, y FROM") != std::string::npos)
            fetched_rows = true;
    }
    EXPECT_TRUE(fetched_rows);
    EXPECT_FALSE(summed_remotely);
}

}  // namespace
