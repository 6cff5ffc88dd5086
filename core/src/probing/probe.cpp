#include "moderato/probing/probe.hpp"

#include <algorithm>
#include <boost/math/tools/roots.hpp>
#include <cmath>
#include <map>

#include "moderato/estimation/distributions.hpp"
#include "moderato/probing/multilevel_probe.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::quoted;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

double horner(const std::vector<double>& c, double x) {
    double v = 0;
    for (auto it = c.rbegin(); it != c.rend(); ++it) v = v * x + *it;
    return v;
}

// Polynomial in a free variable t, per design column: the column's value (or
// its derivative with respect to `d_column`) with `free` = t and every other
// column held at `values` (categorical columns: level index).
std::vector<double> column_poly(const Design& d, const DesignColumn& col, const std::string& free,
                                const std::string& d_column, const std::map<std::string, double>& values) {
    double c = 1.0;
    int degree = 0;
    bool has_d = d_column.empty();
    for (const auto& a : col.atoms) {
        auto v = values.find(a.column);
        if (!a.level.empty()) {  // indicator of a categorical level
            const double want = d.level_index(a.column, a.level);
            if (v == values.end() || v->second != want) return {};
            continue;
        }
        if (a.column == d_column) {
            has_d = true;
            const double x = v == values.end() ? 0.0 : v->second;
            c *= a.power * (a.power > 1 ? std::pow(x, a.power - 1) : 1.0);
            continue;
        }
        if (a.column == free) {
            degree += a.power;
            continue;
        }
        c *= std::pow(v == values.end() ? 0.0 : v->second, a.power);
    }
    if (!has_d) return {};
    std::vector<double> poly(static_cast<std::size_t>(degree) + 1, 0.0);
    poly[static_cast<std::size_t>(degree)] = c;
    return poly;
}

// g_k vectors over the coefficients for a quantity built column by column.
std::vector<Eigen::VectorXd> linear_form(const Design& d, const std::string& free, const std::string& d_column,
                                         const std::map<std::string, double>& values) {
    const Eigen::Index p = static_cast<Eigen::Index>(d.columns.size());
    std::vector<Eigen::VectorXd> g;
    for (Eigen::Index j = 0; j < p; ++j) {
        const auto poly = column_poly(d, d.columns[static_cast<std::size_t>(j)], free, d_column, values);
        for (std::size_t k = 0; k < poly.size(); ++k) {
            if (poly[k] == 0) continue;
            while (g.size() <= k) g.push_back(Eigen::VectorXd::Zero(p));
            g[k][j] += poly[k];
        }
    }
    if (g.empty()) g.push_back(Eigen::VectorXd::Zero(p));
    return g;
}

std::vector<Eigen::VectorXd> subtract(std::vector<Eigen::VectorXd> a, const std::vector<Eigen::VectorXd>& b) {
    while (a.size() < b.size()) a.push_back(Eigen::VectorXd::Zero(b.front().size()));
    for (std::size_t k = 0; k < b.size(); ++k) a[k] -= b[k];
    while (a.size() > 1 && a.back().isZero(0)) a.pop_back();
    return a;
}

std::vector<Region> regions_from_signs(const std::vector<double>& roots, const std::function<double(double)>& f) {
    // Evaluate f between consecutive roots and beyond the ends.
    std::vector<Region> out;
    std::vector<double> edges{-kInf};
    edges.insert(edges.end(), roots.begin(), roots.end());
    edges.push_back(kInf);
    for (std::size_t i = 0; i + 1 < edges.size(); ++i) {
        const double lo = edges[i], hi = edges[i + 1];
        double mid;
        if (std::isinf(lo) && std::isinf(hi)) mid = 0;
        else if (std::isinf(lo)) mid = hi - 1 - std::abs(hi);
        else if (std::isinf(hi)) mid = lo + 1 + std::abs(lo);
        else mid = 0.5 * (lo + hi);
        if (f(mid) > 0) {
            if (!out.empty() && out.back().hi == lo) out.back().hi = hi;
            else out.push_back({lo, hi});
        }
    }
    return out;
}

