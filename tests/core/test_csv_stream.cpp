// Chunked CSV reading (csv_stream.hpp): the chunks put together equal
// read_csv's table on the CSV corpus (read_csv is the reference), whatever
// the chunk and block sizes; errors found late name the file and line; a file
// that changes between passes is refused.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/csv_stream.hpp"
#include "moderato/reading/table.hpp"

namespace fs = std::filesystem;
using moderato::Column;
using moderato::ColumnKind;
using moderato::CsvOptions;
using moderato::CsvStream;
using moderato::Table;
using moderato::test::input_error_of;
using moderato::test::TempDir;

namespace {

moderato::detail::CsvTuning blocks_of(std::size_t bytes) {
    moderato::detail::CsvTuning t;
    t.block_size = bytes;
    t.min_piece = 1;
    return t;
}

// The chunks of a later pass, appended into one table.
Table gather(CsvStream& s) {
    Table all;
    s.read([&](const Table& chunk) {
        if (all.columns.empty()) {
            all = chunk;
            return;
        }
        all.row_lines.insert(all.row_lines.end(), chunk.row_lines.begin(), chunk.row_lines.end());
        for (std::size_t j = 0; j < chunk.cols(); ++j) {
            Column& a = all.columns[j];
            const Column& c = chunk.columns[j];
            a.numbers.insert(a.numbers.end(), c.numbers.begin(), c.numbers.end());
            a.codes.insert(a.codes.end(), c.codes.begin(), c.codes.end());
        }
    });
    return all;
}

// Exact equality (NaN equal to NaN: every NaN means "missing").
void expect_same(const Table& got, const Table& want, const Table& schema) {
    ASSERT_EQ(got.cols(), want.cols());
    ASSERT_EQ(got.rows(), want.rows());
    EXPECT_EQ(got.row_lines, want.row_lines);
    EXPECT_EQ(got.delimiter, want.delimiter);
    for (std::size_t j = 0; j < want.cols(); ++j) {
        const Column& a = got.columns[j];
        const Column& b = want.columns[j];
        SCOPED_TRACE(b.name);
        EXPECT_EQ(a.name, b.name);
        ASSERT_EQ(a.kind, b.kind);
        EXPECT_EQ(a.codes, b.codes);
        EXPECT_EQ(a.levels, b.levels);
        ASSERT_EQ(a.numbers.size(), b.numbers.size());
        for (std::size_t i = 0; i < a.numbers.size(); ++i)
            EXPECT_TRUE(a.numbers[i] == b.numbers[i] || (std::isnan(a.numbers[i]) && std::isnan(b.numbers[i]))) << i;
        const Column& s = schema.columns[j];
        EXPECT_EQ(s.first_text_line, b.first_text_line);
        EXPECT_EQ(s.first_text, b.first_text);
        EXPECT_EQ(s.text_as_missing, b.text_as_missing);
        EXPECT_EQ(s.text_examples, b.text_examples);
        EXPECT_EQ(s.kind_forced, b.kind_forced);
    }
}

// A corpus text that straddles any boundary: quoted fields with delimiters,
// doubled quotes and line breaks, CRLF, blank lines, a BOM, a column that
// turns text late (after numbers) and one missing until it turns text.
std::string straddling_text() {
    std::string text = "\xEF\xBB\xBFid;note;late;sparse\r\n";
    for (int i = 0; i < 60; ++i) {
        text += std::to_string(i);
        if (i % 3 == 0) {
            text += ";\"multi\r\nline; \"\"q\"\" ";
            text += std::to_string(i % 7);
            text += '"';
        } else {
            text += ";w";
            text += std::to_string(i % 5);
        }
        text += ';';
        text += std::to_string(i * 0.5);
        text += ';';
        text += i < 50 ? "NA" : "s" + std::to_string(i % 2);
        text += (i % 11 == 0) ? "\r\n\r\n" : "\r\n";
    }
    text += "60;\"end\";x;s1";  // no final newline
    return text;
}

void expect_chunks_equal_read_csv(const std::string& text, const CsvOptions& o) {
    const Table want = moderato::read_csv_text(text, "t.csv", o);
    for (const std::size_t chunk : {1u, 2u, 3u, 7u, 1000u})
        for (const std::size_t block : {1u, 5u, 64u, 1u << 20}) {
            SCOPED_TRACE("chunk " + std::to_string(chunk) + ", block " + std::to_string(block));
            CsvStream s = CsvStream::from_text(text, "t.csv", o, chunk);
            s.set_tuning(blocks_of(block));
            std::size_t first_pass_rows = 0;
            s.scan([&](const Table& c) { first_pass_rows += c.rows(); }, [&] { first_pass_rows = 0; });
            EXPECT_EQ(first_pass_rows, want.rows());
            EXPECT_EQ(s.rows(), want.rows());
            expect_same(gather(s), want, s.schema());
        }
}

}  // namespace

TEST(CsvStream, ChunksEqualReadCsvAcrossBoundaries) {
    // reference: read_csv of the whole text (test_csv.cpp checks it against RFC 4180)
    expect_chunks_equal_read_csv(straddling_text(), {});
}

TEST(CsvStream, ChunksEqualReadCsvWithOptions) {
    CsvOptions o;
    o.decimal_comma = true;
    o.missing_tokens.push_back("-99");
    o.text_as_missing.insert("b");
    o.column_kinds["c"] = ColumnKind::Categorical;
    expect_chunks_equal_read_csv("a;b;c\n1,5;x;1\n-99;2;2\n3;n/a;\"1\"\n4;5;03\n", o);
    CsvOptions no_header;
    no_header.header = false;
    expect_chunks_equal_read_csv("1\t2\n3\t\"x\ty\"\n\n5\t6\n", no_header);
}

