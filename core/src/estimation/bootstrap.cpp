#include "moderato/estimation/bootstrap.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <random>
#include <stdexcept>

#include "estimation/resampling.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/parallel.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::join;
using detail::quoted;
using detail::replicate_seed;
using detail::uniform_below;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr int kMinReplicates = 100;
constexpr int kMaxJackknifeGroups = 200;
constexpr int kMinClusters = 5;

// ---- replicate designs -----------------------------------------------------

struct Subset {
    std::vector<Eigen::Index> rows;  // rows of the original design, in order
    std::vector<int> cluster;        // new cluster id per row (cluster resampling/jackknife), or empty
    std::vector<std::string> cluster_names;
};

// Replicate fits skip the nested comparison and solve in double precision:
// the resampling noise dwarfs the last digits the long double path keeps, and
// the double path is several times faster at bootstrap sizes.
FitOptions replicate_fit_options() {
    FitOptions o;
    o.compare_without_products = false;
    o.extended_budget = 0;
    return o;
}

class Resampler {
public:
    Resampler(const Design& d, const ModelSpec& spec, const BootstrapStatistic& statistic, Eigen::Index m)
        : d_(d), spec_(spec), statistic_(statistic), m_(m) {
        spec_.threads = 1;  // replicates run in parallel; each fit on one thread
        spec_.wald_tests.clear();
        for (const auto& [name, s] : d.summaries) summary_columns_.emplace_back(name, d.main_column(name));
        if (!d.cluster.empty()) {
            members_.assign(static_cast<std::size_t>(d.n_clusters), {});
            for (std::size_t i = 0; i < d.cluster.size(); ++i)
                members_[static_cast<std::size_t>(d.cluster[i])].push_back(static_cast<Eigen::Index>(i));
        }
    }

    bool clustered() const { return !d_.cluster.empty(); }
    const std::vector<std::vector<Eigen::Index>>& members() const { return members_; }

    // The resample of replicate r.
    Subset draw(std::uint64_t seed, std::uint64_t r) const {
        std::mt19937_64 gen(replicate_seed(seed, r));
        Subset s;
        if (!clustered()) {
            const auto n = static_cast<std::uint64_t>(d_.n());
            s.rows.resize(static_cast<std::size_t>(n));
            for (auto& i : s.rows) i = static_cast<Eigen::Index>(uniform_below(gen, n));
            return s;
        }
        const auto G = static_cast<std::uint64_t>(d_.n_clusters);
        std::vector<int> times(static_cast<std::size_t>(G), 0);
        for (std::uint64_t k = 0; k < G; ++k) {
            const auto g = static_cast<std::size_t>(uniform_below(gen, G));
            for (Eigen::Index i : members_[g]) {
                s.rows.push_back(i);
                s.cluster.push_back(static_cast<int>(k));
            }
            const int t = ++times[g];
            s.cluster_names.push_back(t == 1 ? d_.cluster_names[g] : d_.cluster_names[g] + "#" + std::to_string(t));
        }
        return s;
    }

