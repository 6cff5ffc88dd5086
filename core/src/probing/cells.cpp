#include "moderato/probing/cells.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "estimation/logistic_math.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::join;
using detail::quoted;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

using detail::expit;

bool in_model(const Design& d, const std::string& column) {
    for (const auto& t : d.terms)
        for (const auto& f : t.factors)
            if (f.first == column) return true;
    return false;
}

bool has_factor(const DesignTerm& t, const std::string& column) {
    return std::any_of(t.factors.begin(), t.factors.end(), [&](const auto& f) { return f.first == column; });
}

// A factor of the table: its levels and, per used row, the level it holds.
struct Factor {
    std::string name;
    std::vector<std::string> levels;
    std::vector<int> row_level;  // per used observation
};

int main_column(const Design& d, const Atom& atom) {
    for (std::size_t j = 0; j < d.columns.size(); ++j)
        if (d.columns[j].atoms.size() == 1 && d.columns[j].atoms[0] == atom) return static_cast<int>(j);
    return -1;
}

Factor factor_of(const Design& d, const std::string& name, const std::string& role) {
    if (name.empty())
        throw InputError("the cell table needs a " + role + " factor; choose a categorical column of the model");
    if (!in_model(d, name))
        throw InputError(role + " factor " + quoted(name) +
                         " is not in the model; add it (with an interaction with the other factor) and refit");
    Factor f;
    f.name = name;
    const Eigen::Index n = d.X.rows();
    f.row_level.assign(static_cast<std::size_t>(n), 0);
    if (const CategoricalInfo* c = d.categorical(name)) {
        f.levels = c->levels;
        for (std::size_t l = 1; l < f.levels.size(); ++l) {
            const int j = main_column(d, Atom{name, f.levels[l], 1});
            if (j < 0) throw std::logic_error("cell table: no dummy column for " + name + "=" + f.levels[l]);
            for (Eigen::Index i = 0; i < n; ++i)
                if (d.X(i, j) == 1.0) f.row_level[static_cast<std::size_t>(i)] = static_cast<int>(l);
        }
        return f;
    }
    // A numeric column serves as a two-level factor when every used value is 0 or 1.
    const int j = main_column(d, Atom{name, "", 1});
    std::string offending;
    if (j >= 0)
        for (Eigen::Index i = 0; i < n && offending.empty(); ++i) {
            const double v = d.X(i, j);
            if (v != 0.0 && v != 1.0) offending = exact_text(v);
            else f.row_level[static_cast<std::size_t>(i)] = static_cast<int>(v);
        }
    if (j < 0 || !offending.empty())
        throw InputError(role + " factor " + quoted(name) + " is numeric" +
                         (offending.empty() ? std::string() : " (it holds " + offending + ", not only 0 and 1)") +
                         "; a cell table needs categorical factors: declare " + quoted(name) +
                         " categorical, or probe it as a continuous moderator instead");
    f.levels = {"0", "1"};
    return f;
}

// x'b and x'Vx over the nonzero entries of x (aliased coefficients are NaN in
// b and V, and 0 * NaN would spoil every result), and the aliased
// coefficients that x needs.
struct Combination {
    double estimate = 0, variance = 0;
    std::vector<std::string> aliased;
};

Combination combine(const FitResult& fit, const Design& d, const Eigen::VectorXd& x) {
    Combination c;
    std::vector<Eigen::Index> nz;
    for (Eigen::Index j = 0; j < x.size(); ++j)
        if (x[j] != 0) {
            nz.push_back(j);
            if (std::isnan(fit.beta[j])) c.aliased.push_back(d.columns[static_cast<std::size_t>(j)].label);
        }
    if (!c.aliased.empty()) {
        c.estimate = c.variance = kNaN;
        return c;
    }
    long double v = 0;
    for (auto a : nz) {
        c.estimate += x[a] * fit.beta[a];
        for (auto b : nz) v += x[a] * fit.covariance(a, b) * x[b];
    }
    c.variance = static_cast<double>(v);
    return c;
}

Inference infer(const Combination& c, const FitResult& fit) {
    return moderato::infer(c.estimate, c.variance >= 0 ? std::sqrt(c.variance) : kNaN, fit);
}

template <class T>
void fill(T& out, const Inference& r, bool logistic) {
    static_cast<Inference&>(out) = r;
    out.odds_ratio = logistic ? std::exp(r.estimate) : kNaN;
    out.odds_ratio_lower = logistic ? std::exp(r.ci_lower) : kNaN;
    out.odds_ratio_upper = logistic ? std::exp(r.ci_upper) : kNaN;
}

