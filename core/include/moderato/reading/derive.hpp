// Derived columns (recipes): each returns a new column computed from the
// table; the table itself is never modified. Missing stays missing.
#pragma once

#include <string>

#include "moderato/reading/table.hpp"

namespace moderato {

enum class CentreAt { Mean, Median, Value };

// x - centre; centre is the mean, the median, or `value`.
Column centre(const Column& x, CentreAt at, double value = 0.0, const std::string& new_name = {});
// (x - mean) / sd (sample SD, n - 1).
Column standardise(const Column& x, const std::string& new_name = {});
// log(x); InputError naming the column and row when some x <= 0.
Column log_column(const Column& x, const Table& table, const std::string& new_name = {});
// log(1 + x); InputError when some x <= -1.
Column log1p_column(const Column& x, const Table& table, const std::string& new_name = {});
Column square(const Column& x, const std::string& new_name = {});
Column product(const Column& a, const Column& b, const std::string& new_name = {});
// 0/1 indicator of `level` for a categorical column (missing stays missing).
// InputError when the level does not occur.
Column dummy(const Column& x, const std::string& level, const std::string& new_name = {});

// The centre actually used (mean/median of the non-missing values or `value`).
double centre_value(const Column& x, CentreAt at, double value = 0.0);

}  // namespace moderato
