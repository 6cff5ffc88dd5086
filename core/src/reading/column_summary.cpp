// Column summaries for the dataset view (see column_summary.hpp for the rules).
// Quantiles come from selection (std::nth_element; for many values within
// the few buckets of a counting pass that hold them), not a full sort, so a
// million-value column is summarised in a few linear passes.
#include "moderato/reading/column_summary.hpp"

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

namespace {

// Linear interpolation between order statistics a = x(lo) and b = x(lo + 1)
// as numpy's _lerp does it: a + (b - a) t, and b - (b - a)(1 - t) for
// t >= 0.5 (exact at both ends).
double lerp(double a, double b, double t) {
    const double diff = b - a;
    return t >= 0.5 ? b - diff * (1.0 - t) : a + diff * t;
}

// Quantile p of `v` (any order; partially reordered) by selection instead of
// a full sort: the same order statistics, in linear time.
double select_quantile(std::vector<double>& v, double p) {
    const double h = static_cast<double>(v.size() - 1) * std::clamp(p, 0.0, 1.0);
    const auto lo = static_cast<std::size_t>(std::floor(h));
    const auto mid = v.begin() + static_cast<std::ptrdiff_t>(lo);
    std::nth_element(v.begin(), mid, v.end());
    if (lo + 1 >= v.size()) return *mid;
    const double next = *std::min_element(mid + 1, v.end());
    return lerp(*mid, next, h - static_cast<double>(lo));
}

// The histogram of `v` (any order) once its range and IQR are known.
Histogram histogram_of(const std::vector<double>& v, double first, double last, double iqr, std::size_t max_bins) {
    Histogram h;
    if (v.empty()) return h;
    max_bins = std::max<std::size_t>(max_bins, 1);
    const double n = static_cast<double>(v.size());
    std::size_t bins = 1;
    if (first == last) {
        first -= 0.5;
        last += 0.5;
    } else {
        const double range = last - first;
        const double sturges = range / (std::log2(n) + 1.0);
        const double fd = 2.0 * iqr * std::pow(n, -1.0 / 3.0);
        const double width = fd > 0.0 ? std::min(fd, sturges) : sturges;
        const double wanted = std::ceil(range / width);
        bins = wanted >= static_cast<double>(max_bins) ? max_bins
                                                       : std::max<std::size_t>(1, static_cast<std::size_t>(wanted));
    }
    // numpy.linspace(first, last, bins + 1): start + k * step, the last edge exactly `last`.
    const double step = (last - first) / static_cast<double>(bins);
    h.edges.resize(bins + 1);
    for (std::size_t k = 0; k < bins; ++k) h.edges[k] = static_cast<double>(k) * step + first;
    h.edges[bins] = last;
    h.counts.assign(bins, 0);
    const double denom = last - first;
    const auto nb = static_cast<std::ptrdiff_t>(bins);
    for (const double x : v) {
        // numpy.histogram's uniform-bin path: index from the scaled value,
        // then corrected against the edges themselves.
        auto k = static_cast<std::ptrdiff_t>((x - first) / denom * static_cast<double>(bins));
        if (k >= nb) k = nb - 1;
        if (k < 0) k = 0;
        if (x < h.edges[static_cast<std::size_t>(k)] && k > 0) --k;
        if (k != nb - 1 && x >= h.edges[static_cast<std::size_t>(k) + 1]) ++k;
        ++h.counts[static_cast<std::size_t>(k)];
    }
    return h;
}

}  // namespace

double quantile_sorted(const std::vector<double>& sorted, double p) {
    if (sorted.empty()) return kNaN;
    const double h = static_cast<double>(sorted.size() - 1) * std::clamp(p, 0.0, 1.0);
    const auto lo = static_cast<std::size_t>(std::floor(h));
    if (lo + 1 >= sorted.size()) return sorted.back();
    return lerp(sorted[lo], sorted[lo + 1], h - static_cast<double>(lo));
}

