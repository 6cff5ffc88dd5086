#include "moderato/support/report_text.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

namespace moderato {
namespace {

constexpr int kSignificant = 4;
const char* const kMinus = "\xE2\x88\x92";     // U+2212
const char* const kDash = "\xE2\x80\x94";      // U+2014, a value that does not exist
const char* const kInfinity = "\xE2\x88\x9E";  // U+221E
const char* const kTimesTen =
    "\xC3\x97"
    "10";  // "×10"

std::string with_minus(std::string s) {
    if (!s.empty() && s[0] == '-') s.replace(0, 1, kMinus);
    return s;
}

std::string digits_of(int n, const char* const table[10], const char* minus) {
    std::string out = n < 0 ? minus : "";
    for (char c : std::to_string(n < 0 ? -static_cast<long long>(n) : n)) out += table[c - '0'];
    return out;
}

std::string not_finite(double x) {
    if (std::isnan(x)) return kDash;
    return x > 0 ? std::string(kInfinity) : std::string(kMinus) + kInfinity;
}

// True where the rules write x with a power of ten.
bool needs_power(double x) {
    const double a = std::fabs(x);
    return a != 0 && (a < 1e-4 || a >= 1e7);
}

// "1.234e-05" (printf or to_chars) -> "1.234×10⁻⁵".
std::string power_of_ten(const std::string& scientific) {
    const auto e = scientific.find('e');
    const int exponent = std::atoi(scientific.c_str() + e + 1);
    return with_minus(scientific.substr(0, e)) + kTimesTen + superscript_text(exponent);
}

// The decimals four significant digits of x need (none for 1234.5 and up).
int sig_decimals(double x) {
    if (!std::isfinite(x) || x == 0) return 0;
    // Round first so 9.9996 counts as 10.00, not 9.9996.
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*e", kSignificant - 1, x);
    const int exponent = std::atoi(std::strchr(buf, 'e') + 1);
    const int decimals = kSignificant - 1 - exponent;
    return decimals < 0 ? 0 : decimals;
}

// x with exactly `decimals` decimals.
std::string format_fixed(double x, int decimals) {
    if (!std::isfinite(x)) return not_finite(x);
    char buf[400];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, x);
    std::string s = buf;
    // "-0.00" reads as a sign that is not there.
    if (s[0] == '-' && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
    return with_minus(s);
}

// The decimals that write `step` exactly (0.25 -> 2, 5 -> 0), at most 12.
int step_decimals(double step) {
    double scaled = std::fabs(step);
    for (int d = 0; d < 12; ++d, scaled *= 10)
        if (std::fabs(scaled - std::round(scaled)) <= 1e-6 * scaled) return d;
    return 12;
}

}  // namespace

std::string format_sig(double x) {
    if (!std::isfinite(x)) return not_finite(x);
    if (x == 0) return "0";
    if (needs_power(x)) {
        char buf[64];
        std::snprintf(buf, sizeof buf, "%.*e", kSignificant - 1, x);
        return power_of_ten(buf);
    }
    if (x == std::trunc(x)) return format_fixed(x, 0);  // counts, degrees of freedom, 0/1 levels
    return format_fixed(x, sig_decimals(x));
}

std::string format_range(double lo, double hi) {
    std::string ends[2] = {format_sig(lo), format_sig(hi)};
    const double x[2] = {lo, hi};
    const auto whole = [](double v) { return std::isfinite(v) && v == std::trunc(v) && !needs_power(v); };
    const auto fractional = [](double v) { return std::isfinite(v) && v != std::trunc(v) && !needs_power(v); };
    // A whole-number end beside a fractional one is written as a measured
    // value, with trailing zeros to the other end's decimals ("12.00 to 37.90",
    // not "12 to 37.90"); four significant digits at most (zero: all of them).
    for (int k = 0; k < 2; ++k)
        if (whole(x[k]) && fractional(x[1 - k])) {
            const int other = sig_decimals(x[1 - k]);
            ends[k] = format_fixed(x[k], x[k] == 0 ? other : std::min(other, sig_decimals(x[k])));
        }
    return ends[0] + " to " + ends[1];
}

std::string format_p_value(double p) {
    if (std::isnan(p)) return kDash;
    if (p < 0.001) return "< 0.001";
    return format_fixed(p, 3);
}

std::string p_clause(double p) {
    const std::string t = format_p_value(p);
    return t.rfind("<", 0) == 0 ? "p " + t : "p = " + t;
}

std::string format_count(long long n) {
    // Through unsigned, so the most negative value has a magnitude too.
    const unsigned long long magnitude = n < 0 ? 0ULL - static_cast<unsigned long long>(n) : n;
    std::string digits = std::to_string(magnitude);
    for (int i = static_cast<int>(digits.size()) - 3; i > 0; i -= 3) digits.insert(static_cast<std::size_t>(i), ",");
    return n < 0 ? kMinus + digits : digits;
}

std::string level_text(double level) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4g%%", 100 * level);
    return buf;
}

std::string statistic_label(double df) {
    if (!std::isfinite(df)) return "z";
    return "t(" + format_sig(df) + ")";
}

std::string exact_text(double x) {
    if (std::isnan(x)) return "nan";
    if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, x);
    return std::string(buf, r.ptr);
}

std::string format_data(double x) {
    if (!std::isfinite(x)) return not_finite(x);
    if (x == 0) return "0";
    char buf[400];
    if (needs_power(x)) {
        const auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::scientific);
        return power_of_ten(std::string(buf, r.ptr));
    }
    const auto r = std::to_chars(buf, buf + sizeof buf, x, std::chars_format::fixed);
    return with_minus(std::string(buf, r.ptr));
}

std::string format_tick(double x, double step) {
    if (!std::isfinite(x) || !std::isfinite(step) || step == 0) return format_sig(x);
    // A tick meant to be zero may carry rounding noise (3e-17): it reads 0 with the axis's decimals.
    if (std::fabs(x) <= 1e-9 * std::fabs(step)) x = 0;
    else if (needs_power(x) || std::fabs(step) < 1e-4) return format_sig(x);
    return format_fixed(x, step_decimals(step));
}

std::string subscript_text(int n) {
    static const char* const digits[] = {"\xE2\x82\x80", "\xE2\x82\x81", "\xE2\x82\x82", "\xE2\x82\x83",
                                         "\xE2\x82\x84", "\xE2\x82\x85", "\xE2\x82\x86", "\xE2\x82\x87",
                                         "\xE2\x82\x88", "\xE2\x82\x89"};
    return digits_of(n, digits, "\xE2\x82\x8B");  // subscript minus U+208B
}

std::string superscript_text(int n) {
    static const char* const digits[] = {"\xE2\x81\xB0", "\xC2\xB9",     "\xC2\xB2",     "\xC2\xB3",
                                         "\xE2\x81\xB4", "\xE2\x81\xB5", "\xE2\x81\xB6", "\xE2\x81\xB7",
                                         "\xE2\x81\xB8", "\xE2\x81\xB9"};
    return digits_of(n, digits, "\xE2\x81\xBB");  // superscript minus U+207B
}

std::string format_df(double df) {
    if (std::isinf(df)) return "inf";
    return df == std::round(df) ? exact_text(df) : format_sig(df);
}

}  // namespace moderato