SignificanceRegions from_regions(double q, std::vector<Region> regions, RegionsKind kind) {
    SignificanceRegions s;
    s.critical_value = q;
    s.significant = std::move(regions);
    for (const auto& r : s.significant) {
        if (std::isfinite(r.lo)) s.boundaries.push_back(r.lo);
        if (std::isfinite(r.hi)) s.boundaries.push_back(r.hi);
    }
    std::sort(s.boundaries.begin(), s.boundaries.end());
    s.kind = kind;
    return s;
}

}  // namespace

std::string kind_text(const SignificanceRegions& s) {
    switch (s.kind) {
        case RegionsKind::Everywhere:
            return "significant everywhere";
        case RegionsKind::Nowhere:
            return "significant nowhere";
        case RegionsKind::OneBoundary:
            return "one boundary (degenerate case)";
        case RegionsKind::Outside:
            return "significant outside the two boundaries";
        case RegionsKind::Between:
            return "significant between the two boundaries";
        case RegionsKind::PolynomialRoots:
            return "roots of a polynomial";
        case RegionsKind::Scan:
            return "scan of the moderator from " + format_range(s.scan_from, s.scan_to);
    }
    return {};
}

const char* to_string(FiellerInterval interval) {
    switch (interval) {
        case FiellerInterval::Bounded:
            return "bounded";
        case FiellerInterval::Unbounded:
            return "unbounded";
        case FiellerInterval::WholeLine:
            return "whole line";
        case FiellerInterval::None:
            return "none";
    }
    return "";
}

const char* to_string(CrossoverForm form) { return form == CrossoverForm::Disordinal ? "disordinal" : "ordinal"; }

const char* to_string(InteractionMeasure measure) {
    switch (measure) {
        case InteractionMeasure::CrossPartial:
            return "cross-partial derivative";
        case InteractionMeasure::SlopeDifference:
            return "difference in slopes";
        case InteractionMeasure::DoubleDifference:
            return "double difference";
    }
    return "";
}

EffectFunction::EffectFunction(std::vector<Eigen::VectorXd> g, const Eigen::VectorXd& beta, const Eigen::MatrixXd& cov)
    : g_(std::move(g)) {
    const std::size_t K = g_.size();
    a_.assign(K, 0.0);
    v_ = Eigen::MatrixXd::Zero(static_cast<Eigen::Index>(K), static_cast<Eigen::Index>(K));
    for (std::size_t k = 0; k < K; ++k) {
        double s = 0;
        for (Eigen::Index j = 0; j < beta.size(); ++j)
            if (g_[k][j] != 0) s += g_[k][j] * beta[j];  // NaN (aliased) propagates
        a_[k] = s;
    }
    for (std::size_t k = 0; k < K; ++k)
        for (std::size_t l = 0; l < K; ++l) {
            double s = 0;
            for (Eigen::Index i = 0; i < beta.size(); ++i) {
                if (g_[k][i] == 0) continue;
                for (Eigen::Index j = 0; j < beta.size(); ++j)
                    if (g_[l][j] != 0) s += g_[k][i] * cov(i, j) * g_[l][j];
            }
            v_(static_cast<Eigen::Index>(k), static_cast<Eigen::Index>(l)) = s;
        }
}

Eigen::VectorXd EffectFunction::gradient(double m) const {
    Eigen::VectorXd out = Eigen::VectorXd::Zero(g_.empty() ? 0 : g_.front().size());
    double pw = 1;
    for (const auto& gk : g_) {
        out += pw * gk;
        pw *= m;
    }
    return out;
}

double EffectFunction::effect(double m) const { return horner(a_, m); }

double EffectFunction::variance(double m) const {
    double s = 0;
    for (Eigen::Index k = 0; k < v_.rows(); ++k)
        for (Eigen::Index l = 0; l < v_.cols(); ++l) s += v_(k, l) * std::pow(m, static_cast<double>(k + l));
    return s;
}

