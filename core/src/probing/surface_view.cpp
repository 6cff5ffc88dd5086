#include "moderato/probing/surface_view.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

#include "estimation/glm_family.hpp"
#include "moderato/support/error.hpp"

namespace moderato {

namespace {

struct Pt {
    double x, z;
};

// Twice the signed area of the triangle o, a, b (> 0: counter-clockwise turn).
double cross(const Pt& o, const Pt& a, const Pt& b) { return (a.x - o.x) * (b.z - o.z) - (a.z - o.z) * (b.x - o.x); }

// The points that maximise x, x + z, z, z - x, -x, -x - z, -z and x - z (the
// first of equals), in that order: hull vertices met counter-clockwise, with
// repeats removed.
std::vector<Pt> extreme_points(const std::vector<Pt>& pts) {
    static constexpr double dir[8][2] = {{1, 0}, {1, 1}, {0, 1}, {-1, 1}, {-1, 0}, {-1, -1}, {0, -1}, {1, -1}};
    std::size_t best[8] = {};
    for (std::size_t i = 1; i < pts.size(); ++i)
        for (int d = 0; d < 8; ++d) {
            const Pt& b = pts[best[d]];
            if (dir[d][0] * pts[i].x + dir[d][1] * pts[i].z > dir[d][0] * b.x + dir[d][1] * b.z) best[d] = i;
        }
    std::vector<Pt> out;
    for (const std::size_t i : best)
        if (out.empty() || out.back().x != pts[i].x || out.back().z != pts[i].z) out.push_back(pts[i]);
    while (out.size() > 1 && out.back().x == out.front().x && out.back().z == out.front().z) out.pop_back();
    return out;
}

// Akl and Toussaint's (1978) prefilter: a point well inside the polygon of
// extreme points cannot be a hull vertex, so only the others go on to the
// sort. "Well inside": farther than 1e-9 of the points' extent from every
// edge, so that rounding in the test never drops a point the monotone chain
// would keep. For many points most are dropped, and the sort shrinks with them.
void drop_inner_points(std::vector<Pt>& pts) {
    const std::vector<Pt> poly = extreme_points(pts);
    if (poly.size() < 3) return;
    double xmin = poly[0].x, xmax = xmin, zmin = poly[0].z, zmax = zmin;
    for (const Pt& p : poly) {
        xmin = std::min(xmin, p.x), xmax = std::max(xmax, p.x);
        zmin = std::min(zmin, p.z), zmax = std::max(zmax, p.z);
    }
    const double margin = 1e-9 * std::hypot(xmax - xmin, zmax - zmin);
    std::vector<double> edge_margin(poly.size());
    for (std::size_t e = 0; e < poly.size(); ++e) {
        const Pt &a = poly[e], &b = poly[(e + 1) % poly.size()];
        edge_margin[e] = margin * std::hypot(b.x - a.x, b.z - a.z);  // cross = |ab| times the distance
    }
    const auto inner = [&](const Pt& p) {
        for (std::size_t e = 0; e < poly.size(); ++e)
            if (!(cross(poly[e], poly[(e + 1) % poly.size()], p) > edge_margin[e])) return false;
        return true;
    };
    pts.erase(std::remove_if(pts.begin(), pts.end(), inner), pts.end());
}

}  // namespace

DataRegion convex_hull(const std::vector<double>& x, const std::vector<double>& z) {
    std::vector<Pt> pts;
    const std::size_t n = std::min(x.size(), z.size());
    pts.reserve(n);
    for (std::size_t i = 0; i < n; ++i)
        if (!std::isnan(x[i]) && !std::isnan(z[i])) pts.push_back({x[i], z[i]});
    drop_inner_points(pts);
    std::sort(pts.begin(), pts.end(), [](const Pt& a, const Pt& b) { return a.x < b.x || (a.x == b.x && a.z < b.z); });
    pts.erase(std::unique(pts.begin(), pts.end(), [](const Pt& a, const Pt& b) { return a.x == b.x && a.z == b.z; }),
              pts.end());
    DataRegion r;
    if (pts.size() < 3) {
        for (const Pt& p : pts) r.x.push_back(p.x), r.z.push_back(p.z);
        return r;
    }
    std::vector<Pt> hull(2 * pts.size());
    std::size_t k = 0;
    for (const Pt& p : pts) {  // lower hull
        while (k >= 2 && cross(hull[k - 2], hull[k - 1], p) <= 0) --k;
        hull[k++] = p;
    }
    for (std::size_t i = pts.size() - 1, t = k + 1; i-- > 0;) {  // upper hull
        while (k >= t && cross(hull[k - 2], hull[k - 1], pts[i]) <= 0) --k;
        hull[k++] = pts[i];
    }
    hull.resize(k - 1);  // the last point repeats the first
    for (const Pt& p : hull) r.x.push_back(p.x), r.z.push_back(p.z);
    return r;
}

bool DataRegion::contains(double px, double pz) const {
    const std::size_t m = x.size();
    if (m == 0) return false;
    const auto [xmin, xmax] = std::minmax_element(x.begin(), x.end());
    const auto [zmin, zmax] = std::minmax_element(z.begin(), z.end());
    const double sx = std::max(*xmax - *xmin, 1e-300), sz = std::max(*zmax - *zmin, 1e-300);
    const double tol = 1e-9;
    // Work in coordinates scaled to the hull's box so the tolerance is relative.
    auto sxp = [&](double v) { return (v - *xmin) / sx; };
    auto szp = [&](double v) { return (v - *zmin) / sz; };
    const Pt p{sxp(px), szp(pz)};
    if (m < 3) {
        const Pt a{sxp(x.front()), szp(z.front())}, b{sxp(x.back()), szp(z.back())};
        const double len2 = (b.x - a.x) * (b.x - a.x) + (b.z - a.z) * (b.z - a.z);
        if (len2 == 0) return std::hypot(p.x - a.x, p.z - a.z) <= tol;
        const double t = std::clamp(((p.x - a.x) * (b.x - a.x) + (p.z - a.z) * (b.z - a.z)) / len2, 0.0, 1.0);
        return std::hypot(p.x - a.x - t * (b.x - a.x), p.z - a.z - t * (b.z - a.z)) <= tol;
    }
    for (std::size_t i = 0; i < m; ++i) {
        const std::size_t j = (i + 1) % m;
        const Pt a{sxp(x[i]), szp(z[i])}, b{sxp(x[j]), szp(z[j])};
        const double len = std::hypot(b.x - a.x, b.z - a.z);
        if (cross(a, b, p) < -tol * len) return false;
    }
    return true;
}

DataRegion data_region(const Design& design, const std::string& x, const std::string& z) {
    const int jx = design.main_column(x), jz = design.main_column(z);
    if (jx < 0 || jz < 0)
        throw InputError("data region: '" + (jx < 0 ? x : z) + "' is not a numeric main effect of the model");
    const Eigen::Index n = design.X.rows();
    std::vector<double> xs(static_cast<std::size_t>(n)), zs(static_cast<std::size_t>(n));
    for (Eigen::Index i = 0; i < n; ++i) {
        xs[static_cast<std::size_t>(i)] = design.X(i, jx);
        zs[static_cast<std::size_t>(i)] = design.X(i, jz);
    }
    return convex_hull(xs, zs);
}

Eigen::MatrixXd surface_probabilities(const SurfaceGrid& grid, Family family) {
    switch (link_of(family)) {
        case Link::Logit:
            return grid.predicted.unaryExpr([](double v) { return detail::expit(v); });
        case Link::Probit:
            return grid.predicted.unaryExpr([](double v) { return detail::normal_probability(v); });
        case Link::Log:
            return grid.predicted.unaryExpr([](double v) { return std::exp(v); });
        case Link::Identity:
            break;
    }
    return grid.predicted;
}

}  // namespace moderato
