#include "moderato/probing/binned_effects.hpp"

#include <algorithm>
#include <cmath>

#include "moderato/estimation/bootstrap.hpp"  // quantile_type7
#include "moderato/probing/probe.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "probing/linearity_inputs.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::quoted;

namespace {

const std::string kWhat = "the binned estimates";

std::string bin_label(std::size_t j) { return "[bin " + std::to_string(j + 1) + "]"; }

// The inner cuts at the j/K quantiles, or empty if a bin would hold fewer
// than two distinct values (tied values: two cuts on one value, no value
// between two cuts, or a bin of one repeated value has no slope in Z).
std::vector<double> quantile_cuts(const std::vector<double>& sorted, int k) {
    std::vector<double> cuts;
    for (int j = 1; j < k; ++j) cuts.push_back(quantile_type7(sorted, static_cast<double>(j) / k));
    std::size_t first = 0;  // the bin's first row in sorted order
    for (std::size_t j = 0; j <= cuts.size(); ++j) {
        const auto end = j < cuts.size() ? std::upper_bound(sorted.begin(), sorted.end(), cuts[j]) : sorted.end();
        const auto last = static_cast<std::size_t>(end - sorted.begin());
        if (last <= first || !(sorted[last - 1] > sorted[first])) return {};
        first = last;
    }
    return cuts;
}

std::vector<double> checked_cuts(const std::vector<double>& sorted, int k, const std::string& moderator) {
    if (k < 2) throw InputError("the number of bins must be at least 2, got " + std::to_string(k));
    if (static_cast<std::size_t>(k) > sorted.size())
        throw InputError("the number of bins (" + std::to_string(k) + ") is larger than the number of rows (" +
                         std::to_string(sorted.size()) + ")");
    auto cuts = quantile_cuts(sorted, k);
    if (!cuts.empty()) return cuts;
    int most = k - 1;
    while (most >= 2 && quantile_cuts(sorted, most).empty()) --most;
    throw InputError(
        "the moderator " + quoted(moderator) + " cannot be cut into " + std::to_string(k) +
        " bins at its quantiles with at least two distinct values in each (it has many tied values)" +
        (most >= 2 ? "; at most " + std::to_string(most) + " bins are possible" : "; not even 2 bins are possible"));
}

std::size_t bin_of(double z, const std::vector<double>& cuts) {
    return static_cast<std::size_t>(std::lower_bound(cuts.begin(), cuts.end(), z) - cuts.begin());
}

void describe_bins(const detail::LinearityInputs& in, const std::vector<double>& cuts,
                   const std::vector<std::size_t>& bin, std::vector<EffectBin>& out) {
    std::vector<std::vector<double>> values(cuts.size() + 1);
    out.assign(cuts.size() + 1, EffectBin{});
    for (Eigen::Index i = 0; i < in.moderator.size(); ++i) {
        auto& b = out[bin[static_cast<std::size_t>(i)]];
        values[bin[static_cast<std::size_t>(i)]].push_back(in.moderator[i]);
        ++b.rows;
        if (in.binary_focal) ++(in.focal[i] == 1.0 ? b.rows_one : b.rows_zero);
    }
    for (std::size_t j = 0; j < out.size(); ++j) {
        std::sort(values[j].begin(), values[j].end());
        auto& b = out[j];
        b.moderator_value = quantile_type7(values[j], 0.5);
        b.min = values[j].front();
        b.max = values[j].back();
        b.lower = j == 0 ? b.min : cuts[j - 1];
        b.upper = j < cuts.size() ? cuts[j] : b.max;
        const std::size_t need = 4 * ThinRule::rows_per_coefficient;
        const std::size_t group_need = 2 * ThinRule::rows_per_coefficient;
        b.thin = b.rows < need || (in.binary_focal && std::min(b.rows_zero, b.rows_one) < group_need);
    }
}

// The binning regression: per bin G, G·D, G·(Z − m), G·D·(Z − m); controls.
Design binning_design(const Design& d, const detail::LinearityInputs& in, const std::vector<std::size_t>& bin,
                      const std::vector<EffectBin>& bins, const std::string& focal, const std::string& moderator) {
    const auto n = in.focal.size();
    const auto K = static_cast<Eigen::Index>(bins.size());
    const auto c = static_cast<Eigen::Index>(in.controls.size());
    Eigen::MatrixXd X = Eigen::MatrixXd::Zero(n, 4 * K + c);
    std::vector<std::string> labels;
    for (std::size_t j = 0; j < bins.size(); ++j)
        for (const std::string& s : {std::string(), "×" + focal, "×(" + moderator + " − median)",
                                     "×" + focal + "×(" + moderator + " − median)"})
            labels.push_back(bin_label(j) + s);
    for (Eigen::Index i = 0; i < n; ++i) {
        const auto j = static_cast<Eigen::Index>(bin[static_cast<std::size_t>(i)]);
        const double u = in.moderator[i] - bins[static_cast<std::size_t>(j)].moderator_value;
        X(i, 4 * j) = 1;
        X(i, 4 * j + 1) = in.focal[i];
        X(i, 4 * j + 2) = u;
        X(i, 4 * j + 3) = in.focal[i] * u;
    }
    for (Eigen::Index k = 0; k < c; ++k) {
        X.col(4 * K + k) = d.X.col(in.controls[static_cast<std::size_t>(k)]);
        labels.push_back(d.columns[static_cast<std::size_t>(in.controls[static_cast<std::size_t>(k)])].label);
    }
    return detail::derived_design(d, std::move(X), labels, false);
}

// The straight-line model plus, for bins 2..K, G, G·D, G·Z and G·D·Z; returns
// the labels of the added columns.
Design linearity_design(const Design& d, const detail::LinearityInputs& in, const std::vector<std::size_t>& bin,
                        std::size_t k, const std::string& focal, const std::string& moderator,
                        std::vector<std::string>& tested) {
    const auto n = in.focal.size();
    const auto c = static_cast<Eigen::Index>(in.controls.size());
    const auto extra = static_cast<Eigen::Index>(4 * (k - 1));
    Eigen::MatrixXd X(n, 4 + c + extra);
    std::vector<std::string> labels{"intercept", focal, moderator, focal + "×" + moderator};
    X.col(0).setOnes();
    X.col(1) = in.focal;
    X.col(2) = in.moderator;
    X.col(3) = in.focal.cwiseProduct(in.moderator);
    for (Eigen::Index q = 0; q < c; ++q) {
        X.col(4 + q) = d.X.col(in.controls[static_cast<std::size_t>(q)]);
        labels.push_back(d.columns[static_cast<std::size_t>(in.controls[static_cast<std::size_t>(q)])].label);
    }
    for (std::size_t j = 1; j < k; ++j) {
        const Eigen::Index at = 4 + c + static_cast<Eigen::Index>(4 * (j - 1));
        for (Eigen::Index i = 0; i < n; ++i) {
            const double g = bin[static_cast<std::size_t>(i)] == j ? 1.0 : 0.0;
            X(i, at) = g;
            X(i, at + 1) = g * in.focal[i];
            X(i, at + 2) = g * in.moderator[i];
            X(i, at + 3) = g * in.focal[i] * in.moderator[i];
        }
        for (const std::string& s : {std::string(), "×" + focal, "×" + moderator, "×" + focal + "×" + moderator})
            tested.push_back(bin_label(j) + s);
    }
    labels.insert(labels.end(), tested.begin(), tested.end());
    return detail::derived_design(d, std::move(X), labels, true);
}

FitOptions derived_fit_options() {
    FitOptions o;
    o.compare_without_products = false;
    return o;
}

std::string bin_text(const EffectBin& b, std::size_t j, const std::string& moderator) {
    return "bin " + std::to_string(j + 1) + " of " + quoted(moderator) + " (" +
           (b.min == b.max ? "every value " + format_sig(b.min) : format_range(b.min, b.max)) + ", " +
           format_count(static_cast<long long>(b.rows)) + " rows)";
}

// Before the fit: a 0/1 focal predictor needs both values in every bin.
void check_groups(const BinnedEffects& r) {
    if (!r.binary_focal) return;
    for (std::size_t j = 0; j < r.bins.size(); ++j)
        if (r.bins[j].rows_zero == 0 || r.bins[j].rows_one == 0)
            throw InputError(bin_text(r.bins[j], j, r.moderator) + " has no rows with " + r.focal + " = " +
                             (r.bins[j].rows_zero == 0 ? "0" : "1") + ", so the effect of " + quoted(r.focal) +
                             " there cannot be estimated; use fewer bins");
}

void check_estimable(const FitResult& f, const std::vector<EffectBin>& bins, const std::string& moderator) {
    for (std::size_t j = 0; j < bins.size(); ++j)
        for (Eigen::Index q = 0; q < 4; ++q)
            if (std::isnan(f.beta[static_cast<Eigen::Index>(4 * j) + q]))
                throw InputError(bin_text(bins[j], j, moderator) +
                                 ": its effect cannot be estimated (too few rows, or the focal predictor or the "
                                 "moderator barely varies in it); use fewer bins");
}

void add_cautions(BinnedEffects& r, const FitResult& binned) {
    std::vector<std::string> thin;
    for (std::size_t j = 0; j < r.bins.size(); ++j)
        if (r.bins[j].thin) thin.push_back(std::to_string(j + 1));
    if (!thin.empty())
        r.cautions.push_back(std::string(thin.size() == 1 ? "Bin " : "Bins ") + detail::join_and(thin) +
                             " rest on few rows (the rule: at least 10 rows per estimated coefficient, 40 a bin" +
                             (r.binary_focal ? " and 20 in each group of " + quoted(r.focal) : std::string()) +
                             "); their estimates are imprecise and the test has little power there");
    if (r.linear_contradicted)
        r.cautions.push_back(
            "The conditional effects, the region of significance and the bands assume that the "
            "effect of " +
            r.focal + " changes along a straight line in " + r.moderator +
            "; the binned estimates say it does not, so read those with the binned estimates");
    else
        r.cautions.push_back(
            "A test that does not reject is not proof of a straight-line effect: with few rows per bin it has "
            "little power, and bins average the effect over their range");
    if (r.linearity.covariance == SeKind::Cluster && binned.n_clusters < 50)
        r.cautions.push_back("With " + std::to_string(binned.n_clusters) + " clusters the cluster-robust test of " +
                             format_df(r.linearity.df1) +
                             " terms at once can reject a straight line too often (fewer than about 50 clusters: "
                             "Cameron & Miller 2015); read a p-value near the threshold with care");
    if (binned.separation)
        r.cautions.push_back("The binned logistic fit shows separation; some bins' estimates are unreliable");
    if (r.family == Family::Logistic) r.notes.push_back("Binned effects are on the model (log-odds) scale");
}

}  // namespace

