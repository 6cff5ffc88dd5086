// The block driver of the CSV reader: reads the source in blocks, finds the
// last complete record of each block (quote-aware), cuts the block into one
// piece per thread at record boundaries, parses the pieces in parallel and
// appends their chunks in order, so the table is the same for any thread
// count or block size. The input is only ever opened for reading.
#include "moderato/reading/csv.hpp"
#include "moderato/reading/csv_columns.hpp"

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <deque>
#include <exception>
#include <filesystem>
#include <memory>
#include <string_view>
#include <system_error>
#include <thread>
#include <unordered_map>
#include <utility>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
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
    // Throws InputError when the data changed since the source was opened.
    virtual void check_unchanged() const {}
    // What identifies the data read (streamed reads compare it between passes).
    virtual FileStamp stamp() const { return {}; }
};

// A file read through one descriptor. The size, modification time and
// identity seen at opening are the file's snapshot: reads stop at that size,
// and check_unchanged() refuses a file that was appended to, cut short,
// rewritten in place or replaced since, so torn data are never parsed
// silently (the modification time has nanoseconds where the file system
// keeps them).
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
        fd_ = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
        if (fd_ < 0) {
            const int err = errno;
            throw InputError(path + ": cannot be opened (" +
                             std::error_code(err ? err : EACCES, std::generic_category()).message() +
                             "); check that you may read the file");
        }
        struct stat now {};
        if (::fstat(fd_, &now) != 0) now.st_size = 0;
        opened_ = now;
        size_ = S_ISREG(now.st_mode) ? static_cast<std::size_t>(now.st_size) : 0;
    }
    ~FileSource() override { ::close(fd_); }
    FileSource(const FileSource&) = delete;
    FileSource& operator=(const FileSource&) = delete;

    std::size_t size() const override { return size_; }
    std::size_t read(std::size_t offset, char* dst, std::size_t n) override {
        if (offset >= size_) return 0;
        n = std::min(n, size_ - offset);  // the snapshot's bytes only
        std::size_t got = 0;
        while (got < n) {
            const ssize_t r = ::pread(fd_, dst + got, n - got, static_cast<off_t>(offset + got));
            if (r < 0 && errno == EINTR) continue;
            if (r < 0)
                throw InputError(path_ + ": reading failed near byte " + std::to_string(offset + got) +
                                 "; check the disk or copy the file elsewhere and try again");
            if (r == 0)
                changed("it became shorter (" + std::to_string(offset + got) + " of " + std::to_string(size_) +
                        " bytes were there)");
            got += static_cast<std::size_t>(r);
        }
        return got;
    }
    void check_unchanged() const override {
        struct stat now {};
        if (::fstat(fd_, &now) != 0 || now.st_size != opened_.st_size)
            changed("its size went from " + std::to_string(opened_.st_size) + " to " + std::to_string(now.st_size) +
                    " bytes");
        if (now.st_mtim.tv_sec != opened_.st_mtim.tv_sec || now.st_mtim.tv_nsec != opened_.st_mtim.tv_nsec)
            changed("it was written to (its modification time changed)");
        struct stat named {};
        if (::stat(path_.c_str(), &named) != 0 || named.st_ino != opened_.st_ino || named.st_dev != opened_.st_dev)
            changed("another file took its place");
    }
    FileStamp stamp() const override {
        return {static_cast<long long>(opened_.st_size), static_cast<long long>(opened_.st_mtim.tv_sec),
                static_cast<long long>(opened_.st_mtim.tv_nsec), static_cast<unsigned long long>(opened_.st_ino),
                static_cast<unsigned long long>(opened_.st_dev)};
    }

private:
    [[noreturn]] void changed(const std::string& how) const {
        throw InputError(path_ + ": the file changed while it was being read (" + how +
                         "); nothing was imported. Wait until the program writing it has finished, or read a "
                         "copy, and try again");
    }

    std::string path_;
    int fd_ = -1;
    struct stat opened_ {};
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
    std::size_t text_cells = 0;  // NumberTextMissing
    std::vector<TextCell> text_examples;
    bool handed_numbers = false;  // a streamed read handed out a number of this column
};