SignificanceRegions significance_regions(const EffectFunction& f, double q) {
    const auto& a = f.effect_coefficients();
    const auto& v = f.variance_coefficients();
    const double q2 = q * q;
    auto gap = [&](double m) {
        const double e = f.effect(m);
        return e * e - q2 * f.variance(m);
    };
    if (f.degree() <= 0) {
        const bool sig = a[0] * a[0] > q2 * v(0, 0);
        return from_regions(q, sig ? std::vector<Region>{Region{}} : std::vector<Region>{},
                            sig ? RegionsKind::Everywhere : RegionsKind::Nowhere);
    }
    if (f.degree() == 1) {
        // (a0 + a1 m)^2 - q^2 (v00 + 2 v01 m + v11 m^2) = A m^2 + B m + C
        const double A = a[1] * a[1] - q2 * v(1, 1);
        const double B = 2 * (a[0] * a[1] - q2 * v(0, 1));
        const double C = a[0] * a[0] - q2 * v(0, 0);
        const double scale = a[1] * a[1] + q2 * v(1, 1);
        if (std::abs(A) <= 1e-12 * scale) {  // degenerate: linear in m
            if (B == 0)
                return from_regions(q, C > 0 ? std::vector<Region>{Region{}} : std::vector<Region>{},
                                    C > 0 ? RegionsKind::Everywhere : RegionsKind::Nowhere);
            const double r = -C / B;
            return from_regions(q, B > 0 ? std::vector<Region>{{r, kInf}} : std::vector<Region>{{-kInf, r}},
                                RegionsKind::OneBoundary);
        }
        const double disc = B * B - 4 * A * C;
        if (disc <= 0) {
            const bool sig = A > 0;
            return from_regions(q, sig ? std::vector<Region>{Region{}} : std::vector<Region>{},
                                sig ? RegionsKind::Everywhere : RegionsKind::Nowhere);
        }
        const double t = -0.5 * (B + std::copysign(std::sqrt(disc), B));
        double r1 = t / A, r2 = C / t;
        if (r1 > r2) std::swap(r1, r2);
        if (A > 0) return from_regions(q, {{-kInf, r1}, {r2, kInf}}, RegionsKind::Outside);
        return from_regions(q, {{r1, r2}}, RegionsKind::Between);
    }
    // Higher degree: real roots of the polynomial gap(m), from the companion
    // matrix, polished by a bracketing root finder.
    const int K = f.degree();
    std::vector<double> P(static_cast<std::size_t>(2 * K + 1), 0.0);
    for (int k = 0; k <= K; ++k)
        for (int l = 0; l <= K; ++l)
            P[static_cast<std::size_t>(k + l)] +=
                a[static_cast<std::size_t>(k)] * a[static_cast<std::size_t>(l)] - q2 * v(k, l);
    while (P.size() > 1 && std::abs(P.back()) < 1e-300) P.pop_back();
    std::vector<double> roots;
    const int deg = static_cast<int>(P.size()) - 1;
    if (deg >= 1) {
        Eigen::MatrixXd comp = Eigen::MatrixXd::Zero(deg, deg);
        for (int i = 1; i < deg; ++i) comp(i, i - 1) = 1;
        for (int i = 0; i < deg; ++i) comp(i, deg - 1) = -P[static_cast<std::size_t>(i)] / P.back();
        Eigen::EigenSolver<Eigen::MatrixXd> es(comp, false);
        for (int i = 0; i < deg; ++i) {
            const auto z = es.eigenvalues()[i];
            if (std::abs(z.imag()) <= 1e-7 * (1 + std::abs(z.real()))) roots.push_back(z.real());
        }
    }
    std::sort(roots.begin(), roots.end());
    std::vector<double> polished;
    for (double r : roots) {
        const double h = 1e-6 * (1 + std::abs(r));
        double lo = r - h, hi = r + h;
        if (gap(lo) * gap(hi) < 0) {
            std::uintmax_t iters = 100;
            auto res =
                boost::math::tools::toms748_solve(gap, lo, hi, boost::math::tools::eps_tolerance<double>(50), iters);
            r = 0.5 * (res.first + res.second);
        }
        if (polished.empty() || std::abs(r - polished.back()) > 1e-9 * (1 + std::abs(r))) polished.push_back(r);
    }
    auto regions = regions_from_signs(polished, gap);
    return from_regions(q, regions, regions.empty() ? RegionsKind::Nowhere : RegionsKind::PolynomialRoots);
}

