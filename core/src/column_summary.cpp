// Column summaries for the dataset view (see column_summary.hpp for the rules).
#include "moderato/column_summary.hpp"

#include <algorithm>
#include <cmath>

namespace moderato {

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

// Compensated summation (Neumaier 1974, the Kahan–Babuška variant): the
// rounding error of each addition is carried along, so the sum of a sorted
// million values is as good as the sum of a shuffled one.
class Sum {
public:
    void add(double x) {
        const double t = s_ + x;
        c_ += std::abs(s_) >= std::abs(x) ? (s_ - t) + x : (x - t) + s_;
        s_ = t;
    }
    double value() const { return s_ + c_; }

private:
    double s_ = 0.0, c_ = 0.0;
};

// Mean: compensated sum, then a compensated correction pass.
double mean_of(const std::vector<double>& v) {
    Sum s;
    for (const double d : v) s.add(d);
    const double n = static_cast<double>(v.size());
    const double m = s.value() / n;
    Sum c;
    for (const double d : v) c.add(d - m);
    return m + c.value() / n;
}

// Sample SD by the corrected two-pass formula (Chan, Golub & LeVeque 1983):
// (sum d^2 - (sum d)^2 / n) / (n - 1), d = x - mean, both sums compensated.
double sd_of(const std::vector<double>& v, double mean) {
    Sum ss, s;
    for (const double x : v) {
        const double d = x - mean;
        ss.add(d * d);
        s.add(d);
    }
    const double n = static_cast<double>(v.size());
    const double sd = s.value();
    return std::sqrt(std::max(0.0, (ss.value() - sd * sd / n) / (n - 1.0)));
}

}  // namespace

double quantile_sorted(const std::vector<double>& sorted, double p) {
    if (sorted.empty()) return kNaN;
    const double h = static_cast<double>(sorted.size() - 1) * std::clamp(p, 0.0, 1.0);
    const auto lo = static_cast<std::size_t>(std::floor(h));
    if (lo + 1 >= sorted.size()) return sorted.back();
    const double frac = h - static_cast<double>(lo);
    // numpy's _lerp: a + (b - a) t, and b - (b - a)(1 - t) for t >= 0.5 (exact at both ends).
    const double a = sorted[lo], b = sorted[lo + 1], diff = b - a;
    return frac >= 0.5 ? b - diff * (1.0 - frac) : a + diff * frac;
}

Histogram auto_histogram(const std::vector<double>& sorted, std::size_t max_bins) {
    Histogram h;
    if (sorted.empty()) return h;
    max_bins = std::max<std::size_t>(max_bins, 1);
    double first = sorted.front(), last = sorted.back();
    const double n = static_cast<double>(sorted.size());
    std::size_t bins = 1;
    if (first == last) {
        first -= 0.5;
        last += 0.5;
    } else {
        const double range = last - first;
        const double sturges = range / (std::log2(n) + 1.0);
        const double iqr = quantile_sorted(sorted, 0.75) - quantile_sorted(sorted, 0.25);
        const double fd = 2.0 * iqr * std::pow(n, -1.0 / 3.0);
        const double width = fd > 0.0 ? std::min(fd, sturges) : sturges;
        const double wanted = std::ceil(range / width);
        bins = wanted >= static_cast<double>(max_bins) ? max_bins : std::max<std::size_t>(1, static_cast<std::size_t>(wanted));
    }
    // numpy.linspace(first, last, bins + 1): start + k * step, the last edge exactly `last`.
    const double step = (last - first) / static_cast<double>(bins);
    h.edges.resize(bins + 1);
    for (std::size_t k = 0; k < bins; ++k) h.edges[k] = static_cast<double>(k) * step + first;
    h.edges[bins] = last;
    h.counts.assign(bins, 0);
    const double denom = last - first;
    for (const double x : sorted) {
        // numpy.histogram's uniform-bin path: index from the scaled value,
        // then corrected against the edges themselves.
        auto k = static_cast<std::ptrdiff_t>((x - first) / denom * static_cast<double>(bins));
        const auto nb = static_cast<std::ptrdiff_t>(bins);
        if (k >= nb) k = nb - 1;
        if (k < 0) k = 0;
        if (x < h.edges[static_cast<std::size_t>(k)] && k > 0) --k;
        if (k != nb - 1 && x >= h.edges[static_cast<std::size_t>(k) + 1]) ++k;
        ++h.counts[static_cast<std::size_t>(k)];
    }
    return h;
}

ColumnSummary summarise_column(const Column& column, std::size_t max_bins) {
    ColumnSummary s;
    s.name = column.name;
    s.kind = column.kind;
    s.rows = column.size();
    if (column.kind == ColumnKind::Categorical) {
        s.levels = column.levels;
        s.level_counts.assign(column.levels.size(), 0);
        for (const std::int32_t c : column.codes)
            if (c >= 0 && static_cast<std::size_t>(c) < s.level_counts.size()) {
                ++s.level_counts[static_cast<std::size_t>(c)];
                ++s.n;
            }
        s.missing = s.rows - s.n;
        return s;
    }
    std::vector<double> v;
    v.reserve(column.numbers.size());
    for (const double d : column.numbers)
        if (d == d) v.push_back(d);
    s.n = v.size();
    s.missing = s.rows - s.n;
    if (v.empty()) return s;
    std::sort(v.begin(), v.end());
    s.mean = mean_of(v);
    if (v.size() >= 2) s.sd = sd_of(v, s.mean);
    s.min = v.front();
    s.max = v.back();
    s.q1 = quantile_sorted(v, 0.25);
    s.median = quantile_sorted(v, 0.5);
    s.q3 = quantile_sorted(v, 0.75);
    s.histogram = auto_histogram(v, max_bins);
    return s;
}

}  // namespace moderato