std::string count_text(std::size_t n) { return format_count(static_cast<long long>(n)); }

// "256 MiB" for whole mebibytes, else bytes.
std::string byte_text(std::size_t n) {
    if (n % (std::size_t{1} << 20) == 0) return count_text(n >> 20) + " MiB";
    return count_text(n) + " bytes";
}

std::string delimiter_name(char d) {
    if (d == '\t') return "tab";
    return std::string("'") + d + "'";
}

std::string join_names(const std::vector<std::string>& names) {
    std::string s;
    for (std::size_t i = 0; i < names.size(); ++i) {
        if (i) s += ", ";
        s += names[i];
    }
    return s;
}

// The state of one pass over the source.
struct Pass {
    Pass(const CsvOptions& opt, char delim, const std::vector<std::string>* names)
        : missing(opt.missing_tokens, delim, opt.decimal_comma) {
        setup.delim = delim;
        setup.decimal_comma = opt.decimal_comma;
        setup.missing = &missing;
        setup.names = names;
        sc.delim = delim;
    }
    Pass(const Pass&) = delete;  // setup points at missing
    Pass& operator=(const Pass&) = delete;

    const MissingTokens missing;
    ParseSetup setup;
    Scanner sc;
    std::unique_ptr<char[]> buf;
    std::size_t cap = 0, carry = 0;
    std::size_t offset = 0;  // next byte of the source to read
    std::size_t line0 = 1;   // line of buf[0]
    bool header_done = false;
    std::size_t header_line = 0;
    std::vector<std::size_t> row_lines;
    std::vector<PieceResult> pieces;
    std::vector<std::size_t> targets, splits, bounds;
    double rows_per_byte = 0.0;
    bool reserved = false;
    std::size_t rows_handed = 0;  // rows a streamed read has handed out
};

// One block in the buffer: b[0, len) holds the carried bytes and those just
// read; the records before `cut` are complete.
struct Block {
    char* b = nullptr;
    std::size_t len = 0, cut = 0;
    bool eof = false, unterminated = false;
    std::size_t data_begin = 0, data_line = 0;  // where its data records start
    std::size_t pieces = 0;                     // parsed in this many pieces
};

