#include "estimation/mixed_model.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "estimation/mixed_random_part.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/estimation/mixed_criterion.hpp"
#include "moderato/estimation/mixed_fit.hpp"
#include "moderato/support/error.hpp"
#include "support/text_util.hpp"

namespace moderato {

double MultilevelResult::df_of(const Eigen::VectorXd& c, double fallback) const {
    if (df == FixedEffectDf::Normal) return std::numeric_limits<double>::infinity();
    if (df != FixedEffectDf::Satterthwaite || !satterthwaite) return fallback;
    Eigen::VectorXd kept(static_cast<Eigen::Index>(kept_columns.size()));
    for (std::size_t k = 0; k < kept_columns.size(); ++k) kept[static_cast<Eigen::Index>(k)] = c[kept_columns[k]];
    return satterthwaite->df(kept);
}

namespace detail {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// What one fit of the random part needs and gives.
struct MixedRun {
    std::vector<int> kept;  // estimable fixed-effect columns
    MixedFitOptions options;
    MixedFit fit;
};

MixedFit fit_or_explain(const MixedCrossproducts& data, const MixedFitOptions& options, const std::string& groups) {
    try {
        return fit_mixed(data, options);
    } catch (const std::domain_error& e) {
        std::string why = e.what();
        if (why.rfind("mixed model: ", 0) == 0) why = why.substr(13);
        throw InputError("the multilevel model with groups " + quoted(groups) + " cannot be fitted: " + why);
    }
}

Eigen::MatrixXd kept_columns_of(const Eigen::MatrixXd& X, const std::vector<int>& kept) {
    Eigen::MatrixXd out(X.rows(), static_cast<Eigen::Index>(kept.size()));
    for (std::size_t k = 0; k < kept.size(); ++k) out.col(static_cast<Eigen::Index>(k)) = X.col(kept[k]);
    return out;
}

// Each group's conditional modes u = Psi (I + Z'Z Psi)^-1 Z' r and their
// conditional covariance sigma2 Psi (I + Z'Z Psi)^-1 (Psi = T / sigma2; r:
// the group's residuals from the fixed part), from its cross-products.
std::vector<GroupEffect> group_effects(const MixedCrossproducts& data, const MixedFit& fit, const Design& d) {
    const Eigen::Index q = data.random_columns();
    const Eigen::MatrixXd psi = fit.random_covariance / fit.residual_variance;
    std::vector<GroupEffect> out;
    out.reserve(data.groups());
    for (std::size_t g = 0; g < data.groups(); ++g) {
        const auto& b = data.blocks()[g];
        const Eigen::MatrixXd K = psi * (Eigen::MatrixXd::Identity(q, q) + b.ZtZ * psi).inverse();
        GroupEffect e;
        e.group = d.group_names[g];
        e.rows = static_cast<std::size_t>(std::llround(b.ZtZ(0, 0)));
        e.mode = K * (b.Zty - b.ZtX * fit.beta);
        e.covariance = fit.residual_variance * 0.5 * (K + K.transpose());
        out.push_back(std::move(e));
    }
    return out;
}

// The likelihood-ratio test of each random slope: the model without it.
std::vector<RandomSlopeTest> slope_tests(const Design& d, const Eigen::MatrixXd& Xk, const RandomPart& part,
                                         const MixedRun& run, const std::string& groups) {
    std::vector<RandomSlopeTest> out;
    const Eigen::Index q = part.Z.cols();
    for (Eigen::Index k = 1; k < q; ++k) {
        Eigen::MatrixXd Z(part.Z.rows(), q - 1);
        Z << part.Z.leftCols(k), part.Z.rightCols(q - k - 1);
        const MixedFit without = fit_or_explain(MixedCrossproducts(Xk, Z, d.y, d.group), run.options, groups);
        const Eigen::Index before = run.options.covariance == RandomCovariance::Full ? q - 1 : 0;
        const RandomEffectTest t = added_random_effect_test(without, run.fit, before);
        out.push_back({part.terms[static_cast<std::size_t>(k)], t.statistic, t.p_value, static_cast<int>(t.df_low),
                       static_cast<int>(t.df_high)});
    }
    return out;
}

// The random part's summary: groups, their sizes, T, sigma2, the ICC.
MultilevelResult random_summary(const ModelSpec& spec, const RandomPart& part, const MixedRun& run) {
    MultilevelResult m;
    const auto& ml = spec.multilevel;
    m.groups = ml.groups;
    m.estimation = ml.estimation;
    m.structure = ml.covariance;
    m.df = ml.df;
    m.report_group_effects = ml.group_effects;
    std::vector<std::size_t> sizes = part.group_sizes;
    std::sort(sizes.begin(), sizes.end());
    m.groups_count = sizes.size();
    m.size_min = sizes.front();
    m.size_max = sizes.back();
    const std::size_t h = sizes.size() / 2;
    m.size_median =
        sizes.size() % 2 ? static_cast<double>(sizes[h]) : 0.5 * static_cast<double>(sizes[h - 1] + sizes[h]);
    m.terms = part.terms;
    m.term_columns = part.term_columns;
    m.covariance = run.fit.random_covariance;
    m.residual_variance = run.fit.residual_variance;
    if (m.terms.size() == 1) m.icc = m.covariance(0, 0) / (m.covariance(0, 0) + m.residual_variance);
    m.singular = run.fit.singular;
    m.converged = run.fit.converged;
    m.evaluations = run.fit.evaluations;
    m.kept_columns = run.kept;
    return m;
}

// Each column's df under the chosen rule (NaN for aliased columns). Without
// an interior maximum Satterthwaite's df fall back to between–within.
std::vector<double> column_df(const Design& d, const RandomPart& part, const MixedCrossproducts& data,
                              const Eigen::MatrixXd& Xk, const MixedRun& run, MultilevelResult& m, FitResult& f) {
    std::vector<double> df(d.p(), kNaN);
    const std::size_t k = run.kept.size();
    if (m.df == FixedEffectDf::Normal) {
        for (int j : run.kept) df[static_cast<std::size_t>(j)] = kInf;
        return df;
    }
    if (m.df == FixedEffectDf::Satterthwaite) {
        m.satterthwaite = satterthwaite(data, run.fit, run.options);
        if (m.satterthwaite) {
            for (std::size_t a = 0; a < k; ++a)
                df[static_cast<std::size_t>(run.kept[a])] = m.satterthwaite->df(
                    Eigen::VectorXd::Unit(static_cast<Eigen::Index>(k), static_cast<Eigen::Index>(a)));
            return df;
        }
        f.warnings.push_back(
            "Satterthwaite degrees of freedom need variance estimates inside their range; "
            "between–within degrees of freedom are used instead");
    }
    std::vector<int> position(d.p(), -1);
    for (std::size_t a = 0; a < k; ++a) position[static_cast<std::size_t>(run.kept[a])] = static_cast<int>(a);
    std::vector<std::vector<int>> members;
    for (const auto& list : part.slope_members) {
        members.emplace_back();
        for (int j : list)
            if (position[static_cast<std::size_t>(j)] >= 0)
                members.back().push_back(position[static_cast<std::size_t>(j)]);
    }
    const auto bw = between_within_df(Xk, d.group, d.group_names.size(), members);
    for (std::size_t a = 0; a < k; ++a) df[static_cast<std::size_t>(run.kept[a])] = bw[a];
    return df;
}

// The df probing uses: the smallest among the product columns (else among
// all the non-intercept ones).
double probing_df(const Design& d, const std::vector<double>& df) {
    double out = kInf, any = kInf;
    for (int j : d.product_columns())
        if (!std::isnan(df[static_cast<std::size_t>(j)])) out = std::min(out, df[static_cast<std::size_t>(j)]);
    for (std::size_t j = 0; j < df.size(); ++j)
        if (!(d.intercept && j == 0) && !std::isnan(df[j])) any = std::min(any, df[j]);
    return std::isinf(out) ? any : out;
}

// Estimates, covariance and the coefficient table, each with its own df.
void fixed_effects(const Design& d, const MixedRun& run, const std::vector<double>& df, FitResult& f) {
    const Eigen::Index p = d.X.cols();
    f.beta = Eigen::VectorXd::Constant(p, kNaN);
    f.covariance = Eigen::MatrixXd::Constant(p, p, kNaN);
    for (std::size_t a = 0; a < run.kept.size(); ++a) {
        f.beta[run.kept[a]] = run.fit.beta[static_cast<Eigen::Index>(a)];
        for (std::size_t b = 0; b < run.kept.size(); ++b)
            f.covariance(run.kept[a], run.kept[b]) =
                run.fit.beta_covariance(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b));
    }
    for (Eigen::Index j = 0; j < p; ++j) {
        Coefficient c;
        c.term = d.columns[static_cast<std::size_t>(j)].label;
        c.aliased = std::isnan(f.beta[j]);
        c.df = df[static_cast<std::size_t>(j)];
        static_cast<Inference&>(c) =
            c.aliased ? infer(kNaN, kNaN, f) : infer_with_df(f.beta[j], std::sqrt(f.covariance(j, j)), c.df, f.level);
        c.vif = kNaN;
        f.coefficients.push_back(c);
    }
}

// Conditional fitted values and residuals (the fixed part plus each row's
// group effects); the criterion and information criteria, counting the
// fixed effects and the variance parameters (BIC: log n for ML, log(n - p)
// for REML).
void fit_statistics(const Design& d, const RandomPart& part, const MixedRun& run, const MultilevelResult& m,
                    FitResult& f) {
    const Eigen::Index n = d.X.rows();
    f.fitted.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const auto& e = m.group_effects[d.group[static_cast<std::size_t>(i)]];
        double v = part.Z.row(i).dot(e.mode);
        for (std::size_t a = 0; a < run.kept.size(); ++a)
            v += d.X(i, run.kept[a]) * run.fit.beta[static_cast<Eigen::Index>(a)];
        f.fitted[i] = v;
    }
    f.residuals = d.y - f.fitted;
    const double nd = static_cast<double>(n), pk = static_cast<double>(run.kept.size());
    const double q = static_cast<double>(part.terms.size());
    const double params = pk + (m.structure == RandomCovariance::Full ? q * (q + 1) / 2 : q) + 1;
    f.log_likelihood = run.fit.criterion;
    f.aic = -2 * f.log_likelihood + 2 * params;
    f.bic = -2 * f.log_likelihood + params * std::log(m.estimation == MixedEstimation::Reml ? nd - pk : nd);
    f.residual_sd = std::sqrt(run.fit.residual_variance);
    f.r_squared = f.adj_r_squared = kNaN;
}

