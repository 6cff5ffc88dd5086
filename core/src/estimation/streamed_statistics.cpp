#include "estimation/streamed_statistics.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

#include "estimation/covariance.hpp"
#include "estimation/mixed_model.hpp"
#include "estimation/streamed_factor.hpp"
#include "moderato/estimation/distributions.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// VIF_j = [(X'WX)^{-1}]_jj * sum_i w_i (x_ij - mean_w(x_j))^2, the sum being
// the RSS of column j on the intercept, read off the factor.
std::vector<double> variance_inflation(const Design& d, const StreamedSums& s) {
    std::vector<double> vif(d.columns.size(), kNaN);
    const std::vector<int>& kept = s.ls.kept;
    if (!d.intercept || !std::binary_search(kept.begin(), kept.end(), 0)) return vif;
    const Eigen::Index p = s.factor.cols() - 1;
    for (std::size_t a = 0; a < kept.size(); ++a) {
        const int j = kept[a];
        if (j == 0) continue;
        MatL Rj(s.factor.rows(), p + 1);  // the factor with column j as the "outcome"
        Rj = s.factor;
        Rj.col(p) = s.factor.col(j);
        const double scale = s.scales[static_cast<std::size_t>(j)];
        const double ss = factor_rss(Rj, {0}) * scale * scale;
        vif[static_cast<std::size_t>(j)] = s.ls.inverse_factor.row(static_cast<Eigen::Index>(a)).squaredNorm() * ss;
    }
    return vif;
}

void covariance(const Design& d, const ModelSpec& spec, const StreamedSums& s, FitResult& f) {
    const Eigen::MatrixXd& A = s.ls.inverse_factor;
    f.rss = s.residual_rss ? s.rss : factor_rss(s.factor, s.ls.kept);
    const double sigma2 = f.rss / f.df_residual;
    f.residual_sd = std::sqrt(sigma2);
    const Eigen::MatrixXd Vk =
        spec.se == SeKind::Classical ? Eigen::MatrixXd(sigma2 * (A * A.transpose())) : s.sandwich;
    f.covariance = expand_covariance(Vk, s.ls.kept, static_cast<Eigen::Index>(d.columns.size()));
    f.df_inference = spec.se == SeKind::Cluster ? d.n_clusters - 1.0 : f.df_residual;
    f.critical_value = dist::t_quantile(0.5 + spec.level / 2.0, f.df_inference);
}

// TSS (the RSS on the intercept alone, or sum w y^2 without one), R-squared,
// adjusted R-squared and the Gaussian log-likelihood, as fit.cpp's.
void linear_statistics(const Design& d, const StreamedSums& s, FitResult& f) {
    const double nd = static_cast<double>(s.n);
    const double icpt = d.intercept ? 1.0 : 0.0;
    f.tss = d.intercept ? factor_rss(s.factor, {0}) : factor_rss(s.factor, {});
    f.r_squared = 1.0 - f.rss / f.tss;
    f.adj_r_squared = 1.0 - (nd - icpt) / f.df_residual * (1.0 - f.r_squared);
    f.log_likelihood = -nd / 2.0 * (std::log(2.0 * std::numbers::pi) + std::log(f.rss / nd) + 1.0) +
                       0.5 * static_cast<double>(s.sum_log_w);
}

void overall_test(const Design& d, const ModelSpec& spec, const StreamedSums& s, FitResult& f) {
    const double kd = static_cast<double>(s.ls.kept.size());
    f.aic = -2.0 * f.log_likelihood + 2.0 * kd;
    f.bic = -2.0 * f.log_likelihood + kd * std::log(static_cast<double>(s.n));
    std::vector<std::string> labels;
    for (int j : s.ls.kept)
        if (!(d.intercept && j == 0)) labels.push_back(d.columns[static_cast<std::size_t>(j)].label);
    if (labels.empty()) return;
    WaldTest overall = wald_test(f, labels);
    if (spec.se == SeKind::Classical) {  // the classical F from sums of squares, as fit.cpp
        overall.statistic = ((f.tss - f.rss) / overall.df1) / (f.rss / f.df_residual);
        overall.p_value = dist::upper_p_f(overall.statistic, overall.df1, overall.df2);
    }
    f.f_statistic = overall.statistic;
    f.f_df1 = overall.df1;
    f.f_df2 = overall.df2;
    f.f_p_value = overall.p_value;
}

