// The block driver of the CSV reader: reads the source in blocks, finds the
// last complete record of each block (quote-aware), cuts the block into one
// piece per thread at record boundaries, parses the pieces in parallel and
// appends their chunks in order, so the table is the same for any thread
// count or block size. The input is only ever opened for reading.
#include "moderato/reading/csv.hpp"

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <deque>
#include <exception>
#include <filesystem>
#include <fstream>
#include <memory>
#include <string_view>
#include <system_error>
#include <thread>
#include <unordered_map>

#include "moderato/support/error.hpp"
#include "reading/csv_internal.hpp"

namespace moderato {

namespace {

using namespace csv_detail;

constexpr std::size_t kSniffBytes = 64 * 1024;

class Source {
public:
    virtual ~Source() = default;
    virtual std::size_t size() const = 0;
    // Reads up to n bytes at offset; fewer only at the end of the data.
    virtual std::size_t read(std::size_t offset, char* dst, std::size_t n) = 0;
};

class FileSource final : public Source {
public:
    explicit FileSource(const std::string& path) : path_(path) {
        namespace fs = std::filesystem;
        std::error_code ec;
        const fs::file_status st = fs::status(path, ec);
        if (st.type() == fs::file_type::not_found)
            throw InputError(path + ": file not found; check the path and the file name");
        if (ec)
            throw InputError(path + ": cannot be opened (" + ec.message() +
                             "); check the path and that you may read the file");
        if (st.type() == fs::file_type::directory)
            throw InputError(path + ": is a folder, not a file; choose a CSV or TSV file");
        in_.open(path, std::ios::in | std::ios::binary);
        if (!in_) {
            const int err = errno;
            throw InputError(path + ": cannot be opened (" +
                             std::error_code(err ? err : EACCES, std::generic_category()).message() +
                             "); check that you may read the file");
        }
        const auto sz = fs::file_size(path, ec);
        size_ = ec ? 0 : static_cast<std::size_t>(sz);
    }
    std::size_t size() const override { return size_; }
    std::size_t read(std::size_t offset, char* dst, std::size_t n) override {
        in_.clear();
        in_.seekg(static_cast<std::streamoff>(offset));
        in_.read(dst, static_cast<std::streamsize>(n));
        const auto got = static_cast<std::size_t>(in_.gcount());
        if (in_.bad())
            throw InputError(path_ + ": reading failed near byte " + std::to_string(offset + got) +
                             "; check the disk or copy the file elsewhere and try again");
        return got;
    }

private:
    std::string path_;
    std::ifstream in_;
    std::size_t size_ = 0;
};

class TextSource final : public Source {
public:
    explicit TextSource(std::string_view text) : text_(text) {}
    std::size_t size() const override { return text_.size(); }
    std::size_t read(std::size_t offset, char* dst, std::size_t n) override {
        if (offset >= text_.size()) return 0;
        const std::size_t got = std::min(n, text_.size() - offset);
        std::memcpy(dst, text_.data() + offset, got);
        return got;
    }

private:
    std::string_view text_;
};

// Calls fn(k) for k in [0, n), one thread each (k = 0 on the caller).
template <class Fn>
void run_parallel(std::size_t n, Fn&& fn) {
    if (n == 0) return;
    if (n == 1) {
        fn(std::size_t{0});
        return;
    }
    std::vector<std::exception_ptr> errors(n);
    std::vector<std::thread> pool;
    std::vector<std::size_t> inline_work;
    pool.reserve(n - 1);
    for (std::size_t k = 1; k < n; ++k) {
        try {
            pool.emplace_back([&fn, &errors, k] {
                try {
                    fn(k);
                } catch (...) {
                    errors[k] = std::current_exception();
                }
            });
        } catch (...) {  // no more threads: do it here
            inline_work.push_back(k);
        }
    }
    inline_work.push_back(0);
    for (const std::size_t k : inline_work) {
        try {
            fn(k);
        } catch (...) {
            errors[k] = std::current_exception();
        }
    }
    for (auto& t : pool) t.join();
    for (auto& e : errors)
        if (e) std::rethrow_exception(e);
}

struct FinalColumn {
    Mode mode = Mode::NumberInferred;
    std::vector<double> numbers;
    std::vector<std::int32_t> codes;
    std::deque<std::string> store;  // level texts (stable addresses)
    std::unordered_map<std::string_view, std::int32_t> index;
    std::size_t first_text_line = 0;
    std::string first_text;
};

std::string join_names(const std::vector<std::string>& names) {
    std::string s;
    for (std::size_t i = 0; i < names.size(); ++i) {
        if (i) s += ", ";
        s += names[i];
    }
    return s;
}

class Reader {
public:
    Reader(Source& src, const std::string& name, const CsvOptions& options, const CsvProgress& progress,
           const detail::CsvTuning& tuning)
        : src_(src), name_(name), opt_(options), progress_(progress), tuning_(tuning) {
        tuning_.block_size = std::max<std::size_t>(tuning_.block_size, 1);
        tuning_.min_piece = std::max<std::size_t>(tuning_.min_piece, 1);
        threads_ = opt_.threads ? opt_.threads : std::max(1u, std::thread::hardware_concurrency());
    }

