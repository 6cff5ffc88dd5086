#include "plots/observed_points.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <set>

#include "plots/scatter_thinning.hpp"

namespace moderato::ui {

namespace {

bool finitePair(double a, double b) { return std::isfinite(a) && std::isfinite(b); }

// The finite points' extent along x and y, and how many there are.
std::size_t extent(const std::vector<double>& x, const std::vector<double>& y, std::size_t n_rows, LinesPoints& out) {
    double x0 = std::numeric_limits<double>::infinity(), x1 = -x0, y0 = x0, y1 = -x0;
    std::size_t n = 0;
    for (std::size_t i = 0; i < n_rows; ++i) {
        if (!finitePair(x[i], y[i])) continue;
        ++n;
        x0 = std::min(x0, x[i]);
        x1 = std::max(x1, x[i]);
        y0 = std::min(y0, y[i]);
        y1 = std::max(y1, y[i]);
    }
    if (n > 0) {
        out.xRange = {x0, x1};
        out.yRange = {y0, y1};
    }
    return n;
}

void binPoints(const std::vector<double>& x, const std::vector<double>& y, std::size_t n_rows,
               const std::vector<int>& group, LinesPoints& out) {
    constexpr int bx = LinesPoints::kBinsX, by = LinesPoints::kBinsY;
    out.binned = true;
    out.counts.assign(static_cast<std::size_t>(out.groups), std::vector<int>(bx * by, 0));
    const auto [x0, x1] = out.xRange;
    const auto [y0, y1] = out.yRange;
    // One point (or a line of them) still lands in a cell: a zero width bins all at 0.
    const double sx = x1 > x0 ? (bx - 1) / (x1 - x0) : 0.0, sy = y1 > y0 ? (by - 1) / (y1 - y0) : 0.0;
    for (std::size_t i = 0; i < n_rows; ++i) {
        if (!finitePair(x[i], y[i])) continue;
        const long i_x = std::clamp(std::lround((x[i] - x0) * sx), 0L, long{bx - 1});
        const long i_y = std::clamp(std::lround((y[i] - y0) * sy), 0L, long{by - 1});
        const std::size_t g = group.empty() ? 0 : static_cast<std::size_t>(group[i]);
        ++out.counts[g][static_cast<std::size_t>(i_y * bx + i_x)];
    }
}

}  // namespace

LinesPoints makeLinesPoints(const std::vector<double>& x, const std::vector<double>& y, const std::vector<int>& group,
                            std::size_t maxPoints) {
    LinesPoints out;
    const std::size_t n = std::min(x.size(), y.size());
    for (int g : group) out.groups = std::max(out.groups, g + 1);
    out.rows = extent(x, y, n, out);
    if (out.rows > maxPoints) {
        binPoints(x, y, n, group, out);
        return out;
    }
    out.x.resize(static_cast<std::size_t>(out.groups));
    out.y.resize(static_cast<std::size_t>(out.groups));
    for (std::size_t i = 0; i < n; ++i) {
        if (!finitePair(x[i], y[i])) continue;
        const std::size_t g = group.empty() ? 0 : static_cast<std::size_t>(group[i]);
        out.x[g].push_back(x[i]);
        out.y[g].push_back(y[i]);
    }
    return out;
}

namespace {

std::set<double> distinctFocal(const LinesPoints& p, std::size_t limit) {
    std::set<double> values;
    for (const auto& xs : p.x)
        for (double v : xs) {
            values.insert(v);
            if (values.size() > limit) return values;
        }
    return values;
}

// SplitMix64 (Steele, Lea and Flood 2014): a well-mixed 64-bit hash.
std::uint64_t splitMix(std::uint64_t z) {
    z += 0x9E3779B97F4A7C15ull;
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
    return z ^ (z >> 31);
}

}  // namespace

bool discreteFocal(const LinesPoints& p, int maxValues) {
    if (p.binned || p.rows == 0) return false;
    const std::set<double> values = distinctFocal(p, static_cast<std::size_t>(maxValues));
    if (values.size() > static_cast<std::size_t>(maxValues)) return false;
    return std::all_of(values.begin(), values.end(), [](double v) { return v == std::round(v); });
}

double jitterWidth(const LinesPoints& p) {
    const std::set<double> values = distinctFocal(p, std::numeric_limits<std::size_t>::max());
    double gap = std::numeric_limits<double>::infinity();
    for (auto it = values.begin(); it != values.end() && std::next(it) != values.end(); ++it)
        gap = std::min(gap, *std::next(it) - *it);
    return std::isfinite(gap) ? 0.15 * gap : 0.0;
}

std::vector<double> jittered(const std::vector<double>& x, int group, double width) {
    std::vector<double> out(x.size());
    const std::uint64_t seed = splitMix(0x4D6F646572ull + static_cast<std::uint64_t>(group));
    for (std::size_t i = 0; i < x.size(); ++i) {
        const double u = static_cast<double>(splitMix(seed + i) >> 11) * 0x1.0p-53;  // [0, 1)
        out[i] = x[i] + width * (2 * u - 1);
    }
    return out;
}

SurfacePoints makeSurfacePoints(const std::vector<double>& x, const std::vector<double>& z) {
    SurfacePoints out;
    out.rows = std::min(x.size(), z.size());
    for (std::size_t i : thinScatter(x, z, 20000, 150, 100)) {
        out.x.push_back(x[i]);
        out.z.push_back(z[i]);
    }
    return out;
}

std::shared_ptr<const SurfacePoints> makeSurfacePoints(const Design& d, const std::string& x, const std::string& z) {
    const int jx = d.main_column(x), jz = d.main_column(z);
    if (jx < 0 || jz < 0) return nullptr;
    const auto column = [&](int j) { return std::vector<double>(d.X.col(j).data(), d.X.col(j).data() + d.X.rows()); };
    return std::make_shared<const SurfacePoints>(makeSurfacePoints(column(jx), column(jz)));
}

}  // namespace moderato::ui
