#include "moderato/probing/multiplicity.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

namespace moderato {

const char* to_string(Adjustment adjustment) {
    switch (adjustment) {
        case Adjustment::Holm:
            return "holm";
        case Adjustment::Bonferroni:
            return "bonferroni";
        case Adjustment::None:
            return "none";
    }
    return "holm";
}

std::optional<Adjustment> adjustment_from_string(std::string_view word) {
    for (Adjustment a : {Adjustment::Holm, Adjustment::Bonferroni, Adjustment::None})
        if (word == to_string(a)) return a;
    return std::nullopt;
}

const char* adjustment_text(Adjustment adjustment) {
    switch (adjustment) {
        case Adjustment::Holm:
            return "Holm-adjusted";
        case Adjustment::Bonferroni:
            return "Bonferroni-adjusted";
        case Adjustment::None:
            return "not adjusted";
    }
    return "Holm-adjusted";
}

std::vector<double> adjust_p_values(const std::vector<double>& p, Adjustment adjustment) {
    std::vector<std::size_t> order;
    for (std::size_t i = 0; i < p.size(); ++i)
        if (!std::isnan(p[i])) order.push_back(i);
    std::vector<double> out = p;
    if (adjustment == Adjustment::None) return out;
    const double m = static_cast<double>(order.size());
    if (adjustment == Adjustment::Bonferroni) {
        for (std::size_t i : order) out[i] = std::min(1.0, m * p[i]);
        return out;
    }
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return p[a] < p[b]; });
    double running = 0;
    for (std::size_t rank = 0; rank < order.size(); ++rank) {
        const double scaled = std::min(1.0, (m - static_cast<double>(rank)) * p[order[rank]]);
        running = std::max(running, scaled);
        out[order[rank]] = running;
    }
    return out;
}

}  // namespace moderato