    Design build(const Subset& s, const std::string& note) const {
        const Design& d = d_;
        const auto n = static_cast<Eigen::Index>(s.rows.size());
        const Eigen::Index p = d.X.cols();
        Design r;
        r.X.resize(n, p);
        for (Eigen::Index j = 0; j < p; ++j)
            for (Eigen::Index i = 0; i < n; ++i) r.X(i, j) = d.X(s.rows[static_cast<std::size_t>(i)], j);
        r.y.resize(n);
        for (Eigen::Index i = 0; i < n; ++i) r.y[i] = d.y[s.rows[static_cast<std::size_t>(i)]];
        if (d.weights.size()) {
            r.weights.resize(n);
            for (Eigen::Index i = 0; i < n; ++i) r.weights[i] = d.weights[s.rows[static_cast<std::size_t>(i)]];
        }
        if (d.offset.size()) {
            r.offset.resize(n);
            for (Eigen::Index i = 0; i < n; ++i) r.offset[i] = d.offset[s.rows[static_cast<std::size_t>(i)]];
        }
        r.cluster = s.cluster;
        r.n_clusters = static_cast<int>(s.cluster_names.size());
        r.cluster_names = s.cluster_names;
        r.intercept = d.intercept;
        r.columns = d.columns;
        r.terms = d.terms;
        r.categoricals = d.categoricals;
        r.rows.resize(s.rows.size());
        for (std::size_t i = 0; i < s.rows.size(); ++i) r.rows[i] = d.rows[static_cast<std::size_t>(s.rows[i])];
        r.n_excluded = d.n_excluded;
        r.exclusions = d.exclusions;
        r.notes = d.notes;
        r.notes.push_back(note);
        r.outcome = d.outcome;
        for (const auto& [name, j] : summary_columns_) {
            if (j < 0 || n == 0) {
                r.summaries[name] = d.summaries.at(name);
                continue;
            }
            const auto col = r.X.col(j);
            r.summaries[name] = numeric_summary(std::vector<double>(col.begin(), col.end()));
        }
        return r;
    }

    // Fits a replicate design and evaluates the statistic. `reason` is empty
    // on success; `values` holds m numbers (NaN when the fit failed).
    struct Outcome {
        std::string reason;
        Eigen::VectorXd values;
    };

    Outcome evaluate(const Design& r) const {
        Outcome o;
        o.values = Eigen::VectorXd::Constant(m_, kNaN);
        if (std::string why = design_problem(r); !why.empty()) {
            o.reason = why;
            return o;
        }
        FitResult fit;
        try {
            fit = fit_design(r, spec_, replicate_fit_options());
        } catch (const InputError& e) {
            o.reason = std::string("the model could not be fitted: ") + e.what();
            return o;
        }
        if (std::string why = fit_problem(fit); !why.empty()) {
            o.reason = why;
            return o;
        }
        Eigen::VectorXd v;
        try {
            v = statistic_(r, fit);
        } catch (const InputError& e) {
            o.reason = std::string("statistic could not be computed: ") + e.what();
            return o;
        }
        if (v.size() != m_)
            throw std::logic_error("the bootstrap statistic returned " + std::to_string(v.size()) +
                                   " values in a replicate but " + std::to_string(m_) +
                                   " on the full sample; it must always return the same number (NaN for undefined)");
        o.values = v;
        if (!v.allFinite()) o.reason = "statistic undefined (NaN or infinite)";
        return o;
    }

    FitResult fit_full(unsigned threads) const {
        ModelSpec s = spec_;
        s.threads = threads;
        FitOptions o;  // the estimate itself keeps the full-precision path
        o.compare_without_products = false;
        return fit_design(d_, s, o);
    }

    // Why the fit cannot be used, or empty.
    std::string fit_problem(const FitResult& f) const {
        if (!f.aliased.empty()) return "rank deficient (aliased terms)";
        if (generalized(spec_.family)) {
            if (f.separation) return std::string("separation in the ") + to_string(spec_.family) + " fit";
            if (!f.converged) return std::string(to_string(spec_.family)) + " fit did not converge";
        }
        return {};
    }

private:
    // Problems the design checks of build_design would catch, seen in a
    // resample: a constant predictor column, a one-valued logistic outcome.
    std::string design_problem(const Design& r) const {
        const Eigen::Index n = r.X.rows();
        if (n == 0) return "empty resample";
        for (Eigen::Index j = 0; j < r.X.cols(); ++j) {
            const auto& c = r.columns[static_cast<std::size_t>(j)];
            if (c.atoms.empty()) continue;  // intercept
            const auto col = r.X.col(j);
            const bool constant = (col.array() == col[0]).all();
            if (constant && (r.intercept || col[0] == 0.0))
                return "constant column in the resample (" + quoted(c.label) + ")";
        }
        if (generalized(spec_.family) && (r.y.array() == r.y[0]).all())
            return "outcome takes one value in the resample";
        return {};
    }

