#include "probing/linearity_inputs.hpp"

#include <algorithm>
#include <cmath>

#include "moderato/support/error.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

bool mentions(const DesignTerm& term, const std::string& column) {
    return std::any_of(term.factors.begin(), term.factors.end(), [&](const auto& f) { return f.first == column; });
}

// The term is D, Z or D×Z (each to the first power).
bool allowed_term(const DesignTerm& term, const std::string& focal, const std::string& moderator) {
    for (const auto& [column, power] : term.factors)
        if (power != 1 || (column != focal && column != moderator)) return false;
    return term.factors.size() <= 2;
}

void check_column(const Design& d, const std::string& column, const std::string& role, const std::string& what) {
    if (d.categorical(column))
        throw InputError(what + " need a numeric " + role + "; " + quoted(column) +
                         " is categorical (its levels already give one effect each)");
    if (d.main_column(column) < 0)
        throw InputError(what + " need the " + role + " " + quoted(column) + " as a main effect in the model");
}

}  // namespace

LinearityInputs linearity_inputs(const Design& d, const FitResult& fit, const std::string& focal,
                                 const std::string& moderator, const std::string& what) {
    if (fit.family != Family::Linear && fit.family != Family::Logistic)
        throw InputError(what + " are offered for linear and logistic models; this is a " +
                         std::string(to_string(fit.family)) + " model");
    if (fit.multilevel)
        throw InputError(what + " are not available for multilevel models (groups " + quoted(fit.multilevel->groups) +
                         "): they would need a multilevel fit per bin or moderator value");
    if (focal == moderator) throw InputError(what + " need a focal predictor and a different moderator");
    check_column(d, focal, "focal predictor", what);
    check_column(d, moderator, "moderator", what);
    if (d.is_binary(moderator))
        throw InputError(what + " need a moderator with more than two values; " + quoted(moderator) +
                         " takes only 0 and 1, so its two effects are already separate estimates");
    for (const auto& term : d.terms)
        if ((mentions(term, focal) || mentions(term, moderator)) && !allowed_term(term, focal, moderator))
            throw InputError(what + " need a model in which " + quoted(focal) + " and " + quoted(moderator) +
                             " appear only as main effects and in their product; the term " + quoted(term.label) +
                             " also involves them");
    LinearityInputs in;
    in.focal = d.X.col(d.main_column(focal));
    in.moderator = d.X.col(d.main_column(moderator));
    in.binary_focal = d.is_binary(focal);
    for (std::size_t j = 0; j < d.columns.size(); ++j) {
        const auto& atoms = d.columns[j].atoms;
        const bool involved = std::any_of(atoms.begin(), atoms.end(),
                                          [&](const Atom& a) { return a.column == focal || a.column == moderator; });
        if (!atoms.empty() && !involved) in.controls.push_back(static_cast<int>(j));
    }
    const double mean = in.moderator.mean();
    const double ss = (in.moderator.array() - mean).square().sum();
    in.moderator_sd = d.n() > 1 ? std::sqrt(ss / static_cast<double>(d.n() - 1)) : 0.0;
    return in;
}

Design derived_design(const Design& d, Eigen::MatrixXd X, const std::vector<std::string>& labels, bool intercept) {
    Design r;
    r.X = std::move(X);
    r.y = d.y;
    r.weights = d.weights;
    r.cluster = d.cluster;
    r.n_clusters = d.n_clusters;
    r.cluster_names = d.cluster_names;
    r.intercept = intercept;
    r.rows = d.rows;
    r.n_excluded = d.n_excluded;
    r.exclusions = d.exclusions;
    r.outcome = d.outcome;
    for (std::size_t j = 0; j < labels.size(); ++j) {
        const bool icpt = intercept && j == 0;
        DesignColumn c{labels[j], icpt ? std::vector<Atom>{} : std::vector<Atom>{Atom{labels[j], "", 1}},
                       static_cast<int>(j)};
        r.columns.push_back(c);
        DesignTerm t;
        t.label = labels[j];
        if (!icpt) t.factors = {{labels[j], 1}};
        t.degree = icpt ? 0 : 1;
        t.columns = {static_cast<int>(j)};
        r.terms.push_back(t);
    }
    return r;
}

ModelSpec derived_spec(const ModelSpec& spec) {
    ModelSpec s;
    s.outcome = spec.outcome;
    s.family = spec.family;
    s.se = spec.se;
    s.weights = spec.weights;
    s.cluster = spec.cluster;
    s.level = spec.level;
    s.threads = spec.threads;
    return s;
}

std::vector<double> sorted_finite(const std::vector<double>& values) {
    std::vector<double> v;
    for (double x : values)
        if (std::isfinite(x)) v.push_back(x);
    std::sort(v.begin(), v.end());
    return v;
}

}  // namespace moderato::detail
