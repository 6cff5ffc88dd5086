#include "moderato/probing/slope_contrasts.hpp"

#include <cmath>

#include "moderato/support/error.hpp"

namespace moderato {

namespace {

Eigen::VectorXd finite(const Eigen::VectorXd& v) {
    return v.unaryExpr([](double x) { return std::isnan(x) ? 0.0 : x; });
}

}  // namespace

std::vector<SlopeContrast> slope_contrasts(const std::vector<LevelEffect>& effects, const FitResult& fit,
                                           Adjustment adjustment) {
    const Eigen::MatrixXd V = fit.covariance.unaryExpr([](double x) { return std::isnan(x) ? 0.0 : x; });
    std::vector<SlopeContrast> out;
    for (std::size_t i = 0; i < effects.size(); ++i)
        for (std::size_t j = i + 1; j < effects.size(); ++j) {
            const Eigen::VectorXd g = finite(effects[j].gradient) - finite(effects[i].gradient);
            SlopeContrast c;
            static_cast<Inference&>(c) =
                infer(effects[j].value - effects[i].value, std::sqrt(std::max(0.0, g.dot(V * g))), fit);
            c.first = effects[i].level;
            c.second = effects[j].level;
            out.push_back(c);
        }
    std::vector<double> p;
    for (const auto& c : out) p.push_back(c.p_value);
    const std::vector<double> adjusted = adjust_p_values(p, adjustment);
    for (std::size_t k = 0; k < out.size(); ++k) out[k].p_adjusted = adjusted[k];
    return out;
}

std::vector<std::string> interaction_terms(const Design& d, const std::string& focal, const std::string& moderator) {
    std::vector<std::string> labels;
    for (const auto& t : d.terms) {
        if (t.factors.size() < 2) continue;
        bool has_focal = false, has_moderator = false;
        for (const auto& f : t.factors) {
            has_focal |= f.first == focal;
            has_moderator |= f.first == moderator;
        }
        if (has_focal && has_moderator) labels.push_back(t.label);
    }
    return labels;
}

std::optional<WaldTest> interaction_test(const Design& d, const FitResult& fit, const std::string& focal,
                                         const std::string& moderator) {
    const auto labels = interaction_terms(d, focal, moderator);
    if (labels.empty()) return std::nullopt;
    try {
        return wald_test(fit, labels);
    } catch (const InputError&) {  // an aliased product term cannot be tested
        return std::nullopt;
    }
}

}  // namespace moderato