// The overall test, the test of the product terms and the requested tests,
// all Wald F tests with the probing df as the denominator's.
void wald_tests(const Design& d, const ModelSpec& spec, FitResult& f) {
    std::vector<std::string> tested, products;
    for (const auto& c : f.coefficients)
        if (!c.aliased && c.term != "intercept") tested.push_back(c.term);
    for (int j : d.product_columns())
        if (!f.coefficients[static_cast<std::size_t>(j)].aliased)
            products.push_back(f.coefficients[static_cast<std::size_t>(j)].term);
    if (!tested.empty()) {
        const WaldTest overall = wald_test(f, tested);
        f.f_statistic = overall.statistic;
        f.f_df1 = overall.df1;
        f.f_df2 = overall.df2;
        f.f_p_value = overall.p_value;
    }
    if (!products.empty()) {
        NestedComparison cmp;
        cmp.dropped_terms = products;
        cmp.r_squared_reduced = cmp.r_squared_change = cmp.f_statistic = cmp.p_value = kNaN;
        cmp.wald = wald_test(f, products);
        f.comparison = cmp;
    }
    for (const auto& set : spec.wald_tests) f.wald_tests.push_back(wald_test(f, set));
}

void mixed_warnings(const Design& d, const ModelSpec& spec, const RandomPart& part, const MultilevelResult& m,
                    FitResult& f) {
    for (const auto& a : f.aliased)
        f.warnings.push_back("aliased: " + quoted(a) +
                             " is a linear combination of other columns and was not estimated");
    for (auto& w : group_warnings(d, spec, part)) f.warnings.push_back(std::move(w));
    if (m.singular)
        f.warnings.push_back(
            "singular fit: a random-effect variance is estimated at zero or a correlation at ±1; "
            "the random part is more than these data support — consider fewer random slopes or a "
            "diagonal covariance");
    if (!m.converged)
        f.warnings.push_back("the variance estimates did not settle within " + std::to_string(m.evaluations) +
                             " evaluations; the results are not reliable");
}

}  // namespace

