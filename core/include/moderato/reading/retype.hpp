// A column's kind changed after import, and the check that finds columns
// read as categorical only because of a few cells of text among numbers
// ("twelve" in a column of hours).
//
// The conversions work on the table in memory, so they are the same every
// time the project is opened: categorical to numeric reads each level with
// the CSV reader's number rules (the text trimmed of spaces and tabs; the
// decimal comma when the file uses one); a level that is not a number makes
// its cells missing, counted in Column::text_as_missing. Numeric to
// categorical writes each number as the shortest text that reads back as
// the same number ("3.1", "12"); levels in order of first appearance.
#pragma once

#include <cstddef>
#include <map>
#include <string>
#include <vector>

#include "moderato/reading/table.hpp"

namespace moderato {

// The cells of a categorical column by whether their text reads as a number.
struct StrayText {
    std::size_t number_cells = 0;  // non-missing cells whose text is a number
    std::size_t text_cells = 0;    // non-missing cells whose text is not
    std::size_t text_levels = 0;   // distinct texts among those
    std::vector<TextCell> first;   // the first kTextExamples text cells, in row order
};

StrayText stray_text(const Table& table, const Column& column, bool decimal_comma);

// At least 90% of the non-missing cells are numbers and some are text: the
// column was most likely meant to be numeric (a threshold of our own; a
// column of codes with a few words is better asked about than guessed).
bool mostly_numbers(const StrayText& s);

// The column as numbers (a numeric column is returned as it is).
Column as_numeric(const Table& table, const Column& column, bool decimal_comma);
// The column as categories (a categorical column is returned as it is).
Column as_categorical(const Column& column);

// The table with the named columns changed to the given kinds. InputError
// naming the column (and the columns there are) when one is not in the table.
Table retype_columns(const Table& table, const std::map<std::string, ColumnKind>& kinds, bool decimal_comma);

}  // namespace moderato