EffectFunction effect_function(const Design& d, const FitResult& fit, const std::string& focal,
                               const std::string& moderator, const std::map<std::string, double>& values) {
    return EffectFunction(linear_form(d, moderator, focal, values), fit.beta, fit.covariance);
}

Eigen::VectorXd design_row(const Design& d, const std::map<std::string, double>& values) {
    return linear_form(d, "", "", values).front();
}

std::map<std::string, double> typical_values(const Design& d, const std::map<std::string, double>& overrides) {
    std::map<std::string, double> values;
    for (const auto& [col, s] : d.summaries) values[col] = s.mean;
    for (const auto& c : d.categoricals) values[c.column] = 0;
    for (const auto& [col, v] : overrides) values[col] = v;
    return values;
}

EffectFunction contrast_function(const Design& d, const FitResult& fit, const std::string& column, double from,
                                 double to, const std::string& free, std::map<std::string, double> values) {
    values[column] = from;
    const auto ga = linear_form(d, free, "", values);
    values[column] = to;
    const auto gb = linear_form(d, free, "", values);
    return EffectFunction(subtract(gb, ga), fit.beta, fit.covariance);
}

namespace {

bool in_product_with(const Design& d, const std::string& a, const std::string& b) {
    for (const auto& t : d.terms) {
        bool has_a = false, has_b = false;
        for (const auto& f : t.factors) {
            has_a |= f.first == a;
            has_b |= f.first == b;
        }
        if (has_a && has_b && t.factors.size() >= 2) return true;
    }
    return false;
}

bool in_model(const Design& d, const std::string& c) {
    for (const auto& t : d.terms)
        for (const auto& f : t.factors)
            if (f.first == c) return true;
    return false;
}

}  // namespace

// The usual cautions, worded for this result.
void refresh_cautions(ProbeResult& r, const FitResult& fit) {
    r.cautions.clear();
    r.cautions.push_back(
        "These are associations in observational data, not causal effects, unless the focal "
        "predictor was randomised.");
    bool beyond = false;
    for (const auto& e : r.effects) beyond |= e.beyond_data;
    for (bool b : r.jn_beyond_data) beyond |= b;
    if (beyond)
        r.cautions.push_back("Some moderator values or boundaries lie beyond the observed range of " + r.moderator +
                             " (" + format_range(r.observed_range.first, r.observed_range.second) +
                             "): there the results are extrapolations.");
    if (r.johnson_neyman)
        r.cautions.push_back(
            "The region of significance tests many moderator values, each at the " + level_text(1 - fit.level) +
            " level" +
            (r.simultaneous ? "; the simultaneous band (critical value " + format_sig(r.simultaneous->critical_value) +
                                  ") keeps the chance of any false region at " + level_text(1 - fit.level) + "."
                            : "."));
    if (r.crossovers.size() > 1) {
        // The pairwise differences in slope follow the user's adjustment; lines
        // at moderator values have none, so the shared level is quoted.
        const double pairs = static_cast<double>(r.crossovers.size());
        const bool adjusted = !r.slope_contrasts.empty() && r.adjustment != Adjustment::None;
        r.cautions.push_back("The " + std::to_string(r.crossovers.size()) +
                             " pairs of lines are each compared at the " + level_text(1 - fit.level) +
                             " level; with several comparisons some pair may look different by chance alone " +
                             (adjusted ? "(the differences between the groups' effects of " + r.focal + " are " +
                                             adjustment_text(r.adjustment) + " for this)."
                                       : "(Bonferroni: " + level_text((1 - fit.level) / pairs) + " per pair)."));
    }
    if (r.slope_contrasts.size() > 1 && r.adjustment == Adjustment::None)
        r.cautions.push_back("The " + std::to_string(r.slope_contrasts.size()) +
                             " pairwise differences in the effect of " + r.focal +
                             " are not adjusted for multiple comparisons; with several pairs some may look "
                             "different by chance alone.");
    if (fit.n < 200)
        r.cautions.push_back("With " + std::to_string(fit.n) +
                             " observations, interaction estimates and regions of significance are unstable.");
    if (generalized(fit.family) && r.scale == ProbeScale::Model)
        r.cautions.push_back("On the " + model_scale_text(fit.family, !fit.exposure.empty()) +
                             " scale a product coefficient is not the interaction on the " +
                             outcome_scale_text(fit.family, fit.exposure) + " scale; use the " +
                             outcome_scale_text(fit.family, fit.exposure) + " scale to describe effects on " +
                             outcome_scale_words(fit, r.outcome) + ".");
    for (auto& c : multilevel_cautions(fit, r)) r.cautions.push_back(std::move(c));
    if (r.scale == ProbeScale::Outcome)
        r.cautions.push_back("On the " + outcome_scale_text(fit.family, fit.exposure) +
                             " scale an effect depends on the values of every other predictor; "
                             "these effects are " +
                             std::string(r.averaging == Averaging::Sample ? "averaged over the observed rows."
                                                                          : "at the means and reference levels."));
}

