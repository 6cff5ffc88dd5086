// From a table and a specification to the numbers a fit needs: the design
// matrix (one column per coefficient), outcome, weights and cluster ids, after
// listwise deletion; with the bookkeeping that explains what was done.
#pragma once

#include <Eigen/Dense>
#include <cstddef>
#include <map>
#include <string>
#include <vector>

#include "moderato/estimation/model.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

// One factor of a design column: a numeric column raised to a power, or the
// 0/1 indicator of one level of a categorical column.
struct Atom {
    std::string column;
    std::string level;  // empty for a numeric column
    int power = 1;
    bool operator==(const Atom&) const = default;
};

// How a factor appears in a design column's label: "x", "x^2", "region=North".
std::string atom_label(const Atom& atom);

struct DesignColumn {
    std::string label;        // "intercept", "x", "x^2", "region=North", "x×z"
    std::vector<Atom> atoms;  // empty for the intercept
    int term = 0;             // index into Design::terms
};

struct DesignTerm {
    std::string label;                                 // the term before dummy expansion, e.g. "region×x"
    std::vector<std::pair<std::string, int>> factors;  // column, power
    int degree = 0;                                    // sum of powers (0: intercept)
    bool added = false;                                // added as a lower-order term of a product
    std::vector<int> columns;                          // design columns of this term
};

struct Exclusion {
    std::string column;
    std::size_t rows = 0;  // used-model rows missing this column
};

struct CategoricalInfo {
    std::string column;
    std::vector<std::string> levels;  // sorted; levels[0] or the chosen one is the reference
    std::string reference;
};

// A numeric column over the used rows. skew: the moment coefficient
// m3 / m2^(3/2) (population moments; 0 for a constant column); p10, p50,
// p90: percentiles by linear interpolation (column_summary.hpp's quantile).
struct NumericSummary {
    double mean = 0, sd = 0, min = 0, max = 0;
    double skew = 0, p10 = 0, p50 = 0, p90 = 0;
};

// The summary of these values (none missing), in their order for the sums.
NumericSummary numeric_summary(std::vector<double> values);

// The largest design build_design makes; a bigger one is refused with a
// message naming the categorical column with the most levels, its level
// count and the limit, before the matrix is allocated.
// - Columns: the fit keeps p × p matrices (the triangular factor, the
//   covariance, the sandwich's bread; 32 MB each at 2,000 columns), its QR
//   costs n·p² operations, and a moderator with thousands of levels has too
//   few rows per level to estimate its effects anyway.
// - Cells (n × p): X takes 8 bytes a cell, and the fit and the sandwich
//   estimators hold about three n × p matrices at once. Measured
//   (tests/benchmarks/big_inputs.py): a fit of a 2 GB CSV, 2.2·10⁸ design
//   cells, peaks at 8.2 GB, 2.6 GB of it the table, so about 26 bytes a
//   design cell; 3·10⁸ cells are then about 8 GB for the fit, a third of a
//   24 GB machine, with room left for the table.
struct DesignLimits {
    static constexpr std::size_t max_columns = 2'000;
    static constexpr std::size_t max_cells = 300'000'000;
};

struct Design {
    Eigen::MatrixXd X;         // n x p
    Eigen::VectorXd y;         // n
    Eigen::VectorXd weights;   // n, or empty
    Eigen::VectorXd offset;    // n: log exposure of a count model, or empty
    std::vector<int> cluster;  // n cluster codes 0..G-1, or empty
    int n_clusters = 0;
    std::vector<std::string> cluster_names;  // G
    // Multilevel models: each used row's group 0..G-1 (in order of first
    // appearance) and the groups' names; empty for a single-level model.
    std::vector<std::size_t> group;
    std::vector<std::string> group_names;
    bool intercept = true;
    std::vector<DesignColumn> columns;
    std::vector<DesignTerm> terms;
    std::vector<CategoricalInfo> categoricals;
    std::vector<std::size_t> rows;  // table row of each used observation
    std::size_t n_excluded = 0;
    std::vector<Exclusion> exclusions;
    std::vector<std::string> notes;
    std::vector<std::string> warnings;  // about the data, for the fit's warnings
    std::string outcome;
    // Numeric columns of the model's terms over the used rows.
    std::map<std::string, NumericSummary> summaries;

    std::size_t n() const { return static_cast<std::size_t>(X.rows()); }
    std::size_t p() const { return static_cast<std::size_t>(X.cols()); }
    // Index of the design column with this label, or -1.
    int column_index(const std::string& label) const;
    // The p-th percentile (0..100; linear interpolation between order
    // statistics) of a numeric column over the used rows; NaN if absent.
    double percentile(const std::string& column, double p) const;
    // The design column holding a numeric column's main effect, or -1.
    int main_column(const std::string& column) const;
    // Whether a numeric model column takes only the values 0 and 1 here.
    bool is_binary(const std::string& column) const;
    // Index of `level` among a categorical column's levels (reference = 0), or -1.
    int level_index(const std::string& column, const std::string& level) const;
    const CategoricalInfo* categorical(const std::string& column) const;
    // Design columns of product terms (two or more distinct columns; powers of
    // one column are not products).
    std::vector<int> product_columns() const;
    // Index of the design column whose factors are exactly `atoms` (in any
    // order), or -1.
    int column_of(const std::vector<Atom>& atoms) const;
};

// Throws InputError for: unknown columns, non-numeric outcome, a 0/1
// family's outcome not 0/1, a count family's outcome negative, an outcome
// that never varies (generalized families), an exposure <= 0 or named for a
// family without a log link, a categorical column raised to a power, constant
// predictors (with an intercept), weights <= 0 or non-numeric, a single
// cluster or group, no complete rows, and n <= p. A multilevel model's
// centring options are applied first (group_centring.hpp).
Design build_design(const Table& table, const ModelSpec& spec);

// The outcome and exposure columns against the family, over every row where
// the outcome is present, before any design is built: the same checks and
// words as build_design (0 or 1 for logistic and probit outcomes, no negative
// count for Poisson and negative binomial ones, an exposure only for a count
// family and only a numeric one). For editors that refuse a choice at once.
// Throws InputError naming the column and, for a value, its line.
void check_family_columns(const Table& table, const ModelSpec& spec);

// Sorted levels of a categorical column as the model uses them (numeric-looking
// levels sort by value, others as text).
std::vector<std::string> sorted_levels(const Column& column);

}  // namespace moderato
