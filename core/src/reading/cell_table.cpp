// Typed cells into a Table, with read_csv's rules for missing tokens, kinds,
// names and limits (see cell_table.hpp).
#include "reading/cell_table.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <utility>

#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "reading/csv_internal.hpp"

namespace moderato::cell_detail {

namespace {

std::string_view trim(std::string_view s) {
    std::size_t b = 0, e = s.size();
    while (b < e && (s[b] == ' ' || s[b] == '\t')) ++b;
    while (e > b && (s[e - 1] == ' ' || s[e - 1] == '\t')) --e;
    return s.substr(b, e - b);
}

// Days since 1970-01-01 to a civil date (proleptic Gregorian; H. Hinnant's
// days_from_civil inverse, from memory).
void civil_from_days(long long z, long long& y, unsigned& m, unsigned& d) {
    z += 719468;
    const long long era = (z >= 0 ? z : z - 146096) / 146097;
    const auto doe = static_cast<unsigned>(z - era * 146097);
    const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    const unsigned mp = (5 * doy + 2) / 153;
    d = doy - (153 * mp + 2) / 5 + 1;
    m = mp < 10 ? mp + 3 : mp - 9;
    y = static_cast<long long>(yoe) + era * 400 + (m <= 2);
}

std::string clock_text(long long seconds) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%02lld:%02lld:%02lld", seconds / 3600, seconds / 60 % 60, seconds % 60);
    return buf;
}

std::string join(const std::vector<std::string>& names) {
    std::string s;
    for (std::size_t i = 0; i < names.size(); ++i) s += (i ? ", " : "") + names[i];
    return s;
}

}  // namespace

std::string value_text(CellType type, double v) {
    switch (type) {
        case CellType::Bool:
            return v != 0 ? "TRUE" : "FALSE";
        case CellType::Date:
        case CellType::DateTime: {
            const auto total = static_cast<long long>(std::llround(v * 86400.0));
            long long days = total / 86400, secs = total % 86400;
            if (secs < 0) secs += 86400, --days;
            long long y = 0;
            unsigned m = 0, d = 0;
            civil_from_days(days, y, m, d);
            char buf[32];
            std::snprintf(buf, sizeof buf, "%04lld-%02u-%02u", y, m, d);
            if (type == CellType::Date && secs == 0) return buf;
            return std::string(buf) + "T" + clock_text(secs);
        }
        case CellType::Time: {
            const auto total = static_cast<long long>(std::llround(v * 86400.0));
            return total >= 0 && total < 86400 ? clock_text(total) : value_text(CellType::Number, v);
        }
        default: {
            char buf[32];
            const auto r = std::to_chars(buf, buf + sizeof buf, v);
            return std::string(buf, r.ptr);
        }
    }
}

CellTableBuilder::CellTableBuilder(std::string name, std::string source, const CsvOptions& options, Place place,
                                   CellLimits limits)
    : name_(std::move(name)), source_(std::move(source)), opt_(options), place_(std::move(place)), limits_(limits) {
    for (const std::string& t : opt_.missing_tokens) {
        tokens_.emplace_back(trim(t));
        double v = 0;
        if (csv_detail::parse_number(tokens_.back(), false, v)) numeric_tokens_.push_back(v);
    }
}

bool CellTableBuilder::is_missing_token(std::string_view s) const {
    const std::string_view t = trim(s);
    return std::find(tokens_.begin(), tokens_.end(), t) != tokens_.end();
}

void CellTableBuilder::fail(const std::string& rest) const { throw InputError(source_ + ": " + rest); }

void CellTableBuilder::start_row(std::size_t row) {
    if (in_row_) commit_row();
    in_row_ = true;
    row_ = row;
    pending_.clear();
}

void CellTableBuilder::value(std::size_t col, CellType type, double v) {
    if (type == CellType::Missing) return;
    if (type == CellType::Number)
        for (const double t : numeric_tokens_)
            if (t == v) return pending_.push_back({col, CellType::Missing, v, value_text(type, v)});
    pending_.push_back({col, type, v, {}});
}

void CellTableBuilder::text(std::size_t col, std::string_view s) {
    const std::string_view t = trim(s);
    if (t.empty()) return;  // an empty cell
    if (is_missing_token(t)) return pending_.push_back({col, CellType::Missing, 0.0, std::string(t)});
    double v = 0;
    const bool number = csv_detail::parse_number(t, false, v);
    pending_.push_back({col, number ? CellType::NumberText : CellType::Text, v, std::string(s)});
}

