#include "moderato/estimation/fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

#include "estimation/covariance.hpp"
#include "estimation/glm_family.hpp"
#include "estimation/glm_fit.hpp"
#include "estimation/mixed_model.hpp"
#include "estimation/overdispersion.hpp"
#include "estimation/separation.hpp"
#include "estimation/variance_inflation.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/support/error.hpp"
#include "support/parallel.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::join;
using detail::quoted;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

double weight(const Design& d, Eigen::Index i) { return d.weights.size() ? d.weights[i] : 1.0; }

Eigen::MatrixXd columns_of(const Eigen::MatrixXd& X, const std::vector<int>& cols) {
    Eigen::MatrixXd out(X.rows(), static_cast<Eigen::Index>(cols.size()));
    for (std::size_t c = 0; c < cols.size(); ++c) out.col(static_cast<Eigen::Index>(c)) = X.col(cols[c]);
    return out;
}

WaldTest wald_on_columns(const FitResult& fit, const std::vector<int>& cols, std::vector<std::string> labels) {
    WaldTest w;
    w.terms = std::move(labels);
    w.covariance = fit.se;
    const Eigen::Index q = static_cast<Eigen::Index>(cols.size());
    Eigen::VectorXd b(q);
    Eigen::MatrixXd V(q, q);
    for (Eigen::Index a = 0; a < q; ++a) {
        b[a] = fit.beta[cols[static_cast<std::size_t>(a)]];
        for (Eigen::Index c = 0; c < q; ++c)
            V(a, c) = fit.covariance(cols[static_cast<std::size_t>(a)], cols[static_cast<std::size_t>(c)]);
    }
    Eigen::LDLT<Eigen::MatrixXd> ldlt(V);
    double chi2 = kNaN;
    if (ldlt.info() == Eigen::Success && ldlt.isPositive() && (ldlt.vectorD().array() > 0).all())
        chi2 = b.dot(ldlt.solve(b));
    w.chi_square = chi2;
    w.df1 = static_cast<double>(q);
    w.df2 = fit.df_inference;
    w.statistic = chi2 / w.df1;
    w.p_value = std::isinf(w.df2) ? dist::upper_p_chi2(chi2, w.df1) : dist::upper_p_f(w.statistic, w.df1, w.df2);
    return w;
}

}  // namespace

Inference infer(double estimate, double std_error, const FitResult& fit) {
    Inference r;
    r.estimate = estimate;
    r.std_error = std_error;
    r.statistic = estimate / std_error;
    r.p_value = std::isnan(r.statistic) ? kNaN : dist::two_sided_p_t(r.statistic, fit.df_inference);
    r.ci_lower = estimate - fit.critical_value * std_error;
    r.ci_upper = estimate + fit.critical_value * std_error;
    return r;
}

Inference infer_with_df(double estimate, double std_error, double df, double level) {
    Inference r;
    const double q = dist::t_quantile(0.5 + level / 2.0, df);
    r.estimate = estimate;
    r.std_error = std_error;
    r.statistic = estimate / std_error;
    r.p_value = std::isnan(r.statistic) ? kNaN : dist::two_sided_p_t(r.statistic, df);
    r.ci_lower = estimate - q * std_error;
    r.ci_upper = estimate + q * std_error;
    return r;
}

int FitResult::index_of(const std::string& term) const {
    for (std::size_t j = 0; j < coefficients.size(); ++j)
        if (coefficients[j].term == term) return static_cast<int>(j);
    return -1;
}

namespace {
// "z×x" and "x×z" name the same product.
std::string canonical(const std::string& label) {
    std::vector<std::string> parts;
    const std::string sep = "×";
    std::size_t start = 0;
    while (true) {
        const auto at = label.find(sep, start);
        parts.push_back(label.substr(start, at == std::string::npos ? std::string::npos : at - start));
        if (at == std::string::npos) break;
        start = at + sep.size();
    }
    std::sort(parts.begin(), parts.end());
    return join(parts, sep);
}
}  // namespace