    Table read() {
        const char d = opt_.delimiter;
        if (d == '"' || d == '\n' || d == '\r')
            fail("the delimiter cannot be a quote or a line break; choose ',', ';' or tab");
        if (opt_.decimal_comma && d == ',')
            fail("a decimal comma cannot be used with ',' as the delimiter; choose ';' or tab as the delimiter");
        total_ = src_.size();
        char head[3] = {0, 0, 0};
        if (src_.read(0, head, 3) == 3 && static_cast<unsigned char>(head[0]) == 0xEF &&
            static_cast<unsigned char>(head[1]) == 0xBB && static_cast<unsigned char>(head[2]) == 0xBF)
            start_ = 3;  // UTF-8 byte order mark
        if (d) {
            delim_ = d;
        } else {
            std::string sample(kSniffBytes, '\0');
            const std::size_t got = src_.read(start_, sample.data(), kSniffBytes);
            sample.resize(got);
            delim_ = sniff_delimiter(sample, got < kSniffBytes, opt_.decimal_comma);
            const std::string_view first_line(sample.data(), std::min(sample.find('\n'), sample.size()));
            if (opt_.decimal_comma && first_line.find(';') == std::string_view::npos &&
                first_line.find('\t') == std::string_view::npos &&
                sniff_delimiter(sample, got < kSniffBytes, false) == ',')
                fail(
                    "the file looks comma-separated, but with decimal commas the delimiter cannot be ','; read it "
                    "without the decimal-comma option, or save it with ';' or tab as the delimiter");
        }
        std::vector<char> text_columns;
        for (;;) {
            Table table;
            if (pass(text_columns, table)) return table;
        }
    }

private:
    [[noreturn]] void fail(const std::string& rest) const { throw InputError(name_ + ": " + rest); }
    [[noreturn]] void fail_at(std::size_t line, const std::string& rest) const {
        throw InputError(name_ + ": line " + std::to_string(line) + rest);
    }
    void report(std::size_t done) const {
        if (progress_.callback && !progress_.callback(std::min(done, total_), total_)) throw Cancelled{};
    }

    // Reads the header fields into names and column modes.
    void take_header(const RecordParse& r, std::size_t header_line, const std::vector<char>& text_columns);
    // One pass over the data. Returns false when a column stored as numbers
    // in earlier blocks met text: `text_columns` then says which columns to
    // read as text from the start, and the caller runs another pass.
    bool pass(std::vector<char>& text_columns, Table& out);

    Source& src_;
    const std::string& name_;
    const CsvOptions& opt_;
    const CsvProgress& progress_;
    detail::CsvTuning tuning_;
    unsigned threads_ = 1;
    char delim_ = ',';
    std::size_t start_ = 0;
    std::size_t total_ = 0;