namespace {

EffectPoint point_at(const EffectFunction& f, double m, const FitResult& fit) {
    return effect_point(m, infer(f.effect(m), std::sqrt(f.variance(m)), fit));
}

// The crossover of two simple-regression lines whose gap, as a function of the
// focal predictor, is `gap`: its root and the Fieller set where the gap is not
// significant.
Crossover crossover_of(const EffectFunction& gap, const FitResult& fit, std::pair<double, double> focal_range,
                       std::string groups) {
    Crossover c;
    c.groups = std::move(groups);
    c.gap = gap;
    const auto& a = gap.effect_coefficients();
    c.gap_regions = significance_regions(gap, fit.critical_value);
    if (gap.degree() != 1 || a[1] == 0 || std::isnan(a[1])) {
        c.ci_kind = FiellerInterval::None;
        c.form = CrossoverForm::Ordinal;
        return c;
    }
    c.focal_value = -a[0] / a[1];
    c.within_observed_range = c.focal_value >= focal_range.first && c.focal_value <= focal_range.second;
    c.form = c.within_observed_range ? CrossoverForm::Disordinal : CrossoverForm::Ordinal;
    const SignificanceRegions& sig = c.gap_regions;
    // Fieller set = complement of the significant regions.
    if (sig.significant.empty()) {
        c.ci_kind = FiellerInterval::WholeLine;
        c.ci_lower = -kInf;
        c.ci_upper = kInf;
    } else if (sig.significant.size() == 2) {
        c.ci_kind = FiellerInterval::Bounded;
        c.ci_lower = sig.significant[0].hi;
        c.ci_upper = sig.significant[1].lo;
    } else if (sig.significant.size() == 1 && std::isfinite(sig.significant[0].lo) &&
               std::isfinite(sig.significant[0].hi)) {
        c.ci_kind = FiellerInterval::Unbounded;
        c.ci_lower = sig.significant[0].lo;  // the set is (-inf, lo] U [hi, inf)
        c.ci_upper = sig.significant[0].hi;
    } else if (sig.significant.size() == 1) {  // degenerate: a half line
        c.ci_kind = FiellerInterval::Unbounded;
        c.ci_lower = std::isfinite(sig.significant[0].lo) ? -kInf : sig.significant[0].hi;
        c.ci_upper = std::isfinite(sig.significant[0].lo) ? sig.significant[0].lo : kInf;
    }
    return c;
}

}  // namespace

EffectPoint effect_point(double moderator_value, const Inference& i) {
    EffectPoint e;
    static_cast<Inference&>(e) = i;
    e.moderator_value = moderator_value;
    return e;
}

