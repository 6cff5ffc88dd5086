#include "plots/scatter_thinning.hpp"

#include <algorithm>
#include <cmath>

namespace moderato::ui {

std::vector<std::size_t> thinScatter(const std::vector<double>& x, const std::vector<double>& y, std::size_t limit,
                                     int binsX, int binsY, const std::function<bool(std::size_t)>& keep) {
    const std::size_t n = std::min(x.size(), y.size());
    std::vector<std::size_t> out;
    double x0 = INFINITY, x1 = -INFINITY, y0 = INFINITY, y1 = -INFINITY;
    std::size_t finite = 0;
    for (std::size_t i = 0; i < n; ++i) {
        if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
        ++finite;
        x0 = std::min(x0, x[i]);
        x1 = std::max(x1, x[i]);
        y0 = std::min(y0, y[i]);
        y1 = std::max(y1, y[i]);
    }
    if (finite <= limit) {
        for (std::size_t i = 0; i < n; ++i)
            if (std::isfinite(x[i]) && std::isfinite(y[i])) out.push_back(i);
        return out;
    }
    const double sx = x1 > x0 ? binsX / (x1 - x0) : 0.0, sy = y1 > y0 ? binsY / (y1 - y0) : 0.0;
    std::vector<char> used(static_cast<std::size_t>(binsX + 1) * static_cast<std::size_t>(binsY + 1), 0);
    for (std::size_t i = 0; i < n; ++i) {
        if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
        if (keep && keep(i)) {
            out.push_back(i);
            continue;
        }
        const auto bx = static_cast<std::size_t>((x[i] - x0) * sx);
        const auto by = static_cast<std::size_t>((y[i] - y0) * sy);
        char& u = used[by * static_cast<std::size_t>(binsX + 1) + bx];
        if (!u) {
            u = 1;
            out.push_back(i);
        }
    }
    return out;
}

}  // namespace moderato::ui
