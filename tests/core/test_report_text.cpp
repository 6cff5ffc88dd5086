// The one number formatter (support/report_text.hpp) against cases worked by
// hand: rounding to four significant digits, where powers of ten start, the
// Unicode characters it writes, p-values, counts, axis ticks and the exact
// text of machine columns.
#include <gtest/gtest.h>

#include <climits>
#include <cmath>
#include <cstdlib>
#include <string>
#include <utility>
#include <vector>

#include "moderato/support/report_text.hpp"

using namespace moderato;

namespace {

// The characters, by their Unicode code points (UTF-8 bytes written out).
const std::string kMinus = "\xE2\x88\x92";     // U+2212 MINUS SIGN
const std::string kDash = "\xE2\x80\x94";      // U+2014 EM DASH
const std::string kInfinity = "\xE2\x88\x9E";  // U+221E INFINITY
const std::string kTimes = "\xC3\x97";         // U+00D7 MULTIPLICATION SIGN
const std::string kSupMinus = "\xE2\x81\xBB";  // U+207B SUPERSCRIPT MINUS
const std::string kSup0 = "\xE2\x81\xB0";      // U+2070 SUPERSCRIPT ZERO
const std::string kSup1 = "\xC2\xB9";          // U+00B9 SUPERSCRIPT ONE
const std::string kSup2 = "\xC2\xB2";          // U+00B2 SUPERSCRIPT TWO
const std::string kSup4 = "\xE2\x81\xB4";      // U+2074 SUPERSCRIPT FOUR
const std::string kSup5 = "\xE2\x81\xB5";      // U+2075 SUPERSCRIPT FIVE
const std::string kSup7 = "\xE2\x81\xB7";      // U+2077 SUPERSCRIPT SEVEN
const std::string kSub0 = "\xE2\x82\x80";      // U+2080 SUBSCRIPT ZERO
const std::string kSub1 = "\xE2\x82\x81";      // U+2081 SUBSCRIPT ONE
const std::string kSub2 = "\xE2\x82\x82";      // U+2082 SUBSCRIPT TWO

}  // namespace

TEST(ReportText, FourSignificantDigitsTrailingZerosKept) {
    // Worked by hand: round to four significant digits; the zeros that make up the four are written.
    EXPECT_EQ(format_sig(15.9238), "15.92");
    EXPECT_EQ(format_sig(17.3), "17.30");
    EXPECT_EQ(format_sig(0.0018222), "0.001822");
    EXPECT_EQ(format_sig(0.45678), "0.4568");
    // 9.99962 rounds up to 10.00: the carry adds a digit before the point, so two decimals remain.
    EXPECT_EQ(format_sig(9.99962), "10.00");
    // The whole part is always written out: 12345.678 has five digits before the point.
    EXPECT_EQ(format_sig(12345.678), "12346");
    EXPECT_EQ(format_sig(1234.56), "1235");
    // Whole numbers have no decimals (counts, degrees of freedom, 0/1 levels).
    EXPECT_EQ(format_sig(895), "895");
    EXPECT_EQ(format_sig(1), "1");
    EXPECT_EQ(format_sig(0), "0");
}

TEST(ReportText, MinusSignIsUnicodeU2212AndThereIsNoMinusZero) {
    // Unicode U+2212 MINUS SIGN, not the hyphen-minus U+002D.
    EXPECT_EQ(format_sig(-0.45678), kMinus + "0.4568");
    EXPECT_EQ(format_sig(-2511.3), kMinus + "2511");
    EXPECT_EQ(format_sig(-0.0), "0");
    // Worked by hand: a small negative value keeps its sign in its own digits, never "−0.000".
    EXPECT_EQ(format_sig(-0.00012), kMinus + "0.0001200");
    EXPECT_EQ(format_tick(-1e-17, 0.5), "0.0");
    EXPECT_EQ(format_sig(-1.0), kMinus + "1");
}

TEST(ReportText, PowersOfTenBelow1eMinus4AndFrom1e7) {
    // Worked by hand: 4.867e-5 = 4.867 × 10^-5 (U+00D7, superscript digits U+2070–U+2079, minus U+207B).
    EXPECT_EQ(format_sig(4.867e-5), "4.867" + kTimes + "10" + kSupMinus + kSup5);
    EXPECT_EQ(format_sig(-1.2345e-5), kMinus + "1.234" + kTimes + "10" + kSupMinus + kSup5);
    // The edges: 1e-4 is written plainly (four significant digits: 0.0001000), 9.999e-5 is not.
    EXPECT_EQ(format_sig(1e-4), "0.0001000");
    EXPECT_EQ(format_sig(9.999e-5), "9.999" + kTimes + "10" + kSupMinus + kSup5);
    // 9,999,999 is a whole number below 1e7; 1e7 takes a power.
    EXPECT_EQ(format_sig(9999999), "9999999");
    EXPECT_EQ(format_sig(1e7), "1.000" + kTimes + "10" + kSup7);
    EXPECT_EQ(format_sig(2.5e10), "2.500" + kTimes + "10" + kSup1 + kSup0);
}