namespace {

// InputError for a probe the fit or the model cannot answer.
void check_probe(const Design& d, const FitResult& fit, const ProbeSpec& spec) {
    if (generalized(fit.family) && (!fit.converged || fit.separation))
        throw InputError(std::string("the ") + to_string(fit.family) + " fit " +
                         (fit.separation ? "shows separation"
                                         : "did not converge in " + std::to_string(fit.iterations) + " iterations") +
                         ", so its estimates and effects are not reliable and are not probed; " +
                         (fit.warnings.empty() ? std::string("simplify the model") : fit.warnings.back()));
    if (!in_model(d, spec.focal)) throw InputError("focal predictor " + quoted(spec.focal) + " is not in the model");
    if (d.categorical(spec.focal))
        throw InputError("focal predictor " + quoted(spec.focal) +
                         " is categorical; choose a numeric focal predictor and make " + quoted(spec.focal) +
                         " the moderator");
    if (!in_model(d, spec.moderator)) throw InputError("moderator " + quoted(spec.moderator) + " is not in the model");
    if (!in_product_with(d, spec.focal, spec.moderator))
        throw InputError("focal predictor " + quoted(spec.focal) + " and moderator " + quoted(spec.moderator) +
                         " share no product term, so the effect of " + quoted(spec.focal) + " does not depend on " +
                         quoted(spec.moderator) + "; add --interaction " + spec.focal + "," + spec.moderator);
    if (!spec.second_moderator.empty() && !in_model(d, spec.second_moderator))
        throw InputError("second moderator " + quoted(spec.second_moderator) + " is not in the model");
}

// Everything else held at its mean (numeric) or reference level, or at the
// values the spec gives; the notes say where every other column the effect
// depends on is held.
std::map<std::string, double> held_values(const Design& d, const ProbeSpec& spec, ProbeResult& r) {
    std::map<std::string, double> values = typical_values(d);
    if (!std::isnan(spec.focal_value)) values[spec.focal] = spec.focal_value;
    if (!spec.second_moderator.empty()) {
        if (!std::isnan(spec.second_value)) values[spec.second_moderator] = spec.second_value;
        r.notes.push_back(spec.second_moderator + " held at " + format_sig(values[spec.second_moderator]));
    }
    for (const auto& t : d.terms) {
        if (t.factors.size() < 2) continue;
        bool has_focal = false;
        for (const auto& f : t.factors) has_focal |= f.first == spec.focal;
        if (!has_focal) continue;
        for (const auto& f : t.factors) {
            const std::string& c = f.first;
            if (c == spec.focal || c == spec.moderator || c == spec.second_moderator) continue;
            const std::string note = c + " also changes the effect of " + spec.focal + "; it is held at " +
                                     (d.categorical(c) ? "its reference level '" + d.categorical(c)->reference + "'"
                                                       : "its mean " + format_sig(values[c]));
            if (std::find(r.notes.begin(), r.notes.end(), note) == r.notes.end()) r.notes.push_back(note);
        }
    }
    for (const auto& t : d.terms)
        if (t.factors.size() == 1 && t.factors[0].first == spec.focal && t.factors[0].second > 1) {
            r.notes.push_back("with " + t.label + " in the model the effect of " + spec.focal + " depends on " +
                              spec.focal + " itself; it is taken at " + spec.focal + " = " +
                              format_sig(values[spec.focal]));
            break;
        }
    return values;
}

// A categorical moderator: the effect in every group and the crossover of
// every pair of group lines.
void probe_groups(const Design& d, const FitResult& fit, const ProbeSpec& spec, const CategoricalInfo& cat,
                  std::map<std::string, double> values, ProbeResult& r) {
    std::vector<LevelEffect> level_effects;
    for (std::size_t L = 0; L < cat.levels.size(); ++L) {
        values[spec.moderator] = static_cast<double>(L);
        const EffectFunction f(linear_form(d, "", spec.focal, values), fit.beta, fit.covariance);
        EffectPoint e = point_at(f, 0, fit);
        e.moderator_value = static_cast<double>(L);
        e.level = cat.levels[L];
        r.effects.push_back(e);
        level_effects.push_back({cat.levels[L], f.effect(0), f.basis().front()});
    }
    r.slope_contrasts = slope_contrasts(level_effects, fit, spec.adjustment);
    for (std::size_t a = 0; a < cat.levels.size(); ++a)
        for (std::size_t b = a + 1; b < cat.levels.size(); ++b) {
            const EffectFunction gap = contrast_function(d, fit, spec.moderator, static_cast<double>(a),
                                                         static_cast<double>(b), spec.focal, values);
            r.crossovers.push_back(
                crossover_of(gap, fit, r.focal_range,
                             spec.moderator + "=" + cat.levels[a] + " vs " + spec.moderator + "=" + cat.levels[b]));
        }
}

// The moderator values to probe at: the chosen ones, else the defaults
// (ProbePoints), with a note when the percentiles replace mean ± 1 SD.
std::vector<double> default_points(const ProbeSpec& spec, const NumericSummary& ms, bool binary, ProbeResult& r) {
    if (!spec.at.empty()) {
        r.points = ProbePoints::Chosen;
        return spec.at;
    }
    if (binary) {
        r.points = ProbePoints::ZeroOne;
        return {0.0, 1.0};
    }
    if (!use_percentiles(ms)) {
        r.points = ProbePoints::MeanSd;
        return {ms.mean - ms.sd, ms.mean, ms.mean + ms.sd};
    }
    r.points = ProbePoints::Percentiles;
    const std::string why = std::fabs(ms.skew) > 1
                                ? spec.moderator + " is skewed (skewness " + format_sig(ms.skew) + ")"
                                : "mean ± 1 SD of " + spec.moderator + " (" +
                                      format_range(ms.mean - ms.sd, ms.mean + ms.sd) +
                                      ") reaches beyond its observed range (" + format_range(ms.min, ms.max) + ")";
    r.notes.push_back(why + ", so the effects are given at its 10th, 50th and 90th percentiles (" + format_sig(ms.p10) +
                      ", " + format_sig(ms.p50) + ", " + format_sig(ms.p90) + ") rather than at the mean and ± 1 SD");
    return {ms.p10, ms.p50, ms.p90};
}

// The defaults and the pins, ascending; a pin within 1e-9 of the moderator's
// scale from a default is that default.
std::vector<double> with_pins(std::vector<double> at, const ProbeSpec& spec) {
    if (!spec.at.empty() || spec.pinned.empty()) return at;
    double scale = 1;
    for (const double v : at) scale = std::max(scale, std::fabs(v));
    for (const double pin : spec.pinned) {
        if (!std::isfinite(pin)) continue;
        const bool known =
            std::any_of(at.begin(), at.end(), [&](double v) { return std::fabs(v - pin) <= 1e-9 * scale; });
        if (!known) at.push_back(pin);
    }
    std::sort(at.begin(), at.end());
    return at;
}

// A numeric moderator: effects at the chosen values (or the defaults), the
// Johnson–Neyman regions and the simultaneous band (not for a 0/1
// moderator), and where the lines at different moderator values cross.
void probe_numeric(const Design& d, const FitResult& fit, const ProbeSpec& spec,
                   const std::map<std::string, double>& values, ProbeResult& r) {
    const auto& ms = d.summaries.at(spec.moderator);
    r.observed_range = {ms.min, ms.max};
    r.moderator_mean = ms.mean;
    r.moderator_sd = ms.sd;
    r.moderator_skew = ms.skew;
    r.moderator_percentiles = {ms.p10, ms.p50, ms.p90};
    const EffectFunction f = effect_function(d, fit, spec.focal, spec.moderator, values);
    r.effect_function = f;
    const bool binary = d.is_binary(spec.moderator);
    r.binary_moderator = binary;
    const std::vector<double> at = with_pins(default_points(spec, ms, binary, r), spec);
    for (double m : at) {
        EffectPoint e = point_at(f, m, fit);
        e.beyond_data = m < ms.min || m > ms.max;
        r.effects.push_back(e);
    }
    if (binary) {
        r.notes.push_back(spec.moderator +
                          " takes only the values 0 and 1: the effects at 0 and 1 are the whole "
                          "story, so no region of significance over " +
                          spec.moderator + " is reported");
    } else {
        r.johnson_neyman = significance_regions(f, fit.critical_value);
        for (double b : r.johnson_neyman->boundaries) r.jn_beyond_data.push_back(b < ms.min || b > ms.max);
        const double dof = static_cast<double>(f.degree() + 1);
        const double band_q = std::sqrt(dof * dist::f_quantile(fit.level, dof, fit.df_inference));
        r.simultaneous = significance_regions(f, band_q);
    }

    // Lines at different moderator values meet where the moderator's own
    // effect, as a function of the focal predictor, is zero.
    const EffectFunction gap(linear_form(d, spec.focal, spec.moderator, values), fit.beta, fit.covariance);
    r.crossovers.push_back(crossover_of(
        gap, fit, r.focal_range,
        binary ? spec.moderator + "=0 vs " + spec.moderator + "=1" : "lines at any two values of " + spec.moderator));
}

}  // namespace

