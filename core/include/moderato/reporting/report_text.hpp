// Numbers as a reader sees them in memos and exported tables. One rule
// everywhere: four significant digits, trailing zeros kept (so 17.30 next to
// 14.73), the true minus sign U+2212, thousands separated by commas in counts,
// p-values to three decimals with "< 0.001" below that. The CSV column of a
// table carries exact_text() instead, which round-trips the double.
#pragma once

#include <string>

namespace moderato {

// Four significant digits by default; NaN -> "—", infinities -> "∞" / "−∞".
// Values below 1e-4 or of 1e7 and above in magnitude use powers of ten
// ("3.210×10⁻⁵"). Whole numbers have no decimals ("895", "0", "1").
std::string format_sig(double x, int significant = 4);
// The decimals format_sig uses for x (for lining up both ends of an interval).
int sig_decimals(double x, int significant = 4);
// x with exactly `decimals` decimals (U+2212 minus, NaN -> "—").
std::string format_fixed(double x, int decimals);
// "lo to hi", both ends with the decimals of the larger-magnitude end (none
// when both are whole numbers).
std::string format_range(double lo, double hi, int significant = 4);
// "0.023", "< 0.001", "1.000" (NaN -> "—").
std::string format_p_value(double p);
// "p = 0.023" or "p < 0.001".
std::string p_clause(double p);
// 1200 -> "1,200".
std::string format_count(long long n);
// The shortest decimal text that reads back as exactly x ("0.1", "-2.5e-07"),
// plain ASCII; "nan", "inf", "-inf" for non-finite values.
std::string exact_text(double x);
// 0.95 -> "95%" (0.9 -> "90%", 0.995 -> "99.5%").
std::string level_text(double level);

}  // namespace moderato
