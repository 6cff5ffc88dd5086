// One estimated number with its standard error, tested against zero with a
// reference distribution (t with the fit's inference df, or z) and given a
// confidence interval at the fit's level. Every result that reports such a
// number (a coefficient, a conditional effect, a contrast, an interaction
// effect on the outcome scale) is an Inference plus what it is about.
#pragma once

namespace moderato {

struct Inference {
    double estimate = 0, std_error = 0, statistic = 0, p_value = 0, ci_lower = 0, ci_upper = 0;
};

}  // namespace moderato
