#include "moderato/probing/common_support.hpp"

#include <algorithm>
#include <cmath>

#include "moderato/probing/binned_effects.hpp"  // ThinRule
#include "moderato/support/error.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::quoted;

namespace {

std::vector<double> even_edges(double lo, double hi, std::size_t intervals) {
    std::vector<double> e(intervals + 1);
    for (std::size_t k = 0; k <= intervals; ++k)
        e[k] = lo + (hi - lo) * static_cast<double>(k) / static_cast<double>(intervals);
    e.back() = hi;
    return e;
}

// The interval of x among equal-width edges (the last one closed).
std::size_t interval_of(double x, const std::vector<double>& edges) {
    const std::size_t B = edges.size() - 1;
    const double lo = edges.front(), hi = edges.back();
    if (!(hi > lo)) return 0;
    const auto k = static_cast<std::size_t>(std::floor((x - lo) / (hi - lo) * static_cast<double>(B)));
    return std::min(k, B - 1);
}

Eigen::VectorXd numeric_column(const Design& d, const std::string& column, const std::string& role) {
    const int j = d.main_column(column);
    if (j < 0 || d.categorical(column))
        throw InputError("common support needs the " + role + " " + quoted(column) +
                         " as a numeric main effect in the model");
    return d.X.col(j);
}

void mark_thin(CommonSupport& s, const std::vector<bool>& thin) {
    for (std::size_t k = 0; k < thin.size();) {
        if (!thin[k]) {
            ++k;
            continue;
        }
        std::size_t e = k;
        while (e + 1 < thin.size() && thin[e + 1]) ++e;
        s.thin.push_back({s.moderator_edges[k], s.moderator_edges[e + 1]});
        k = e + 1;
    }
}

}  // namespace

CommonSupport common_support(const Design& d, const std::string& focal, const std::string& moderator) {
    const Eigen::VectorXd x = numeric_column(d, focal, "focal predictor");
    const Eigen::VectorXd z = numeric_column(d, moderator, "moderator");
    CommonSupport s;
    s.focal = focal;
    s.moderator = moderator;
    s.rows = d.n();
    s.binary_focal = d.is_binary(focal);
    const std::size_t B = std::clamp<std::size_t>(d.n() / 40, 5, 20);
    s.moderator_edges = even_edges(z.minCoeff(), z.maxCoeff(), B);
    const std::size_t per = ThinRule::rows_per_coefficient;
    std::vector<bool> thin(B);
    if (s.binary_focal) {
        s.counts_zero.assign(B, 0);
        s.counts_one.assign(B, 0);
        for (Eigen::Index i = 0; i < z.size(); ++i)
            ++(x[i] == 1.0 ? s.counts_one : s.counts_zero)[interval_of(z[i], s.moderator_edges)];
        for (std::size_t k = 0; k < B; ++k) thin[k] = std::min(s.counts_zero[k], s.counts_one[k]) < per;
        s.rule = "an interval of " + moderator + " (one of " + std::to_string(B) +
                 " of equal width) is thin when either group of " + focal + " has fewer than " + std::to_string(per) +
                 " rows in it (at least 10 rows per estimated coefficient: each group's local level)";
    } else {
        s.focal_edges = even_edges(x.minCoeff(), x.maxCoeff(), B);
        s.joint = Eigen::MatrixXi::Zero(static_cast<Eigen::Index>(B), static_cast<Eigen::Index>(B));
        for (Eigen::Index i = 0; i < z.size(); ++i)
            ++s.joint(static_cast<Eigen::Index>(interval_of(z[i], s.moderator_edges)),
                      static_cast<Eigen::Index>(interval_of(x[i], s.focal_edges)));
        for (std::size_t k = 0; k < B; ++k)
            thin[k] = static_cast<std::size_t>(s.joint.row(static_cast<Eigen::Index>(k)).sum()) < 2 * per;
        s.rule = "an interval of " + moderator + " (one of " + std::to_string(B) +
                 " of equal width) is thin when it holds fewer than " + std::to_string(2 * per) +
                 " rows (at least 10 rows per estimated coefficient: a local line in " + focal + " has two)";
    }
    mark_thin(s, thin);
    return s;
}

}  // namespace moderato