std::string level_text(const std::string& factor, const std::string& level) { return factor + "=" + level; }

// The product terms of the model that hold both factors.
struct SharedTerms {
    const DesignTerm* pair = nullptr;  // the two-way product, if the model has it
    std::vector<std::string> higher;   // labels of higher-order products
};

SharedTerms shared_terms(const Design& d, const std::string& row_factor, const std::string& column_factor) {
    SharedTerms s;
    for (const auto& t : d.terms) {
        if (!has_factor(t, row_factor) || !has_factor(t, column_factor)) continue;
        if (t.factors.size() == 2) s.pair = &t;
        else s.higher.push_back(t.label);
    }
    if (!s.pair && s.higher.empty())
        throw InputError(quoted(row_factor) + " and " + quoted(column_factor) +
                         " share no product term; add an interaction of " + row_factor + " and " + column_factor);
    return s;
}

void check_held(const Design& d, const std::string& row_factor, const std::string& column_factor,
                const std::map<std::string, double>& held) {
    for (const auto& [column, value] : held) {
        if (column == row_factor || column == column_factor)
            throw InputError(
                quoted(column) +
                " is a factor of the cell table and cannot also be held at a value; drop it from the held values");
        if (!in_model(d, column))
            throw InputError("held column " + quoted(column) + " is not in the model; hold only model columns");
        if (const CategoricalInfo* c = d.categorical(column)) {
            if (!(value >= 0 && value < static_cast<double>(c->levels.size()) && value == std::floor(value)))
                throw InputError("held level " + exact_text(value) + " of " + quoted(column) +
                                 " is not a level index; give 0 to " + std::to_string(c->levels.size() - 1) + " (" +
                                 join(c->levels, ", ") + ")");
        } else if (!std::isfinite(value)) {
            throw InputError("held value of " + quoted(column) + " is not a finite number; give a number");
        }
    }
}

// The notes that say where the other columns are held and what the scale means.
void held_notes(const Design& d, const std::map<std::string, double>& held, const SharedTerms& shared, CellTable& t) {
    std::vector<std::string> parts;
    for (const auto& [column, v] : t.held) {
        const bool given = held.count(column) > 0;
        if (const CategoricalInfo* c = d.categorical(column))
            parts.push_back(column + " = " + quoted(c->levels[static_cast<std::size_t>(v)]) +
                            (given ? "" : " (reference level)"));
        else parts.push_back(column + " = " + format_sig(v) + (given ? "" : " (its mean)"));
    }
    if (!parts.empty()) t.notes.push_back("cells predicted with " + join(parts, ", "));
    if (!shared.higher.empty())
        t.notes.push_back(quoted(t.row_factor) + " and " + quoted(t.column_factor) + " also enter " +
                          join(shared.higher, ", ") +
                          ": the cells, simple effects and contrasts hold the other columns at the values above, "
                          "while the joint test covers only the two-way product columns");
    if (t.family == Family::Logistic)
        t.notes.push_back(
            "on the log-odds scale: simple effects are log odds ratios and interaction contrasts are "
            "log ratios of odds ratios; an interaction on the log-odds scale is not the same as one "
            "on the probability scale (cell probabilities are given beside)");
}

// Counts and (weighted) outcome sums of the used rows, per cell (row-major).
struct Observed {
    std::vector<std::size_t> count;
    std::vector<long double> sum_wy, sum_w;
};

Observed observed_cells(const Design& d, const Factor& R, const Factor& C) {
    const std::size_t nr = R.levels.size(), nc = C.levels.size();
    Observed o{std::vector<std::size_t>(nr * nc, 0), std::vector<long double>(nr * nc, 0),
               std::vector<long double>(nr * nc, 0)};
    for (Eigen::Index i = 0; i < d.X.rows(); ++i) {
        const auto k = static_cast<std::size_t>(R.row_level[static_cast<std::size_t>(i)]) * nc +
                       static_cast<std::size_t>(C.row_level[static_cast<std::size_t>(i)]);
        const double w = d.weights.size() ? d.weights[i] : 1.0;
        ++o.count[k];
        o.sum_wy[k] += w * d.y[i];
        o.sum_w[k] += w;
    }
    return o;
}

