// Columnar, typed table with a missing mask.
//
// Numeric columns store doubles; a missing cell is a quiet NaN (every NaN in
// a numeric column means "missing"). Categorical columns store one int32 code
// per row into `levels`; a missing cell has code -1.
#pragma once

#include <cstddef>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace moderato {

enum class ColumnKind { Numeric, Categorical };

inline constexpr std::int32_t kMissingCode = -1;

inline double missing_value() { return std::numeric_limits<double>::quiet_NaN(); }

// A cell of text where numbers were expected: its 1-based physical line in
// the file (its row number when the table has no lines) and its text.
struct TextCell {
    std::size_t line = 0;
    std::string text;
    bool operator==(const TextCell&) const = default;
};

// How many such cells a column keeps to show (the first ones, in row order).
inline constexpr std::size_t kTextExamples = 5;

struct Column {
    std::string name;
    ColumnKind kind = ColumnKind::Numeric;
    std::vector<double> numbers;      // Numeric: one per row, NaN = missing
    std::vector<std::int32_t> codes;  // Categorical: one per row, -1 = missing
    std::vector<std::string> levels;  // Categorical: code -> text

    // Where a column was inferred categorical because of text, the first such
    // cell (1-based physical line of the file, its text) for error messages.
    std::size_t first_text_line = 0;
    std::string first_text;
    bool kind_forced = false;  // the kind was set by the user, not inferred
    // A numeric column of dates (a workbook's date cells): days since
    // 1970-01-01, the time of day as the fraction. Shown so, with a note.
    bool dates = false;
    // A numeric column whose text cells were read as missing (at the user's
    // request): how many there were and the first kTextExamples of them.
    std::size_t text_as_missing = 0;
    std::vector<TextCell> text_examples;

    std::size_t size() const { return kind == ColumnKind::Numeric ? numbers.size() : codes.size(); }
    bool is_missing(std::size_t row) const {
        return kind == ColumnKind::Numeric ? numbers[row] != numbers[row] : codes[row] < 0;
    }
    std::size_t missing_count() const;
};

class Table {
public:
    std::vector<Column> columns;
    // 1-based physical line in the source file where each data row starts
    // (empty when the table was not read from a file).
    std::vector<std::size_t> row_lines;
    std::string source;  // file name the table came from, for messages
    // row_lines hold row numbers of a sheet or a query result, not lines of a text file.
    bool sheet_rows = false;
    char delimiter = 0;  // the delimiter the text was read with (given or detected); 0: not read from text

    std::size_t rows() const { return columns.empty() ? 0 : columns.front().size(); }
    std::size_t cols() const { return columns.size(); }

    // nullptr when absent.
    const Column* find(const std::string& name) const;
    Column* find(const std::string& name);
    // Throws InputError naming the column and listing the available ones.
    const Column& at(const std::string& name) const;

    // "line", or "row" where row_lines are a sheet's rows.
    const char* line_word() const { return sheet_rows ? "row" : "line"; }
    // Human-readable location of a data row: "line 17" (or "row 17").
    std::string row_location(std::size_t row) const;
    // The same with the source named: "line 17 of visits.csv".
    std::string row_place(std::size_t row) const;
};

}  // namespace moderato
