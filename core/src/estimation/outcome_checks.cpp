#include "estimation/outcome_checks.hpp"

#include "estimation/family_words.hpp"

#include <cmath>

#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

// The outcome's values with their table rows: a design's, or a column's present ones.
struct OutcomeValues {
    const Eigen::VectorXd& y;
    const std::vector<std::size_t>& rows;
};

void check_binary(const Table& table, const ModelSpec& spec, const OutcomeValues& v) {
    for (Eigen::Index i = 0; i < v.y.size(); ++i)
        if (v.y[i] != 0.0 && v.y[i] != 1.0)
            throw InputError(family_words(spec.family) + " outcome " + quoted(spec.outcome) + " must be 0 or 1: " +
                             table.row_place(v.rows[static_cast<std::size_t>(i)]) + " holds " + exact_text(v.y[i]));
}

// Refuses a negative count; returns how many values are not whole, and the first's index.
std::pair<std::size_t, std::size_t> check_nonnegative(const Table& table, const ModelSpec& spec,
                                                      const OutcomeValues& o) {
    std::size_t fractional = 0, first = 0;
    for (Eigen::Index i = 0; i < o.y.size(); ++i) {
        const double v = o.y[i];
        const std::size_t row = o.rows[static_cast<std::size_t>(i)];
        if (v < 0)
            throw InputError(family_words(spec.family) + " outcome " + quoted(spec.outcome) +
                             " must be a count (0, 1, 2, ...): " + table.row_place(row) + " holds " + exact_text(v) +
                             "; a count cannot be negative");
        if (v != std::floor(v) && fractional++ == 0) first = static_cast<std::size_t>(i);
    }
    return {fractional, first};
}

void check_counts(const Table& table, const ModelSpec& spec, Design& d) {
    const auto [fractional, first] = check_nonnegative(table, spec, {d.y, d.rows});
    if (fractional == 0) return;
    d.warnings.push_back(
        "outcome " + quoted(spec.outcome) + " is not a whole count in " + std::to_string(fractional) +
        (fractional == 1 ? " row" : " rows") + " (first " + table.row_place(d.rows[first]) + ": " +
        exact_text(d.y[static_cast<Eigen::Index>(first)]) + "); the " + family_words(spec.family) +
        " likelihood is meant for counts. If these are rates, model the counts with the exposure as its own column");
}

void check_not_constant(const ModelSpec& spec, const Design& d) {
    if (d.y.size() == 0) return;
    const double v = d.y[0];
    for (Eigen::Index i = 1; i < d.y.size(); ++i)
        if (d.y[i] != v) return;
    throw InputError("outcome " + quoted(spec.outcome) + " is " + exact_text(v) + " in all " +
                     std::to_string(d.y.size()) + " rows the model uses; a " + family_words(spec.family) +
                     " model needs an outcome that varies");
}

}  // namespace

void check_exposure_column(const Table& table, const ModelSpec& spec) {
    if (spec.exposure.empty()) return;
    if (!count_outcome(spec.family))
        throw InputError("an exposure column (" + quoted(spec.exposure) +
                         ") applies to poisson and negative-binomial models only; this is a " +
                         family_words(spec.family) + " model");
    const Column* c = table.find(spec.exposure);
    if (!c) throw InputError("exposure column " + quoted(spec.exposure) + " not found");
    if (c->kind != ColumnKind::Numeric)
        throw InputError("exposure column " + quoted(spec.exposure) +
                         " is not numeric; choose a column of positive amounts (time, area, population)");
}

void check_outcome(const Table& table, const ModelSpec& spec, Design& d) {
    if (binary_outcome(spec.family)) check_binary(table, spec, {d.y, d.rows});
    if (count_outcome(spec.family)) check_counts(table, spec, d);
    if (generalized(spec.family)) check_not_constant(spec, d);
}

void fill_offset(const Table& table, const ModelSpec& spec, Design& d) {
    if (spec.exposure.empty()) return;
    const Column& c = table.at(spec.exposure);
    d.offset.resize(d.y.size());
    for (Eigen::Index i = 0; i < d.y.size(); ++i) {
        const std::size_t row = d.rows[static_cast<std::size_t>(i)];
        const double e = c.numbers[row];
        if (!(e > 0) || !std::isfinite(e))
            throw InputError("exposure " + quoted(spec.exposure) + " must be positive: " + table.row_place(row) +
                             " holds " + exact_text(e) + "; a row with no exposure cannot have counted anything");
        d.offset[i] = std::log(e);
    }
}

}  // namespace moderato::detail

namespace moderato {

void check_family_columns(const Table& table, const ModelSpec& spec) {
    detail::check_exposure_column(table, spec);
    const Column* c = table.find(spec.outcome);
    if (!c || c->kind != ColumnKind::Numeric || !generalized(spec.family)) return;
    std::vector<std::size_t> rows;
    std::vector<double> present;
    for (std::size_t i = 0; i < c->numbers.size(); ++i)
        if (!std::isnan(c->numbers[i])) {
            rows.push_back(i);
            present.push_back(c->numbers[i]);
        }
    const Eigen::VectorXd y =
        Eigen::Map<const Eigen::VectorXd>(present.data(), static_cast<Eigen::Index>(present.size()));
    if (binary_outcome(spec.family)) detail::check_binary(table, spec, {y, rows});
    if (count_outcome(spec.family)) detail::check_nonnegative(table, spec, {y, rows});
}

}  // namespace moderato
