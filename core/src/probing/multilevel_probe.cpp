#include "moderato/probing/multilevel_probe.hpp"

#include <cmath>

#include "moderato/estimation/distributions.hpp"
#include "moderato/support/report_text.hpp"

namespace moderato {

std::optional<GroupSlopeSpread> group_slope_spread(const FitResult& fit, const std::string& focal) {
    if (!fit.multilevel) return std::nullopt;
    const auto& m = *fit.multilevel;
    for (std::size_t k = 1; k < m.terms.size(); ++k)
        if (m.terms[k] == focal) {
            const auto K = static_cast<Eigen::Index>(k);
            return GroupSlopeSpread{std::sqrt(m.covariance(K, K)), dist::normal_quantile(0.5 + fit.level / 2)};
        }
    return std::nullopt;
}

void add_multilevel_notes(const FitResult& fit, ProbeResult& r) {
    if (!fit.multilevel || std::isinf(r.df)) return;
    r.notes.push_back("t tests use " + format_df(r.df) + " df (" + df_method_text(fit.multilevel->df_used()) +
                      ", those of the product terms) at every value of " + r.moderator);
}

std::vector<std::string> multilevel_cautions(const FitResult& fit, const ProbeResult& r) {
    std::vector<std::string> out;
    if (!fit.multilevel) return out;
    const auto& m = *fit.multilevel;
    std::string typical = "These effects are those of a typical group of " + m.groups + " (the model's fixed part)";
    if (r.group_slopes)
        typical += "; each group's own slope of " + r.focal + " varies around them with SD " +
                   format_sig(r.group_slopes->sd) + ", so " + level_text(r.level) + " of groups lie within ± " +
                   format_sig(r.group_slopes->critical_value * r.group_slopes->sd) + " of the effect";
    out.push_back(typical + ".");
    if (m.groups_count < 30)
        out.push_back("Only " + std::to_string(m.groups_count) + " groups of " + m.groups +
                      ": an effect that depends on a group-level moderator rests on the number of groups, not rows.");
    if (m.singular)
        out.push_back(
            "The random part is singular (a variance at zero or a correlation at ±1): the model is more "
            "complex than these data support.");
    return out;
}

}  // namespace moderato