    const Design& d_;
    ModelSpec spec_;
    const BootstrapStatistic& statistic_;
    Eigen::Index m_;
    std::vector<std::pair<std::string, int>> summary_columns_;
    std::vector<std::vector<Eigen::Index>> members_;
};

// Runs fn(i) for i in [0, count) in waves, reporting progress after each.
template <class Fn>
void in_waves(int count, unsigned threads, int& done, int total, const BootstrapOptions& options, Fn&& fn) {
    // Large waves keep both cores busy (the join at the end of a wave idles one
    // core for up to a fit); progress still comes every few dozen fits.
    const int wave = std::max(64, 32 * static_cast<int>(threads));
    for (int start = 0; start < count; start += wave) {
        const int len = std::min(wave, count - start);
        detail::parallel_for(static_cast<std::size_t>(len), threads,
                             [&](std::size_t i) { fn(start + static_cast<int>(i)); });
        done += len;
        if (options.progress && !options.progress(done, total)) throw Cancelled{};
    }
}

}  // namespace

std::string resampling_text(const BootstrapResult& r) {
    return r.resampling == Resampling::Clusters ? "clusters (G = " + std::to_string(r.units) + ")" : "cases";
}

std::string jackknife_text(const BootstrapResult& r) {
    const bool clustered = r.resampling == Resampling::Clusters;
    const std::string unit = clustered ? "cluster" : "row";
    const int J = r.jackknife_groups;
    return J == r.units
               ? "leave one " + unit + " out (" + (clustered ? "G" : "n") + " = " + std::to_string(r.units) + ")"
               : "grouped: " + std::to_string(J) + " groups (" + unit + " i in group i mod " + std::to_string(J) + ")";
}

double quantile_type7(const std::vector<double>& sorted, double p) {
    if (sorted.empty() || std::isnan(p)) return kNaN;
    const double h = std::clamp(p, 0.0, 1.0) * static_cast<double>(sorted.size() - 1);
    const auto lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, sorted.size() - 1);
    return sorted[lo] + (h - static_cast<double>(lo)) * (sorted[hi] - sorted[lo]);
}

double jackknife_acceleration(const std::vector<double>& jackknife_values) {
    std::vector<double> v;
    for (double x : jackknife_values)
        if (std::isfinite(x)) v.push_back(x);
    if (v.size() < 2) return kNaN;
    long double mean = 0;
    for (double x : v) mean += x;
    mean /= static_cast<long double>(v.size());
    long double s2 = 0, s3 = 0;
    for (double x : v) {
        const long double u = mean - x;
        s2 += u * u;
        s3 += u * u * u;
    }
    if (s2 == 0) return 0.0;
    return static_cast<double>(s3 / (6.0L * std::pow(s2, 1.5L)));
}

BootstrapInterval bootstrap_interval(const std::vector<double>& values, double estimate, double acceleration,
                                     double level) {
    BootstrapInterval out;
    out.estimate = estimate;
    out.acceleration = acceleration;
    std::vector<double> v;
    for (double x : values)
        if (std::isfinite(x)) v.push_back(x);
    out.valid_replicates = static_cast<int>(v.size());
    if (v.size() < 2 || !(level > 0 && level < 1)) return out;
    std::sort(v.begin(), v.end());
    const double B = static_cast<double>(v.size());
    long double mean = 0;
    for (double x : v) mean += x;
    mean /= static_cast<long double>(v.size());
    long double ss = 0;
    for (double x : v) ss += (x - mean) * (x - mean);
    out.std_error = std::sqrt(static_cast<double>(ss / static_cast<long double>(v.size() - 1)));

    const double tail = (1.0 - level) / 2.0;
    out.percentile_lower = quantile_type7(v, tail);
    out.percentile_upper = quantile_type7(v, 1.0 - tail);

    if (!std::isfinite(estimate)) return out;
    const auto below = static_cast<double>(std::lower_bound(v.begin(), v.end(), estimate) - v.begin());
    const auto ties = static_cast<double>(std::upper_bound(v.begin(), v.end(), estimate) - v.begin()) - below;
    const double share = (below + 0.5 * ties) / B;
    out.bias_correction_z0 = share <= 0   ? -std::numeric_limits<double>::infinity()
                             : share >= 1 ? std::numeric_limits<double>::infinity()
                                          : dist::normal_quantile(share);
    const double z0 = out.bias_correction_z0;
    if (!std::isfinite(z0) || !std::isfinite(acceleration)) return out;
    auto adjusted = [&](double q) {
        const double z = dist::normal_quantile(q);
        const double denom = 1.0 - acceleration * (z0 + z);
        if (!(denom > 0)) return kNaN;
        return dist::normal_cdf(z0 + (z0 + z) / denom);
    };
    const double a1 = adjusted(tail), a2 = adjusted(1.0 - tail);
    if (std::isnan(a1) || std::isnan(a2)) return out;
    out.bca_lower_level = a1;
    out.bca_upper_level = a2;
    out.bca_lower = quantile_type7(v, a1);
    out.bca_upper = quantile_type7(v, a2);
    return out;
}

