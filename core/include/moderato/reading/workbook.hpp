// Office Open XML workbooks (.xlsx, ECMA-376), read with libzip and expat.
//
// One sheet becomes a table the way a CSV file does (CsvOptions' header,
// missing tokens, column kinds and text-as-missing; CsvLimits), with these
// rules of its own:
// - numbers are numbers; booleans are 1 (TRUE) and 0 (FALSE); strings
//   (shared, inline, rich text) are read as read_csv reads a quoted cell:
//   a missing token is missing, a number written as text is a number, any
//   other text is a level;
// - a cell whose style shows a date (the built-in date formats and custom
//   codes with date tokens) is a number: days since 1970-01-01, with the
//   time of day as the fraction (1900 and 1904 date systems; 1900-02-29,
//   the 1900 system's day that never was, is refused); a cell shown as a
//   time of day only keeps its value, the fraction of a day. A numeric
//   column with date cells has Column::dates set. In a
//   categorical column these show as ISO 8601 text ("2024-03-01",
//   "2024-03-01T08:30:00", "08:30:00");
// - a formula is read by the value the workbook saved with it; a formula
//   saved without one (by a program that does not calculate) is refused;
// - an error cell (#N/A, #DIV/0!, ...) is refused, naming the cell, unless
//   its text is one of the missing tokens (add "#N/A" to read #N/A as missing);
// - rows without any value are skipped; the first row with one is the
//   header; a column is as wide as the rightmost cell holding a value;
// - Table::row_lines holds each data row's sheet row number (sheet_rows).
// Refused with the file's name: an encrypted workbook, a legacy .xls, a
// binary .xlsb, a chart, dialog or macro sheet, an unknown sheet (the
// message lists the sheets), a file that is not a zip archive, a damaged
// archive or XML part; cell problems name the cell ("Sheet1!C7").
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

struct WorkbookSheet {
    enum class Kind { Worksheet, Chart, Dialog, Macro, Other };
    std::string name;
    Kind kind = Kind::Worksheet;
    bool hidden = false;
};

// The workbook's sheets in their order (only worksheets can be read).
std::vector<WorkbookSheet> workbook_sheets(const std::string& path);

// Reads one worksheet (`sheet` by name; empty: the first visible
// worksheet); `max_rows` > 0 stops after that many data rows (a preview).
Table read_workbook(const std::string& path, const std::string& sheet, const CsvOptions& options = {},
                    const CsvProgress& progress = {}, std::size_t max_rows = 0);

}  // namespace moderato