FitResult fit_mixed_design(const Design& d, const ModelSpec& spec) {
    const RandomPart part = random_part(d, spec);
    FitResult f = start_result(d, spec);
    MixedRun run;
    run.options = {spec.multilevel.estimation, spec.multilevel.covariance};
    const LeastSquaresResult ls = least_squares(d.X, d.y);
    run.kept = ls.kept;
    for (int j : ls.aliased) f.aliased.push_back(d.columns[static_cast<std::size_t>(j)].label);
    const Eigen::MatrixXd Xk = kept_columns_of(d.X, run.kept);
    const MixedCrossproducts data(Xk, part.Z, d.y, d.group);
    run.fit = fit_or_explain(data, run.options, spec.multilevel.groups);
    f.rank = static_cast<int>(run.kept.size());
    f.df_residual = static_cast<double>(d.n()) - f.rank;
    MultilevelResult m = random_summary(spec, part, run);
    m.group_effects = group_effects(data, run.fit, d);
    const std::vector<double> df = column_df(d, part, data, Xk, run, m, f);
    f.df_inference = probing_df(d, df);
    f.critical_value = dist::t_quantile(0.5 + spec.level / 2.0, f.df_inference);
    fixed_effects(d, run, df, f);
    fit_statistics(d, part, run, m, f);
    m.slope_tests = slope_tests(d, Xk, part, run, spec.multilevel.groups);
    mixed_warnings(d, spec, part, m, f);
    f.multilevel = std::move(m);
    wald_tests(d, spec, f);
    return f;
}

}  // namespace detail

}  // namespace moderato