TEST(ReportText, NotANumberAndInfinities) {
    // A value that does not exist is a dash (U+2014); infinities are U+221E with U+2212 for the negative one.
    EXPECT_EQ(format_sig(std::nan("")), kDash);
    EXPECT_EQ(format_sig(INFINITY), kInfinity);
    EXPECT_EQ(format_sig(-INFINITY), kMinus + kInfinity);
    EXPECT_EQ(format_p_value(std::nan("")), kDash);
    EXPECT_EQ(format_data(std::nan("")), kDash);
    EXPECT_EQ(format_range(-INFINITY, 2.5), kMinus + kInfinity + " to 2.500");
}

TEST(ReportText, IntervalEndsReadAsTheyDoAloneWithTheirTrailingZeros) {
    // The helpdesk-staffing memo once wrote "Fieller interval 9.93 to 11.29" and one line down "below 9.928":
    // each end of an interval is written by itself (worked by hand: 9.92814 -> 9.928, 11.2867 -> 11.29).
    EXPECT_EQ(format_range(9.92814, 11.2867), "9.928 to 11.29");
    EXPECT_EQ(format_range(9.92814, 11.2867).substr(0, 5), format_sig(9.92814));
    EXPECT_EQ(format_range(14.73, 17.3), "14.73 to 17.30");
    EXPECT_EQ(format_range(0, 30), "0 to 30");
    EXPECT_EQ(format_range(-11.0801, -5.58), kMinus + "11.08 to " + kMinus + "5.580");
    // Issue 12: "0.077 to 0.08845" (the probe text report's own "%.4g") and "12 to 37.90" (a whole-number
    // end) dropped trailing zeros at one end. Common practice: both ends with the same decimals where the
    // digits allow it; a whole end takes the other end's decimals, up to four significant digits.
    EXPECT_EQ(format_range(0.077, 0.08845), "0.07700 to 0.08845");
    EXPECT_EQ(format_range(12, 37.9), "12.00 to 37.90");
    EXPECT_EQ(format_range(-37.9, -12), kMinus + "37.90 to " + kMinus + "12.00");
    EXPECT_EQ(format_range(0, 0.5), "0.0000 to 0.5000");
    EXPECT_EQ(format_range(0.5, 1), "0.5000 to 1.000");  // 1 to four significant digits, no more
    EXPECT_EQ(format_range(0.5, 12000), "0.5000 to 12000");
    EXPECT_EQ(format_range(2e-5, 3), format_sig(2e-5) + " to 3");  // a power of ten gives no decimals to copy
    // Ends of one order of magnitude, or one of them whole: the same count of decimals.
    for (const auto& [lo, hi] : std::vector<std::pair<double, double>>{
             {0.077, 0.08845}, {3.25, 7.5}, {-0.0625, -0.05}, {12, 37.9}, {101.5, 250}}) {
        const std::string r = format_range(lo, hi);
        const std::string a = r.substr(0, r.find(" to ")), b = r.substr(r.find(" to ") + 4);
        EXPECT_EQ(a.size() - a.find('.'), b.size() - b.find('.')) << r;
    }
}

TEST(ReportText, PValuesToThreeDecimalsOrBelow0001) {
    // Common practice in reports: three decimals, "< 0.001" below that.
    EXPECT_EQ(format_p_value(0.0234), "0.023");
    EXPECT_EQ(format_p_value(0.001), "0.001");
    EXPECT_EQ(format_p_value(0.00099), "< 0.001");
    EXPECT_EQ(format_p_value(0.0004), "< 0.001");
    EXPECT_EQ(format_p_value(0.99962), "1.000");
    EXPECT_EQ(p_clause(0.0004), "p < 0.001");
    EXPECT_EQ(p_clause(0.5), "p = 0.500");
}

TEST(ReportText, CountsHaveThousandsSeparators) {
    // Worked by hand: groups of three digits from the right, U+2212 for a negative count.
    EXPECT_EQ(format_count(1234567), "1,234,567");
    EXPECT_EQ(format_count(1000), "1,000");
    EXPECT_EQ(format_count(999), "999");
    EXPECT_EQ(format_count(900), "900");
    EXPECT_EQ(format_count(0), "0");
    EXPECT_EQ(format_count(-1200), kMinus + "1,200");
    // The most negative 64-bit value: -2^63 = -9,223,372,036,854,775,808.
    EXPECT_EQ(format_count(LLONG_MIN), kMinus + "9,223,372,036,854,775,808");
    // A measured value is not a count: no separator, so it copies as a number.
    EXPECT_EQ(format_sig(1200.25), "1200");
}