// Design rows of the cells (row-major), the other columns at `values`.
std::vector<Eigen::VectorXd> cell_rows(const Design& d, const Factor& R, const Factor& C,
                                       std::map<std::string, double> values) {
    const std::size_t nr = R.levels.size(), nc = C.levels.size();
    std::vector<Eigen::VectorXd> x(nr * nc);
    for (std::size_t i = 0; i < nr; ++i)
        for (std::size_t j = 0; j < nc; ++j) {
            values[R.name] = static_cast<double>(i);
            values[C.name] = static_cast<double>(j);
            x[i * nc + j] = design_row(d, values);
        }
    return x;
}

// Every cell: count, observed mean, prediction with its interval (and
// probabilities for a logistic fit), with notes on cells that cannot be
// estimated or hold no rows.
void predicted_cells(const Design& d, const FitResult& fit, const Factor& R, const Factor& C, const Observed& o,
                     const std::vector<Eigen::VectorXd>& x, CellTable& t) {
    const bool logistic = fit.family == Family::Logistic;
    const std::size_t nr = R.levels.size(), nc = C.levels.size();
    std::vector<std::string> empty_cells;
    for (std::size_t i = 0; i < nr; ++i)
        for (std::size_t j = 0; j < nc; ++j) {
            const std::size_t k = i * nc + j;
            Cell c;
            c.row = i;
            c.column = j;
            c.row_level = R.levels[i];
            c.column_level = C.levels[j];
            c.n = o.count[k];
            c.observed_mean = o.count[k] ? static_cast<double>(o.sum_wy[k] / o.sum_w[k]) : kNaN;
            const Combination m = combine(fit, d, x[k]);
            const Inference r = infer(m, fit);
            c.estimable = m.aliased.empty();
            c.estimate = r.estimate;
            c.std_error = r.std_error;
            c.ci_lower = r.ci_lower;
            c.ci_upper = r.ci_upper;
            c.probability = c.probability_lower = c.probability_upper = c.probability_std_error = kNaN;
            if (logistic) {
                c.probability = expit(r.estimate);
                c.probability_lower = expit(r.ci_lower);
                c.probability_upper = expit(r.ci_upper);
                c.probability_std_error = c.probability * (1 - c.probability) * r.std_error;
            }
            const std::string where =
                "cell (" + level_text(R.name, c.row_level) + ", " + level_text(C.name, c.column_level) + ")";
            if (!c.estimable)
                t.notes.push_back(where + " cannot be estimated: it needs the aliased coefficient" +
                                  (m.aliased.size() > 1 ? "s " : " ") + join(m.aliased, ", ") +
                                  (c.n == 0 ? " (no rows fall in this cell)" : ""));
            else if (c.n == 0) empty_cells.push_back(where);
            t.cells.push_back(std::move(c));
        }
    if (!empty_cells.empty())
        t.notes.push_back(join(empty_cells, ", ") + (empty_cells.size() > 1 ? " have" : " has") +
                          " no observed rows: the prediction rests on the model's structure alone");
}

// Level `level` of factor F vs its reference level, with the other factor G
// at `at_level`; `x` is the difference of the two cells' design rows.
SimpleEffect simple_effect(const Design& d, const FitResult& fit, const Eigen::VectorXd& x, const Factor& F,
                           std::size_t level, const Factor& G, std::size_t at_level) {
    const Combination m = combine(fit, d, x);
    SimpleEffect e;
    e.factor = F.name;
    e.level = F.levels[level];
    e.reference = F.levels[0];
    e.at_factor = G.name;
    e.at_level = G.levels[at_level];
    e.label = level_text(F.name, e.level) + " vs " + level_text(F.name, e.reference) + " at " +
              level_text(G.name, e.at_level);
    fill(e, infer(m, fit), fit.family == Family::Logistic);
    e.estimable = m.aliased.empty();
    return e;
}

// Row levels vs the reference row level at each column level, then column
// levels vs the reference column level at each row level. Returns how many
// are not estimable.
std::size_t simple_effects(const Design& d, const FitResult& fit, const Factor& R, const Factor& C,
                           const std::vector<Eigen::VectorXd>& x, CellTable& t) {
    const std::size_t nr = R.levels.size(), nc = C.levels.size();
    std::size_t not_estimable = 0;
    for (std::size_t j = 0; j < nc; ++j)
        for (std::size_t i = 1; i < nr; ++i) {
            t.row_effects.push_back(simple_effect(d, fit, x[i * nc + j] - x[j], R, i, C, j));
            not_estimable += !t.row_effects.back().estimable;
        }
    for (std::size_t i = 0; i < nr; ++i)
        for (std::size_t j = 1; j < nc; ++j) {
            t.column_effects.push_back(simple_effect(d, fit, x[i * nc + j] - x[i * nc], C, j, R, i));
            not_estimable += !t.column_effects.back().estimable;
        }
    return not_estimable;
}