// The R-squared change F test of dropping the product columns: the extra sum
// of squares from the factor (sequential sums of squares when the products
// come last at full rank, else the factor re-triangularised without them).
std::optional<NestedComparison> comparison(const Design& d, const StreamedSums& s, const FitResult& f) {
    const std::vector<int> products = d.product_columns();
    const std::vector<int>& kept = s.ls.kept;
    std::vector<int> products_kept, reduced_cols;
    for (int j : products)
        if (std::binary_search(kept.begin(), kept.end(), j)) products_kept.push_back(j);
    if (products_kept.empty()) return std::nullopt;
    const auto p = static_cast<Eigen::Index>(d.columns.size());
    for (Eigen::Index j = 0; j < p; ++j)
        if (std::find(products.begin(), products.end(), static_cast<int>(j)) == products.end())
            reduced_cols.push_back(static_cast<int>(j));
    NestedComparison cmp;
    for (int j : products_kept) cmp.dropped_terms.push_back(d.columns[static_cast<std::size_t>(j)].label);
    const bool trailing = s.ls.aliased.empty() && products.front() == static_cast<int>(reduced_cols.size()) &&
                          products.back() == static_cast<int>(p - 1);
    double extra_ss = 0;
    if (trailing) {
        for (int j : products) extra_ss += s.ls.qty[j] * s.ls.qty[j];
        cmp.df1 = static_cast<double>(products.size());
    } else {
        MatL R(s.factor.rows(), static_cast<Eigen::Index>(reduced_cols.size()) + 1);
        for (std::size_t c = 0; c < reduced_cols.size(); ++c)
            R.col(static_cast<Eigen::Index>(c)) = s.factor.col(reduced_cols[c]);
        R.col(R.cols() - 1) = s.factor.col(p);
        LeastSquaresResult red;
        const double tol =
            s.ls.extended_precision
                ? LeastSquaresOptions{}.rank_tolerance
                : std::max(LeastSquaresOptions{}.rank_tolerance,
                           16.0 * std::sqrt(static_cast<double>(s.n)) * std::numeric_limits<double>::epsilon());
        decide_rank(R, R.cols() - 1, tol, red);
        extra_ss = factor_rss(R, red.kept) - f.rss;
        cmp.df1 = static_cast<double>(red.kept.size() < kept.size() ? kept.size() - red.kept.size() : 0);
    }
    cmp.r_squared_change = extra_ss / f.tss;
    cmp.r_squared_reduced = f.r_squared - cmp.r_squared_change;
    cmp.df2 = f.df_residual;
    cmp.f_statistic = (extra_ss / cmp.df1) / (f.rss / f.df_residual);
    cmp.p_value = dist::upper_p_f(cmp.f_statistic, cmp.df1, cmp.df2);
    cmp.wald = wald_test(f, cmp.dropped_terms);
    return cmp;
}

}  // namespace

FitResult streamed_result(const Design& d, const ModelSpec& spec, const FitOptions& options, const StreamedSums& s) {
    FitResult f = start_result(d, spec);
    f.n = s.n;
    f.n_clusters = d.n_clusters;
    f.beta = s.ls.coef;
    f.extended_precision = s.ls.extended_precision;
    f.rank = static_cast<int>(s.ls.kept.size());
    f.df_residual = static_cast<double>(s.n - s.ls.kept.size());
    for (int j : s.ls.aliased) f.aliased.push_back(d.columns[static_cast<std::size_t>(j)].label);
    covariance(d, spec, s, f);
    const std::vector<double> vif = variance_inflation(d, s);
    for (std::size_t j = 0; j < d.columns.size(); ++j) {
        Coefficient c;
        c.term = d.columns[j].label;
        const auto jj = static_cast<Eigen::Index>(j);
        c.aliased = std::isnan(f.beta[jj]);
        static_cast<Inference&>(c) = infer(f.beta[jj], std::sqrt(f.covariance(jj, jj)), f);
        c.vif = vif[j];
        f.coefficients.push_back(c);
    }
    linear_statistics(d, s, f);
    overall_test(d, spec, s, f);
    if (options.compare_without_products) f.comparison = comparison(d, s, f);
    for (const auto& set : spec.wald_tests) f.wald_tests.push_back(wald_test(f, set));
    add_column_warnings(spec, d.n_clusters, f);
    return f;
}

}  // namespace moderato::detail
