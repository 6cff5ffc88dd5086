// A worksheet's <sheetData>: rows and cells (with or without their `r`
// references), their types (number, shared or inline string, formula
// string, boolean, error, ISO date) and date styles, into the builder.
#include "reading/xlsx_sheet.hpp"

#include <charconv>
#include <cstdio>
#include <cstdlib>

#include "moderato/support/error.hpp"

namespace moderato::xlsx_detail {

namespace {

using cell_detail::CellType;

struct EnoughRows {};  // a preview has its rows

// Days since 1970-01-01 of a civil date (H. Hinnant's days_from_civil, from memory).
long long days_from_civil(long long y, unsigned m, unsigned d) {
    y -= m <= 2;
    const long long era = (y >= 0 ? y : y - 399) / 400;
    const auto yoe = static_cast<unsigned>(y - era * 400);
    const unsigned doy = (153 * (m > 2 ? m - 3 : m + 9) + 2) / 5 + d - 1;
    const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + static_cast<long long>(doe) - 719468;
}

// "2024-03-01", "2024-03-01T08:30:00[.5]" (t="d" cells, ISO 8601).
bool parse_iso(const std::string& s, double& days, bool& with_time) {
    int y = 0, mo = 0, d = 0, h = 0, mi = 0, n = 0;
    double sec = 0;
    if (std::sscanf(s.c_str(), "%d-%d-%d%n", &y, &mo, &d, &n) != 3 || mo < 1 || mo > 12 || d < 1 || d > 31)
        return false;
    with_time = static_cast<std::size_t>(n) < s.size();
    if (with_time && std::sscanf(s.c_str() + n, "T%d:%d:%lf", &h, &mi, &sec) < 2) return false;
    days = static_cast<double>(days_from_civil(y, static_cast<unsigned>(mo), static_cast<unsigned>(d))) +
           (h * 3600.0 + mi * 60.0 + sec) / 86400.0;
    return true;
}

class SheetHandler final : public XmlHandler {
public:
    SheetHandler(const SheetContext& ctx, cell_detail::CellTableBuilder& b) : ctx_(ctx), b_(b) {}

    void start(std::string_view name, const char** atts) override {
        if (name == "sheetData") {
            in_data_ = true;
        } else if (!in_data_) {
            return;
        } else if (name == "row") {
            const char* r = attribute(atts, "r");
            row_ = r ? std::strtoull(r, nullptr, 10) : row_ + 1;
            if (row_ == 0) fail_damaged("a row number '" + std::string(r ? r : "") + "'");
            next_col_ = 0;
            b_.start_row(row_);
            if (ctx_.max_rows && b_.data_rows() >= ctx_.max_rows) throw EnoughRows{};
        } else if (name == "c") {
            start_cell(atts);
        } else if (name == "f") {
            formula_ = in_cell_;
        } else if (name == "v" || (name == "t" && in_is_ && phonetic_ == 0)) {
            in_text_ = in_cell_;
        } else if (name == "is") {
            in_is_ = true;
        } else if (name == "rPh") {
            ++phonetic_;
        }
    }
    void end(std::string_view name) override {
        if (name == "sheetData") in_data_ = false;
        else if (name == "c" && in_cell_) end_cell();
        else if (name == "v" || name == "t") in_text_ = false;
        else if (name == "is") in_is_ = false;
        else if (name == "rPh") --phonetic_;
    }
    void text(std::string_view s) override {
        if (in_text_) value_.append(s);
    }

private:
    enum class Type { Number, Shared, String, Inline, Bool, Error, Date };

    std::string here() const { return ctx_.label + "!" + cell_name(col_, row_); }
    [[noreturn]] void fail(const std::string& rest) const { ctx_.archive->fail(here() + " " + rest); }
    [[noreturn]] void fail_damaged(const std::string& what) const {
        ctx_.archive->fail("sheet '" + ctx_.sheet + "' (" + ctx_.part + ") holds " + what +
                           " that is not valid; the workbook is damaged");
    }

