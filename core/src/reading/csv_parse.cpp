// The per-thread part of the CSV reader: turns the records of one piece of a
// block into per-column chunks (doubles, or local level codes).
#include <charconv>
#include <cmath>
#include <cstring>
#include <limits>

#include "reading/csv_internal.hpp"

namespace moderato::csv_detail {

namespace {

inline bool is_digit(char c) { return c >= '0' && c <= '9'; }

// A cell's text for a message: at most 60 bytes, cut at a character boundary.
std::string excerpt(std::string_view s) {
    constexpr std::size_t kMax = 60;
    if (s.size() <= kMax) return std::string(s);
    std::size_t cut = kMax;
    while (cut > 0 && (static_cast<unsigned char>(s[cut]) & 0xC0) == 0x80) --cut;
    return std::string(s.substr(0, cut)) + "...";
}

std::string delimiter_label(char d) {
    if (d == '\t') return "tab";
    return std::string("'") + d + "'";
}

}  // namespace

bool parse_number(std::string_view text, bool decimal_comma, double& out) {
    const char* b = text.data();
    const char* e = b + text.size();
    if (b == e) return false;
    if (*b == '+') {
        ++b;
        if (b == e || !(is_digit(*b) || *b == '.' || (decimal_comma && *b == ','))) return false;
    }
    double v = 0.0;
    if (decimal_comma) {
        // Copy with ',' -> '.'; a '.' is not a decimal separator here.
        char local[128];
        const std::size_t n = static_cast<std::size_t>(e - b);
        if (n >= sizeof local) return false;
        int commas = 0;
        for (std::size_t i = 0; i < n; ++i) {
            char c = b[i];
            if (c == '.') return false;
            if (c == ',') {
                c = '.';
                ++commas;
            }
            local[i] = c;
        }
        if (commas > 1) return false;
        const auto r = std::from_chars(local, local + n, v);
        if (r.ec != std::errc() || r.ptr != local + n) return false;
    } else {
        const auto r = std::from_chars(b, e, v);
        if (r.ec != std::errc() || r.ptr != e) return false;
    }
    if (!std::isfinite(v)) return false;
    out = v;
    return true;
}

const char* find_invalid_utf8(const char* begin, const char* end) {
    const auto* s = reinterpret_cast<const unsigned char*>(begin);
    const auto* e = reinterpret_cast<const unsigned char*>(end);
    while (s < e) {
        while (e - s >= 8) {  // ASCII fast path, 8 bytes at a time
            std::uint64_t w;
            std::memcpy(&w, s, 8);
            if (w & 0x8080808080808080ULL) break;
            s += 8;
        }
        if (s >= e) break;
        const unsigned c = *s;
        if (c < 0x80) {
            ++s;
            continue;
        }
        std::ptrdiff_t more = 0;
        unsigned lo = 0x80, hi = 0xBF;  // allowed range of the second byte
        if (c >= 0xC2 && c <= 0xDF) {
            more = 1;
        } else if (c == 0xE0) {
            more = 2;
            lo = 0xA0;
        } else if ((c >= 0xE1 && c <= 0xEC) || c == 0xEE || c == 0xEF) {
            more = 2;
        } else if (c == 0xED) {
            more = 2;
            hi = 0x9F;  // no UTF-16 surrogates
        } else if (c == 0xF0) {
            more = 3;
            lo = 0x90;
        } else if (c >= 0xF1 && c <= 0xF3) {
            more = 3;
        } else if (c == 0xF4) {
            more = 3;
            hi = 0x8F;  // nothing above U+10FFFF
        } else {
            return reinterpret_cast<const char*>(s);
        }
        if (e - s <= more) return reinterpret_cast<const char*>(s);
        if (s[1] < lo || s[1] > hi) return reinterpret_cast<const char*>(s);
        for (std::ptrdiff_t k = 2; k <= more; ++k)
            if ((s[k] & 0xC0) != 0x80) return reinterpret_cast<const char*>(s);
        s += more + 1;
    }
    return nullptr;
}

MissingTokens::MissingTokens(const std::vector<std::string>& tokens, char delim, bool decimal_comma) {
    for (const auto& t : tokens) {
        const std::string_view trimmed = trim_blanks(t, delim);
        tokens_.emplace_back(trimmed);
        length_mask_ |= std::uint64_t{1} << (trimmed.size() < 63 ? trimmed.size() : 63);
        double v;
        if (parse_number(trimmed, decimal_comma, v)) any_numeric_ = true;
    }
}

std::string column_label(const std::vector<std::string>* names, std::size_t j) {
    std::string s = "column " + std::to_string(j + 1);
    if (names && j < names->size()) s += " ('" + (*names)[j] + "')";
    return s;
}

namespace {

class PieceParser {
public:
    PieceParser(const ParseSetup& setup, const char* begin, const char* end, PieceResult& out)
        : s_(setup),
          begin_(begin),
          end_(end),
          out_(out),
          delim_(setup.delim),
          fast_numbers_(!setup.decimal_comma),
          numeric_missing_(setup.missing->any_numeric()) {}

