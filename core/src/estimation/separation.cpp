#include "estimation/separation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

struct Range {
    double lo = std::numeric_limits<double>::infinity();
    double hi = -std::numeric_limits<double>::infinity();
    std::size_t count = 0;
    void add(double v) {
        lo = std::min(lo, v);
        hi = std::max(hi, v);
        ++count;
    }
};

std::string outcome_value(double v) { return v == 1.0 ? "1" : "0"; }

// A finding for one column, or an empty string.
std::string column_finding(const Design& d, Eigen::Index j) {
    const auto x = d.X.col(j);
    const std::string& label = d.columns[static_cast<std::size_t>(j)].label;
    const bool binary = ((x.array() == 0.0) || (x.array() == 1.0)).all();
    if (binary) {
        for (double level : {1.0, 0.0}) {
            Range r;
            for (Eigen::Index i = 0; i < x.size(); ++i)
                if (x[i] == level) r.add(d.y[i]);
            if (r.count > 0 && r.lo == r.hi && r.count < static_cast<std::size_t>(x.size())) {
                const bool dummy = !d.columns[static_cast<std::size_t>(j)].atoms.empty() &&
                                   !d.columns[static_cast<std::size_t>(j)].atoms.front().level.empty() &&
                                   d.columns[static_cast<std::size_t>(j)].atoms.size() == 1;
                const std::string rows = dummy && level == 1.0 ? "every row with " + label
                                                               : "every row with " + label + " = " + exact_text(level);
                return "quasi-complete separation by " + quoted(label) + ": " + rows + " has " + d.outcome + " = " +
                       outcome_value(r.lo);
            }
        }
        return {};
    }
    Range r0, r1;
    for (Eigen::Index i = 0; i < x.size(); ++i) (d.y[i] == 1.0 ? r1 : r0).add(x[i]);
    if (r0.count == 0 || r1.count == 0) return {};
    auto say = [&](const char* kind, const char* cmp, double a, double b) {
        return std::string(kind) + " separation by " + quoted(label) + ": every row with " + d.outcome + " = " +
               outcome_value(a) + " has " + cmp + " " + quoted(label) + " than every row with " + d.outcome + " = " +
               outcome_value(b);
    };
    if (r0.hi < r1.lo) return say("complete", "a larger", 1, 0);
    if (r1.hi < r0.lo) return say("complete", "a smaller", 1, 0);
    if (r0.hi == r1.lo) return say("quasi-complete", "at least as large a", 1, 0);
    if (r1.hi == r0.lo) return say("quasi-complete", "at most as large a", 1, 0);
    return {};
}

}  // namespace

std::optional<SeparationFinding> find_separation(const Design& d, const Eigen::VectorXd& beta,
                                                 const Eigen::VectorXd& mu, bool converged) {
    const Eigen::Index p = d.X.cols();
    std::vector<std::string> findings;
    if (d.intercept)
        for (Eigen::Index j = 0; j < p; ++j) {
            if (d.columns[static_cast<std::size_t>(j)].atoms.empty()) continue;
            auto f = column_finding(d, j);
            if (!f.empty()) findings.push_back(f);
        }
    if (!findings.empty())
        return SeparationFinding{join(findings, "; ") + "; the estimates and standard errors are not reliable"};

    std::size_t extreme = 0;
    for (Eigen::Index i = 0; i < mu.size(); ++i)
        if (mu[i] < 1e-10 || mu[i] > 1 - 1e-10) ++extreme;
    // Largest standardised coefficient |b_j| * sd(x_j).
    double biggest = 0;
    Eigen::Index worst = -1;
    for (Eigen::Index j = 0; j < p; ++j) {
        if (d.columns[static_cast<std::size_t>(j)].atoms.empty() || std::isnan(beta[j])) continue;
        const auto x = d.X.col(j);
        const double mean = x.mean();
        const double sd = std::sqrt((x.array() - mean).square().sum() / std::max<double>(1.0, x.size() - 1.0));
        const double s = std::abs(beta[j]) * sd;
        if (s > biggest) {
            biggest = s;
            worst = j;
        }
    }
    if ((!converged || (extreme > 0 && biggest > 10)) && worst >= 0)
        return SeparationFinding{"possible separation: fitted probabilities of 0 or 1 for " + std::to_string(extreme) +
                                 " rows and a diverging estimate of " +
                                 quoted(d.columns[static_cast<std::size_t>(worst)].label) +
                                 "; the estimates and standard errors are not reliable"};
    return std::nullopt;
}

void refuse_zero_cells(const Design& d) {
    if (!d.intercept) return;
    for (Eigen::Index j = 0; j < d.X.cols(); ++j) {
        const auto& column = d.columns[static_cast<std::size_t>(j)];
        if (column.atoms.empty()) continue;
        const auto x = d.X.col(j);
        if (!((x.array() == 0.0) || (x.array() == 1.0)).all()) continue;
        for (double level : {1.0, 0.0}) {
            std::size_t rows = 0;
            bool all_zero = true;
            for (Eigen::Index i = 0; i < x.size() && all_zero; ++i)
                if (x[i] == level) {
                    ++rows;
                    all_zero = d.y[i] == 0.0;
                }
            if (rows == 0 || !all_zero || rows == static_cast<std::size_t>(x.size())) continue;
            const bool dummy = column.atoms.size() == 1 && !column.atoms.front().level.empty();
            const std::string which = dummy && level == 1.0
                                          ? "every row with " + column.label
                                          : "every row with " + column.label + " = " + exact_text(level);
            throw InputError("all-zero cell: " + which + " (" + std::to_string(rows) + " rows) has " + d.outcome +
                             " = 0, so the estimate for " + quoted(column.label) +
                             " runs off to minus infinity and has no finite value; merge that level with a "
                             "neighbour, leave those rows out, or drop " +
                             quoted(column.label) + " from the model");
        }
    }
}

}  // namespace moderato::detail
