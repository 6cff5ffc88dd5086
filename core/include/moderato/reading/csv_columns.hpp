// Reading only some columns of a delimited text file, for commands that know
// which columns their model uses (a wide file's other columns then cost only
// the scan past their fields).
#pragma once

#include <string>
#include <vector>

#include "moderato/reading/csv.hpp"

namespace moderato {

// As read_csv, but the table holds only the columns named in `keep` (in the
// file's order). The other columns' cells are checked as text (fields per
// row, quotes, UTF-8), so a broken file is refused as read_csv refuses it,
// but they are not converted or stored, and the column kinds asked for them
// are not checked. When a name in `keep` is not a column of the file,
// every column is read, so that the caller's own lookup of that name
// reports it with all the file's columns listed.
Table read_csv_columns(const std::string& path, const CsvOptions& options, const std::vector<std::string>& keep,
                       const CsvProgress& progress = {});

}  // namespace moderato
