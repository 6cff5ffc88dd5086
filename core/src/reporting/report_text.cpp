#include "moderato/reporting/report_text.hpp"

#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

namespace moderato {
namespace {

const char* const kMinus = "\xE2\x88\x92";  // U+2212

std::string with_minus(std::string s) {
    if (!s.empty() && s[0] == '-') s.replace(0, 1, kMinus);
    return s;
}

std::string superscript(int e) {
    static const char* const digits[] = {"\xE2\x81\xB0", "\xC2\xB9",     "\xC2\xB2",     "\xC2\xB3",
                                         "\xE2\x81\xB4", "\xE2\x81\xB5", "\xE2\x81\xB6", "\xE2\x81\xB7",
                                         "\xE2\x81\xB8", "\xE2\x81\xB9"};
    std::string out = e < 0 ? "\xE2\x81\xBB" : "";  // superscript minus
    const std::string d = std::to_string(std::abs(e));
    for (char c : d) out += digits[c - '0'];
    return out;
}

}  // namespace

int sig_decimals(double x, int significant) {
    if (!std::isfinite(x) || x == 0) return 0;
    // Round first so 9.9996 counts as 10.00, not 9.9996.
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*e", significant - 1, x);
    const int exponent = std::atoi(std::strchr(buf, 'e') + 1);
    const int decimals = significant - 1 - exponent;
    return decimals < 0 ? 0 : decimals;
}

std::string format_fixed(double x, int decimals) {
    if (std::isnan(x)) return "\xE2\x80\x94";
    if (std::isinf(x)) return x > 0 ? "\xE2\x88\x9E" : std::string(kMinus) + "\xE2\x88\x9E";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, x);
    std::string s = buf;
    // "-0.00" reads as a sign that is not there.
    if (s[0] == '-' && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
    return with_minus(s);
}

std::string format_sig(double x, int significant) {
    if (!std::isfinite(x)) return format_fixed(x, 0);
    if (x == 0) return "0";
    const double a = std::fabs(x);
    if (a < 1e-4 || a >= 1e7) {
        char buf[64];
        std::snprintf(buf, sizeof buf, "%.*e", significant - 1, x);
        std::string s = buf;
        const auto e = s.find('e');
        const int exponent = std::atoi(s.c_str() + e + 1);
        return with_minus(s.substr(0, e)) +
               "\xC3\x97"
               "10" +
               superscript(exponent);
    }
    if (x == std::trunc(x)) return format_fixed(x, 0);  // counts, degrees of freedom, 0/1 levels
    return format_fixed(x, sig_decimals(x, significant));
}

std::string format_range(double lo, double hi, int significant) {
    const double big = std::fabs(lo) > std::fabs(hi) || !std::isfinite(hi) ? lo : hi;
    const double a = std::fabs(big);
    if (!std::isfinite(lo) || !std::isfinite(hi) || (a != 0 && (a < 1e-4 || a >= 1e7)))
        return format_sig(lo, significant) + " to " + format_sig(hi, significant);
    const int d = lo == std::trunc(lo) && hi == std::trunc(hi) ? 0 : sig_decimals(big, significant);
    return format_fixed(lo, d) + " to " + format_fixed(hi, d);
}

std::string format_p_value(double p) {
    if (std::isnan(p)) return "\xE2\x80\x94";
    if (p < 0.001) return "< 0.001";
    return format_fixed(p, 3);
}

std::string p_clause(double p) {
    const std::string t = format_p_value(p);
    return t.rfind("<", 0) == 0 ? "p " + t : "p = " + t;
}

std::string format_count(long long n) {
    std::string digits = std::to_string(n < 0 ? -n : n);
    for (int i = static_cast<int>(digits.size()) - 3; i > 0; i -= 3) digits.insert(static_cast<std::size_t>(i), ",");
    return n < 0 ? kMinus + digits : digits;
}

std::string exact_text(double x) {
    if (std::isnan(x)) return "nan";
    if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
    char buf[64];
    const auto r = std::to_chars(buf, buf + sizeof buf, x);
    return std::string(buf, r.ptr);
}

std::string level_text(double level) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4g%%", 100 * level);
    return buf;
}

}  // namespace moderato
