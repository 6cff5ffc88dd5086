// The cell table of two categorical predictors that share a product term
// (binary × binary, k × m): the predicted outcome in every cell with its
// standard error, the observed count, the simple effects of each factor at
// every level of the other, the interaction contrasts (differences in
// differences) and the joint Wald test of the product columns. All on the
// model's linear-predictor scale (the mean for OLS/WLS, the log-odds for a
// logistic fit, which also gets predicted probabilities per cell).
#pragma once

#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"

namespace moderato {

struct Cell {
    std::size_t row = 0, column = 0;  // level indices (reference = 0)
    std::string row_level, column_level;
    std::size_t n = 0;  // used rows observed in the cell
    // Mean outcome of those rows (weighted by the fit's weights, if any; the
    // share of 1s for a logistic fit); NaN for an empty cell.
    double observed_mean = 0;
    // Predicted value x'b with x = the design row of the cell; on the link
    // scale for a logistic fit. NaN when a needed coefficient is aliased.
    double estimate = 0, std_error = 0, ci_lower = 0, ci_upper = 0;
    // Logistic only (NaN otherwise): expit of the estimate and of the CI ends,
    // and the delta-method SE p(1 - p) * std_error.
    double probability = 0, probability_lower = 0, probability_upper = 0, probability_std_error = 0;
    bool estimable = true;
};

// A difference of two cells (a simple effect) on the link scale.
struct SimpleEffect : Inference {
    std::string factor;               // the factor whose levels are compared
    std::string level, reference;     // level vs the reference level of `factor`
    std::string at_factor, at_level;  // the other factor, held at this level
    std::string label;                // "a=L1 vs a=L0 at b=M2"
    // Logistic only (NaN otherwise): exp of estimate and CI ends (odds ratio).
    double odds_ratio = 0, odds_ratio_lower = 0, odds_ratio_upper = 0;
    bool estimable = true;
};

// (mu_ij - mu_i0) - (mu_0j - mu_00): how much the row effect of level i
// changes from the reference column level to column level j.
struct InteractionContrast : Inference {
    std::string row_level, column_level;  // non-reference levels i and j
    std::string label;                    // "(a=L1 vs a=L0) at b=M1 minus at b=M0"
    // Logistic only (NaN otherwise): ratio of odds ratios, exp of the above.
    double odds_ratio = 0, odds_ratio_lower = 0, odds_ratio_upper = 0;
    bool estimable = true;
};

// The scale of the cell estimates: the outcome's mean (linear models) or
// the log-odds (logistic models).
enum class CellScale { Mean, LogOdds };
const char* to_string(CellScale scale);  // "mean", "log-odds"

struct CellTable {
    std::string row_factor, column_factor;
    std::vector<std::string> row_levels, column_levels;  // reference first
    Family family = Family::Linear;
    CellScale scale = CellScale::Mean;
    SeKind covariance = SeKind::Classical;
    double level = 0.95, df = 0, critical_value = 0;
    // Every other model column as the cells hold it (numeric: value;
    // categorical: level index, reference = 0).
    std::map<std::string, double> held;
    std::vector<Cell> cells;  // row-major: cells[i * column_levels.size() + j]
    // Row levels vs the reference row level, at each column level (column
    // level outer, row level inner); then the same with the roles swapped.
    std::vector<SimpleEffect> row_effects, column_effects;
    // One per pair (non-reference row level, non-reference column level),
    // row level outer.
    std::vector<InteractionContrast> interactions;
    // Joint Wald test of the two-way product columns of the two factors (for a
    // 2 × 2 table its F equals the square of the interaction contrast's t);
    // empty when a product column is aliased (see notes).
    std::optional<WaldTest> interaction_test;
    std::vector<std::string> notes;

    const Cell& at(std::size_t row, std::size_t column) const { return cells[row * column_levels.size() + column]; }
};

// Both factors must be columns of the model that share a product term, each
// either categorical or numeric with every used value 0 or 1 (then its levels
// are "0" and "1"). `held` sets other model columns (numeric: a value;
// categorical: a level index); the rest sit at their means (numeric) or
// reference level. InputError names the column and what to do for: an empty,
// unknown or repeated factor, a numeric factor that is not 0/1, factors with
// no product term, and a held value for a factor, an unknown column or an
// out-of-range level.
CellTable cell_table(const Design& design, const FitResult& fit, const std::string& row_factor,
                     const std::string& column_factor, const std::map<std::string, double>& held = {});

}  // namespace moderato
