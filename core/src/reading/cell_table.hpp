// Private: a table built from typed cells, row by row, for the readers whose
// sources hand out values rather than text (workbooks, databases). It applies
// CsvOptions the way read_csv does: missing tokens, per-column kinds, text
// read as missing, a header row or generated names V1, V2, ..., the cell
// limits. Where a cell is goes into messages through `Place`.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::cell_detail {

// What a cell held. Numbers from text keep their text, so a column that
// turns categorical shows the text as it was written.
enum class CellType : std::uint8_t { Missing, Number, Bool, Date, DateTime, Time, NumberText, Text };

// The text a typed value shows as a categorical level or a column name:
// the shortest decimal that reads back to the number, TRUE/FALSE, ISO 8601
// dates ("2024-03-01", "2024-03-01T08:30:00") and times ("08:30:00").
// Dates are days since 1970-01-01, times fractions of a day.
std::string value_text(CellType type, double v);

struct CellLimits {
    std::size_t max_columns = CsvLimits::max_columns;
    std::size_t max_cells = CsvLimits::max_cells;
};

class CellTableBuilder {
public:
    // "Sheet1!C7" or "row 7, column 'x'": `row` is the source's own row
    // number (as passed to start_row), `col` 0-based.
    using Place = std::function<std::string(std::size_t row, std::size_t col)>;

    // Messages read "<name>: <place>: ..." for a cell and "<source>: ..."
    // otherwise; `source` becomes Table::source ("sheet Sheet1 of data.xlsx").
    CellTableBuilder(std::string name, std::string source, const CsvOptions& options, Place place,
                     CellLimits limits = {});

    // Starts a row (the previous one is complete). Rows whose cells are all
    // empty are skipped; the first row kept is the header when options.header.
    void start_row(std::size_t row);
    void value(std::size_t col, CellType type, double v);
    // A missing cell that still makes its row a row (a database's NULL).
    void missing(std::size_t col) { pending_.push_back({col, CellType::Missing, 0.0, {}}); }
    // A cell of text: trimmed of spaces and tabs, a missing token is missing,
    // a number (as read_csv reads one) is a number, anything else text.
    void text(std::size_t col, std::string_view s);
    // The text equals one of the missing tokens (after trimming).
    bool is_missing_token(std::string_view s) const;
    // Data rows kept so far (the header not included).
    std::size_t data_rows() const { return data_rows_; }
    // The table; `row_lines` holds each data row's source row number when
    // `keep_rows`. Throws InputError for an empty source, a header without
    // data, bad names and forced kinds that do not fit.
    Table finish(bool keep_rows);

private:
    struct Pending {
        std::size_t col;
        CellType type;
        double v;
        std::string text;
    };
    struct ColBuf {
        std::vector<double> numbers;
        std::vector<CellType> types;
        std::vector<std::int32_t> text_ids;  // allocated with the first text
        std::vector<std::string> pool;
        std::unordered_map<std::string, std::int32_t> index;
    };

    void commit_row();
    void take_header();
    void store(ColBuf& c, const Pending& p);
    void add_columns(std::size_t width);
    [[noreturn]] void fail(const std::string& rest) const;
    std::string name_of(std::size_t j) const;
    void build_column(std::size_t j, Column& out);
    void build_numeric(std::size_t j, Column& out, bool text_missing);
    void build_text(std::size_t j, Column& out);
    void check_overrides() const;

    std::string name_, source_;
    const CsvOptions& opt_;
    Place place_;
    CellLimits limits_;
    std::vector<std::string> tokens_;
    std::vector<double> numeric_tokens_;

    bool in_row_ = false;
    std::size_t row_ = 0;
    std::vector<Pending> pending_;
    bool have_header_ = false;
    std::size_t header_row_ = 0;
    std::vector<std::string> names_;
    std::vector<std::size_t> name_cols_;  // header cells that hold a name
    std::size_t data_rows_ = 0;
    std::vector<std::size_t> row_numbers_;
    std::vector<ColBuf> cols_;
};

}  // namespace moderato::cell_detail