WaldTest wald_test(const FitResult& fit, const std::vector<std::string>& terms) {
    if (terms.empty()) throw InputError("a Wald test needs at least one term");
    std::vector<int> cols;
    auto add = [&](int j, const std::string& name) {
        if (fit.coefficients[static_cast<std::size_t>(j)].aliased)
            throw InputError("term " + quoted(name) + " is aliased (not estimable) and cannot be tested");
        if (std::find(cols.begin(), cols.end(), j) == cols.end()) cols.push_back(j);
    };
    for (const auto& t : terms) {
        const std::string key = canonical(t);
        bool found = false;
        for (std::size_t j = 0; j < fit.coefficients.size() && !found; ++j)
            if (canonical(fit.coefficients[j].term) == key) {
                add(static_cast<int>(j), t);
                found = true;
            }
        for (const auto& [label, columns] : fit.terms)
            if (!found && canonical(label) == key) {
                for (int j : columns) add(j, t);
                found = true;
            }
        if (!found) {
            std::vector<std::string> names;
            for (const auto& c : fit.coefficients) names.push_back(c.term);
            throw InputError("term " + quoted(t) + " is not in the model; terms are: " + join(names, ", "));
        }
    }
    return wald_on_columns(fit, cols, terms);
}

namespace {

// What the later steps of a fit need from its solution.
struct Solution {
    LeastSquaresResult ls;  // the factor at the estimate: kept columns, (X' W X)^{-1} = A A'
    Eigen::VectorXd score, leverage_weight;
    std::optional<detail::SeparationFinding> separation;
    // negative binomial: the inverse negative Hessian of (beta_K, alpha) and alpha's per-row score
    Eigen::MatrixXd joint_inverse;
    Eigen::VectorXd alpha_score;
};

// The estimates: least squares (linear), Newton/IRLS (logistic); the rank.
Solution solve(const Design& d, const ModelSpec& spec, const FitOptions& options, const LeastSquaresOptions& lso,
               FitResult& f) {
    const Eigen::Index n = d.X.rows();
    Solution s;
    s.score.resize(n);
    if (!generalized(spec.family)) {
        s.ls = least_squares(d.X, d.y, d.weights, lso);
        f.beta = s.ls.coef;
        f.residuals = s.ls.residuals;
        f.fitted = d.y - s.ls.residuals;
        for (Eigen::Index i = 0; i < n; ++i) s.score[i] = weight(d, i) * s.ls.residuals[i];
        if (d.weights.size()) s.leverage_weight = d.weights;
    } else {
        if (count_outcome(spec.family)) detail::refuse_zero_cells(d);
        auto g = detail::fit_glm(d, d.X, spec.family, options.max_iterations, lso);
        s.ls = std::move(g.factor);
        s.score = std::move(g.score);
        s.joint_inverse = std::move(g.joint_inverse);
        s.alpha_score = std::move(g.alpha_score);
        f.beta = g.beta;
        f.fitted = g.mu;
        f.residuals = d.y - g.mu;
        f.iterations = g.iterations;
        f.converged = g.converged;
        f.log_likelihood = g.loglik;
        if (spec.family == Family::NegativeBinomial) f.dispersion = Dispersion{g.alpha};
        if (binary_outcome(spec.family)) s.separation = detail::find_separation(d, f.beta, f.fitted, g.converged);
    }
    f.extended_precision = s.ls.extended_precision;
    f.rank = static_cast<int>(s.ls.kept.size());
    f.df_residual = static_cast<double>(n - static_cast<Eigen::Index>(s.ls.kept.size()));
    for (int j : s.ls.aliased) f.aliased.push_back(d.columns[static_cast<std::size_t>(j)].label);
    return s;
}

// The negative binomial's covariance of (beta_K, alpha): the inverse negative
// Hessian, or a sandwich of the per-row scores of both; returns the beta
// block and sets alpha's standard error.
Eigen::MatrixXd negative_binomial_covariance(const Design& d, const ModelSpec& spec, const Solution& s,
                                             unsigned threads, Dispersion& alpha) {
    const Eigen::Index k = static_cast<Eigen::Index>(s.ls.kept.size());
    Eigen::MatrixXd V = s.joint_inverse;
    if (spec.se != SeKind::Classical)
        V = detail::sandwich_with_extra(d.X, s.ls.kept, s.joint_inverse, s.score, s.alpha_score, spec.se, d.cluster,
                                        d.n_clusters, threads);
    alpha.std_error = std::sqrt(V(k, k));
    return V.topLeftCorner(k, k);
}

// Covariance of the kept coefficients (NaN for aliased ones), the inference df
// and the critical value.
void covariance(const Design& d, const ModelSpec& spec, const Solution& s, unsigned threads, FitResult& f) {
    const bool glm = generalized(spec.family);
    const Eigen::MatrixXd& A = s.ls.inverse_factor;
    Eigen::MatrixXd Vk;
    if (spec.family == Family::NegativeBinomial) {
        Vk = negative_binomial_covariance(d, spec, s, threads, *f.dispersion);
    } else if (!glm) {
        f.rss = s.ls.rss;
        const double sigma2 = s.ls.rss / f.df_residual;
        f.residual_sd = std::sqrt(sigma2);
        if (spec.se == SeKind::Classical) Vk = sigma2 * (A * A.transpose());
    } else if (spec.se == SeKind::Classical) {
        Vk = A * A.transpose();
    }
    if (spec.se != SeKind::Classical && spec.family != Family::NegativeBinomial)
        Vk = detail::sandwich(d.X, s.ls.kept, A, s.score, s.leverage_weight, spec.se, d.cluster, d.n_clusters, threads);
    f.covariance = detail::expand_covariance(Vk, s.ls.kept, d.X.cols());
    f.df_inference = glm ? kInf : (spec.se == SeKind::Cluster ? d.n_clusters - 1.0 : f.df_residual);
    f.critical_value = dist::t_quantile(0.5 + spec.level / 2.0, f.df_inference);
    if (f.dispersion) {
        Dispersion& a = *f.dispersion;
        // on the log scale, where the interval stays above zero
        a.ci_lower = a.alpha * std::exp(-f.critical_value * a.std_error / a.alpha);
        a.ci_upper = a.alpha * std::exp(f.critical_value * a.std_error / a.alpha);
    }
}

// VIFs with the prior weights only: a generalized fit's factor carries its
// working weights, so its VIFs come from the centred cross-products (or,
// where those are too ill-conditioned, from a least-squares factor of X).
std::vector<double> inflation(const Design& d, const Solution& s, const LeastSquaresOptions& lso, Family family) {
    const unsigned threads = detail::resolve_threads(lso.threads);
    if (!generalized(family)) return detail::variance_inflation(d, s.ls.kept, s.ls.inverse_factor, threads);
    if (auto vif = detail::variance_inflation_by_cross_products(d, s.ls.kept, threads)) return *vif;
    const auto ls = least_squares(d.X, Eigen::VectorXd::Zero(d.X.rows()), d.weights, lso);
    return detail::variance_inflation(d, s.ls.kept, ls.inverse_factor, threads);
}

void coefficient_table(const Design& d, const Solution& s, const LeastSquaresOptions& lso, FitResult& f) {
    const Eigen::Index p = d.X.cols();
    const auto vif = inflation(d, s, lso, f.family);
    for (Eigen::Index j = 0; j < p; ++j) {
        Coefficient c;
        c.term = d.columns[static_cast<std::size_t>(j)].label;
        c.aliased = std::isnan(f.beta[j]);
        static_cast<Inference&>(c) = infer(f.beta[j], std::sqrt(f.covariance(j, j)), f);
        c.vif = vif[static_cast<std::size_t>(j)];
        f.coefficients.push_back(c);
    }
}

// TSS, R-squared, adjusted R-squared and the Gaussian log-likelihood.
void linear_statistics(const Design& d, FitResult& f) {
    const Eigen::Index n = d.X.rows();
    const double nd = static_cast<double>(n);
    const double icpt = d.intercept ? 1.0 : 0.0;
    long double sw = 0, swy = 0, tss = 0, sumlogw = 0;
    for (Eigen::Index i = 0; i < n; ++i) {
        sw += weight(d, i);
        swy += weight(d, i) * d.y[i];
        sumlogw += std::log(weight(d, i));
    }
    const long double ybar = d.intercept ? swy / sw : 0.0L;
    for (Eigen::Index i = 0; i < n; ++i) tss += weight(d, i) * (d.y[i] - ybar) * (d.y[i] - ybar);
    f.tss = static_cast<double>(tss);
    f.r_squared = 1.0 - f.rss / f.tss;
    f.adj_r_squared = 1.0 - (nd - icpt) / f.df_residual * (1.0 - f.r_squared);
    f.log_likelihood = -nd / 2.0 * (std::log(2.0 * std::numbers::pi) + std::log(f.rss / nd) + 1.0) +
                       0.5 * static_cast<double>(sumlogw);
}

// The intercept-only model's mean and log-likelihood on the same rows (with
// the offset; without an intercept, the linear predictor is the offset).
// Binary and Poisson means have closed forms; the negative binomial's null
// model is fitted with its own alpha.
double null_loglik(const Design& d, Family family, double alpha, const FitOptions& options,
                   const LeastSquaresOptions& lso) {
    const Eigen::Index n = d.X.rows();
    const auto offset = [&](Eigen::Index i) { return d.offset.size() ? d.offset[i] : 0.0; };
    if (family == Family::NegativeBinomial && d.intercept)
        return detail::fit_glm(d, Eigen::MatrixXd::Ones(n, 1), family, options.max_iterations, lso).loglik;
    long double sw = 0, swy = 0, swe = 0;
    for (Eigen::Index i = 0; i < n; ++i) {
        sw += weight(d, i);
        swy += weight(d, i) * d.y[i];
        swe += weight(d, i) * std::exp(offset(i));
    }
    double b0 = 0;
    if (d.intercept && binary_outcome(family)) {
        const double mean = static_cast<double>(swy / sw);
        b0 = family == Family::Probit ? dist::normal_quantile(mean) : std::log(mean / (1 - mean));
    } else if (d.intercept) {
        b0 = std::log(static_cast<double>(swy / swe));
    }
    long double ll = 0;
    for (Eigen::Index i = 0; i < n; ++i) ll += weight(d, i) * detail::row_loglik(family, d.y[i], b0 + offset(i), alpha);
    return static_cast<double>(ll);
}

// The deviance of a count model: twice the log-likelihood ratio of the
// saturated model (the negative binomial's at the fitted alpha).
double count_deviance(const Design& d, const FitResult& f) {
    const double r = f.dispersion ? 1 / f.dispersion->alpha : 0;
    long double dev = 0;
    for (Eigen::Index i = 0; i < d.y.size(); ++i) {
        const double y = d.y[i], mu = f.fitted[i];
        const double ylog = y > 0 ? y * std::log(y / mu) : 0.0;
        dev += weight(d, i) * (f.dispersion ? ylog - (y + r) * std::log((y + r) / (mu + r)) : ylog - (y - mu));
    }
    return 2 * static_cast<double>(dev);
}

// Deviance, McFadden's R-squared and the likelihood-ratio test against the
// intercept-only model (tested: the number of non-intercept columns kept).
void glm_statistics(const Design& d, std::size_t tested, const FitOptions& options, const LeastSquaresOptions& lso,
                    FitResult& f) {
    const double alpha = f.dispersion ? f.dispersion->alpha : 0.0;
    const double null_ll = null_loglik(d, f.family, alpha, options, lso);
    f.deviance = count_outcome(f.family) ? count_deviance(d, f) : -2.0 * f.log_likelihood;
    f.null_deviance = count_outcome(f.family) ? kNaN : -2.0 * null_ll;
    f.null_log_likelihood = null_ll;
    f.mcfadden_r2 = 1.0 - f.log_likelihood / null_ll;
    f.lr_statistic = 2.0 * (f.log_likelihood - null_ll);
    f.lr_df = static_cast<double>(tested);
    f.lr_p_value = dist::upper_p_chi2(f.lr_statistic, f.lr_df);
}

// Fit statistics, information criteria and the overall test of every kept
// non-intercept column.
void fit_statistics(const Design& d, const ModelSpec& spec, const std::vector<int>& kept, const FitOptions& options,
                    const LeastSquaresOptions& lso, FitResult& f) {
    const bool glm = generalized(spec.family);
    // the negative binomial's alpha is a parameter too
    const double nd = static_cast<double>(d.X.rows()), kd = static_cast<double>(kept.size() + (f.dispersion ? 1 : 0));
    std::vector<int> tested;  // all kept non-intercept columns
    for (int j : kept)
        if (!(d.intercept && j == 0)) tested.push_back(j);
    if (!glm) linear_statistics(d, f);
    else glm_statistics(d, tested.size(), options, lso, f);
    f.aic = -2.0 * f.log_likelihood + 2.0 * kd;
    f.bic = -2.0 * f.log_likelihood + kd * std::log(nd);
    if (tested.empty()) return;
    std::vector<std::string> labels;
    for (int j : tested) labels.push_back(d.columns[static_cast<std::size_t>(j)].label);
    WaldTest overall = wald_on_columns(f, tested, labels);
    if (!glm && spec.se == SeKind::Classical) {
        // The classical F from sums of squares: exact where the Wald form
        // would invert an ill-conditioned covariance block.
        overall.statistic = ((f.tss - f.rss) / overall.df1) / (f.rss / f.df_residual);
        overall.p_value = dist::upper_p_f(overall.statistic, overall.df1, overall.df2);
    }
    if (!glm) {
        f.f_statistic = overall.statistic;
        f.f_df1 = overall.df1;
        f.f_df2 = overall.df2;
        f.f_p_value = overall.p_value;
    }
}

// The R-squared change F test of dropping the product columns (linear fits).
void linear_comparison(const Design& d, const LeastSquaresOptions& lso, const LeastSquaresResult& ls,
                       const std::vector<int>& products, const std::vector<int>& reduced_cols, const FitResult& f,
                       NestedComparison& cmp) {
    const Eigen::Index p = d.X.cols();
    // With full rank and the product columns last, the extra sum of squares
    // is read off the factorisation already made (sequential sums of
    // squares); otherwise refit without the products.
    const bool trailing = ls.aliased.empty() && products.front() == static_cast<int>(reduced_cols.size()) &&
                          products.back() == static_cast<int>(p - 1);
    double extra_ss = 0;
    if (trailing) {
        for (int j : products) extra_ss += ls.qty[j] * ls.qty[j];
        cmp.df1 = static_cast<double>(products.size());
    } else {
        const auto red = least_squares(columns_of(d.X, reduced_cols), d.y, d.weights, lso);
        extra_ss = red.rss - f.rss;
        cmp.df1 = static_cast<double>(red.kept.size() < ls.kept.size() ? ls.kept.size() - red.kept.size() : 0);
    }
    cmp.r_squared_change = extra_ss / f.tss;
    cmp.r_squared_reduced = f.r_squared - cmp.r_squared_change;
    cmp.df2 = f.df_residual;
    cmp.f_statistic = (extra_ss / cmp.df1) / (f.rss / f.df_residual);
    cmp.p_value = dist::upper_p_f(cmp.f_statistic, cmp.df1, cmp.df2);
}

// Where the model without the products starts: the full fit's estimates of
// its columns, and its estimable columns known without a QR — when every
// product column comes after every other column, the full fit's kept ones
// among them (aliasing is decided in column order). Empty kept otherwise.
detail::GlmStart reduced_start(const FitResult& f, const std::vector<int>& kept, const std::vector<int>& products,
                               const std::vector<int>& reduced_cols) {
    detail::GlmStart s;
    if (products.front() != static_cast<int>(reduced_cols.size())) return s;
    s.beta.resize(static_cast<Eigen::Index>(reduced_cols.size()));
    for (std::size_t c = 0; c < reduced_cols.size(); ++c) {
        const double b = f.beta[reduced_cols[c]];
        s.beta[static_cast<Eigen::Index>(c)] = std::isnan(b) ? 0.0 : b;
        if (std::binary_search(kept.begin(), kept.end(), reduced_cols[c])) s.kept.push_back(static_cast<int>(c));
    }
    return s;
}

// The generalized model without the products. With a start from the full
// fit, on the full design with the products held at 0 (no copy of the
// design); the negative binomial, which takes no start, on a copy.
detail::GlmFit reduced_glm(const Design& d, const FitOptions& options, const LeastSquaresOptions& lso,
                           const FitResult& f, const std::vector<int>& kept, const std::vector<int>& products,
                           const std::vector<int>& reduced_cols) {
    const detail::GlmStart start = reduced_start(f, kept, products, reduced_cols);
    if (start.kept.empty() || f.family == Family::NegativeBinomial)
        return detail::fit_glm(d, columns_of(d.X, reduced_cols), f.family, options.max_iterations, lso, false,
                               start.kept.empty() ? nullptr : &start);
    detail::GlmStart full{Eigen::VectorXd::Zero(d.X.cols()), {}};
    for (std::size_t c = 0; c < reduced_cols.size(); ++c)
        full.beta[reduced_cols[c]] = start.beta[static_cast<Eigen::Index>(c)];
    for (int c : start.kept) full.kept.push_back(reduced_cols[static_cast<std::size_t>(c)]);
    return detail::fit_glm(d, d.X, f.family, options.max_iterations, lso, false, &full);
}

// The model without its product terms, fitted on the same rows; none when no
// product column is estimable.
std::optional<NestedComparison> nested_comparison(const Design& d, const FitOptions& options,
                                                  const LeastSquaresOptions& lso, const LeastSquaresResult& ls,
                                                  const FitResult& f) {
    const Eigen::Index p = d.X.cols();
    const std::vector<int> products = d.product_columns();
    std::vector<int> products_kept;
    for (int j : products)
        if (std::binary_search(ls.kept.begin(), ls.kept.end(), j)) products_kept.push_back(j);
    if (products_kept.empty()) return std::nullopt;
    NestedComparison cmp;
    std::vector<int> reduced_cols;
    for (Eigen::Index j = 0; j < p; ++j)
        if (std::find(products.begin(), products.end(), static_cast<int>(j)) == products.end())
            reduced_cols.push_back(static_cast<int>(j));
    for (int j : products_kept) cmp.dropped_terms.push_back(d.columns[static_cast<std::size_t>(j)].label);
    if (!generalized(f.family)) {
        linear_comparison(d, lso, ls, products, reduced_cols, f, cmp);
    } else {
        const detail::GlmFit red = reduced_glm(d, options, lso, f, ls.kept, products, reduced_cols);
        cmp.df1 = static_cast<double>(ls.kept.size() - red.factor.kept.size());
        cmp.lr_statistic = 2.0 * (f.log_likelihood - red.loglik);
        cmp.lr_p_value = dist::upper_p_chi2(cmp.lr_statistic, cmp.df1);
    }
    cmp.wald = wald_on_columns(f, products_kept, cmp.dropped_terms);
    return cmp;
}

// Warnings a reader must see.
void add_warnings(const Design& d, const ModelSpec& spec, const Solution& s, FitResult& f) {
    const bool glm = generalized(spec.family);
    detail::add_column_warnings(spec, d.n_clusters, f);
    if (glm && !f.converged && !s.separation)
        f.warnings.push_back(std::string("the ") + to_string(spec.family) + " fit did not converge in " +
                             std::to_string(f.iterations) + " iterations; the estimates are not reliable");
    if (s.separation) {
        f.separation = true;
        f.warnings.push_back(s.separation->message);
    }
    detail::add_dispersion_warnings(f);
}

}  // namespace