// Differences in differences, one per pair of non-reference levels. Returns
// how many are not estimable.
std::size_t interaction_contrasts(const Design& d, const FitResult& fit, const Factor& R, const Factor& C,
                                  const std::vector<Eigen::VectorXd>& x, CellTable& t) {
    const std::size_t nr = R.levels.size(), nc = C.levels.size();
    std::size_t not_estimable = 0;
    for (std::size_t i = 1; i < nr; ++i)
        for (std::size_t j = 1; j < nc; ++j) {
            const Eigen::VectorXd v = (x[i * nc + j] - x[i * nc]) - (x[j] - x[0]);
            const Combination m = combine(fit, d, v);
            InteractionContrast e;
            e.row_level = R.levels[i];
            e.column_level = C.levels[j];
            e.label = std::string("(");  // appended piecewise: GCC 12 warns falsely (-Wrestrict) on "(" + string&&
            e.label += level_text(R.name, e.row_level) + " vs " + level_text(R.name, R.levels[0]) + ") at " +
                       level_text(C.name, e.column_level) + " minus at " + level_text(C.name, C.levels[0]);
            fill(e, infer(m, fit), fit.family == Family::Logistic);
            e.estimable = m.aliased.empty();
            not_estimable += !e.estimable;
            t.interactions.push_back(std::move(e));
        }
    return not_estimable;
}

// Joint test of the two-way product columns, or a note on why there is none.
void joint_test(const Design& d, const FitResult& fit, const DesignTerm& pair_term, CellTable& t) {
    std::vector<std::string> aliased;
    for (int j : pair_term.columns)
        if (std::isnan(fit.beta[j])) aliased.push_back(d.columns[static_cast<std::size_t>(j)].label);
    if (aliased.empty()) t.interaction_test = wald_test(fit, {pair_term.label});
    else
        t.notes.push_back("no joint test of " + pair_term.label + ": the product column" +
                          (aliased.size() > 1 ? "s " : " ") + join(aliased, ", ") +
                          (aliased.size() > 1 ? " are" : " is") +
                          " aliased (often an empty cell); the estimable contrasts above are still valid");
}

}  // namespace

const char* to_string(CellScale scale) { return scale == CellScale::LogOdds ? "log-odds" : "mean"; }

CellTable cell_table(const Design& d, const FitResult& fit, const std::string& row_factor,
                     const std::string& column_factor, const std::map<std::string, double>& held) {
    if (fit.family != Family::Linear && fit.family != Family::Logistic)
        throw InputError("the cell table is offered for linear and logistic models; this is a " +
                         std::string(to_string(fit.family)) + " model");
    if (!row_factor.empty() && row_factor == column_factor)
        throw InputError("row and column factor are both " + quoted(row_factor) +
                         "; choose two different factors for the cell table");
    const Factor R = factor_of(d, row_factor, "row");
    const Factor C = factor_of(d, column_factor, "column");
    const SharedTerms shared = shared_terms(d, row_factor, column_factor);
    if (fit.beta.size() != d.X.cols() || fit.covariance.rows() != d.X.cols())
        throw std::invalid_argument("cell_table: the fit does not belong to this design");
    check_held(d, row_factor, column_factor, held);

    CellTable t;
    t.row_factor = row_factor;
    t.column_factor = column_factor;
    t.row_levels = R.levels;
    t.column_levels = C.levels;
    t.family = fit.family;
    t.scale = fit.family == Family::Logistic ? CellScale::LogOdds : CellScale::Mean;
    t.covariance = fit.se;
    t.level = fit.level;
    t.df = fit.df_inference;
    t.critical_value = fit.critical_value;
    t.held = typical_values(d, held);
    t.held.erase(row_factor);
    t.held.erase(column_factor);
    held_notes(d, held, shared, t);

    const std::vector<Eigen::VectorXd> x = cell_rows(d, R, C, t.held);
    predicted_cells(d, fit, R, C, observed_cells(d, R, C), x, t);
    std::size_t not_estimable = simple_effects(d, fit, R, C, x, t);
    not_estimable += interaction_contrasts(d, fit, R, C, x, t);
    if (not_estimable > 0)
        t.notes.push_back(std::to_string(not_estimable) +
                          " simple effect(s) or interaction contrast(s) need aliased coefficients and are not "
                          "estimable (NaN)");
    if (shared.pair) joint_test(d, fit, *shared.pair, t);
    return t;
}

}  // namespace moderato
