// Adjusting p-values for multiple comparisons: Holm's step-down procedure
// (Holm 1979; the default), Bonferroni, or none. Used for the pairwise
// comparisons of a categorical moderator's slopes.
#pragma once

#include <optional>
#include <string_view>
#include <vector>

namespace moderato {

enum class Adjustment { Holm, Bonferroni, None };

const char* to_string(Adjustment adjustment);  // "holm", "bonferroni", "none"
// The enum for those words; nullopt for anything else.
std::optional<Adjustment> adjustment_from_string(std::string_view word);
// How a reader is told: "Holm-adjusted", "Bonferroni-adjusted", "not adjusted".
const char* adjustment_text(Adjustment adjustment);

// Adjusted p-values in the order given. Bonferroni: min(1, m p). Holm: with
// p sorted ascending, p(i) adjusted = max over j <= i of min(1, (m - j + 1) p(j)).
// A NaN p-value stays NaN and does not count among the m comparisons.
std::vector<double> adjust_p_values(const std::vector<double>& p, Adjustment adjustment);

}  // namespace moderato
