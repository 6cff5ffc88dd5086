// Big and odd inputs to the CSV reader, scaled down for the normal suite
// (the full-size cases are in tests/benchmarks/big_inputs.py): 10,000
// columns, a 5 MB cell, a 5 MB line of fields, the limits of CsvLimits (one
// record's length, the column count, the cell count), and a file that changes
// while it is read (appended to, cut short, rewritten in place, replaced).
// Every file is generated here from a fixed recipe; none is committed.
#include <gtest/gtest.h>

#include <chrono>
#include <cstddef>
#include <filesystem>
#include <fstream>
#include <functional>
#include <string>

#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace fs = std::filesystem;
using moderato::ColumnKind;
using moderato::CsvLimits;
using moderato::CsvOptions;
using moderato::CsvProgress;
using moderato::Table;
using moderato::detail::CsvTuning;
using moderato::test::input_error_of;
using moderato::test::TempDir;

namespace {

// A header of `cols` names c1..cN and `rows` rows where cell (i, j) holds
// i + j (so every cell's value is known by construction).
std::string wide_csv(std::size_t cols, std::size_t rows) {
    std::string s;
    for (std::size_t j = 1; j <= cols; ++j) s += (j > 1 ? ",c" : "c") + std::to_string(j);
    s += '\n';
    for (std::size_t i = 0; i < rows; ++i) {
        for (std::size_t j = 1; j <= cols; ++j) s += (j > 1 ? "," : "") + std::to_string(i + j);
        s += '\n';
    }
    return s;
}

// n data rows "i,i*2" under "x,y": 8 bytes or more a row.
std::string tall_csv(std::size_t rows) {
    std::string s = "x,y\n";
    for (std::size_t i = 0; i < rows; ++i) s += std::to_string(i) + ',' + std::to_string(2 * i) + '\n';
    return s;
}

TEST(CsvLimits, TenThousandColumnsAreRead) {
    TempDir dir("csv-limits");
    const auto file = dir.write("wide.csv", wide_csv(10'000, 20));
    const Table t = moderato::read_csv(file.string());
    ASSERT_EQ(t.cols(), 10'000u);
    ASSERT_EQ(t.rows(), 20u);
    // by construction: cell (row i, column j) = i + j
    EXPECT_EQ(t.columns[0].numbers[0], 1.0);
    EXPECT_EQ(t.columns[9'999].name, "c10000");
    EXPECT_EQ(t.columns[9'999].numbers[19], 19.0 + 10'000.0);
}

TEST(CsvLimits, AFiveMegabyteCellIsOneLevel) {
    TempDir dir("csv-limits");
    const std::string huge(5u << 20, 'q');  // 5 MiB of one letter, no delimiter or quote
    const auto file = dir.write("cell.csv", "y,note\n1," + huge + "\n2,short\n");
    const Table t = moderato::read_csv(file.string());
    ASSERT_EQ(t.rows(), 2u);
    const auto& note = t.columns[1];
    ASSERT_EQ(note.kind, ColumnKind::Categorical);
    ASSERT_EQ(note.levels.size(), 2u);
    EXPECT_EQ(note.levels[0].size(), huge.size());  // by construction: the cell kept whole
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{2, 3}));
}

TEST(CsvLimits, AFiveMegabyteLineOfFieldsIsRefusedByTheColumnLimit) {
    // 2.6 million one-digit fields on the header line: over CsvLimits::max_columns.
    std::string line;
    line.reserve(5u << 20);
    while (line.size() < (5u << 20)) line += "a,";
    line += "a\n1\n";
    TempDir dir("csv-limits");
    const auto file = dir.write("fields.csv", line);
    CsvOptions no_header;
    no_header.header = false;
    EXPECT_EQ(input_error_of([&] { moderato::read_csv(file.string(), no_header); }),
              file.string() +
                  ": line 1 has more than 100,000 fields; Moderato reads at most 100,000 columns. Check the delimiter "
                  "(','), or keep only the columns the analysis needs");
}

TEST(CsvLimits, AFiveMegabyteDataLineIsARaggedRow) {
    // Under a 2-column header, a data line of 2.6 million fields is named with its count.
    std::string s = "x,y\n1,2\n";
    const std::size_t fields = (5u << 20) / 2;
    for (std::size_t i = 0; i < fields; ++i) s += i ? ",7" : "7";
    s += '\n';
    TempDir dir("csv-limits");
    const auto file = dir.write("ragged.csv", s);
    const std::string msg = input_error_of([&] { moderato::read_csv(file.string()); });
    EXPECT_EQ(msg.rfind(file.string() + ": line 3 has " + std::to_string(fields) + " fields, expected 2;", 0), 0u)
        << msg;
}

TEST(CsvLimits, ExactlyTheColumnLimitIsReadAndOneMoreIsNot) {
    CsvTuning tuning;
    tuning.max_columns = 50;  // the limit is a parameter; the rule is the same at 100,000
    TempDir dir("csv-limits");
    const auto ok = dir.write("ok.csv", wide_csv(50, 2));
    EXPECT_EQ(moderato::detail::read_csv_tuned(ok.string(), {}, {}, tuning).cols(), 50u);
    const auto over = dir.write("over.csv", wide_csv(51, 2));
    const std::string msg = input_error_of([&] { moderato::detail::read_csv_tuned(over.string(), {}, {}, tuning); });
    EXPECT_NE(msg.find(": line 1 has more than 50 fields; Moderato reads at most 50 columns."), std::string::npos)
        << msg;
    static_assert(CsvLimits::max_columns >= 10'000, "the issue asks for 10,000 columns to be read");
}

TEST(CsvLimits, ARecordLongerThanTheLimitIsRefusedWithItsLine) {
    CsvTuning tuning;
    tuning.block_size = 1 << 16;
    tuning.max_record_bytes = 1 << 20;  // 1 MiB here, 256 MiB by default
    TempDir dir("csv-limits");
    // Line 3 opens a quote that never closes: the record runs to the end of the 3 MiB file.
    const auto file = dir.write("open.csv", "x,y\n1,2\n3,\"" + std::string(3u << 20, 'z') + "\n");
    EXPECT_EQ(input_error_of([&] { moderato::detail::read_csv_tuned(file.string(), {}, {}, tuning); }),
              file.string() +
                  ": line 3: a record starts here and runs on for more than 1 MiB without ending; Moderato reads "
                  "records of at most 1 MiB. A quoted field may lack its closing quote, or the file is not "
                  "line-based text");
    // Just under the limit the same cell is read (closing the quote).
    const auto fine = dir.write("fine.csv", "x,y\n1,2\n3,\"" + std::string((1u << 20) - 16, 'z') + "\"\n");
    EXPECT_EQ(moderato::detail::read_csv_tuned(fine.string(), {}, {}, tuning).rows(), 2u);
}

TEST(CsvLimits, MoreCellsThanTheLimitAreRefusedBeforeTheyAreStored) {
    CsvTuning tuning;
    tuning.block_size = 1 << 12;
    tuning.max_cells = 2'000;  // 1,000 rows of 2 columns
    TempDir dir("csv-limits");
    const auto ok = dir.write("ok.csv", tall_csv(1'000));
    EXPECT_EQ(moderato::detail::read_csv_tuned(ok.string(), {}, {}, tuning).rows(), 1'000u);
    const auto over = dir.write("over.csv", tall_csv(5'000));
    const std::string msg = input_error_of([&] { moderato::detail::read_csv_tuned(over.string(), {}, {}, tuning); });
    EXPECT_EQ(msg.rfind(over.string() + ": more than 2,000 cells (", 0), 0u) << msg;
    EXPECT_NE(msg.find("); Moderato holds at most 2,000 cells in memory."), std::string::npos) << msg;
}

// ------------------------------------------------- a file that changes

void append_file(const fs::path& file, const std::string& bytes) {
    std::ofstream out(file, std::ios::binary | std::ios::app);
    out << bytes;
}

// Writes over the file's bytes from the start without truncating it first.
void overwrite_in_place(const fs::path& file, const std::string& bytes) {
    std::fstream out(file, std::ios::binary | std::ios::in | std::ios::out);
    out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
}

// Reads `file` in 4 KiB blocks; after the first block, `change` runs once.
std::string error_when_changed(const fs::path& file, const std::function<void()>& change) {
    CsvTuning tuning;
    tuning.block_size = 1 << 12;
    bool done = false;
    CsvProgress progress;
    progress.callback = [&](std::size_t, std::size_t) {
        if (!done) change();
        done = true;
        return true;
    };
    return input_error_of([&] { moderato::detail::read_csv_tuned(file.string(), {}, progress, tuning); });
}

// A 100,000-byte-plus file whose modification time lies an hour back, so a
// rewrite now shows a different time whatever the clock's resolution.
fs::path old_file(const TempDir& dir) {
    const auto file = dir.write("live.csv", tall_csv(10'000));
    fs::last_write_time(file, fs::file_time_type::clock::now() - std::chrono::hours(1));
    return file;
}

const std::string kChanged = ": the file changed while it was being read (";
const std::string kAdvice =
    "); nothing was imported. Wait until the program writing it has finished, or read a copy, and try again";

TEST(CsvChangingFile, AnAppendIsNoticed) {
    TempDir dir("csv-change");
    const fs::path file = old_file(dir);
    const auto before = fs::file_size(file);
    const std::string msg = error_when_changed(file, [&] { append_file(file, "1,2\n"); });
    EXPECT_EQ(msg, file.string() + kChanged + "its size went from " + std::to_string(before) + " to " +
                       std::to_string(before + 4) + " bytes" + kAdvice);
}

TEST(CsvChangingFile, ATruncationIsNoticed) {
    TempDir dir("csv-change");
    const fs::path file = old_file(dir);
    const std::string msg = error_when_changed(file, [&] { fs::resize_file(file, 5'000); });
    // The next block reads past the new end: the read itself finds it short.
    EXPECT_EQ(msg.rfind(file.string() + kChanged, 0), 0u) << msg;
    EXPECT_TRUE(msg.find("it became shorter") != std::string::npos ||
                msg.find("its size went from") != std::string::npos)
        << msg;
}

TEST(CsvChangingFile, ARewriteOfTheSameSizeIsNoticedByItsTime) {
    TempDir dir("csv-change");
    const fs::path file = old_file(dir);
    std::string same = tall_csv(10'000);
    same[same.size() - 2] = '8';  // one digit of the last row differs; the length does not
    const std::string msg = error_when_changed(file, [&] { overwrite_in_place(file, same); });
    EXPECT_EQ(msg, file.string() + kChanged + "it was written to (its modification time changed)" + kAdvice);
}

TEST(CsvChangingFile, AFileReplacedByRenameIsNoticed) {
    TempDir dir("csv-change");
    const fs::path file = old_file(dir);
    const std::string msg = error_when_changed(file, [&] {
        const auto other = dir.write("other.csv", tall_csv(10'000));
        fs::last_write_time(other, fs::last_write_time(file));
        fs::rename(other, file);  // POSIX rename(2): the name now points at another file
    });
    EXPECT_EQ(msg, file.string() + kChanged + "another file took its place" + kAdvice);
}

TEST(CsvChangingFile, AnUnchangedFileReadsInFull) {
    TempDir dir("csv-change");
    const fs::path file = old_file(dir);
    bool called = false;
    CsvTuning tuning;
    tuning.block_size = 1 << 12;
    CsvProgress progress;
    progress.callback = [&](std::size_t, std::size_t) { return called = true; };
    const Table t = moderato::detail::read_csv_tuned(file.string(), {}, progress, tuning);
    EXPECT_TRUE(called);
    ASSERT_EQ(t.rows(), 10'000u);
    EXPECT_EQ(t.columns[1].numbers[9'999], 19'998.0);  // by construction: y = 2x
}

}  // namespace
