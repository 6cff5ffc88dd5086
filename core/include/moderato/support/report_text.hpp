// How Moderato writes a number, everywhere a reader sees one: memo sentences
// and tables, exported tables, text reports, the notes and cautions core
// writes, and (through ui/src/common/number_text.hpp) every table, readout,
// plot axis and grid of the workbench. One set of rules, so one value reads
// the same in a sentence and in a table:
//
// - four significant digits, trailing zeros kept (17.30 next to 14.73), the
//   whole part always written out (12346, not 1.235e+04); whole numbers
//   without decimals (895, 0, 1);
// - powers of ten below 1e-4 and from 1e7 in magnitude (3.210×10⁻⁵);
// - the true minus sign U+2212, never a hyphen; no "−0";
// - thousands separated by commas in counts (n = 1,200 rows) only: a measured
//   value keeps plain digits so it copies as a number;
// - p-values to three decimals, "< 0.001" below that;
// - "—" for a value that does not exist (NaN), "∞" and "−∞" for infinities;
// - exact_text() for machine columns (CSV, tooltips): every digit, ASCII.
//
// It sits in support, the bottom layer, so the probing and estimation code
// that writes notes and cautions uses it too.
#pragma once

#include <string>

namespace moderato {

// Four significant digits (the rules above).
std::string format_sig(double x);
// "lo to hi", each end with the four significant digits it has on its own
// (so "9.928 to 11.29": a number reads the same inside an interval as
// alone), trailing zeros kept ("0.07700 to 0.08845"); a whole-number end
// beside a fractional one gets the other's decimals as trailing zeros, up to
// four significant digits ("12.00 to 37.90", "0.0000 to 0.5000"). Both ends
// whole stay whole ("0 to 30").
std::string format_range(double lo, double hi);
// "0.023", "< 0.001", "1.000" (NaN -> "—").
std::string format_p_value(double p);
// "p = 0.023" or "p < 0.001".
std::string p_clause(double p);
// 1200 -> "1,200"; −1200 -> "−1,200".
// Degrees of freedom: whole ones as they are ("475"), approximate ones
// (Satterthwaite's) to four significant digits ("27.19"), "inf" for none.
std::string format_df(double df);
std::string format_count(long long n);
// 0.95 -> "95%" (0.9 -> "90%", 0.995 -> "99.5%").
std::string level_text(double level);
// The name of a test statistic with its degrees of freedom: "t(196)" for a t
// reference distribution, "z" for the normal one (infinite df).
std::string statistic_label(double df);
// The shortest decimal text that reads back as exactly x ("0.1", "-2.5e-07"),
// plain ASCII; "nan", "inf", "-inf" for non-finite values. For machine columns.
std::string exact_text(double x);
// A data value as the reader's eye wants it but with every digit it has (the
// dataset grid, a value the user typed): the shortest decimal that reads back
// as x, with the minus sign, powers of ten and symbols of format_sig.
std::string format_data(double x);
// A plot axis tick at x when the ticks are `step` apart: the decimals the step
// needs, the same for every tick of the axis (0.00, 0.25, 0.50: zero too); powers of ten
// as format_sig where it uses them.
std::string format_tick(double x, double step);
// Unicode subscript and superscript digits: 12 -> "₁₂", −2 -> "⁻²".
std::string subscript_text(int n);
std::string superscript_text(int n);

}  // namespace moderato
