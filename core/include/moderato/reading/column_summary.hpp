// A summary of one column for the dataset view: counts, mean, SD, quantiles
// and a histogram for a numeric column; level counts for a categorical one.
#pragma once

#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "moderato/reading/table.hpp"

namespace moderato {

// Equal-width bins: edges.size() == counts.size() + 1. Bin k holds
// edges[k] <= x < edges[k+1]; the last bin also holds x == edges.back().
struct Histogram {
    std::vector<double> edges;
    std::vector<std::size_t> counts;
};

struct ColumnSummary {
    std::string name;
    ColumnKind kind = ColumnKind::Numeric;
    std::size_t rows = 0;     // cells in the column
    std::size_t n = 0;        // non-missing cells
    std::size_t missing = 0;  // rows - n

    // Numeric columns (NaN when undefined: no values; sd needs n >= 2).
    double mean = std::numeric_limits<double>::quiet_NaN();
    double sd = std::numeric_limits<double>::quiet_NaN();  // sample SD, divisor n - 1
    double min = std::numeric_limits<double>::quiet_NaN();
    double q1 = std::numeric_limits<double>::quiet_NaN();  // 25th percentile
    double median = std::numeric_limits<double>::quiet_NaN();
    double q3 = std::numeric_limits<double>::quiet_NaN();  // 75th percentile
    double max = std::numeric_limits<double>::quiet_NaN();
    Histogram histogram;  // empty when there are no values

    // Categorical columns: levels[k] occurs level_counts[k] times (the
    // column's level order; a level with no present cell counts 0).
    std::vector<std::string> levels;
    std::vector<std::size_t> level_counts;
};

// Quantile p in [0, 1] of ascending `sorted` values by linear interpolation
// between order statistics: h = (n - 1) p, x[floor h] + (h - floor h)(x[floor h + 1] - x[floor h])
// (Hyndman & Fan 1996, definition 7; numpy.percentile's default "linear").
// NaN for an empty vector.
double quantile_sorted(const std::vector<double>& sorted, double p);
// The same quantiles of unsorted values, found by selection in linear time
// (no full sort); `values` is reordered. `ps` in ascending order.
std::vector<double> quantiles_by_selection(std::vector<double>& values, const std::vector<double>& ps);

// Histogram of ascending `sorted` values (no NaN). Bin width: the narrower of
// the Freedman–Diaconis width 2 IQR n^(-1/3) (Freedman & Diaconis 1981) and
// the Sturges width range / (log2 n + 1) (Sturges 1926); the Sturges width
// alone when the IQR is 0. This is numpy.histogram_bin_edges' bins="auto".
// The bin count is ceil(range / width), at most `max_bins` (then `max_bins`
// equal bins over the range). A constant column gets one bin [x - 0.5, x + 0.5].
// Edges and bin assignment follow numpy.histogram (edge k = min + k·step, the
// last edge exactly max; a value on an inner edge goes to the bin above).
Histogram auto_histogram(const std::vector<double>& sorted, std::size_t max_bins = 40);

// The whole summary; `max_bins` as for auto_histogram.
ColumnSummary summarise_column(const Column& column, std::size_t max_bins = 40);

}  // namespace moderato
