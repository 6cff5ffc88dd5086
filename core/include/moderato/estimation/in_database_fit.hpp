// Linear models (OLS and WLS) fitted inside PostgreSQL by aggregate queries:
// only sums come back, never rows, so the table may be far larger than
// this machine's memory. The design is the one build_design makes of the
// same rows as read_postgres reads them (dummies of the levels a SELECT
// DISTINCT finds among the complete rows, products, powers, weights;
// listwise deletion), and the result is the FitResult fit_model returns but
// for `fitted` and `residuals` (empty) and the numeric summaries.
//
// The queries, all in one REPEATABLE READ, READ ONLY transaction:
// - one SELECT DISTINCT per categorical column of the terms (its levels);
// - pass 1: row counts, missing cells per column, the weighted means of the
//   design columns and the outcome, sum of log weights, each numeric
//   column's range (constant and non-finite checks), the smallest weight;
// - pass 2: the weighted cross-products of z = [1, d - mean, y - mean] (the
//   centred design columns d and outcome); locally, their pivoted LDL'
//   factor in long double turns into rows whose triangular factor is that of
//   the weighted [X | y], and streamed_fit's own factor, solve and
//   statistics finish the fit (the coefficients, classical covariance, R²,
//   nested comparison, VIF);
// - pass 3, HC0-HC4 only: sum over rows of omega_i u_i u_i' with
//   u_i = A' x_i (A the inverse factor, (X'WX)^-1 = AA', written into the
//   SQL as literals), leverage h_i = w_i |u_i|^2, score w_i e_i and omega as
//   in covariance.cpp; also the RSS from the residuals;
// - pass 3, cluster-robust (CR1): per-cluster sums of w_i e_i u_i (GROUP BY
//   the cluster column) and the RSS.
// So classical standard errors take 2 queries, every other kind 3, plus one
// per categorical column (and one counting clusters when a cluster column is
// given for a kind other than cluster-robust).
//
// Cross-products square the design's condition number, so columns whose
// relative pivot falls below 1e-6 are reported as aliased (the local fit's
// threshold is 1e-13 on the QR factor of the rows themselves); centring
// keeps ordinary interaction models far from that.
//
// A partitioned table (for example one whose partitions are postgres_fdw
// foreign tables on other servers): every aggregate query groups by the
// partition key, read from the catalog, and the groups are summed here, so
// with enable_partitionwise_aggregate each partition (each shard) computes
// its own partial sums; levels become GROUP BY queries for the same reason,
// and the nested SELECTs are left for the planner to flatten (no OFFSET 0).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/data_source.hpp"

namespace moderato {

// What an in-database fit did, for tests and notes.
struct InDatabaseRun {
    std::vector<std::string> partition_key;  // empty: the source was not partitioned
    std::vector<std::string> statements;     // the SQL run, in order (no secrets)
};

// Queries an in-database fit takes besides the level queries (see above).
std::size_t in_database_queries(SeKind se);

// Fits `spec` to the PostgreSQL `source` (CsvOptions as read_postgres applies
// them). Throws InputError naming the source for what fit_model refuses, for
// generalized, multilevel and exposure models (linear models only), and for
// connection or server errors (without the password).
FitResult fit_in_database(const SourceSpec& source, const ModelSpec& spec, const CsvOptions& options = {},
                          const std::string& password = {}, const FitOptions& fit_options = {},
                          InDatabaseRun* run = nullptr);

}  // namespace moderato
