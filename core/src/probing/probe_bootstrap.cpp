#include "moderato/probing/probe_bootstrap.hpp"

#include <cmath>
#include <limits>

#include "moderato/probing/response_scale.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}

const char* to_string(ProbeStatistic statistic) {
    switch (statistic) {
        case ProbeStatistic::Effect:
            return "effect";
        case ProbeStatistic::Boundary:
            return "boundary";
        case ProbeStatistic::Crossover:
            return "crossover";
    }
    return "";
}

ProbeBootstrap bootstrap_probe(const Design& design, const ModelSpec& spec, const ProbeSpec& probe_spec,
                               const ProbeResult& probe, const BootstrapOptions& options) {
    ProbeBootstrap out;
    out.seed = options.seed;
    const bool response = probe.scale == ProbeScale::Outcome;
    for (const auto& e : probe.effects) {
        out.labels.push_back("effect at " + probe.moderator + " = " +
                             (e.level.empty() ? format_sig(e.moderator_value) : e.level));
        out.kinds.push_back(ProbeStatistic::Effect);
        out.at.push_back(e.moderator_value);
    }
    const std::size_t n_boundaries = !response && probe.johnson_neyman ? probe.johnson_neyman->boundaries.size() : 0;
    for (std::size_t k = 0; k < n_boundaries; ++k) {
        out.labels.push_back("Johnson–Neyman boundary " + std::to_string(k + 1));
        out.kinds.push_back(ProbeStatistic::Boundary);
        out.at.push_back(static_cast<double>(k));
    }
    const bool crossover = !probe.crossovers.empty() && probe.crossovers.front().ci_kind != FiellerInterval::None;
    if (crossover) {
        out.labels.push_back("crossover (" + probe.crossovers.front().groups + ")");
        out.kinds.push_back(ProbeStatistic::Crossover);
        out.at.push_back(kNaN);
    }

    const EffectFunction& f = probe.effect_function;
    const std::vector<Eigen::VectorXd> effect_basis = response ? std::vector<Eigen::VectorXd>{} : f.basis();
    std::vector<Eigen::VectorXd> level_gradients;  // categorical moderator: one gradient per level
    if (!response && probe.categorical_moderator) {
        auto values = typical_values(design);
        for (const auto& e : probe.effects) {
            values[probe.moderator] = e.moderator_value;
            level_gradients.push_back(effect_function(design, FitResult{}, probe.focal, "", values).basis().front());
        }
    }
    const std::vector<Eigen::VectorXd> gap_basis =
        crossover ? probe.crossovers.front().gap.basis() : std::vector<Eigen::VectorXd>{};
    const double q = probe.critical_t;
    ScaleRequest request;
    request.focal = probe.focal;
    request.moderator = probe.moderator;
    request.averaging = probe.averaging;
    if (!probe_spec.second_moderator.empty())
        // At its chosen value, else its mean (numeric) or reference level (categorical).
        request.values[probe_spec.second_moderator] = std::isnan(probe_spec.second_value)
                                                          ? typical_values(design).at(probe_spec.second_moderator)
                                                          : probe_spec.second_value;
    if (request.averaging == Averaging::AtValues)  // held at the full sample's values, not each replicate's
        request.values = typical_values(design, request.values);

    const std::size_t m = out.labels.size();
    BootstrapStatistic statistic = [&](const Design& rd, const FitResult& rf) {
        Eigen::VectorXd s = Eigen::VectorXd::Constant(static_cast<Eigen::Index>(m), kNaN);
        std::size_t k = 0;
        if (response) {
            for (const auto& e : probe.effects)
                s[static_cast<Eigen::Index>(k++)] = probability_effect(rd, rf, request, e.moderator_value).estimate;
        } else if (probe.categorical_moderator) {
            for (const auto& g : level_gradients) s[static_cast<Eigen::Index>(k++)] = g.dot(rf.beta);
        } else {
            const EffectFunction rfun(effect_basis, rf.beta, rf.covariance);
            for (const auto& e : probe.effects) s[static_cast<Eigen::Index>(k++)] = rfun.effect(e.moderator_value);
            if (n_boundaries > 0) {
                const auto regions = significance_regions(rfun, q);
                for (std::size_t b = 0; b < n_boundaries; ++b, ++k)
                    if (regions.boundaries.size() == n_boundaries)
                        s[static_cast<Eigen::Index>(k)] = regions.boundaries[b];
            }
        }
        if (crossover) {
            const EffectFunction gap(gap_basis, rf.beta, rf.covariance);
            const auto& a = gap.effect_coefficients();
            if (a.size() == 2 && a[1] != 0) s[static_cast<Eigen::Index>(k)] = -a[0] / a[1];
        }
        return s;
    };
    out.result = bootstrap(design, spec, statistic, options);
    return out;
}

}  // namespace moderato