namespace {

void check_request(const Design& d, const ModelSpec& spec, const BootstrapStatistic& statistic,
                   const BootstrapOptions& options) {
    if (!statistic) throw std::invalid_argument("bootstrap: no statistic given");
    if (spec.multilevel.active() || !d.group.empty())
        throw InputError("the bootstrap is not offered for multilevel models (groups " +
                         quoted(spec.multilevel.groups) +
                         "): resampling rows would break up the groups; the model's own intervals, with their "
                         "Satterthwaite or between–within degrees of freedom, take the groups into account");
    if (options.replicates < kMinReplicates)
        throw InputError("the bootstrap needs at least " + std::to_string(kMinReplicates) + " replicates, got " +
                         std::to_string(options.replicates) +
                         "; ask for 1000 or more for percentile intervals and 2000 or more for BCa intervals");
    if (!(options.level > 0 && options.level < 1))
        throw InputError("bootstrap confidence level " + exact_text(options.level) +
                         " is not between 0 and 1 (e.g. 0.95)");
    const auto n = static_cast<long long>(d.n());
    const auto p = static_cast<long long>(d.p());
    if (n < 10 || n < 2 * p)
        throw InputError("too few rows for the bootstrap: n = " + std::to_string(n) +
                         " rows for p = " + std::to_string(p) +
                         " coefficients; resampling needs at least 10 rows and at least twice as many rows as "
                         "coefficients (here " +
                         std::to_string(std::max<long long>(10, 2 * p)) + ") — add rows or drop terms");
    if (!d.cluster.empty() && d.n_clusters < kMinClusters)
        throw InputError("cluster resampling needs at least " + std::to_string(kMinClusters) + " clusters, but " +
                         (spec.cluster.empty() ? std::string("the cluster column") : quoted(spec.cluster)) +
                         " has G = " + std::to_string(d.n_clusters) +
                         " among the used rows; use a cluster column with more clusters, or remove the cluster "
                         "column to resample rows");
}

// The full-sample fit behind the estimate, refused when every replicate
// would fail the same way.
FitResult full_sample_fit(const Design& d, const ModelSpec& spec, const BootstrapStatistic& statistic,
                          unsigned threads) {
    Resampler probe_only(d, spec, statistic, 0);
    FitResult full = probe_only.fit_full(threads);
    if (!full.aliased.empty())
        throw InputError("the model has aliased terms (" + join(full.aliased, ", ") +
                         ") on the full sample, so every bootstrap replicate would fail; drop those terms first");
    if (const std::string why = probe_only.fit_problem(full); !why.empty()) {
        std::string detail = full.warnings.empty() ? why : join(full.warnings, "; ");
        throw InputError("the full-sample fit cannot be bootstrapped: " + detail +
                         "; fix the model (e.g. drop or merge the separating terms) first");
    }
    return full;
}

// The design rows left in jackknife group g of J: every row (or every
// cluster's rows, clusters renumbered) except those of group g, in the
// original row order.
Subset jackknife_subset(const Design& d, const Resampler& rs, int J, int g) {
    Subset s;
    if (d.cluster.empty()) {
        for (Eigen::Index i = 0; i < static_cast<Eigen::Index>(d.n()); ++i)
            if (i % J != g) s.rows.push_back(i);
        return s;
    }
    int next = 0;
    for (int c = 0; c < d.n_clusters; ++c) {
        if (c % J == g) continue;
        for (Eigen::Index i : rs.members()[static_cast<std::size_t>(c)]) {
            s.rows.push_back(i);
            s.cluster.push_back(next);
        }
        s.cluster_names.push_back(d.cluster_names[static_cast<std::size_t>(c)]);
        ++next;
    }
    // keep the original row order within the design
    std::vector<std::size_t> order(s.rows.size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::sort(order.begin(), order.end(), [&](auto a, auto b) { return s.rows[a] < s.rows[b]; });
    Subset sorted;
    sorted.cluster_names = s.cluster_names;
    for (auto i : order) {
        sorted.rows.push_back(s.rows[i]);
        sorted.cluster.push_back(s.cluster[i]);
    }
    return sorted;
}

// Failures by reason, in order of first occurrence, and the warnings about
// failed replicates and jackknife fits.
void tally_failures(const std::vector<std::string>& reasons, const std::vector<std::string>& jack_reasons,
                    BootstrapResult& res) {
    const int R = static_cast<int>(reasons.size()), J = static_cast<int>(jack_reasons.size());
    std::map<std::string, std::size_t> slot;
    for (const auto& why : reasons) {
        if (why.empty()) {
            ++res.completed;
            continue;
        }
        auto [it, fresh] = slot.emplace(why, res.failures.size());
        if (fresh) res.failures.emplace_back(why, 0);
        ++res.failures[it->second].second;
    }
    if (res.completed * 2 < R)
        res.warnings.push_back("only " + std::to_string(res.completed) + " of " + std::to_string(R) +
                               " bootstrap replicates succeeded; the intervals rest on those and may be unreliable — "
                               "see the failure reasons (rare categories, separation, or too few rows per term)");
    int jack_failed = 0;
    std::string first_jack_reason;
    for (const auto& why : jack_reasons)
        if (!why.empty() && why != "statistic undefined (NaN or infinite)") {
            if (jack_failed++ == 0) first_jack_reason = why;
        }
    if (jack_failed > 0)
        res.warnings.push_back(std::to_string(jack_failed) + " of " + std::to_string(J) +
                               " jackknife fits failed (first: " + first_jack_reason +
                               "); the BCa acceleration uses the others");
}

// The warning an interval needs, if any ("which": the statistic or one of its values).
void warn_about_interval(const BootstrapInterval& iv, double estimate, double a, const std::string& which,
                         BootstrapResult& res) {
    if (iv.valid_replicates < 2) {
        res.warnings.push_back(which + " is defined in " + std::to_string(iv.valid_replicates) +
                               " replicates only; no interval is given");
    } else if (!std::isfinite(estimate)) {
        res.warnings.push_back(which + " is undefined on the full sample; BCa intervals are not given");
    } else if (std::isnan(iv.bca_lower) || std::isnan(iv.bca_upper)) {
        res.warnings.push_back(
            which + ": BCa interval undefined (" +
            (std::isfinite(iv.bias_correction_z0)
                 ? std::string(std::isnan(a) ? "no usable jackknife values" : "acceleration too large for the level")
                 : std::string("the estimate lies outside all replicates")) +
            "); use the percentile interval");
    } else {
        // Type 7 interpolates between the two most extreme replicates:
        // the endpoint rests on one or two replicates.
        const double last = static_cast<double>(iv.valid_replicates - 1);
        if (iv.bca_lower_level * last < 1.0 || iv.bca_upper_level * last > last - 1.0)
            res.warnings.push_back(
                which + ": a BCa endpoint lies among the most extreme replicates; increase the number of replicates");
    }
}

// Percentile and BCa intervals of every value of the statistic.
void intervals(const Eigen::VectorXd& estimate, const Eigen::MatrixXd& jack, double level, BootstrapResult& res) {
    const Eigen::Index m = estimate.size();
    const int R = static_cast<int>(res.replicates.rows()), J = static_cast<int>(jack.rows());
    for (Eigen::Index k = 0; k < m; ++k) {
        std::vector<double> values(static_cast<std::size_t>(R));
        for (int r = 0; r < R; ++r) values[static_cast<std::size_t>(r)] = res.replicates(r, k);
        std::vector<double> jv(static_cast<std::size_t>(J));
        for (int g = 0; g < J; ++g) jv[static_cast<std::size_t>(g)] = jack(g, k);
        const double a = jackknife_acceleration(jv);
        BootstrapInterval iv = bootstrap_interval(values, estimate[k], a, level);
        const std::string which = m == 1 ? "the statistic" : "value " + std::to_string(k + 1) + " of the statistic";
        warn_about_interval(iv, estimate[k], a, which, res);
        res.intervals.push_back(iv);
    }
}

}  // namespace

BootstrapResult bootstrap(const Design& d, const ModelSpec& spec, const BootstrapStatistic& statistic,
                          const BootstrapOptions& options) {
    check_request(d, spec, statistic, options);
    const bool clustered = !d.cluster.empty();
    const unsigned threads = detail::resolve_threads(options.threads);

    // The full sample: the estimate, and the checks that make every replicate fail.
    const FitResult full = full_sample_fit(d, spec, statistic, threads);
    const Eigen::VectorXd estimate = statistic(d, full);
    const Eigen::Index m = estimate.size();
    if (m == 0) throw std::invalid_argument("bootstrap: the statistic returned no values");

    Resampler rs(d, spec, statistic, m);
    BootstrapResult res;
    res.requested = options.replicates;
    res.level = options.level;
    res.resampling = clustered ? Resampling::Clusters : Resampling::Cases;
    // Jackknife groups: rows (cases) or clusters, at most 200, unit i in group
    // i mod J (a fixed split that does not follow any sorting of the data).
    res.units = clustered ? d.n_clusters : static_cast<int>(d.n());
    const int J = std::min(res.units, kMaxJackknifeGroups);
    res.jackknife_groups = J;

    const int R = options.replicates;
    const int total = R + J;
    int done = 0;

    // 1. Replicates.
    res.replicates = Eigen::MatrixXd::Constant(R, m, kNaN);
    std::vector<std::string> reasons(static_cast<std::size_t>(R));
    const std::string note = "bootstrap replicate (" + resampling_text(res) + ")";
    in_waves(R, threads, done, total, options, [&](int r) {
        const Subset s = rs.draw(options.seed, static_cast<std::uint64_t>(r));
        const Design rd = rs.build(s, note);
        auto o = rs.evaluate(rd);
        res.replicates.row(r) = o.values.transpose();
        reasons[static_cast<std::size_t>(r)] = std::move(o.reason);
    });

    // 2. Jackknife for the acceleration.
    Eigen::MatrixXd jack = Eigen::MatrixXd::Constant(J, m, kNaN);
    std::vector<std::string> jack_reasons(static_cast<std::size_t>(J));
    const std::string jnote = "jackknife design (" + jackknife_text(res) + ")";
    in_waves(J, threads, done, total, options, [&](int g) {
        auto o = rs.evaluate(rs.build(jackknife_subset(d, rs, J, g), jnote));
        jack.row(g) = o.values.transpose();
        jack_reasons[static_cast<std::size_t>(g)] = std::move(o.reason);
    });

    // 3. Failures by reason; 4. intervals.
    tally_failures(reasons, jack_reasons, res);
    intervals(estimate, jack, options.level, res);
    return res;
}

}  // namespace moderato
