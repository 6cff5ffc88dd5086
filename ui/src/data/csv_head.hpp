// The head of a delimited text file for the import preview: its first
// records, cut at a record end that lies outside any quoted field (a quoted
// field may hold line breaks), so the core reader sees whole records only.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>

namespace moderato::ui {

inline constexpr std::size_t kNoCut = static_cast<std::size_t>(-1);

// Length of the first `records` records of `text` (through the '\n' that
// ends the last of them), or kNoCut when `text` holds fewer complete records.
// A '"' opens a quoted field only as the first byte of a field (after the
// delimiter, a line break or the start), as the core reader has it; with
// delimiter 0 (sniffed) each of ',', ';' and tab counts as a field start.
std::size_t csvHeadLength(std::string_view text, std::size_t records, char delimiter);

struct CsvHead {
    std::string text;        // the bytes to preview
    bool wholeFile = false;  // the file ends within `text`
    bool truncated = false;  // stopped at maxBytes without a cut (a quoted field that never closed)
    std::string error;       // the file could not be read (then text is empty)
};

// Reads the file's first `records` records (and never more than `maxBytes`
// unless the file ends sooner). Never writes. When the cut would fall inside a
// quoted field it reads on until the field closes, up to `maxBytes`.
CsvHead readCsvHead(const std::string& path, std::size_t records, char delimiter,
                    std::size_t maxBytes = std::size_t{8} << 20);

}  // namespace moderato::ui