void CellTableBuilder::add_columns(std::size_t width) {
    if (width > limits_.max_columns)
        throw InputError(name_ + ": " + place_(row_, width - 1) + ": more than " +
                         format_count(static_cast<long long>(limits_.max_columns)) +
                         " columns; Moderato reads at most that many. Keep only the columns the analysis needs");
    while (cols_.size() < width) {
        ColBuf c;
        c.numbers.assign(data_rows_, missing_value());
        c.types.assign(data_rows_, CellType::Missing);
        cols_.push_back(std::move(c));
    }
}

void CellTableBuilder::commit_row() {
    in_row_ = false;
    if (pending_.empty()) return;  // an empty row is skipped, as blank lines are
    if (opt_.header && !have_header_) return take_header();
    std::size_t width = cols_.size();
    for (const Pending& p : pending_) width = std::max(width, p.col + 1);
    if (opt_.header && width > names_.size()) {
        std::size_t col = 0;
        for (const Pending& p : pending_) col = std::max(col, p.col);
        throw InputError(name_ + ": " + place_(row_, col) +
                         " holds a value, but its column has no name in the header row (" + place_(header_row_, col) +
                         "); name the column there, or clear the cell");
    }
    add_columns(width);
    if ((data_rows_ + 1) > limits_.max_cells / std::max<std::size_t>(1, cols_.size()))
        fail("more than " + format_count(static_cast<long long>(limits_.max_cells)) + " cells (at " + place_(row_, 0) +
             "); Moderato holds at most that many in memory. Keep only the columns or rows the "
             "analysis needs");
    for (ColBuf& c : cols_) {
        c.numbers.push_back(missing_value());
        c.types.push_back(CellType::Missing);
        if (!c.text_ids.empty()) c.text_ids.push_back(-1);
    }
    for (const Pending& p : pending_) store(cols_[p.col], p);
    row_numbers_.push_back(row_);
    ++data_rows_;
}

void CellTableBuilder::store(ColBuf& c, const Pending& p) {
    c.types.back() = p.type;
    if (p.type == CellType::Missing) return;
    if (p.type != CellType::Text) c.numbers.back() = p.v;
    if (p.type != CellType::Text && p.type != CellType::NumberText) return;
    if (c.text_ids.empty()) c.text_ids.assign(c.types.size(), -1);
    const auto it = c.index.find(p.text);
    if (it != c.index.end()) {
        c.text_ids.back() = it->second;
        return;
    }
    c.text_ids.back() = static_cast<std::int32_t>(c.pool.size());
    c.index.emplace(p.text, c.text_ids.back());
    c.pool.push_back(p.text);
}

void CellTableBuilder::take_header() {
    have_header_ = true;
    header_row_ = row_;
    std::size_t width = 0;
    for (const Pending& p : pending_) width = std::max(width, p.col + 1);
    if (width > limits_.max_columns) add_columns(width);  // refuses
    names_.assign(width, std::string());
    for (const Pending& p : pending_) {
        // A missing token names its column with its text, as in a CSV header.
        const bool textual = p.type == CellType::Text || p.type == CellType::NumberText || p.type == CellType::Missing;
        names_[p.col] = textual ? std::string(trim(p.text)) : value_text(p.type, p.v);
    }
    std::unordered_map<std::string, std::size_t> seen;
    for (std::size_t j = 0; j < width; ++j) {
        if (names_[j].empty())
            throw InputError(name_ + ": " + place_(header_row_, j) +
                             ": the column name is empty; name every column in the header row, or read the "
                             "source without a header");
        const auto [it, fresh] = seen.emplace(names_[j], j);
        if (!fresh)
            throw InputError(name_ + ": " + place_(header_row_, j) + ": the column name '" + names_[j] +
                             "' is also used by " + place_(header_row_, it->second) +
                             "; give each column a different name");
    }
    add_columns(width);
}

std::string CellTableBuilder::name_of(std::size_t j) const {
    if (opt_.header) return names_[j];
    std::string v(1, 'V');
    v += std::to_string(j + 1);
    return v;
}