BinnedEffects binned_effects(const Design& d, const FitResult& fit, const ModelSpec& spec, const std::string& focal,
                             const std::string& moderator, int k) {
    const auto in = detail::linearity_inputs(d, fit, focal, moderator, kWhat);
    std::vector<double> sorted(in.moderator.data(), in.moderator.data() + in.moderator.size());
    std::sort(sorted.begin(), sorted.end());
    BinnedEffects r;
    r.focal = focal;
    r.moderator = moderator;
    r.family = fit.family;
    r.binary_focal = in.binary_focal;
    r.level = fit.level;
    const std::size_t columns = 4 * static_cast<std::size_t>(std::max(k, 0)) + in.controls.size() + 4;
    if (d.n() * columns > DesignLimits::max_cells)
        throw InputError(std::to_string(k) + " bins on " + format_count(static_cast<long long>(d.n())) + " rows need " +
                         format_count(static_cast<long long>(columns)) +
                         " design columns, more than Moderato holds in memory (" +
                         format_count(static_cast<long long>(DesignLimits::max_cells)) + " cells); use fewer bins");
    r.cuts = checked_cuts(sorted, k, moderator);
    std::vector<std::size_t> bin(static_cast<std::size_t>(in.moderator.size()));
    for (Eigen::Index i = 0; i < in.moderator.size(); ++i)
        bin[static_cast<std::size_t>(i)] = bin_of(in.moderator[i], r.cuts);
    describe_bins(in, r.cuts, bin, r.bins);
    check_groups(r);

    const ModelSpec s = detail::derived_spec(spec);
    const FitResult bf = fit_design(binning_design(d, in, bin, r.bins, focal, moderator), s, derived_fit_options());
    check_estimable(bf, r.bins, moderator);
    const EffectFunction line = effect_function(d, fit, focal, moderator, typical_values(d));
    for (std::size_t j = 0; j < r.bins.size(); ++j) {
        const auto c = static_cast<Eigen::Index>(4 * j + 1);
        static_cast<Inference&>(r.bins[j]) = infer(bf.beta[c], std::sqrt(bf.covariance(c, c)), bf);
        const double m = r.bins[j].moderator_value;
        r.bins[j].linear = infer(line.effect(m), std::sqrt(line.variance(m)), fit);
    }

    std::vector<std::string> tested;
    const FitResult lf =
        fit_design(linearity_design(d, in, bin, r.bins.size(), focal, moderator, tested), s, derived_fit_options());
    const WaldTest w = wald_test(lf, tested);
    r.linearity = {w.statistic, w.df1, w.df2, w.chi_square, w.p_value, w.covariance};
    r.linear_contradicted = w.p_value < 1.0 - fit.level;
    r.notes.push_back(std::to_string(r.bins.size()) + " bins of " + moderator +
                      " at its quantiles; each bin's effect at the bin's median");
    add_cautions(r, bf);
    return r;
}

std::string linearity_sentence(const BinnedEffects& b) {
    const std::string test = std::isinf(b.linearity.df2)
                                 ? "χ²(" + format_df(b.linearity.df1) + ") = " + format_sig(b.linearity.chi_square)
                                 : "F(" + format_df(b.linearity.df1) + ", " + format_df(b.linearity.df2) +
                                       ") = " + format_sig(b.linearity.statistic);
    const std::string what = "the straight-line effect of " + b.focal + " across " + b.moderator;
    return (b.linear_contradicted ? "The binned estimates contradict " + what
                                  : "The binned estimates do not contradict " + what) +
           " (" + test + ", " + p_clause(b.linearity.p_value) + ")";
}

}  // namespace moderato
