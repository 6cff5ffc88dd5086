#include "stream_choice.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>

#include <unistd.h>

#include "model_options.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"

namespace moderato::cli {

namespace {

constexpr double kMiB = 1024.0 * 1024.0;

// Rows and columns of the file, from its size and its first 64 KiB (the
// header's widest count of ',', ';' or tab, and the bytes a line takes).
struct FileShape {
    double rows = 0, cols = 1, bytes = 0;
};

FileShape file_shape(const std::string& path) {
    FileShape s;
    std::error_code ec;
    s.bytes = static_cast<double>(std::filesystem::file_size(path, ec));
    if (ec) return s;  // the reader will name the problem
    std::ifstream in(path, std::ios::binary);
    std::string sample(64 * 1024, '\0');
    in.read(sample.data(), static_cast<std::streamsize>(sample.size()));
    sample.resize(static_cast<std::size_t>(in.gcount()));
    const std::string header = sample.substr(0, sample.find('\n'));
    for (const char d : {',', ';', '\t'})
        s.cols = std::max(s.cols, 1.0 + static_cast<double>(std::count(header.begin(), header.end(), d)));
    const double lines =
        static_cast<double>(std::max<std::ptrdiff_t>(1, std::count(sample.begin(), sample.end(), '\n')));
    s.rows = s.bytes / (static_cast<double>(sample.size()) / lines);
    return s;
}

// Design columns, counting each named column once per term (a categorical
// one takes more; this is a floor).
double design_columns(const ModelSpec& spec) {
    double p = spec.intercept ? 1.0 : 0.0;
    p += static_cast<double>(spec.predictors.size() + spec.interactions.size());
    for (const auto& [c, degree] : spec.polynomial) p += degree;
    return std::max(p, 1.0);
}

// Why this model is fitted in memory whatever its size, or "".
std::string unstreamable(const Arguments& args, const ModelSpec& spec) {
    if (generalized(spec.family)) return std::string(to_string(spec.family)) + " models are not streamed yet";
    if (spec.multilevel.active()) return "multilevel models are not streamed yet";
    if (!spec.exposure.empty()) return "an exposure is not streamed";
    for (const char* t : {"centre", "standardise", "log", "log1p"})
        if (args.has(t) || !args.all(t).empty())
            return std::string("the column transforms (--") + t +
                   ") need the table in memory; transform the column in the file instead";
    return {};
}

}  // namespace

// A quarter of physical memory: the in-memory estimate below is rough (the
// measured 26 bytes a design cell of design.hpp's DesignLimits vary with the
// model), the page cache keeps the file being read in memory too, and the
// machine runs other work; a quarter leaves room for an estimate off by two
// and for that work, while a file that fits comfortably is still fitted in
// memory, which is faster (one pass, fitted values and residuals kept).
double default_memory_budget_mb() {
    const long pages = ::sysconf(_SC_PHYS_PAGES), page = ::sysconf(_SC_PAGESIZE);
    if (pages <= 0 || page <= 0) return 4096.0;  // unknown: 4 GiB
    return static_cast<double>(pages) * static_cast<double>(page) / 4.0 / kMiB;
}

StreamChoice choose_streaming(const Arguments& args, const ModelSpec& spec) {
    StreamChoice c;
    c.forced = args.has("stream");
    c.budget_mb = default_memory_budget_mb();
    if (auto b = args.get("memory-budget")) c.budget_mb = parse_double(*b, "memory-budget");
    if (!(c.budget_mb > 0)) throw InputError("option --memory-budget must be a positive number of MB");
    const SourceSpec source = source_spec(args);
    if (source.kind != SourceKind::TextFile) {  // only delimited text is read in chunks
        if (c.forced)
            throw InputError("--stream: " + describe_source(source) +
                             " is read whole; streaming reads delimited text files (CSV, TSV) only");
        return c;
    }
    // The table (8 bytes a cell) and the fit (about 26 bytes a design cell, DesignLimits).
    const FileShape shape = file_shape(args.required("data"));
    c.need_mb = shape.rows * (8.0 * shape.cols + 26.0 * design_columns(spec)) / kMiB;
    // Also past the design's cell limit (DesignLimits), which an in-memory fit refuses.
    const bool too_many_cells = shape.rows * design_columns(spec) > static_cast<double>(DesignLimits::max_cells);
    const bool over = c.need_mb > c.budget_mb || too_many_cells;
    const std::string why_not = unstreamable(args, spec);
    if (c.forced && !why_not.empty()) throw InputError("--stream: " + why_not + "; fit without --stream");
    c.stream = c.forced || (over && why_not.empty());
    const std::string sizes = too_many_cells && c.need_mb <= c.budget_mb
                                  ? "the design matrix would hold more than " + format_count(DesignLimits::max_cells) +
                                        " cells, more than an in-memory fit holds"
                                  : "an in-memory fit is estimated to need " + format_count(std::llround(c.need_mb)) +
                                        " MB, over the memory budget of " + format_count(std::llround(c.budget_mb)) +
                                        " MB";
    if (over && !c.forced) c.note = c.stream ? sizes + ", so the file was streamed" : sizes + ", but " + why_not;
    return c;
}

}  // namespace moderato::cli