namespace {

// The order statistics `ranks` (0-based, ascending) of values without NaN,
// by counting sort into equal-width buckets between the minimum and the
// maximum: bucket(v) never decreases as v grows, so the k-th smallest value
// is the (k - values in earlier buckets)-th smallest of its bucket, which is
// found by selection among that bucket's values only. Two passes over all
// values (count, then gather the few buckets needed), instead of several
// rounds of nth_element over most of them. Empty when the buckets cannot be
// formed (an infinite or overflowing range).
std::vector<double> order_statistics_by_buckets(const std::vector<double>& values,
                                                const std::vector<std::size_t>& ranks) {
    constexpr std::size_t kBuckets = 4096;
    const auto [lo_it, hi_it] = std::minmax_element(values.begin(), values.end());
    const double lo = *lo_it, hi = *hi_it;
    if (lo == hi) return std::vector<double>(ranks.size(), lo);
    const double scale = static_cast<double>(kBuckets) / (hi - lo);
    if (!std::isfinite(scale) || !(scale > 0)) return {};
    const auto bucket = [&](double v) { return std::min(kBuckets - 1, static_cast<std::size_t>((v - lo) * scale)); };
    std::vector<std::size_t> count(kBuckets + 1, 0);  // count[b + 1]: values in bucket b, then cumulated
    for (const double v : values) ++count[bucket(v) + 1];
    for (std::size_t b = 0; b < kBuckets; ++b) count[b + 1] += count[b];
    std::vector<std::size_t> home;  // bucket of each rank
    std::vector<std::vector<double>> members(kBuckets);
    for (const std::size_t k : ranks)
        home.push_back(static_cast<std::size_t>(std::upper_bound(count.begin(), count.end(), k) - count.begin()) - 1);
    std::vector<char> wanted(kBuckets, 0);
    for (const std::size_t b : home) wanted[b] = 1;
    for (const std::size_t b : home) members[b].reserve(count[b + 1] - count[b]);
    for (const double v : values)
        if (const std::size_t b = bucket(v); wanted[b]) members[b].push_back(v);
    std::vector<double> out;
    for (std::size_t r = 0; r < ranks.size(); ++r) {
        std::vector<double>& m = members[home[r]];
        const auto at = m.begin() + static_cast<std::ptrdiff_t>(ranks[r] - count[home[r]]);
        std::nth_element(m.begin(), at, m.end());
        out.push_back(*at);
    }
    return out;
}

// Below this many values plain selection is as quick.
constexpr std::size_t kBucketsFrom = std::size_t{1} << 15;

}  // namespace

std::vector<double> quantiles_by_selection(std::vector<double>& values, const std::vector<double>& ps) {
    if (values.size() >= kBucketsFrom) {
        const std::size_t n = values.size();
        std::vector<std::size_t> ranks;
        std::vector<double> fraction;
        for (const double p : ps) {
            const double h = static_cast<double>(n - 1) * std::clamp(p, 0.0, 1.0);
            const auto k = static_cast<std::size_t>(std::floor(h));
            ranks.push_back(k);
            ranks.push_back(std::min(k + 1, n - 1));
            fraction.push_back(h - static_cast<double>(k));
        }
        const std::vector<double> x = order_statistics_by_buckets(values, ranks);
        if (!x.empty()) {
            std::vector<double> out;
            for (std::size_t q = 0; q < ps.size(); ++q)
                out.push_back(ranks[2 * q] + 1 >= n ? x[2 * q] : lerp(x[2 * q], x[2 * q + 1], fraction[q]));
            return out;
        }
    }
    std::vector<double> out;
    const std::size_t n = values.size();
    std::size_t start = 0;  // values[0..start) are at most values[start], which is in its sorted place
    for (const double p : ps) {
        if (n == 0) {
            out.push_back(kNaN);
            continue;
        }
        const double h = static_cast<double>(n - 1) * std::clamp(p, 0.0, 1.0);
        const auto lo = static_cast<std::size_t>(std::floor(h));
        const auto at = [&](std::size_t k) { return values.begin() + static_cast<std::ptrdiff_t>(k); };
        if (lo > start || (lo == 0 && start == 0)) std::nth_element(at(start), at(lo), values.end());
        start = lo;
        if (lo + 1 >= n) {
            out.push_back(values[lo]);
            continue;
        }
        out.push_back(lerp(values[lo], *std::min_element(at(lo + 1), values.end()), h - static_cast<double>(lo)));
    }
    return out;
}

Histogram auto_histogram(const std::vector<double>& sorted, std::size_t max_bins) {
    if (sorted.empty()) return {};
    const double iqr = quantile_sorted(sorted, 0.75) - quantile_sorted(sorted, 0.25);
    return histogram_of(sorted, sorted.front(), sorted.back(), iqr, max_bins);
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
    s.mean = mean_of(v);
    if (v.size() >= 2) s.sd = sd_of(v, s.mean);
    const auto [lo, hi] = std::minmax_element(v.begin(), v.end());
    s.min = *lo;
    s.max = *hi;
    // Quantiles by selection (each partially reorders v; the order statistics are unchanged).
    s.median = select_quantile(v, 0.5);
    s.q1 = select_quantile(v, 0.25);
    s.q3 = select_quantile(v, 0.75);
    s.histogram = histogram_of(v, s.min, s.max, s.q3 - s.q1, max_bins);
    return s;
}

}  // namespace moderato