void CellTableBuilder::check_overrides() const {
    std::vector<std::string> all;
    for (std::size_t j = 0; j < cols_.size(); ++j) all.push_back(name_of(j));
    const auto known = [&](const std::string& n) { return std::find(all.begin(), all.end(), n) != all.end(); };
    for (const auto& [name, kind] : opt_.column_kinds) {
        if (!known(name))
            fail("column '" + name +
                 "' has a type override but is not a column of this source; columns are: " + join(all));
        if (kind == ColumnKind::Categorical && opt_.text_as_missing.count(name))
            fail("column '" + name + "' is set to categorical and also to numbers with text as missing; choose one");
    }
    for (const auto& name : opt_.text_as_missing)
        if (!known(name))
            fail("column '" + name +
                 "' is set to numbers with text as missing but is not a column of this source; columns are: " +
                 join(all));
}

Table CellTableBuilder::finish(bool keep_rows) {
    if (in_row_) commit_row();
    if (!have_header_ && data_rows_ == 0)
        fail(opt_.header ? "no values; expected a header row and data rows" : "no values; expected data rows");
    if (data_rows_ == 0)
        fail("a header (" + place_(header_row_, 0) + ") but no data rows; add data rows below the header");
    check_overrides();
    Table t;
    t.source = source_;
    t.columns.resize(cols_.size());
    for (std::size_t j = 0; j < cols_.size(); ++j) {
        build_column(j, t.columns[j]);
        cols_[j] = ColBuf{};
    }
    if (keep_rows) t.row_lines = std::move(row_numbers_);  // the columns' messages use them above
    return t;
}

void CellTableBuilder::build_column(std::size_t j, Column& out) {
    out.name = name_of(j);
    const bool text_missing = opt_.text_as_missing.count(out.name) > 0;
    const auto forced = opt_.column_kinds.find(out.name);
    out.kind_forced = text_missing || forced != opt_.column_kinds.end();
    const ColBuf& c = cols_[j];
    const bool has_text = std::find(c.types.begin(), c.types.end(), CellType::Text) != c.types.end();
    if (forced != opt_.column_kinds.end() && forced->second == ColumnKind::Categorical) return build_text(j, out);
    if (text_missing || forced != opt_.column_kinds.end() || !has_text) return build_numeric(j, out, text_missing);
    build_text(j, out);
}

void CellTableBuilder::build_numeric(std::size_t j, Column& out, bool text_missing) {
    ColBuf& c = cols_[j];
    out.kind = ColumnKind::Numeric;
    out.dates = std::any_of(c.types.begin(), c.types.end(),
                            [](CellType t) { return t == CellType::Date || t == CellType::DateTime; });
    for (std::size_t i = 0; i < c.types.size(); ++i) {
        if (c.types[i] != CellType::Text) continue;
        const std::string& text = c.pool[static_cast<std::size_t>(c.text_ids[i])];
        if (!text_missing)
            throw InputError(name_ + ": " + place_(row_numbers_[i], j) + ": '" + text +
                             "' is not a number, but the column '" + out.name +
                             "' is set to numeric; correct the cell, add '" + text +
                             "' to the missing tokens, or read the column as categorical");
        ++out.text_as_missing;
        if (out.text_examples.size() < kTextExamples) out.text_examples.push_back({row_numbers_[i], text});
    }
    out.numbers = std::move(c.numbers);
}

void CellTableBuilder::build_text(std::size_t j, Column& out) {
    const ColBuf& c = cols_[j];
    out.kind = ColumnKind::Categorical;
    out.codes.assign(c.types.size(), kMissingCode);
    std::unordered_map<std::string, std::int32_t> codes;
    for (std::size_t i = 0; i < c.types.size(); ++i) {
        const CellType type = c.types[i];
        if (type == CellType::Missing) continue;
        std::string text = type == CellType::Text || type == CellType::NumberText
                               ? c.pool[static_cast<std::size_t>(c.text_ids[i])]
                               : value_text(type, c.numbers[i]);
        if (type == CellType::Text && out.first_text_line == 0) {
            out.first_text_line = row_numbers_[i];
            out.first_text = text;
        }
        const auto [it, fresh] = codes.emplace(text, static_cast<std::int32_t>(out.levels.size()));
        if (fresh) out.levels.push_back(std::move(text));
        out.codes[i] = it->second;
    }
}

}  // namespace moderato::cell_detail