TEST(ReportText, LevelsAndTestStatisticNames) {
    EXPECT_EQ(level_text(0.95), "95%");
    EXPECT_EQ(level_text(0.9), "90%");
    EXPECT_EQ(level_text(0.995), "99.5%");
    // A t reference distribution names its degrees of freedom; the normal one (infinite df) is z.
    EXPECT_EQ(statistic_label(196), "t(196)");
    EXPECT_EQ(statistic_label(INFINITY), "z");
}

TEST(ReportText, ExactTextRoundTrips) {
    // The shortest decimal that reads back as the same double (C++17 to_chars, IEEE 754 round trip).
    for (const double v : {0.1, -2.5e-7, 1.0 / 3.0, 123456789.125, 5e-324, 1.7976931348623157e308}) {
        const std::string t = exact_text(v);
        EXPECT_EQ(std::strtod(t.c_str(), nullptr), v) << t;
    }
    EXPECT_EQ(exact_text(0.1), "0.1");
    EXPECT_EQ(exact_text(-2.5), "-2.5");  // ASCII: a machine column
    EXPECT_EQ(exact_text(std::nan("")), "nan");
    EXPECT_EQ(exact_text(-INFINITY), "-inf");
}

TEST(ReportText, DataValuesKeepEveryDigit) {
    // The shortest decimal that reads back as x, written with the reader's minus sign and powers of ten.
    EXPECT_EQ(format_data(0.1), "0.1");
    EXPECT_EQ(format_data(-2.5), kMinus + "2.5");
    EXPECT_EQ(format_data(123456.789), "123456.789");
    EXPECT_EQ(format_data(41), "41");
    // 0.1 + 0.2 is not 0.3 in binary (IEEE 754): every digit of it is shown.
    EXPECT_EQ(format_data(0.1 + 0.2), "0.30000000000000004");
    EXPECT_EQ(format_data(1e-7), "1" + kTimes + "10" + kSupMinus + kSup7);
    EXPECT_EQ(format_data(-2.5e10), kMinus + "2.5" + kTimes + "10" + kSup1 + kSup0);
    for (const double v : {0.1, -2.5, 123456.789, 1.0 / 3.0}) {
        std::string t = format_data(v);
        if (t.rfind(kMinus, 0) == 0) t.replace(0, kMinus.size(), "-");
        EXPECT_EQ(std::strtod(t.c_str(), nullptr), v) << t;
    }
}

TEST(ReportText, AxisTicksTakeTheDecimalsOfTheirStep) {
    // Worked by hand: ticks 0.25 apart need two decimals, on every tick of the axis.
    EXPECT_EQ(format_tick(0.5, 0.25), "0.50");
    EXPECT_EQ(format_tick(-0.25, 0.25), kMinus + "0.25");
    EXPECT_EQ(format_tick(1, 0.25), "1.00");
    EXPECT_EQ(format_tick(20, 5), "20");
    EXPECT_EQ(format_tick(2.5, 0.5), "2.5");
    // Tick positions carry binary rounding: 3 × 0.1 and a zero that came out as 5.6e-17 (zero takes the
    // axis's decimals like every other tick).
    EXPECT_EQ(format_tick(0.1 * 3, 0.1), "0.3");
    EXPECT_EQ(format_tick(5.551115123125783e-17, 0.1), "0.0");
    EXPECT_EQ(format_tick(0, 5), "0");
    // Powers of ten where format_sig uses them.
    EXPECT_EQ(format_tick(1.5e7, 5e6), "1.500" + kTimes + "10" + kSup7);
    EXPECT_EQ(format_tick(2e-5, 1e-5), "2.000" + kTimes + "10" + kSupMinus + kSup5);
}

TEST(ReportText, SubscriptsAndSuperscripts) {
    // Unicode U+2080–U+2089 (subscripts) and U+2070, U+00B9, U+00B2, U+00B3, U+2074–U+2079 (superscripts).
    EXPECT_EQ(subscript_text(0), kSub0);
    EXPECT_EQ(subscript_text(12), kSub1 + kSub2);
    EXPECT_EQ(superscript_text(2), kSup2);
    EXPECT_EQ(superscript_text(-2), kSupMinus + kSup2);
    EXPECT_EQ(superscript_text(14), kSup1 + kSup4);
}