    // npos when done (possibly with out.error set); otherwise the column
    // that met text and must be re-read as Text.
    std::size_t run();

private:
    enum class Signal { Ok, Restart, Error };

    bool try_fast_number(ColumnChunk& col, const char*& p);
    Signal general_cell(std::size_t j, const char*& p, std::size_t& line);
    Signal handle_value(std::size_t j, std::string_view raw, bool quoted, bool in_scratch, std::size_t cell_line);
    void skip_field(const char*& p, std::size_t& line);
    Signal check_utf8(std::size_t j, std::string_view raw, std::size_t cell_line) {
        if (const void* nul = std::memchr(raw.data(), 0, raw.size()))
            return fail(cell_line + count_newlines(raw.data(), static_cast<const char*>(nul)),
                        ", " + column_label(s_.names, j) +
                            ": a NUL byte (0x00), which text files do not contain; save the data as CSV text (UTF-8) "
                            "and read it again");
        const char* bad = find_invalid_utf8(raw.data(), raw.data() + raw.size());
        if (!bad) return Signal::Ok;
        return fail(cell_line + count_newlines(raw.data(), bad),
                    ", " + column_label(s_.names, j) + ": invalid UTF-8 (byte " +
                        hex_byte(static_cast<unsigned char>(*bad)) + "); save the file as UTF-8 and read it again");
    }
    Signal fail(std::size_t line, std::string rest) {
        out_.error.set = true;
        out_.error.line = line;
        out_.error.rest = std::move(rest);
        return Signal::Error;
    }

    bool is_end_of_field(const char* t) const {
        return t == end_ || *t == delim_ || *t == '\n' || (*t == '\r' && (t + 1 == end_ || t[1] == '\n'));
    }