void detail::add_column_warnings(const ModelSpec& spec, int n_clusters, FitResult& f) {
    for (const auto& a : f.aliased)
        f.warnings.push_back("aliased: " + quoted(a) +
                             " is a linear combination of other columns and was not estimated");
    if (spec.se == SeKind::Cluster && n_clusters < 30)
        f.warnings.push_back("only " + std::to_string(n_clusters) +
                             " clusters: cluster-robust standard errors are unreliable with fewer than 30");
    if (generalized(spec.family) || spec.se == SeKind::Classical || spec.se == SeKind::Cluster) return;
    for (const auto& c : f.coefficients)  // leverage of 1 makes HC2-HC4 undefined
        if (!c.aliased && !std::isfinite(c.std_error)) {
            f.warnings.push_back("some rows have leverage 1 (a coefficient fitted by a single row); " +
                                 std::string(to_string(spec.se)) + " standard errors are undefined");
            break;
        }
}

FitResult detail::start_result(const Design& d, const ModelSpec& spec) {
    if (generalized(spec.family) && (spec.se == SeKind::HC2 || spec.se == SeKind::HC3 || spec.se == SeKind::HC4))
        throw InputError(std::string(to_string(spec.se)) + " is not offered for " + to_string(spec.family) +
                         " models; use classical (model-based), hc0 or hc1 (sandwich), or cluster");
    FitResult f;
    f.family = spec.family;
    f.se = spec.se;
    f.level = spec.level;
    f.n = static_cast<std::size_t>(d.X.rows());
    f.n_excluded = d.n_excluded;
    f.exclusions = d.exclusions;
    f.notes = d.notes;
    f.warnings = d.warnings;
    f.exposure = spec.exposure;
    f.n_clusters = d.n_clusters;
    for (const auto& t : d.terms) f.terms.emplace_back(t.label, t.columns);
    return f;
}

FitResult fit_design(const Design& d, const ModelSpec& spec, const FitOptions& options) {
    if (spec.multilevel.active()) return detail::fit_mixed_design(d, spec);
    const unsigned threads = detail::resolve_threads(spec.threads);
    FitResult f = detail::start_result(d, spec);
    LeastSquaresOptions lso;
    lso.threads = threads;
    lso.extended_budget = options.extended_budget;
    const Solution s = solve(d, spec, options, lso, f);
    covariance(d, spec, s, threads, f);
    coefficient_table(d, s, lso, f);
    fit_statistics(d, spec, s.ls.kept, options, lso, f);
    if (spec.family == Family::Poisson) f.overdispersion = detail::overdispersion(d, f);
    if (options.compare_without_products) f.comparison = nested_comparison(d, options, lso, s.ls, f);
    for (const auto& set : spec.wald_tests) f.wald_tests.push_back(wald_test(f, set));
    add_warnings(d, spec, s, f);
    return f;
}

FitResult fit_model(const Table& table, const ModelSpec& spec, const FitOptions& options) {
    const Design d = build_design(table, spec);
    return fit_design(d, spec, options);
}

}  // namespace moderato
