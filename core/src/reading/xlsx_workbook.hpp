// Private: the parts of a workbook around its sheets' cells: which sheets
// there are and where (workbook.xml and its relationships), the date system,
// the cell styles that show dates, the shared strings.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "reading/xlsx_archive.hpp"

namespace moderato::xlsx_detail {

enum class SheetKind : std::uint8_t { Worksheet, Chartsheet, Dialogsheet, Macrosheet, Other };

struct SheetEntry {
    std::string name;
    std::string part;  // e.g. "xl/worksheets/sheet1.xml"
    SheetKind kind = SheetKind::Worksheet;
    bool hidden = false;
};

struct WorkbookInfo {
    std::string workbook_part;  // e.g. "xl/workbook.xml"
    std::vector<SheetEntry> sheets;
    bool date1904 = false;            // workbookPr date1904: serial 0 is 1904-01-01
    std::string shared_strings_part;  // empty: none
    std::string styles_part;          // empty: none
};

// Follows _rels/.rels to the workbook part and reads it with its
// relationships. Refuses a binary workbook (.xlsb), a zip archive that is
// another kind of document, and a workbook without sheets.
WorkbookInfo read_workbook_info(const Archive& archive);

// How a cell style shows its number (ECMA-376 18.8.30 built-in formats and
// custom format codes with date or time tokens).
enum class DateStyle : std::uint8_t { None, Date, DateTime, Time };

// A number format's kind: built-in ids 14-17 and 27-36, 50-58 dates, 22 date
// and time, 18-21 and 45-47 times; any other id by its code's tokens
// (y, d, m without h or s: a date; h, s, AM/PM: a time; both: date and time),
// outside quoted text, escapes and [colour]/[$-locale] brackets.
DateStyle classify_format(int id, const std::string& code);

// The DateStyle of each cell format (cellXfs, by index).
std::vector<DateStyle> read_date_styles(const Archive& archive, const std::string& part);

std::vector<std::string> read_shared_strings(const Archive& archive, const std::string& part);

// A date serial to days since 1970-01-01. The 1900 system counts
// 1900-01-01 as 1 and, for compatibility with an old spreadsheet program's
// mistake, holds the day 1900-02-29 (serial 60), which never was: serials
// from 61 on are one day ahead of a plain count. Returns false for serial 60.
// The 1904 system counts 1904-01-01 as 0.
bool serial_to_days(double serial, bool date1904, double& days);

// "C7" for column 2 (0-based), row 7.
std::string cell_name(std::size_t col, std::size_t row);

}  // namespace moderato::xlsx_detail
