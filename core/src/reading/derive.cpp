// Derived columns: centring, standardising, logs, squares, products and
// dummy indicators. Each returns a new numeric column; missing stays missing.
#include "moderato/reading/derive.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <vector>

#include "moderato/support/error.hpp"

namespace moderato {

namespace {

// Shortest text that reads back as the same double.
std::string number_text(double v) {
    char buf[32];
    const auto r = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, r.ptr);
}

void require_numeric(const Column& x, const std::string& what) {
    if (x.kind != ColumnKind::Numeric)
        throw InputError("column '" + x.name + "' is categorical; " + what +
                         " needs a numeric column (dummy-code it, or choose another column)");
}

std::vector<double> present_values(const Column& x) {
    std::vector<double> v;
    v.reserve(x.numbers.size());
    for (const double d : x.numbers)
        if (d == d) v.push_back(d);
    return v;
}

// Mean with a correction pass (the second pass removes most rounding error).
double mean_of(const std::vector<double>& v) {
    double s = 0.0;
    for (const double d : v) s += d;
    const double m = s / static_cast<double>(v.size());
    double c = 0.0;
    for (const double d : v) c += d - m;
    return m + c / static_cast<double>(v.size());
}

Column numeric_column(const std::string& name, std::size_t rows) {
    Column c;
    c.name = name;
    c.kind = ColumnKind::Numeric;
    c.numbers.resize(rows);
    return c;
}

}  // namespace

double centre_value(const Column& x, CentreAt at, double value) {
    require_numeric(x, "centring");
    if (at == CentreAt::Value) {
        if (!std::isfinite(value))
            throw InputError("the centring value for column '" + x.name + "' must be a finite number");
        return value;
    }
    std::vector<double> v = present_values(x);
    if (v.empty())
        throw InputError("column '" + x.name + "' has no values (every cell is missing); it cannot be centred");
    if (at == CentreAt::Mean) return mean_of(v);
    const std::size_t n = v.size(), mid = n / 2;
    std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(mid), v.end());
    const double upper = v[mid];
    if (n % 2) return upper;
    const double lower = *std::max_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(mid));
    return lower + (upper - lower) / 2.0;
}

Column centre(const Column& x, CentreAt at, double value, const std::string& new_name) {
    const double c = centre_value(x, at, value);
    Column out = numeric_column(new_name.empty() ? x.name + "_c" : new_name, x.numbers.size());
    for (std::size_t i = 0; i < x.numbers.size(); ++i) out.numbers[i] = x.numbers[i] - c;
    return out;
}

Column standardise(const Column& x, const std::string& new_name) {
    require_numeric(x, "standardising");
    const std::vector<double> v = present_values(x);
    if (v.size() < 2)
        throw InputError("column '" + x.name + "' has " + std::to_string(v.size()) +
                         (v.size() == 1 ? " value" : " values") +
                         "; standardising needs at least 2 non-missing values");
    const auto [lo, hi] = std::minmax_element(v.begin(), v.end());
    if (*lo == *hi)
        throw InputError("column '" + x.name + "' is constant (every value is " + number_text(*lo) +
                         "); it cannot be standardised");
    const double m = mean_of(v);
    double ss = 0.0;
    for (const double d : v) ss += (d - m) * (d - m);
    const double sd = std::sqrt(ss / static_cast<double>(v.size() - 1));
    Column out = numeric_column(new_name.empty() ? x.name + "_std" : new_name, x.numbers.size());
    for (std::size_t i = 0; i < x.numbers.size(); ++i) out.numbers[i] = (x.numbers[i] - m) / sd;
    return out;
}

Column log_column(const Column& x, const Table& table, const std::string& new_name) {
    require_numeric(x, "log");
    Column out = numeric_column(new_name.empty() ? "log(" + x.name + ")" : new_name, x.numbers.size());
    for (std::size_t i = 0; i < x.numbers.size(); ++i) {
        const double d = x.numbers[i];
        if (d <= 0.0)
            throw InputError("column '" + x.name + "' has the value " + number_text(d) + " at " + table.row_place(i) +
                             ", but log needs values above 0; use log1p for data with zeros, or add a constant "
                             "first");
        out.numbers[i] = std::log(d);  // NaN (missing) stays NaN
    }
    return out;
}

Column log1p_column(const Column& x, const Table& table, const std::string& new_name) {
    require_numeric(x, "log1p");
    Column out = numeric_column(new_name.empty() ? "log1p(" + x.name + ")" : new_name, x.numbers.size());
    for (std::size_t i = 0; i < x.numbers.size(); ++i) {
        const double d = x.numbers[i];
        if (d <= -1.0)
            throw InputError("column '" + x.name + "' has the value " + number_text(d) + " at " + table.row_place(i) +
                             ", but log1p needs values above -1; add a constant first");
        out.numbers[i] = std::log1p(d);
    }
    return out;
}

Column square(const Column& x, const std::string& new_name) {
    require_numeric(x, "squaring");
    Column out = numeric_column(new_name.empty() ? x.name + "^2" : new_name, x.numbers.size());
    for (std::size_t i = 0; i < x.numbers.size(); ++i) out.numbers[i] = x.numbers[i] * x.numbers[i];
    return out;
}

Column product(const Column& a, const Column& b, const std::string& new_name) {
    require_numeric(a, "a product");
    require_numeric(b, "a product");
    if (a.numbers.size() != b.numbers.size())
        throw InputError("columns '" + a.name + "' and '" + b.name + "' have different lengths (" +
                         std::to_string(a.numbers.size()) + " and " + std::to_string(b.numbers.size()) +
                         "); a product needs columns of the same table");
    Column out = numeric_column(new_name.empty() ? a.name + "\u00D7" + b.name : new_name, a.numbers.size());
    for (std::size_t i = 0; i < a.numbers.size(); ++i) out.numbers[i] = a.numbers[i] * b.numbers[i];
    return out;
}

Column dummy(const Column& x, const std::string& level, const std::string& new_name) {
    if (x.kind != ColumnKind::Categorical)
        throw InputError("column '" + x.name + "' is numeric; dummy coding needs a categorical column");
    const auto it = std::find(x.levels.begin(), x.levels.end(), level);
    if (it == x.levels.end()) {
        std::vector<std::string> sorted = x.levels;
        std::sort(sorted.begin(), sorted.end());
        std::string list;
        for (std::size_t i = 0; i < sorted.size(); ++i) list += (i ? ", " : "") + sorted[i];
        throw InputError("column '" + x.name + "' has no level '" + level + "'; levels are: " + list);
    }
    const auto code = static_cast<std::int32_t>(it - x.levels.begin());
    Column out = numeric_column(new_name.empty() ? x.name + "=" + level : new_name, x.codes.size());
    for (std::size_t i = 0; i < x.codes.size(); ++i)
        out.numbers[i] = x.codes[i] < 0 ? missing_value() : (x.codes[i] == code ? 1.0 : 0.0);
    return out;
}

}  // namespace moderato
