// Writes the seeded benchmark table as CSV:
//   y,x1,x2,x3,treated,c1,c2,c3,c4,c5,cluster_id,region
// (11 numeric columns and one text column, region). Same seed and row count,
// same bytes. Numbers carry 9 significant digits.
//
//   make_bench_table [--rows N] [--seed S] [--out FILE]
//
// Without --out the table goes to standard output; with it the file is
// written under a temporary name and renamed into place when complete.
#include <unistd.h>
#include <cerrno>
#include <charconv>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <memory>
#include <string>
#include <string_view>
#include <system_error>

#include "bench_data.hpp"

namespace {

void usage(std::FILE* to) {
    std::fputs(
        "usage: make_bench_table [--rows N] [--seed S] [--out FILE]\n"
        "  --rows N    data rows (default 1000000)\n"
        "  --seed S    seed of std::mt19937_64 (default 20240917)\n"
        "  --out FILE  write FILE (atomically) instead of standard output\n",
        to);
}

bool parse_u64(const char* text, std::uint64_t& out) {
    const char* end = text + std::strlen(text);
    const auto [p, ec] = std::from_chars(text, end, out);
    return ec == std::errc{} && p == end && p != text;
}

class Writer {
public:
    explicit Writer(std::FILE* f) : f_(f) {}
    ~Writer() { flush(); }
    void number(double v) {
        reserve(32);
        const auto r = std::to_chars(buf_ + len_, buf_ + kSize, v, std::chars_format::general, 9);
        len_ = static_cast<std::size_t>(r.ptr - buf_);
    }
    void integer(long long v) {
        reserve(24);
        const auto r = std::to_chars(buf_ + len_, buf_ + kSize, v);
        len_ = static_cast<std::size_t>(r.ptr - buf_);
    }
    void text(std::string_view s) {
        reserve(s.size());
        std::memcpy(buf_ + len_, s.data(), s.size());
        len_ += s.size();
    }
    void put(char c) {
        reserve(1);
        buf_[len_++] = c;
    }
    bool flush() {
        if (len_ && std::fwrite(buf_, 1, len_, f_) != len_) ok_ = false;
        len_ = 0;
        return ok_;
    }
    bool ok() const { return ok_; }

private:
    static constexpr std::size_t kSize = std::size_t{1} << 20;
    void reserve(std::size_t n) {
        if (len_ + n > kSize) flush();
    }
    std::FILE* f_;
    char buf_[kSize];
    std::size_t len_ = 0;
    bool ok_ = true;
};

bool write_table(std::FILE* f, std::uint64_t rows, std::uint64_t seed) {
    auto w = std::make_unique<Writer>(f);
    w->text("y,x1,x2,x3,treated,c1,c2,c3,c4,c5,cluster_id,region\n");
    moderato::bench::Generator gen(seed);
    for (std::uint64_t i = 0; i < rows; ++i) {
        const moderato::bench::Row r = gen.next();
        w->number(r.y), w->put(',');
        w->number(r.x1), w->put(',');
        w->number(r.x2), w->put(',');
        w->number(r.x3), w->put(',');
        w->integer(r.treated), w->put(',');
        w->number(r.c[0]), w->put(',');
        w->number(r.c[1]), w->put(',');
        w->number(r.c[2]), w->put(',');
        w->integer(static_cast<long long>(r.c[3])), w->put(',');
        w->integer(static_cast<long long>(r.c[4])), w->put(',');
        w->integer(r.cluster_id), w->put(',');
        w->text(moderato::bench::kRegions[static_cast<std::size_t>(r.region)]);
        w->put('\n');
    }
    return w->flush();
}

}  // namespace

int main(int argc, char** argv) {
    std::uint64_t rows = 1000000, seed = moderato::bench::kDefaultSeed;
    std::string out;
    for (int i = 1; i < argc; ++i) {
        const std::string_view a = argv[i];
        const bool has_value = i + 1 < argc;
        if (a == "--help" || a == "-h") {
            usage(stdout);
            return 0;
        } else if (a == "--rows" && has_value) {
            if (!parse_u64(argv[++i], rows)) {
                std::fprintf(stderr, "make_bench_table: --rows needs a whole number, got '%s'\n", argv[i]);
                return 2;
            }
        } else if (a == "--seed" && has_value) {
            if (!parse_u64(argv[++i], seed)) {
                std::fprintf(stderr, "make_bench_table: --seed needs a whole number, got '%s'\n", argv[i]);
                return 2;
            }
        } else if (a == "--out" && has_value) {
            out = argv[++i];
        } else {
            std::fprintf(stderr, "make_bench_table: unexpected argument '%s'\n", argv[i]);
            usage(stderr);
            return 2;
        }
    }

    if (out.empty()) return write_table(stdout, rows, seed) && std::fflush(stdout) == 0 ? 0 : 1;

    const std::string tmp = out + ".tmp-" + std::to_string(static_cast<long>(::getpid()));
    std::FILE* f = std::fopen(tmp.c_str(), "wb");
    if (!f) {
        std::fprintf(stderr, "make_bench_table: cannot write '%s': %s\n", tmp.c_str(), std::strerror(errno));
        return 1;
    }
    const bool ok = write_table(f, rows, seed);
    const bool closed = std::fclose(f) == 0;
    std::error_code ec;
    if (!ok || !closed) {
        std::fprintf(stderr, "make_bench_table: writing '%s' failed\n", tmp.c_str());
        std::filesystem::remove(tmp, ec);
        return 1;
    }
    std::filesystem::rename(tmp, out, ec);
    if (ec) {
        std::fprintf(stderr, "make_bench_table: cannot rename '%s' to '%s': %s\n", tmp.c_str(), out.c_str(),
                     ec.message().c_str());
        std::filesystem::remove(tmp, ec);
        return 1;
    }
    return 0;
}
