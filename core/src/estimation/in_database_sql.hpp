// The SQL text of an in-database fit (private to core): each model column's
// value as read_postgres would read it (float8 or text, NULL when missing),
// each design column as an expression of those values, and the nested
// SELECTs the passes aggregate over. Every identifier is quoted by
// PQescapeIdentifier and every text value by PQescapeLiteral; numbers are
// written with 17 significant digits, so they read back exactly.
#pragma once

#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/reading/csv.hpp"
#include "reading/postgres_connection.hpp"

namespace moderato::detail {

// A double as a float8 literal that reads back to the same value.
std::string float8_literal(double v);

// The value of `column` under `options`: float8 for a numeric kind (NaN,
// NULL and missing tokens give NULL), text for a categorical one.
std::string value_expression(const PgConnection& c, const PgColumn& column, const CsvOptions& options);

// The same value on a complete row (where value_expression is not NULL):
// the plain column for numbers and text, so that design expressions over it
// stay small when the planner flattens the nested SELECTs into each aggregate.
std::string complete_value_expression(const PgConnection& c, const PgColumn& column, const CsvOptions& options);

// The rows the passes read, as nested SELECTs:
//   level 0: each model column's value as v0, v1, ..., its value on complete
//            rows as s0, s1, ... (and the partition key as k0, ...);
//   level 1: the design columns as d1, d2, ... (intercept excluded), y, w.
struct DesignQuery {
    std::string from;                 // what follows FROM
    std::vector<std::string> values;  // value expressions, one per model column (aliases v<i>)
    std::vector<std::string> simple;  // complete_value_expression of each (aliases s<i>)
    std::vector<std::string> keys;    // quoted partition key columns; empty: none
    // OFFSET 0 after the per-row residual levels of pass 3 (u = A'x used in
    // k(k+1)/2 sums would otherwise be re-evaluated in each); off for a
    // partitioned table, whose aggregates must reach the partitions. Levels 0
    // and 1 are always left to the planner to flatten: they are cheap to
    // repeat, and flattening keeps parallel aggregation open.
    bool fence = true;
    std::string complete;             // "v0 IS NOT NULL AND ..."
    std::vector<std::string> design;  // expressions of v<i>, one per non-intercept design column
    std::string y, w;                 // s<i> of the outcome and the weights ("" when none)

    // "k0, k1, " (or ""), to start a select list.
    std::string key_list() const;
    // " GROUP BY k0, k1" (or ""), with `more` grouped too.
    std::string group_by(const std::string& more = {}) const;
    std::string level0() const;
    // Level 1 over every row (complete_only false) or the complete rows.
    std::string level1(bool complete_only) const;
    std::string fence_text() const { return fence ? " OFFSET 0" : ""; }
};

// The expression of one design column over the level-0 aliases s<i> (names[i]
// is the model column of s<i>); its value on complete rows.
std::string design_expression(const PgConnection& c, const DesignColumn& column, const std::vector<std::string>& names);

}  // namespace moderato::detail
