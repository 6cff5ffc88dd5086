#include "moderato/probing/multilevel_probe.hpp"

#include <algorithm>
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

std::vector<GroupLine> group_lines(const Design& d, const FitResult& fit, const std::string& focal,
                                   const std::string& moderator, std::size_t most) {
    std::vector<GroupLine> out;
    const int mc = d.main_column(moderator);
    if (!fit.multilevel || mc < 0 || most == 0) return out;
    const auto& m = *fit.multilevel;
    std::size_t slope = 0;
    for (std::size_t k = 1; k < m.terms.size(); ++k)
        if (m.terms[k] == focal) slope = k;
    std::vector<double> sum(m.group_effects.size(), 0.0), count(sum.size(), 0.0);
    for (std::size_t i = 0; i < d.group.size(); ++i) {
        sum[d.group[i]] += d.X(static_cast<Eigen::Index>(i), mc);
        count[d.group[i]] += 1;
    }
    std::vector<GroupLine> all;
    for (std::size_t g = 0; g < m.group_effects.size(); ++g) {
        const GroupEffect& e = m.group_effects[g];
        all.push_back({e.group, sum[g] / count[g], e.mode[0], slope ? e.mode[static_cast<Eigen::Index>(slope)] : 0.0});
    }
    std::stable_sort(all.begin(), all.end(),
                     [](const GroupLine& a, const GroupLine& b) { return a.moderator < b.moderator; });
    if (all.size() <= most) return all;
    const std::size_t steps = std::max<std::size_t>(most - 1, 1);
    for (std::size_t k = 0; k < most; ++k) out.push_back(all[k * (all.size() - 1) / steps]);
    return out;
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