TEST(CsvStream, ChunksEqualReadCsvOnTheTestData) {
    // the test inputs of tests/data/ok, each read whole by read_csv as the reference
    const fs::path dir = fs::path(MODERATO_TEST_DATA_DIR) / "ok";
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(dir)) {
        if (e.path().extension() != ".csv") continue;
        SCOPED_TRACE(e.path().string());
        const Table want = moderato::read_csv(e.path().string());
        CsvStream s(e.path().string(), {}, 3);
        s.set_tuning(blocks_of(17));
        s.scan([](const Table&) {});
        expect_same(gather(s), want, s.schema());
        ++files;
    }
    EXPECT_GE(files, 5u);  // the folder's seven files at the time of writing
}

TEST(CsvStream, ErrorsEqualReadCsv) {
    // every bad CSV input of tests/data/bad: the streamed read fails with read_csv's words
    const fs::path dir = fs::path(MODERATO_TEST_DATA_DIR) / "bad";
    for (const auto& e : fs::directory_iterator(dir)) {
        if (e.path().extension() != ".csv") continue;
        const std::string want = input_error_of([&] { moderato::read_csv(e.path().string()); });
        if (want.empty()) continue;  // a model-level problem, not the reader's
        CsvStream s(e.path().string(), {}, 2);
        s.set_tuning(blocks_of(9));
        EXPECT_EQ(input_error_of([&] { s.scan([](const Table&) {}); }), want) << e.path();
    }
}

TEST(CsvStream, TextInAForcedNumericColumnOnTheLastLine) {
    TempDir dir("csvstream");
    std::string text = "y,x\n";
    for (int i = 0; i < 200; ++i) text += std::to_string(i) + "," + std::to_string(i % 7) + "\n";
    text += "5,seven\n";  // line 202: closed form (header on line 1, 200 rows, then this one)
    const fs::path p = dir.write("late.csv", text);
    CsvOptions o;
    o.column_kinds["x"] = ColumnKind::Numeric;
    CsvStream s(p.string(), o, 16);
    s.set_tuning(blocks_of(64));
    std::size_t rows_before_error = 0;
    const std::string message = input_error_of([&] { s.scan([&](const Table& c) { rows_before_error += c.rows(); }); });
    EXPECT_EQ(message, p.string() +
                           ": line 202, column 2 ('x'): 'seven' is not a number, but the column is set to numeric; "
                           "correct the cell, add 'seven' to the missing tokens, or read the column as categorical");
    EXPECT_GT(rows_before_error, 0u);  // chunks were handed out before the bad line was met
}

TEST(CsvStream, LateTextRestartsTheFirstPass) {
    // A column that meets text after numbers were handed out: the pass starts
    // again with the column as text, so its levels keep their text (read_csv's rule).
    std::string text = "y,g\n";
    for (int i = 0; i < 30; ++i) text += std::to_string(i) + "," + std::to_string(i % 3) + ".0\n";
    text += "30,other\n";
    CsvStream s = CsvStream::from_text(text, "t.csv", {}, 4);
    s.set_tuning(blocks_of(32));
    int restarts = 0;
    s.scan([](const Table&) {}, [&] { ++restarts; });
    EXPECT_EQ(restarts, 1);
    EXPECT_EQ(s.passes(), 2u);
    EXPECT_EQ(s.schema().at("g").kind, ColumnKind::Categorical);
    EXPECT_EQ(s.schema().at("g").levels.front(), "0.0");  // the cell's own text, first appearance first
    expect_same(gather(s), moderato::read_csv_text(text, "t.csv"), s.schema());
}

TEST(CsvStream, FileChangedBetweenPasses) {
    TempDir dir("csvstream");
    const fs::path p = dir.write("grow.csv", "y,x\n1,2\n3,4\n5,6\n");
    CsvStream s(p.string(), {}, 2);
    s.scan([](const Table&) {});
    dir.write("grow.csv", "y,x\n1,2\n3,4\n5,6\n7,8\n");  // appended to between the passes
    EXPECT_EQ(input_error_of([&] { s.read([](const Table&) {}); }),
              p.string() +
                  ": the file changed between the passes of a streamed read (its size, modification time or "
                  "identity differs); nothing was fitted. Wait until the program writing it has finished, or read a "
                  "copy, and try again");
}

TEST(CsvStream, ALaterPassSkipsColumnsNotKept) {
    // The kept columns equal read_csv's (the reference); a skipped one comes as missing cells.
    const std::string text = straddling_text();
    const Table want = moderato::read_csv_text(text, "t.csv");
    CsvStream s = CsvStream::from_text(text, "t.csv", {}, 4);
    s.set_tuning(blocks_of(13));
    s.scan([](const Table&) {});
    const std::vector<std::string> keep{"id", "late"};
    Table got;
    s.read(
        [&](const Table& c) {
            for (const std::size_t r : c.row_lines) got.row_lines.push_back(r);
            for (const double v : c.at("note").numbers) EXPECT_TRUE(std::isnan(v));
            for (const double v : c.at("id").numbers) got.columns.resize(1), got.columns[0].numbers.push_back(v);
            EXPECT_EQ(c.at("late").levels, want.at("late").levels);
        },
        &keep);
    EXPECT_EQ(got.row_lines, want.row_lines);
    EXPECT_EQ(got.columns.at(0).numbers, want.at("id").numbers);
}