bool use_percentiles(const NumericSummary& m) {
    return std::fabs(m.skew) > 1 || m.mean - m.sd < m.min || m.mean + m.sd > m.max;
}

ProbeResult probe(const Design& d, const FitResult& fit, const ProbeSpec& spec) {
    check_probe(d, fit, spec);
    ProbeResult r;
    r.outcome = d.outcome;
    r.focal = spec.focal;
    r.moderator = spec.moderator;
    r.level = fit.level;
    r.df = fit.df_inference;
    r.critical_t = fit.critical_value;
    const auto& fs = d.summaries.at(spec.focal);
    r.focal_range = {fs.min, fs.max};

    const std::map<std::string, double> values = held_values(d, spec, r);
    r.adjustment = spec.adjustment;
    r.binary_focal = d.is_binary(spec.focal);
    r.interaction_test = interaction_test(d, fit, spec.focal, spec.moderator);
    const CategoricalInfo* cat = d.categorical(spec.moderator);
    r.categorical_moderator = cat != nullptr;
    if (cat) probe_groups(d, fit, spec, *cat, values, r);
    else probe_numeric(d, fit, spec, values, r);
    r.group_slopes = group_slope_spread(fit, spec.focal);
    add_multilevel_notes(fit, r);
    if (count_outcome(fit.family))
        for (const EffectPoint& e : r.effects)
            r.rate_ratios.push_back(
                {e.moderator_value, e.level, std::exp(e.estimate), std::exp(e.ci_lower), std::exp(e.ci_upper)});
    refresh_cautions(r, fit);
    return r;
}