    const ParseSetup& s_;
    const char* const begin_;
    const char* const end_;
    PieceResult& out_;
    const char delim_;
    const bool fast_numbers_;
    const bool numeric_missing_;
    std::string scratch_;
    std::size_t restart_column_ = npos;
};

inline bool PieceParser::try_fast_number(ColumnChunk& col, const char*& p) {
    const char* s = p;
    while (s < end_ && is_blank(*s, delim_)) ++s;
    const char* num = s;
    if (num < end_ && *num == '+') {
        if (num + 1 < end_ && (is_digit(num[1]) || num[1] == '.')) ++num;
        else return false;
    }
    double v;
    const auto r = std::from_chars(num, end_, v);
    if (r.ec != std::errc() || !std::isfinite(v)) return false;
    const char* t = r.ptr;
    while (t < end_ && is_blank(*t, delim_)) ++t;
    if (!is_end_of_field(t)) return false;
    if (numeric_missing_ && s_.missing->contains(std::string_view(s, static_cast<std::size_t>(r.ptr - s))))
        v = std::numeric_limits<double>::quiet_NaN();
    col.numbers.push_back(v);
    p = (t < end_ && *t == '\r') ? t + 1 : t;
    return true;
}

void PieceParser::skip_field(const char*& p, std::size_t& line) {
    if (p < end_ && *p == '"') {
        const char* q = p + 1;
        for (;;) {
            const void* hit = std::memchr(q, '"', static_cast<std::size_t>(end_ - q));
            if (!hit) {
                line += count_newlines(p, end_);
                p = end_;
                return;
            }
            const char* h = static_cast<const char*>(hit);
            if (h + 1 < end_ && h[1] == '"') {
                q = h + 2;
                continue;
            }
            line += count_newlines(p, h);
            p = h + 1;
            break;
        }
    }
    while (p < end_ && *p != delim_ && *p != '\n') ++p;
}

PieceParser::Signal PieceParser::general_cell(std::size_t j, const char*& p, std::size_t& line) {
    const std::size_t cell_line = line;
    std::string_view raw;
    bool quoted = false, in_scratch = false;
    if (p < end_ && *p == '"') {
        quoted = true;
        const char* cb = p + 1;
        const char* q = cb;
        bool escaped = false;
        for (;;) {
            const void* hit = std::memchr(q, '"', static_cast<std::size_t>(end_ - q));
            if (!hit)  // the block driver never hands out such a record; be safe
                return fail(cell_line, ", " + column_label(s_.names, j) +
                                           ": the quoted field that starts here has no closing quote; add the "
                                           "missing '\"' (write a '\"' inside a quoted field as '\"\"')");
            q = static_cast<const char*>(hit);
            if (q + 1 < end_ && q[1] == '"') {
                escaped = true;
                q += 2;
                continue;
            }
            break;
        }
        line += count_newlines(cb, q);
        const char* t = q + 1;
        while (t < end_ && is_blank(*t, delim_)) ++t;
        if (!is_end_of_field(t))
            return fail(line, ", " + column_label(s_.names, j) +
                                  ": text follows the closing quote of a quoted field; write a '\"' inside a "
                                  "quoted field as '\"\"', or remove the text after the closing quote");
        if (t < end_ && *t == '\r') ++t;
        p = t;
        if (escaped) {
            scratch_.clear();
            for (const char* c = cb; c < q; ++c) {
                scratch_ += *c;
                if (*c == '"') ++c;  // the second quote of a pair
            }
            raw = scratch_;
            in_scratch = true;
        } else {
            raw = std::string_view(cb, static_cast<std::size_t>(q - cb));
        }
    } else {
        const char* e = p;
        while (e < end_ && *e != delim_ && *e != '\n') ++e;
        const char* fe = e;
        if (fe > p && fe[-1] == '\r' && (e == end_ || *e == '\n')) --fe;
        raw = std::string_view(p, static_cast<std::size_t>(fe - p));
        p = e;
    }
    return handle_value(j, raw, quoted, in_scratch, cell_line);
}

PieceParser::Signal PieceParser::handle_value(std::size_t j, std::string_view raw, bool quoted, bool in_scratch,
                                              std::size_t cell_line) {
    ColumnChunk& col = out_.cols[j];
    if (col.mode == Mode::Drop) return check_utf8(j, raw, cell_line);  // checked as text, not kept
    const std::string_view trimmed = trim_blanks(raw, delim_);
    if (s_.missing->contains(trimmed)) {
        if (col.mode == Mode::Text) col.text.codes.push_back(-1);
        else col.numbers.push_back(std::numeric_limits<double>::quiet_NaN());
        return Signal::Ok;
    }
    double v;
    if (col.mode != Mode::Text && parse_number(trimmed, s_.decimal_comma, v)) {
        col.numbers.push_back(v);
        return Signal::Ok;
    }
    if (col.mode == Mode::NumberInferred) {  // re-read this piece with the column as text
        restart_column_ = j;
        return Signal::Restart;
    }
    if (col.mode == Mode::NumberTextMissing) {
        if (const Signal bad = check_utf8(j, raw, cell_line); bad != Signal::Ok) return bad;
        col.numbers.push_back(std::numeric_limits<double>::quiet_NaN());
        if (col.text_cells++ < kTextExamples) col.text_examples.push_back({cell_line, excerpt(trimmed)});
        return Signal::Ok;
    }
    if (col.mode == Mode::NumberForced) {
        if (const Signal bad = check_utf8(j, raw, cell_line); bad != Signal::Ok) return bad;
        const std::string text = excerpt(trimmed);
        return fail(cell_line, ", " + column_label(s_.names, j) + ": '" + text +
                                   "' is not a number, but the column is set to numeric; correct the cell, add '" +
                                   text + "' to the missing tokens, or read the column as categorical");
    }
    // Text column. A level seen before was checked when first seen.
    std::string_view level = quoted ? raw : trimmed;
    TextChunk& tc = col.text;
    std::int32_t code;
    if (const auto it = tc.index.find(level); it != tc.index.end()) {
        code = it->second;
    } else {
        if (const Signal bad = check_utf8(j, raw, cell_line); bad != Signal::Ok) return bad;
        if (in_scratch) level = tc.owned.emplace_back(level);
        code = static_cast<std::int32_t>(tc.levels.size());
        tc.levels.push_back(level);
        tc.index.emplace(level, code);
    }
    if (col.first_text_line == npos && !parse_number(trimmed, s_.decimal_comma, v)) {
        col.first_text_line = cell_line;
        col.first_text.assign(trimmed);
    }
    tc.codes.push_back(code);
    return Signal::Ok;
}

std::size_t PieceParser::run() {
    const std::size_t ncols = out_.cols.size();
    const char* p = begin_;
    std::size_t line = 0;
    while (p < end_) {
        const char c0 = *p;
        if (c0 == '\n') {  // blank line
            ++p;
            ++line;
            continue;
        }
        if (c0 == '\r' && (p + 1 == end_ || p[1] == '\n')) {
            if (p + 1 == end_) {
                ++p;
            } else {
                p += 2;
                ++line;
            }
            continue;
        }
        const std::size_t record_line = line;
        out_.row_lines.push_back(line);
        std::size_t j = 0;
        for (;;) {
            if (j < ncols && out_.cols[j].mode == Mode::Skip) {
                skip_field(p, line);
                out_.cols[j].numbers.push_back(std::numeric_limits<double>::quiet_NaN());
            } else if (j < ncols) {
                ColumnChunk& col = out_.cols[j];
                const bool done = fast_numbers_ && col.mode != Mode::Text && col.mode != Mode::Drop && p < end_ &&
                                  *p != '"' && try_fast_number(col, p);
                if (!done) {
                    const Signal sig = general_cell(j, p, line);
                    if (sig == Signal::Error) return npos;
                    if (sig == Signal::Restart) return restart_column_;
                }
            } else {
                skip_field(p, line);
            }
            ++j;
            if (p >= end_) break;
            if (*p == '\n') {
                ++p;
                ++line;
                break;
            }
            ++p;  // the delimiter
        }
        if (j != ncols) {
            fail(record_line, " has " + std::to_string(j) + (j == 1 ? " field" : " fields") + ", expected " +
                                  std::to_string(ncols) + "; look for a missing or extra delimiter (" +
                                  delimiter_label(delim_) +
                                  ") on that line, and put quotes around any field that contains one");
            return npos;
        }
    }
    out_.newlines = line;
    return npos;
}

}  // namespace

void parse_piece(const ParseSetup& setup, const char* begin, const char* end, const std::vector<Mode>& modes,
                 PieceResult& out) {
    std::vector<Mode> m = modes;
    for (;;) {
        out.cols.resize(m.size());
        for (std::size_t j = 0; j < m.size(); ++j) {
            ColumnChunk& c = out.cols[j];
            c.mode = m[j];
            c.first_text_line = npos;
            c.first_text.clear();
            c.text_cells = 0;
            c.text_examples.clear();
            c.text.clear();
            c.numbers.clear();
            if (c.mode == Mode::Text) {
                std::vector<double>().swap(c.numbers);
                c.text.codes.reserve(setup.expected_rows);
            } else {
                std::vector<std::int32_t>().swap(c.text.codes);
                if (c.mode != Mode::Drop) c.numbers.reserve(setup.expected_rows);
            }
        }
        out.row_lines.clear();
        out.row_lines.reserve(setup.expected_rows);
        out.newlines = 0;
        out.error = PieceError{};
        PieceParser parser(setup, begin, end, out);
        const std::size_t turned = parser.run();
        if (turned == npos) return;
        m[turned] = Mode::Text;
    }
}

}  // namespace moderato::csv_detail
