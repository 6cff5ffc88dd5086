// Private pieces of the CSV reader, shared by csv.cpp (the block driver),
// csv_scan.cpp (record boundaries, sniffing, single records) and
// csv_parse.cpp (the per-thread cell parser).
#pragma once

#include <cstddef>
#include <cstdint>
#include <deque>
#include <functional>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::csv_detail {

inline constexpr std::size_t npos = static_cast<std::size_t>(-1);

// How a column is being read.
enum class Mode : std::uint8_t {
    NumberInferred,     // numeric so far; the first text cell turns it to Text
    NumberForced,       // numeric by request; a text cell is an error
    NumberTextMissing,  // numeric by request; a text cell is missing (counted)
    Text,               // categorical: every non-missing cell is a level
    Skip,               // not wanted (a later pass of a streamed read): skipped, stored as missing
    Drop,               // not wanted (read_csv_columns): checked as text (quotes, UTF-8), not stored
};

// ---------------------------------------------------------------- cells

// Spaces and tabs (except the delimiter) are trimmed around cells.
inline bool is_blank(char c, char delim) { return (c == ' ' || c == '\t') && c != delim; }

inline std::string_view trim_blanks(std::string_view s, char delim) {
    std::size_t b = 0, e = s.size();
    while (b < e && is_blank(s[b], delim)) ++b;
    while (e > b && is_blank(s[e - 1], delim)) --e;
    return s.substr(b, e - b);
}

inline std::size_t count_newlines(const char* b, const char* e) {
    std::size_t n = 0;
    for (; b < e; ++b) n += *b == '\n';
    return n;
}

inline std::string hex_byte(unsigned char c) {
    constexpr char digits[] = "0123456789ABCDEF";
    std::string s = "0x";
    s += digits[c >> 4];
    s += digits[c & 15];
    return s;
}

// A finite number read in full by std::from_chars (one leading '+' allowed).
// With decimal_comma, ',' is the decimal separator and '.' is not allowed.
bool parse_number(std::string_view text, bool decimal_comma, double& out);

// First byte of an invalid UTF-8 sequence in [begin, end), or nullptr.
const char* find_invalid_utf8(const char* begin, const char* end);

class MissingTokens {
public:
    MissingTokens(const std::vector<std::string>& tokens, char delim, bool decimal_comma);
    // `trimmed` must already be trimmed.
    bool contains(std::string_view trimmed) const {
        const std::size_t bit = trimmed.size() < 63 ? trimmed.size() : 63;
        if (!(length_mask_ >> bit & 1u)) return false;
        for (const auto& t : tokens_)
            if (t == trimmed) return true;
        return false;
    }
    // Some token reads as a number (e.g. "-99"): number cells must be checked.
    bool any_numeric() const { return any_numeric_; }

private:
    std::vector<std::string> tokens_;
    std::uint64_t length_mask_ = 0;
    bool any_numeric_ = false;
};

// -------------------------------------------------------- record scanning

// Finds record ends ('\n' outside quotes) in a buffer that starts at a
// record start. Resumable: scan() continues where the last call stopped.
struct Scanner {
    enum State : std::uint8_t { Unquoted, Quoted, QuoteInQuoted };
    char delim = ',';
    State state = Unquoted;
    std::size_t pos = 0;           // next byte to look at
    std::size_t record_start = 0;  // just past the last record end (0: none yet)
    std::size_t quote_open = 0;    // where the open quoted field starts

    // Scans buf[pos, len). For each target (ascending), records in `splits`
    // the first record end at or after it that is found in this call.
    void scan(const char* buf, std::size_t len, const std::vector<std::size_t>& targets,
              std::vector<std::size_t>& splits);
    bool in_quotes() const { return state == Quoted; }
    // The buffer's first `cut` bytes were consumed.
    void shift(std::size_t cut) {
        pos -= cut;
        record_start -= cut;
        quote_open = quote_open >= cut ? quote_open - cut : 0;
    }
};

struct RawField {
    std::string text;  // content (quotes removed, "" unescaped)
    bool quoted = false;
};

enum class RecordStatus : std::uint8_t { Ok, Blank, Incomplete, TextAfterQuote, TooManyFields };