SurfaceGrid surface_grid(const Design& d, const FitResult& fit, const std::string& x, const std::string& z, int nx,
                         int nz, const std::map<std::string, double>& held) {
    for (const auto& c : {x, z})
        if (!d.summaries.count(c)) throw InputError("surface: " + quoted(c) + " is not a numeric column of the model");
    if (nx < 2 || nz < 2 || nx > 1000 || nz > 1000) throw InputError("surface grid sizes must be between 2 and 1000");
    SurfaceGrid g;
    g.x = x;
    g.z = z;
    const auto& sx = d.summaries.at(x);
    const auto& sz = d.summaries.at(z);
    for (int i = 0; i < nx; ++i) g.x_values.push_back(sx.min + (sx.max - sx.min) * i / (nx - 1));
    for (int k = 0; k < nz; ++k) g.z_values.push_back(sz.min + (sz.max - sz.min) * k / (nz - 1));
    g.predicted.resize(nz, nx);
    g.std_error.resize(nz, nx);
    auto values = typical_values(d, held);
    const Eigen::VectorXd b = fit.beta.unaryExpr([](double v) { return std::isnan(v) ? 0.0 : v; });
    const Eigen::MatrixXd V = fit.covariance.unaryExpr([](double v) { return std::isnan(v) ? 0.0 : v; });
    for (int k = 0; k < nz; ++k)
        for (int i = 0; i < nx; ++i) {
            values[x] = g.x_values[static_cast<std::size_t>(i)];
            values[z] = g.z_values[static_cast<std::size_t>(k)];
            const Eigen::VectorXd row = design_row(d, values);
            g.predicted(k, i) = row.dot(b);
            g.std_error(k, i) = std::sqrt(row.dot(V * row));
        }
    return g;
}

}  // namespace moderato
