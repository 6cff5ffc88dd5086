#include "moderato/reading/retype.hpp"

#include <charconv>
#include <limits>
#include <string_view>
#include <unordered_map>

#include "moderato/support/error.hpp"
#include "reading/csv_internal.hpp"

namespace moderato {

namespace {

std::string_view trim_spaces(std::string_view s) {
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
    return s;
}

// Each level read as a number (NaN: the level is text).
std::vector<double> level_numbers(const Column& c, bool decimal_comma) {
    std::vector<double> out(c.levels.size(), std::numeric_limits<double>::quiet_NaN());
    for (std::size_t k = 0; k < c.levels.size(); ++k) {
        double v;
        if (csv_detail::parse_number(trim_spaces(c.levels[k]), decimal_comma, v)) out[k] = v;
    }
    return out;
}

std::size_t line_of(const Table& t, std::size_t row) { return row < t.row_lines.size() ? t.row_lines[row] : row + 1; }

std::string shortest_text(double v) {
    char buf[32];
    const auto r = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, r.ptr);
}

}  // namespace

StrayText stray_text(const Table& table, const Column& column, bool decimal_comma) {
    StrayText s;
    if (column.kind != ColumnKind::Categorical) return s;
    const std::vector<double> numbers = level_numbers(column, decimal_comma);
    std::vector<char> seen(column.levels.size(), 0);
    for (std::size_t row = 0; row < column.codes.size(); ++row) {
        const std::int32_t code = column.codes[row];
        if (code < 0) continue;
        const auto k = static_cast<std::size_t>(code);
        if (numbers[k] == numbers[k]) {
            ++s.number_cells;
            continue;
        }
        ++s.text_cells;
        if (!seen[k]) ++s.text_levels, seen[k] = 1;
        if (s.first.size() < kTextExamples) s.first.push_back({line_of(table, row), column.levels[k]});
    }
    return s;
}

bool mostly_numbers(const StrayText& s) { return s.text_cells > 0 && s.number_cells >= 9 * s.text_cells; }

Column as_numeric(const Table& table, const Column& column, bool decimal_comma) {
    if (column.kind == ColumnKind::Numeric) return column;
    const std::vector<double> numbers = level_numbers(column, decimal_comma);
    Column out;
    out.name = column.name;
    out.kind = ColumnKind::Numeric;
    out.kind_forced = true;
    out.numbers.resize(column.codes.size(), missing_value());
    for (std::size_t row = 0; row < column.codes.size(); ++row) {
        const std::int32_t code = column.codes[row];
        if (code < 0) continue;
        const auto k = static_cast<std::size_t>(code);
        out.numbers[row] = numbers[k];
        if (numbers[k] == numbers[k]) continue;
        if (out.text_as_missing++ < kTextExamples) out.text_examples.push_back({line_of(table, row), column.levels[k]});
    }
    return out;
}

Column as_categorical(const Column& column) {
    if (column.kind == ColumnKind::Categorical) return column;
    Column out;
    out.name = column.name;
    out.kind = ColumnKind::Categorical;
    out.kind_forced = true;
    out.codes.resize(column.numbers.size(), kMissingCode);
    std::unordered_map<double, std::int32_t> index;
    for (std::size_t row = 0; row < column.numbers.size(); ++row) {
        const double v = column.numbers[row];
        if (v != v) continue;
        const double key = v == 0 ? 0.0 : v;  // -0 and 0 are one level
        auto [it, added] = index.emplace(key, static_cast<std::int32_t>(out.levels.size()));
        if (added) out.levels.push_back(shortest_text(key));
        out.codes[row] = it->second;
    }
    return out;
}

Table retype_columns(const Table& table, const std::map<std::string, ColumnKind>& kinds, bool decimal_comma) {
    Table out = table;
    for (const auto& [name, kind] : kinds) {
        Column* c = out.find(name);
        if (!c) (void)table.at(name);  // throws, naming the columns there are
        *c = kind == ColumnKind::Numeric ? as_numeric(table, *c, decimal_comma) : as_categorical(*c);
    }
    return out;
}

}  // namespace moderato