struct RecordParse {
    RecordStatus status = RecordStatus::Incomplete;
    std::size_t next = 0;      // offset just past the record (or blank line)
    std::size_t newlines = 0;  // '\n' bytes consumed
    std::vector<RawField> fields;
    std::size_t bad_field = 0;     // TextAfterQuote: 0-based field
    std::size_t bad_newlines = 0;  // TextAfterQuote: '\n' bytes before the bad text
};

// Parses one record starting at buf[begin]; `at_eof` says the data ends at
// `end` (so a last record without '\n' is complete). Stops with
// TooManyFields once the record has more than `max_fields` fields.
RecordParse parse_record(const char* buf, std::size_t begin, std::size_t end, char delim, bool at_eof,
                         std::size_t max_fields = npos);

// Picks ',', ';' or '\t' from a sample of the first lines.
char sniff_delimiter(std::string_view sample, bool sample_is_whole, bool decimal_comma);

// 0-based field in which buf[at] lies, for a record starting at buf[begin].
std::size_t field_index_at(const char* buf, std::size_t begin, std::size_t at, char delim);

// ------------------------------------------------------------ piece parse

struct ParseSetup {
    char delim = ',';
    bool decimal_comma = false;
    const MissingTokens* missing = nullptr;
    const std::vector<std::string>* names = nullptr;
    std::size_t expected_rows = 0;  // reservation hint for the piece
};

struct TextChunk {
    std::vector<std::int32_t> codes;
    std::vector<std::string_view> levels;  // local code -> text, first appearance order
    std::unordered_map<std::string_view, std::int32_t> index;
    std::deque<std::string> owned;  // texts that are not in the buffer (unescaped)
    void clear() {
        codes.clear();
        levels.clear();
        index.clear();
        owned.clear();
    }
};

struct ColumnChunk {
    Mode mode = Mode::NumberInferred;
    std::vector<double> numbers;
    TextChunk text;
    std::size_t first_text_line = npos;  // local line of the first non-number text
    std::string first_text;
    // NumberTextMissing: text cells read as missing, the first few with local lines.
    std::size_t text_cells = 0;
    std::vector<TextCell> text_examples;
};

struct PieceError {
    bool set = false;
    std::size_t line = 0;  // local line (newlines before it within the piece)
    std::string rest;      // message after "<file>: line <N>"
};

struct PieceResult {
    std::vector<ColumnChunk> cols;
    std::vector<std::size_t> row_lines;  // local lines of record starts
    std::size_t newlines = 0;            // '\n' bytes in the piece
    PieceError error;
};

// Parses the records in buf[begin, end): begin is a record start, end is a
// record end or the end of the data. `modes` gives each column's starting
// mode; inferred-numeric columns that meet text are re-read as Text, so on
// return out.cols[j].mode is final for this piece.
void parse_piece(const ParseSetup& setup, const char* begin, const char* end, const std::vector<Mode>& modes,
                 PieceResult& out);

// Describes a column for messages: "column 3 ('age')".
std::string column_label(const std::vector<std::string>* names, std::size_t j);

// ------------------------------------------------------- streamed reading

// What identifies a file's contents between two reads of it: its size,
// modification time and identity (all zero for text in memory).
struct FileStamp {
    long long size = 0, mtime_sec = 0, mtime_nsec = 0;
    unsigned long long inode = 0, device = 0;
    bool operator==(const FileStamp&) const = default;
};

// A streamed read (csv_stream.cpp): the block driver hands its rows out in
// chunks instead of keeping them. A chunk is a Table with every column; its
// categorical codes are the file's (first appearance, stable across chunks)
// and its levels those found so far. A column that meets text after numbers
// were handed out makes the driver start the pass again (`restarted`, which
// may throw to refuse that), exactly when read_csv would read again.
struct ChunkSink {
    std::size_t chunk_rows = 65536;  // a chunk is handed out once it holds this many rows
    std::function<void(Table&&)> take;
    std::function<void()> restarted;
    std::vector<char> text_columns;     // columns read as text from the start
    std::vector<char> skip_columns;     // columns skipped (a later pass: the first pass checked them)
    const FileStamp* expect = nullptr;  // refuse a file whose stamp differs (a later pass)
    FileStamp seen;                     // the stamp of the file read
};

// Reads the file (or text, when `text` is given) through, handing its rows to
// the sink; throws what read_csv throws.
void read_csv_chunks(const std::string& path, const std::string* text, const CsvOptions& options,
                     const CsvProgress& progress, const detail::CsvTuning& tuning, ChunkSink& sink);

}  // namespace moderato::csv_detail