class Reader {
public:
    // `keep`: read only these columns (read_csv_columns); null: all.
    Reader(Source& src, const std::string& name, const CsvOptions& options, const CsvProgress& progress,
           const detail::CsvTuning& tuning, ChunkSink* sink = nullptr, const std::vector<std::string>* keep = nullptr)
        : src_(src), name_(name), opt_(options), progress_(progress), tuning_(tuning), sink_(sink), keep_(keep) {
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
        if (sink_) start_streamed(text_columns);
        for (;;) {
            Table table;
            if (pass(text_columns, table)) return table;
            if (sink_ && sink_->restarted) sink_->restarted();
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
    // Reads the next block after the carried bytes and finds its record ends
    // and its split points.
    Block read_block(Pass& ps);
    // Finds the header record (after blank lines) and where the data start.
    void find_header(Pass& ps, Block& blk, const std::vector<char>& text_columns);
    // Parses the block's data records in pieces, one per thread.
    void parse_pieces(Pass& ps, Block& blk);
    void parse_one(Pass& ps, const Block& blk, std::size_t k);
    void check_pieces(const Pass& ps, const Block& blk) const;
    // Columns that met their first text in this block are re-read as text.
    // Returns false when one had already stored numbers (see pass).
    bool take_new_text(Pass& ps, const Block& blk, std::vector<char>& text_columns);
    // Reserves the whole table once, from the first block's density.
    void reserve_table(Pass& ps, const Block& blk);
    // Appends the pieces to the table; returns the line at the block's cut.
    std::size_t append_pieces(Pass& ps, const Block& blk);
    void append_column(Pass& ps, const Block& blk, std::size_t j, const std::vector<std::size_t>& piece_line,
                       std::vector<std::int32_t>& remap);
    [[noreturn]] void fail_unterminated(const Pass& ps, const Block& blk) const;
    // The limits of CsvLimits: one record's length, the table's cells.
    void check_record_length(const Pass& ps, const Block& blk) const;
    // The per-column overrides name columns of the file and do not contradict each other.
    void check_overrides() const;
    // Columns not in keep_ are dropped, when every kept name is a column
    // (else all are read, so that the caller's lookup names the missing one
    // with every column listed).
    void drop_unwanted();
    void check_cells(const Pass& ps, const Block& blk) const;
    // Moves the columns read into `out`.
    void build_table(Pass& ps, Table& out);
    // A streamed read: the file is the one of the earlier passes; the text
    // columns known from them.
    void start_streamed(std::vector<char>& text_columns);
    // Hands the rows held to the sink as one chunk.
    void hand_out(Pass& ps);

    Source& src_;
    const std::string& name_;
    const CsvOptions& opt_;
    const CsvProgress& progress_;
    detail::CsvTuning tuning_;
    ChunkSink* sink_ = nullptr;
    const std::vector<std::string>* keep_ = nullptr;
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
    check_overrides();
    modes_.assign(ncols, Mode::NumberInferred);
    for (std::size_t j = 0; j < ncols; ++j) {
        const auto it = opt_.column_kinds.find(names_[j]);
        if (opt_.text_as_missing.count(names_[j])) modes_[j] = Mode::NumberTextMissing;
        else if (it != opt_.column_kinds.end())
            modes_[j] = it->second == ColumnKind::Categorical ? Mode::Text : Mode::NumberForced;
        else if (j < text_columns.size() && text_columns[j]) modes_[j] = Mode::Text;
        if (sink_ && j < sink_->skip_columns.size() && sink_->skip_columns[j]) modes_[j] = Mode::Skip;
    }
    if (keep_) drop_unwanted();
    cols_.clear();
    cols_.resize(ncols);
    for (std::size_t j = 0; j < ncols; ++j) cols_[j].mode = modes_[j];
}

void Reader::drop_unwanted() {
    for (const std::string& name : *keep_)
        if (std::find(names_.begin(), names_.end(), name) == names_.end()) return;
    for (std::size_t j = 0; j < names_.size(); ++j)
        if (std::find(keep_->begin(), keep_->end(), names_[j]) == keep_->end()) modes_[j] = Mode::Drop;
}

bool Reader::pass(std::vector<char>& text_columns, Table& out) {
    Pass ps(opt_, delim_, &names_);
    ps.offset = start_;
    names_.clear();
    modes_.clear();
    cols_.clear();
    for (;;) {
        Block blk = read_block(ps);
        src_.check_unchanged();
        check_record_length(ps, blk);
        if (!blk.eof && blk.cut == 0) {  // no complete record yet: read more
            ps.carry = blk.len;
            report(ps.offset);
            continue;
        }
        blk.data_line = ps.line0;
        if (!ps.header_done) find_header(ps, blk, text_columns);
        std::size_t line_at_cut = blk.data_line;
        if (ps.header_done && blk.cut > blk.data_begin) {
            parse_pieces(ps, blk);
            if (!take_new_text(ps, blk, text_columns)) return false;
            check_cells(ps, blk);
            reserve_table(ps, blk);
            line_at_cut = append_pieces(ps, blk);
            if (sink_ && ps.row_lines.size() >= sink_->chunk_rows) hand_out(ps);
        }
        ps.line0 = line_at_cut;
        if (blk.unterminated) fail_unterminated(ps, blk);
        report(ps.offset);
        if (blk.eof) break;
        ps.carry = blk.len - blk.cut;
        if (ps.carry) std::memmove(blk.b, blk.b + blk.cut, ps.carry);
        ps.sc.shift(blk.cut);
    }
    build_table(ps, out);
    return true;
}

Block Reader::read_block(Pass& ps) {
    const std::size_t block = tuning_.block_size;
    if (ps.carry + block > ps.cap) {
        const std::size_t ncap = std::max(ps.carry + block, ps.cap + ps.cap / 2);
        std::unique_ptr<char[]> nb(new char[ncap]);
        if (ps.carry) std::memcpy(nb.get(), ps.buf.get(), ps.carry);
        ps.buf = std::move(nb);
        ps.cap = ncap;
    }
    Block blk;
    blk.b = ps.buf.get();
    const std::size_t got = src_.read(ps.offset, blk.b + ps.carry, block);
    ps.offset += got;
    blk.len = ps.carry + got;
    blk.eof = got < block;

    // Split targets spread evenly over the bytes not scanned yet.
    ps.targets.clear();
    ps.splits.clear();
    if (blk.len > ps.sc.pos) {
        const std::size_t span = blk.len - ps.sc.pos;
        const std::size_t want = std::min<std::size_t>(threads_, std::max<std::size_t>(1, span / tuning_.min_piece));
        for (std::size_t k = 1; k < want; ++k) ps.targets.push_back(ps.sc.pos + span / want * k);
    }
    ps.sc.scan(blk.b, blk.len, ps.targets, ps.splits);
    blk.unterminated = blk.eof && ps.sc.in_quotes();
    blk.cut = ps.sc.record_start;
    if (blk.eof && !blk.unterminated) blk.cut = blk.len;
    return blk;
}

void Reader::find_header(Pass& ps, Block& blk, const std::vector<char>& text_columns) {
    std::size_t p = 0, newlines = 0;
    RecordParse r;
    bool found = false;
    while (p < blk.cut) {
        r = parse_record(blk.b, p, blk.cut, delim_, blk.eof && blk.cut == blk.len, tuning_.max_columns);
        if (r.status == RecordStatus::Blank) {
            newlines += r.newlines;
            p = r.next;
            continue;
        }
        found = r.status != RecordStatus::Incomplete;
        break;
    }
    if (!found) {
        blk.data_begin = blk.cut;  // blank lines only
        blk.data_line = ps.line0 + newlines;
        return;
    }
    ps.header_line = ps.line0 + newlines;
    if (r.status == RecordStatus::TooManyFields)
        fail_at(ps.header_line, " has more than " + count_text(tuning_.max_columns) +
                                    " fields; Moderato reads at most " + count_text(tuning_.max_columns) +
                                    " columns. Check the delimiter (" + delimiter_name(delim_) +
                                    "), or keep only the columns the analysis needs");
    if (r.status == RecordStatus::TextAfterQuote)
        fail_at(ps.header_line + r.bad_newlines,
                ", column " + std::to_string(r.bad_field + 1) +
                    ": text follows the closing quote of a quoted field; write a '\"' inside a quoted "
                    "field as '\"\"', or remove the text after the closing quote");
    take_header(r, ps.header_line, text_columns);
    ps.header_done = true;
    if (opt_.header) {
        blk.data_begin = r.next;
        blk.data_line = ps.header_line + r.newlines;
    } else {
        blk.data_begin = p;
        blk.data_line = ps.header_line;
    }
}

void Reader::parse_pieces(Pass& ps, Block& blk) {
    ps.bounds.assign(1, blk.data_begin);
    for (const std::size_t s : ps.splits)
        if (s > ps.bounds.back() && s < blk.cut) ps.bounds.push_back(s);
    ps.bounds.push_back(blk.cut);
    const std::size_t np = ps.bounds.size() - 1;
    blk.pieces = np;
    if (ps.pieces.size() < np) ps.pieces.resize(np);
    for (std::size_t j = 0; j < cols_.size(); ++j) modes_[j] = cols_[j].mode;
    const double bytes = static_cast<double>(blk.cut - blk.data_begin);
    if (ps.rows_per_byte == 0.0)  // first data block: estimate the density from its line count
        ps.rows_per_byte = static_cast<double>(count_newlines(blk.b + blk.data_begin, blk.b + blk.cut) + 1) / bytes;
    const double piece_bytes = bytes / static_cast<double>(np);
    ps.setup.expected_rows = static_cast<std::size_t>(piece_bytes * ps.rows_per_byte * 1.1) + 16;
    run_parallel(np, [&](std::size_t k) { parse_one(ps, blk, k); });
    check_pieces(ps, blk);
}

void Reader::parse_one(Pass& ps, const Block& blk, std::size_t k) {
    parse_piece(ps.setup, blk.b + ps.bounds[k], blk.b + ps.bounds[k + 1], modes_, ps.pieces[k]);
}

void Reader::check_pieces(const Pass& ps, const Block& blk) const {
    std::size_t line = blk.data_line;
    for (std::size_t k = 0; k < blk.pieces; ++k) {
        if (ps.pieces[k].error.set) fail_at(line + ps.pieces[k].error.line, ps.pieces[k].error.rest);
        line += ps.pieces[k].newlines;
    }
}

bool Reader::take_new_text(Pass& ps, const Block& blk, std::vector<char>& text_columns) {
    const std::size_t np = blk.pieces;
    std::vector<std::size_t> turned;
    for (std::size_t j = 0; j < cols_.size(); ++j) {
        if (cols_[j].mode == Mode::Text) continue;
        for (std::size_t k = 0; k < np; ++k)
            if (ps.pieces[k].cols[j].mode == Mode::Text) {
                turned.push_back(j);
                break;
            }
    }
    if (turned.empty()) return true;
    for (const std::size_t j : turned) modes_[j] = Mode::Text;
    run_parallel(np, [&](std::size_t k) {
        for (const std::size_t j : turned)
            if (ps.pieces[k].cols[j].mode != Mode::Text) {
                parse_one(ps, blk, k);
                return;
            }
    });
    check_pieces(ps, blk);
    bool again = false;
    for (const std::size_t j : turned) {
        again = again || cols_[j].handed_numbers;
        for (const double v : cols_[j].numbers)
            if (v == v) {  // a number already stored: its text is gone
                again = true;
                break;
            }
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
    return true;
}

void Reader::reserve_table(Pass& ps, const Block& blk) {
    std::size_t block_rows = 0;
    for (std::size_t k = 0; k < blk.pieces; ++k) block_rows += ps.pieces[k].row_lines.size();
    ps.rows_per_byte = static_cast<double>(block_rows) / static_cast<double>(blk.cut - blk.data_begin);
    if (ps.reserved || sink_) return;  // a streamed read holds one chunk at a time
    ps.reserved = true;
    const std::size_t cut_offset = ps.offset - (blk.len - blk.cut);
    const std::size_t rest = total_ > cut_offset ? total_ - cut_offset : 0;
    std::size_t est = ps.row_lines.size() + block_rows +
                      static_cast<std::size_t>(static_cast<double>(rest) * ps.rows_per_byte * 1.05) + 16;
    est = std::min(est, tuning_.max_cells / std::max<std::size_t>(1, cols_.size()) + 1);
    ps.row_lines.reserve(est);
    for (auto& fc : cols_) {
        if (fc.mode == Mode::Text) fc.codes.reserve(est);
        else if (fc.mode != Mode::Drop) fc.numbers.reserve(est);
    }
}

// One column per task (first touch of the table's memory happens here, so it
// is spread over threads), the row lines as one more task.
std::size_t Reader::append_pieces(Pass& ps, const Block& blk) {
    const std::size_t np = blk.pieces;
    std::vector<std::size_t> piece_line(np + 1, blk.data_line);
    for (std::size_t k = 0; k < np; ++k) piece_line[k + 1] = piece_line[k] + ps.pieces[k].newlines;
    const std::size_t tasks = cols_.size() + 1;
    const std::size_t workers = std::min<std::size_t>(threads_, tasks);
    run_parallel(workers, [&](std::size_t w) {
        std::vector<std::int32_t> remap;
        for (std::size_t t = w; t < tasks; t += workers) {
            if (t == cols_.size()) {
                for (std::size_t k = 0; k < np; ++k)
                    for (const std::size_t r : ps.pieces[k].row_lines) ps.row_lines.push_back(piece_line[k] + r);
                continue;
            }
            append_column(ps, blk, t, piece_line, remap);
        }
    });
    return piece_line[np];
}

void Reader::append_column(Pass& ps, const Block& blk, std::size_t j, const std::vector<std::size_t>& piece_line,
                           std::vector<std::int32_t>& remap) {
    FinalColumn& fc = cols_[j];
    if (fc.mode == Mode::Drop) return;
    for (std::size_t k = 0; k < blk.pieces; ++k) {
        ColumnChunk& ch = ps.pieces[k].cols[j];
        if (fc.mode != Mode::Text) {
            fc.numbers.insert(fc.numbers.end(), ch.numbers.begin(), ch.numbers.end());
            fc.text_cells += ch.text_cells;
            for (const TextCell& t : ch.text_examples)
                if (fc.text_examples.size() < kTextExamples)
                    fc.text_examples.push_back({piece_line[k] + t.line, t.text});
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

void Reader::check_overrides() const {
    const auto known = [this](const std::string& name) {
        return std::find(names_.begin(), names_.end(), name) != names_.end();
    };
    for (const auto& [name, kind] : opt_.column_kinds) {
        if (!known(name))
            fail("column '" + name +
                 "' has a type override but is not a column of this file; columns are: " + join_names(names_));
        if (kind == ColumnKind::Categorical && opt_.text_as_missing.count(name))
            fail("column '" + name + "' is set to categorical and also to numbers with text as missing; choose one");
    }
    for (const auto& name : opt_.text_as_missing)
        if (!known(name))
            fail("column '" + name +
                 "' is set to numbers with text as missing but is not a column of this file; "
                 "columns are: " +
                 join_names(names_));
}

void Reader::check_record_length(const Pass& ps, const Block& blk) const {
    const std::size_t open = blk.len - blk.cut;  // bytes of the record not yet complete
    if (blk.eof || open <= tuning_.max_record_bytes) return;
    fail_at(ps.line0 + count_newlines(blk.b, blk.b + blk.cut),
            ": a record starts here and runs on for more than " + byte_text(tuning_.max_record_bytes) +
                " without ending; Moderato reads records of at most " + byte_text(tuning_.max_record_bytes) +
                ". A quoted field may lack its closing quote, or the file is not line-based text");
}

void Reader::check_cells(const Pass& ps, const Block& blk) const {
    std::size_t rows = ps.row_lines.size();
    for (std::size_t k = 0; k < blk.pieces; ++k) rows += ps.pieces[k].row_lines.size();
    const std::size_t ncols = std::max<std::size_t>(1, cols_.size());
    if (rows <= tuning_.max_cells / ncols) return;
    fail("more than " + count_text(tuning_.max_cells) + " cells (" + count_text(rows) + " rows × " +
         count_text(cols_.size()) + " columns by byte " + count_text(ps.offset) + " of " + count_text(total_) +
         "); Moderato holds at most " + count_text(tuning_.max_cells) +
         " cells in memory. Keep only the columns or rows the analysis needs");
}

void Reader::fail_unterminated(const Pass& ps, const Block& blk) const {
    const std::size_t field = field_index_at(blk.b, blk.cut, ps.sc.quote_open, delim_);
    const std::string label = ps.header_done ? column_label(&names_, field) : "column " + std::to_string(field + 1);
    fail_at(ps.line0 + count_newlines(blk.b + blk.cut, blk.b + ps.sc.quote_open),
            ", " + label +
                ": the quoted field that starts here has no closing quote; add the missing '\"' (write "
                "a '\"' inside a quoted field as '\"\"')");
}

void Reader::build_table(Pass& ps, Table& out) {
    if (!ps.header_done)
        fail(opt_.header ? "the file is empty; expected a header row and data rows"
                         : "the file is empty; expected data rows");
    if (ps.row_lines.empty() && ps.rows_handed == 0)
        fail("the file has a header (line " + std::to_string(ps.header_line) +
             ") but no data rows; add data rows below the header");
    if (sink_) {
        if (!ps.row_lines.empty()) hand_out(ps);
        return;
    }

    out.source = name_;
    out.delimiter = delim_;
    out.row_lines = std::move(ps.row_lines);
    out.columns.reserve(cols_.size());
    for (std::size_t j = 0; j < cols_.size(); ++j) {
        FinalColumn& fc = cols_[j];
        if (fc.mode == Mode::Drop) continue;
        Column& c = out.columns.emplace_back();
        c.name = names_[j];
        c.kind_forced = opt_.column_kinds.count(names_[j]) > 0 || opt_.text_as_missing.count(names_[j]) > 0;
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
            c.text_as_missing = fc.text_cells;
            c.text_examples = std::move(fc.text_examples);
        }
        fc = FinalColumn{};
    }
}

void Reader::start_streamed(std::vector<char>& text_columns) {
    text_columns = sink_->text_columns;
    sink_->seen = src_.stamp();
    if (sink_->expect && !(*sink_->expect == sink_->seen))
        fail(
            "the file changed between the passes of a streamed read (its size, modification time or identity "
            "differs); nothing was fitted. Wait until the program writing it has finished, or read a copy, and try "
            "again");
}

void Reader::hand_out(Pass& ps) {
    Table chunk;
    chunk.source = name_;
    chunk.delimiter = delim_;
    chunk.row_lines = std::move(ps.row_lines);
    ps.row_lines = {};
    ps.rows_handed += chunk.row_lines.size();
    chunk.columns.resize(cols_.size());
    for (std::size_t j = 0; j < cols_.size(); ++j) {
        FinalColumn& fc = cols_[j];
        Column& c = chunk.columns[j];
        c.name = names_[j];
        c.kind_forced = opt_.column_kinds.count(names_[j]) > 0 || opt_.text_as_missing.count(names_[j]) > 0;
        if (fc.mode == Mode::Text) {
            c.kind = ColumnKind::Categorical;
            c.codes = std::move(fc.codes);
            fc.codes = {};
            c.levels.assign(fc.store.begin(), fc.store.end());
            c.first_text_line = fc.first_text_line;
            c.first_text = fc.first_text;
        } else {
            c.kind = ColumnKind::Numeric;
            c.numbers = std::move(fc.numbers);
            fc.numbers = {};
            for (const double v : c.numbers) fc.handed_numbers = fc.handed_numbers || v == v;
            c.text_as_missing = std::exchange(fc.text_cells, 0);
            c.text_examples = std::move(fc.text_examples);
            fc.text_examples = {};
        }
    }
    sink_->take(std::move(chunk));
}

}  // namespace

void csv_detail::read_csv_chunks(const std::string& path, const std::string* text, const CsvOptions& options,
                                 const CsvProgress& progress, const detail::CsvTuning& tuning, ChunkSink& sink) {
    if (text) {
        TextSource source(*text);
        Reader(source, path, options, progress, tuning, &sink).read();
    } else {
        FileSource source(path);
        Reader(source, path, options, progress, tuning, &sink).read();
    }
}

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

Table read_csv_columns(const std::string& path, const CsvOptions& options, const std::vector<std::string>& keep,
                       const CsvProgress& progress) {
    FileSource source(path);
    return Reader(source, path, options, progress, detail::CsvTuning{}, nullptr, &keep).read();
}

Table read_csv_text(const std::string& text, const std::string& name, const CsvOptions& options) {
    return detail::read_csv_text_tuned(text, name, options, CsvProgress{}, detail::CsvTuning{});
}

}  // namespace moderato
