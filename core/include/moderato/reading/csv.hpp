// Delimited-text import (RFC 4180): quoted fields with embedded delimiters,
// newlines and doubled quotes; LF or CRLF; UTF-8 BOM; delimiter sniffing;
// missing tokens; decimal comma; numeric vs categorical inference with
// per-column override. Parses with std::from_chars, in chunks, on all cores.
#pragma once

#include <atomic>
#include <cstddef>
#include <functional>
#include <map>
#include <set>
#include <string>
#include <vector>

#include "moderato/reading/table.hpp"
#include "moderato/support/error.hpp"

namespace moderato {

// Conventions beyond RFC 4180 (common practice):
// - blank lines (empty, or a lone CR) are skipped wherever they are;
// - a '"' opens a quoted field only as the first byte of a field; elsewhere in
//   an unquoted field it is literal text; spaces may follow a closing quote,
//   any other text there is an error;
// - spaces and tabs (unless the delimiter) around a cell are trimmed before
//   missing-token matching and number parsing; categorical level text is the
//   trimmed cell for unquoted cells and the exact content for quoted ones;
// - a number is what std::from_chars reads in full, optionally after one '+',
//   and finite ("inf" and "nan" are text unless listed as missing tokens);
//   with decimal_comma the one decimal separator is ',' and '.' makes text;
// - levels of a categorical column are coded in order of first appearance;
//   a column whose first text comes after numbers were already stored for it
//   is read once more from the start, so its levels keep the original text.
// Messages name the file as given (path or `name`); Table::row_lines is
// filled for files and for text alike.
struct CsvOptions {
    char delimiter = 0;  // 0: sniff among ',', ';', '\t'
    bool header = true;  // first record holds the column names
    // Cells equal to one of these (after trimming spaces) are missing.
    std::vector<std::string> missing_tokens{"", "NA", "NaN", "."};
    bool decimal_comma = false;                      // "3,14" means 3.14 (',' cannot be the delimiter)
    std::map<std::string, ColumnKind> column_kinds;  // per-column override
    // Columns read as numbers whose cells of text are missing (counted in
    // Column::text_as_missing); such a column needs no column_kinds entry and
    // cannot also be set to categorical there.
    std::set<std::string> text_as_missing;
    unsigned threads = 0;  // 0: all hardware threads
};

// What the reader refuses rather than run out of memory on. Each message names
// the limit. Columns: the reader keeps some bookkeeping per column and thread
// (about a kilobyte), and a table wider than the widest common spreadsheet
// (16,384 columns, from memory) several times over is not a table of
// variables. Record: a record is held whole in memory while it is parsed,
// with a copy of its cells; a record this long is most often a quote that
// was never closed. Cells: the table stores 8 bytes a numeric cell, so 10^9
// cells are 8 GB before any model is fitted (a third of a 24 GB machine).
struct CsvLimits {
    static constexpr std::size_t max_columns = 100'000;
    static constexpr std::size_t max_record_bytes = std::size_t{256} << 20;  // 256 MiB
    static constexpr std::size_t max_cells = 1'000'000'000;
};

struct CsvProgress {
    // Called now and then with bytes done and total; return false to cancel.
    std::function<bool(std::size_t done, std::size_t total)> callback;
};

// Reads a file. Throws InputError with the file name and the line (and
// column, where it applies) for: a missing/unreadable file, an empty file, a
// header without data rows, invalid UTF-8, an unterminated quote, a row with
// the wrong number of fields, empty or duplicate column names, a forced
// numeric column holding text, a file over one of the CsvLimits, and a file
// that changed while it was read (its size, modification time or identity
// differs from when it was opened). Throws Cancelled when the callback says
// stop.
Table read_csv(const std::string& path, const CsvOptions& options = {}, const CsvProgress& progress = {});

// Same, from text held in memory (`name` is used in messages).
Table read_csv_text(const std::string& text, const std::string& name, const CsvOptions& options = {});

namespace detail {
// Internal knobs, public only so tests can exercise block and piece
// boundaries with tiny sizes. The result never depends on them.
struct CsvTuning {
    std::size_t block_size = std::size_t{16} << 20;  // bytes read per block
    std::size_t min_piece = std::size_t{1} << 16;    // smallest piece per thread
    // The CsvLimits, smaller in tests.
    std::size_t max_columns = CsvLimits::max_columns;
    std::size_t max_record_bytes = CsvLimits::max_record_bytes;
    std::size_t max_cells = CsvLimits::max_cells;
};
Table read_csv_tuned(const std::string& path, const CsvOptions& options, const CsvProgress& progress,
                     const CsvTuning& tuning);
Table read_csv_text_tuned(const std::string& text, const std::string& name, const CsvOptions& options,
                          const CsvProgress& progress, const CsvTuning& tuning);
}  // namespace detail

}  // namespace moderato