    void start_cell(const char** atts) {
        in_cell_ = true;
        formula_ = false;
        value_.clear();
        const char* r = attribute(atts, "r");
        col_ = r ? column_of(r) : next_col_;
        next_col_ = col_ + 1;
        const char* t = attribute(atts, "t");
        const std::string_view tv = t ? t : "n";
        type_ = tv == "s"           ? Type::Shared
                : tv == "str"       ? Type::String
                : tv == "inlineStr" ? Type::Inline
                : tv == "b"         ? Type::Bool
                : tv == "e"         ? Type::Error
                : tv == "d"         ? Type::Date
                                    : Type::Number;
        const char* s = attribute(atts, "s");
        const std::size_t xf = s ? std::strtoull(s, nullptr, 10) : 0;
        style_ = xf < ctx_.styles->size() ? (*ctx_.styles)[xf] : DateStyle::None;
    }

    std::size_t column_of(const char* ref) const {
        std::size_t col = 0, letters = 0;
        for (; *ref >= 'A' && *ref <= 'Z'; ++ref, ++letters) col = col * 26 + static_cast<std::size_t>(*ref - 'A' + 1);
        if (letters == 0 || letters > 3) fail_damaged("a cell reference");
        return col - 1;
    }

    void end_cell() {
        in_cell_ = false;
        if (formula_ && value_.empty() && type_ != Type::Inline)
            fail(
                "holds a formula without its computed value (the program that saved the workbook did not "
                "compute it); open the workbook in a spreadsheet program, let it calculate, save it and read it "
                "again");
        switch (type_) {
            case Type::Number:
                return number();
            case Type::Shared:
                return shared();
            case Type::String:
            case Type::Inline:
                return b_.text(col_, value_);
            case Type::Bool:
                return b_.value(col_, CellType::Bool, value_ == "1" || value_ == "true" ? 1.0 : 0.0);
            case Type::Error:
                return error();
            case Type::Date:
                return iso_date();
        }
    }

    void number() {
        if (value_.empty()) return;  // a cell with a style but no value
        double v = 0;
        const auto r = std::from_chars(value_.data(), value_.data() + value_.size(), v);
        if (r.ec != std::errc() || r.ptr != value_.data() + value_.size())
            fail("holds '" + value_ + "' where the workbook promises a number; the workbook is damaged");
        if (style_ == DateStyle::None) return b_.value(col_, CellType::Number, v);
        if (style_ == DateStyle::Time) return b_.value(col_, CellType::Time, v);
        double days = 0;
        if (!serial_to_days(v, ctx_.date1904, days))
            fail(
                "holds the date 1900-02-29, which does not exist (a date serial of 60 in the 1900 date system); "
                "correct the date in the workbook");
        b_.value(col_, style_ == DateStyle::Date ? CellType::Date : CellType::DateTime, days);
    }

    void shared() {
        std::size_t i = 0;
        const auto r = std::from_chars(value_.data(), value_.data() + value_.size(), i);
        if (r.ec != std::errc() || r.ptr != value_.data() + value_.size() || i >= ctx_.shared->size())
            fail("refers to shared string '" + value_ +
                 "', which the workbook does not hold; the workbook is "
                 "damaged");
        b_.text(col_, (*ctx_.shared)[i]);
    }

    void error() {
        if (b_.is_missing_token(value_)) return b_.text(col_, value_);
        fail("holds the error value " + value_ + "; correct it in the workbook, or add " + value_ +
             " to the missing tokens to read such cells as missing");
    }

    void iso_date() {
        double days = 0;
        bool with_time = false;
        if (value_.empty()) return;
        if (!parse_iso(value_, days, with_time))
            fail("holds '" + value_ + "' where the workbook promises an ISO 8601 date; the workbook is damaged");
        b_.value(col_, with_time ? CellType::DateTime : CellType::Date, days);
    }

    const SheetContext& ctx_;
    cell_detail::CellTableBuilder& b_;
    bool in_data_ = false, in_cell_ = false, in_text_ = false, in_is_ = false, formula_ = false;
    int phonetic_ = 0;
    std::size_t row_ = 0, col_ = 0, next_col_ = 0;
    Type type_ = Type::Number;
    DateStyle style_ = DateStyle::None;
    std::string value_;
};

}  // namespace

void read_sheet_cells(const SheetContext& ctx, cell_detail::CellTableBuilder& builder,
                      const std::function<void(std::size_t, std::size_t)>& progress) {
    SheetHandler h(ctx, builder);
    try {
        ctx.archive->parse(ctx.part, "sheet '" + ctx.sheet + "'", h, progress);
    } catch (const EnoughRows&) {
    }
}

}  // namespace moderato::xlsx_detail