    // Per pass.
    std::vector<std::string> names_;
    std::vector<Mode> modes_;
    std::vector<FinalColumn> cols_;
};

void Reader::take_header(const RecordParse& r, std::size_t header_line, const std::vector<char>& text_columns) {
    const std::size_t ncols = r.fields.size();
    names_.clear();
    if (opt_.header) {
        std::unordered_map<std::string_view, std::size_t> seen;
        names_.reserve(ncols);
        for (std::size_t j = 0; j < ncols; ++j) {
            const std::string& raw = r.fields[j].text;
            if (const char* bad = find_invalid_utf8(raw.data(), raw.data() + raw.size()))
                fail_at(header_line + count_newlines(raw.data(), bad),
                        ", column " + std::to_string(j + 1) + ": invalid UTF-8 in the column name (byte " +
                            hex_byte(static_cast<unsigned char>(*bad)) + "); save the file as UTF-8 and read it again");
            names_.emplace_back(trim_blanks(raw, delim_));
        }
        for (std::size_t j = 0; j < ncols; ++j) {
            if (names_[j].empty())
                fail_at(header_line, ", column " + std::to_string(j + 1) +
                                         ": the column name is empty; name every column in the header row, or "
                                         "read the file without a header");
            const auto [it, fresh] = seen.emplace(names_[j], j);
            if (!fresh)
                fail_at(header_line, ", column " + std::to_string(j + 1) + ": the column name '" + names_[j] +
                                         "' is also used by column " + std::to_string(it->second + 1) +
                                         "; give each column a different name");
        }
    } else {
        for (std::size_t j = 0; j < ncols; ++j) {
            std::string v(1, 'V');  // (not "V" + ...: GCC 12 warns falsely, -Wrestrict)
            v += std::to_string(j + 1);
            names_.push_back(std::move(v));
        }
    }
    for (const auto& [name, kind] : opt_.column_kinds) {
        (void)kind;
        if (std::find(names_.begin(), names_.end(), name) == names_.end())
            fail("column '" + name +
                 "' has a type override but is not a column of this file; columns are: " + join_names(names_));
    }
    modes_.assign(ncols, Mode::NumberInferred);
    for (std::size_t j = 0; j < ncols; ++j) {
        const auto it = opt_.column_kinds.find(names_[j]);
        if (it != opt_.column_kinds.end())
            modes_[j] = it->second == ColumnKind::Categorical ? Mode::Text : Mode::NumberForced;
        else if (j < text_columns.size() && text_columns[j]) modes_[j] = Mode::Text;
    }
    cols_.clear();
    cols_.resize(ncols);
    for (std::size_t j = 0; j < ncols; ++j) cols_[j].mode = modes_[j];
}

bool Reader::pass(std::vector<char>& text_columns, Table& out) {
    const MissingTokens missing(opt_.missing_tokens, delim_, opt_.decimal_comma);
    ParseSetup setup;
    setup.delim = delim_;
    setup.decimal_comma = opt_.decimal_comma;
    setup.missing = &missing;
    setup.names = &names_;

    Scanner sc;
    sc.delim = delim_;
    std::unique_ptr<char[]> buf;
    std::size_t cap = 0, carry = 0;
    std::size_t offset = start_;  // next byte of the source to read
    std::size_t line0 = 1;        // line of buf[0]
    bool header_done = false;
    std::size_t header_line = 0;
    std::vector<std::size_t> row_lines;
    std::vector<PieceResult> pieces;
    std::vector<std::size_t> targets, splits, bounds;
    double rows_per_byte = 0.0;
    bool reserved = false;
    names_.clear();
    modes_.clear();
    cols_.clear();

    for (;;) {
        const std::size_t block = tuning_.block_size;
        if (carry + block > cap) {
            const std::size_t ncap = std::max(carry + block, cap + cap / 2);
            std::unique_ptr<char[]> nb(new char[ncap]);
            if (carry) std::memcpy(nb.get(), buf.get(), carry);
            buf = std::move(nb);
            cap = ncap;
        }
        char* b = buf.get();
        const std::size_t got = src_.read(offset, b + carry, block);
        offset += got;
        const std::size_t len = carry + got;
        const bool eof = got < block;

        // Split targets spread evenly over the bytes not scanned yet.
        targets.clear();
        splits.clear();
        if (len > sc.pos) {
            const std::size_t span = len - sc.pos;
            const std::size_t want =
                std::min<std::size_t>(threads_, std::max<std::size_t>(1, span / tuning_.min_piece));
            for (std::size_t k = 1; k < want; ++k) targets.push_back(sc.pos + span / want * k);
        }
        sc.scan(b, len, targets, splits);
        const bool unterminated = eof && sc.in_quotes();
        std::size_t cut = sc.record_start;
        if (eof && !unterminated) cut = len;
        if (!eof && cut == 0) {  // no complete record yet: read more
            carry = len;
            report(offset);
            continue;
        }

        std::size_t data_begin = 0, data_line = line0;
        if (!header_done) {
            std::size_t p = 0, newlines = 0;
            RecordParse r;
            bool found = false;
            while (p < cut) {
                r = parse_record(b, p, cut, delim_, eof && cut == len);
                if (r.status == RecordStatus::Blank) {
                    newlines += r.newlines;
                    p = r.next;
                    continue;
                }
                found = r.status != RecordStatus::Incomplete;
                break;
            }
            if (found) {
                header_line = line0 + newlines;
                if (r.status == RecordStatus::TextAfterQuote)
                    fail_at(header_line + r.bad_newlines,
                            ", column " + std::to_string(r.bad_field + 1) +
                                ": text follows the closing quote of a quoted field; write a '\"' inside a quoted "
                                "field as '\"\"', or remove the text after the closing quote");
                take_header(r, header_line, text_columns);
                header_done = true;
                if (opt_.header) {
                    data_begin = r.next;
                    data_line = header_line + r.newlines;
                } else {
                    data_begin = p;
                    data_line = header_line;
                }
            } else {
                data_begin = cut;  // blank lines only
                data_line = line0 + newlines;
            }
        }

        std::size_t line_at_cut = data_line;
        if (header_done && cut > data_begin) {
            bounds.assign(1, data_begin);
            for (const std::size_t s : splits)
                if (s > bounds.back() && s < cut) bounds.push_back(s);
            bounds.push_back(cut);
            const std::size_t np = bounds.size() - 1;
            if (pieces.size() < np) pieces.resize(np);
            for (std::size_t j = 0; j < cols_.size(); ++j) modes_[j] = cols_[j].mode;
            if (rows_per_byte == 0.0)  // first data block: estimate the density from its line count
                rows_per_byte = static_cast<double>(count_newlines(b + data_begin, b + cut) + 1) /
                                static_cast<double>(cut - data_begin);
            const double piece_bytes = static_cast<double>(cut - data_begin) / static_cast<double>(np);
            setup.expected_rows = static_cast<std::size_t>(piece_bytes * rows_per_byte * 1.1) + 16;
            auto parse = [&](std::size_t k) {
                parse_piece(setup, b + bounds[k], b + bounds[k + 1], modes_, pieces[k]);
            };
            auto check_errors = [&] {
                std::size_t line = data_line;
                for (std::size_t k = 0; k < np; ++k) {
                    if (pieces[k].error.set) fail_at(line + pieces[k].error.line, pieces[k].error.rest);
                    line += pieces[k].newlines;
                }
            };
            run_parallel(np, parse);
            check_errors();

            // Columns that met their first text in this block.
            std::vector<std::size_t> turned;
            for (std::size_t j = 0; j < cols_.size(); ++j) {
                if (cols_[j].mode == Mode::Text) continue;
                for (std::size_t k = 0; k < np; ++k)
                    if (pieces[k].cols[j].mode == Mode::Text) {
                        turned.push_back(j);
                        break;
                    }
            }
            if (!turned.empty()) {
                for (const std::size_t j : turned) modes_[j] = Mode::Text;
                run_parallel(np, [&](std::size_t k) {
                    for (const std::size_t j : turned)
                        if (pieces[k].cols[j].mode != Mode::Text) {
                            parse(k);
                            return;
                        }
                });
                check_errors();
                bool again = false;
                for (const std::size_t j : turned)
                    for (const double v : cols_[j].numbers)
                        if (v == v) {  // a number already stored: its text is gone
                            again = true;
                            break;
                        }
                if (again) {
                    text_columns.assign(cols_.size(), 0);
                    for (std::size_t j = 0; j < cols_.size(); ++j) text_columns[j] = modes_[j] == Mode::Text;
                    return false;
                }
                for (const std::size_t j : turned) {  // only missing cells so far
                    FinalColumn& fc = cols_[j];
                    fc.codes.reserve(std::max(fc.numbers.capacity(), fc.numbers.size()));
                    fc.codes.assign(fc.numbers.size(), kMissingCode);
                    std::vector<double>().swap(fc.numbers);
                    fc.mode = Mode::Text;
                }
            }

            // Reserve the whole table once, from the first block's density.
            std::size_t block_rows = 0;
            for (std::size_t k = 0; k < np; ++k) block_rows += pieces[k].row_lines.size();
            rows_per_byte = static_cast<double>(block_rows) / static_cast<double>(cut - data_begin);
            if (!reserved) {
                reserved = true;
                const std::size_t cut_offset = offset - (len - cut);
                const std::size_t rest = total_ > cut_offset ? total_ - cut_offset : 0;
                const std::size_t est = row_lines.size() + block_rows +
                                        static_cast<std::size_t>(static_cast<double>(rest) * rows_per_byte * 1.05) + 16;
                row_lines.reserve(est);
                for (auto& fc : cols_) {
                    if (fc.mode == Mode::Text) fc.codes.reserve(est);
                    else fc.numbers.reserve(est);
                }
            }

            // Append the chunks in order, one column per task (first touch of
            // the table's memory happens here, so it is spread over threads).
            std::vector<std::size_t> piece_line(np + 1, data_line);
            for (std::size_t k = 0; k < np; ++k) piece_line[k + 1] = piece_line[k] + pieces[k].newlines;
            const std::size_t tasks = cols_.size() + 1;
            const std::size_t workers = std::min<std::size_t>(threads_, tasks);
            run_parallel(workers, [&](std::size_t w) {
                std::vector<std::int32_t> remap;
                for (std::size_t t = w; t < tasks; t += workers) {
                    if (t == cols_.size()) {
                        for (std::size_t k = 0; k < np; ++k)
                            for (const std::size_t r : pieces[k].row_lines) row_lines.push_back(piece_line[k] + r);
                        continue;
                    }
                    FinalColumn& fc = cols_[t];
                    for (std::size_t k = 0; k < np; ++k) {
                        ColumnChunk& ch = pieces[k].cols[t];
                        if (fc.mode != Mode::Text) {
                            fc.numbers.insert(fc.numbers.end(), ch.numbers.begin(), ch.numbers.end());
                            continue;
                        }
                        remap.resize(ch.text.levels.size());
                        for (std::size_t i = 0; i < ch.text.levels.size(); ++i) {
                            const std::string_view lv = ch.text.levels[i];
                            const auto it = fc.index.find(lv);
                            if (it != fc.index.end()) {
                                remap[i] = it->second;
                            } else {
                                const auto code = static_cast<std::int32_t>(fc.store.size());
                                const std::string& kept = fc.store.emplace_back(lv);
                                fc.index.emplace(std::string_view(kept), code);
                                remap[i] = code;
                            }
                        }
                        for (const std::int32_t c : ch.text.codes)
                            fc.codes.push_back(c < 0 ? kMissingCode : remap[static_cast<std::size_t>(c)]);
                        if (fc.first_text_line == 0 && ch.first_text_line != npos) {
                            fc.first_text_line = piece_line[k] + ch.first_text_line;
                            fc.first_text = ch.first_text;
                        }
                    }
                }
            });
            const std::size_t base = piece_line[np];
            line_at_cut = base;
        }
        line0 = line_at_cut;

        if (unterminated) {
            const std::size_t field = field_index_at(b, cut, sc.quote_open, delim_);
            const std::string label =
                header_done ? column_label(&names_, field) : "column " + std::to_string(field + 1);
            fail_at(line0 + count_newlines(b + cut, b + sc.quote_open),
                    ", " + label +
                        ": the quoted field that starts here has no closing quote; add the missing '\"' (write "
                        "a '\"' inside a quoted field as '\"\"')");
        }
        report(offset);
        if (eof) break;
        carry = len - cut;
        if (carry) std::memmove(b, b + cut, carry);
        sc.shift(cut);
    }

    if (!header_done)
        fail(opt_.header ? "the file is empty; expected a header row and data rows"
                         : "the file is empty; expected data rows");
    if (row_lines.empty())
        fail("the file has a header (line " + std::to_string(header_line) +
             ") but no data rows; add data rows below the header");

    out.source = name_;
    out.row_lines = std::move(row_lines);
    out.columns.resize(cols_.size());
    for (std::size_t j = 0; j < cols_.size(); ++j) {
        FinalColumn& fc = cols_[j];
        Column& c = out.columns[j];
        c.name = names_[j];
        c.kind_forced = opt_.column_kinds.count(names_[j]) > 0;
        if (fc.mode == Mode::Text) {
            c.kind = ColumnKind::Categorical;
            c.codes = std::move(fc.codes);
            fc.index.clear();
            c.levels.reserve(fc.store.size());
            for (auto& s : fc.store) c.levels.push_back(std::move(s));
            c.first_text_line = fc.first_text_line;
            c.first_text = std::move(fc.first_text);
        } else {
            c.kind = ColumnKind::Numeric;
            c.numbers = std::move(fc.numbers);
        }
        fc = FinalColumn{};
    }
    return true;
}

}  // namespace

namespace detail {

Table read_csv_tuned(const std::string& path, const CsvOptions& options, const CsvProgress& progress,
                     const CsvTuning& tuning) {
    FileSource source(path);
    return Reader(source, path, options, progress, tuning).read();
}

Table read_csv_text_tuned(const std::string& text, const std::string& name, const CsvOptions& options,
                          const CsvProgress& progress, const CsvTuning& tuning) {
    TextSource source(text);
    return Reader(source, name, options, progress, tuning).read();
}

}  // namespace detail

Table read_csv(const std::string& path, const CsvOptions& options, const CsvProgress& progress) {
    return detail::read_csv_tuned(path, options, progress, detail::CsvTuning{});
}

Table read_csv_text(const std::string& text, const std::string& name, const CsvOptions& options) {
    return detail::read_csv_text_tuned(text, name, options, CsvProgress{}, detail::CsvTuning{});
}

}  // namespace moderato
