// libFuzzer target: the CSV reader over import options taken from the first
// three bytes (delimiter, header, decimal comma, extra missing tokens, forced
// column kinds, threads, a byte-order mark or other encoding prefix, block
// sizes). Property (csv.hpp, CsvTuning): the result never depends on the
// block and piece sizes, so tiny blocks must give the same table, or the
// same error, as the default ones.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "moderato/reading/csv.hpp"

namespace {

using namespace moderato;
using fuzz::require;

constexpr const char* kTarget = "fuzz_csv";

CsvOptions options_from(std::uint8_t a, std::uint8_t b) {
    static const char kDelimiters[] = {0, ',', ';', '\t', '|', ' ', '"', '\n'};
    CsvOptions o;
    o.delimiter = kDelimiters[a & 7];
    o.header = (a & 8) == 0;
    o.decimal_comma = (a & 16) != 0;
    if (a & 32) o.missing_tokens = {"-", "n/a", "999", ""};
    if (a & 64) {
        o.column_kinds["x"] = ColumnKind::Categorical;
        o.column_kinds["y"] = ColumnKind::Numeric;
        o.column_kinds["Column 1"] = ColumnKind::Numeric;
    }
    // Two threads in one input of eight: a thread per tiny block is slow
    // under the sanitizers, and the pieces' seams are still crossed often.
    o.threads = (b & 0x31) == 0x31 ? 2 : 1;
    return o;
}

// From bits 1-3: a prefix naming an encoding: none, the UTF-8 BOM, the UTF-16 LE and BE
// BOMs, the UTF-32 LE BOM, a Latin-1 byte, a lone continuation byte, NUL.
std::string prefix_from(std::uint8_t b) {
    static const char* const kPrefixes[] = {"", "\xEF\xBB\xBF", "\xFF\xFE", "\xFE\xFF", "", "\xE9", "\x80", ""};
    const unsigned k = (b >> 1) & 7;
    if (k == 4) return std::string("\xFF\xFE\0\0", 4);
    if (k == 7) return std::string(1, '\0');
    return kPrefixes[k];
}

bool same_number(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

bool same_table(const Table& a, const Table& b) {
    if (a.columns.size() != b.columns.size() || a.row_lines != b.row_lines) return false;
    for (std::size_t j = 0; j < a.columns.size(); ++j) {
        const Column &x = a.columns[j], &y = b.columns[j];
        if (x.name != y.name || x.kind != y.kind || x.codes != y.codes || x.levels != y.levels) return false;
        if (x.numbers.size() != y.numbers.size()) return false;
        for (std::size_t i = 0; i < x.numbers.size(); ++i)
            if (!same_number(x.numbers[i], y.numbers[i])) return false;
    }
    return true;
}

// Every column holds one value per row; codes point at levels.
void check_shape(const Table& t) {
    for (const Column& c : t.columns) {
        require(c.size() == t.rows(), kTarget, "a column's length differs from the row count");
        for (const auto code : c.codes)
            require(code >= -1 && (code < 0 || static_cast<std::size_t>(code) < c.levels.size()), kTarget,
                    "a categorical code outside its levels");
    }
}

// The table, or the error message.
struct Outcome {
    bool ok = false;
    Table table;
    std::string error;
};

Outcome read(const std::string& text, const CsvOptions& o, const detail::CsvTuning& tuning) {
    Outcome out;
    try {
        out.table = detail::read_csv_text_tuned(text, "fuzz.csv", o, {}, tuning);
        out.ok = true;
    } catch (const InputError& e) {
        out.error = e.what();
    } catch (const std::exception& e) {
        fuzz::internal_error(kTarget, e.what());
    }
    return out;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size < 3) return 0;
    const CsvOptions o = options_from(data[0], data[1]);
    const std::string text = prefix_from(data[1]) + std::string(reinterpret_cast<const char*>(data + 3), size - 3);
    // One block holds any input libFuzzer makes here (its default length
    // limit is 4 KB): the default 16 MB blocks would give the same table, but
    // allocating them under ASan made each run a hundred times slower.
    detail::CsvTuning one_block;
    one_block.block_size = std::size_t{1} << 16;
    const Outcome whole = read(text, o, one_block);
    if (whole.ok) check_shape(whole.table);
    detail::CsvTuning tiny;
    tiny.block_size = 1 + data[2] % 61;
    tiny.min_piece = 1 + data[2] % 7;
    const Outcome pieces = read(text, o, tiny);
    require(whole.ok == pieces.ok, kTarget, "block size changes whether the text reads");
    if (whole.ok) require(same_table(whole.table, pieces.table), kTarget, "block size changes the table");
    else require(whole.error == pieces.error, kTarget, "block size changes the error message");
    return 0;
}
