// CSV import: RFC 4180 features, practice beyond it (BOM, sniffing, missing
// tokens, decimal comma), type inference, every error message, and
// determinism across thread counts and block sizes.
#include <gtest/gtest.h>

#include <unistd.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <functional>
#include <iterator>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/csv_columns.hpp"
#include "moderato/reading/table.hpp"
#include "moderato/support/error.hpp"

namespace fs = std::filesystem;
using moderato::Column;
using moderato::ColumnKind;
using moderato::CsvOptions;
using moderato::InputError;
using moderato::Table;
using moderato::test::input_error_of;
using moderato::test::read_file;
using moderato::test::TempDir;

namespace {

Table read(const std::string& text, const CsvOptions& options = {}) {
    return moderato::read_csv_text(text, "t.csv", options);
}

std::string text_error(const std::string& text, const CsvOptions& options = {}) {
    return input_error_of([&] { read(text, options); });
}

std::vector<std::string> cells(const Column& c) {
    std::vector<std::string> out;
    for (auto code : c.codes) out.push_back(code < 0 ? "<NA>" : c.levels[static_cast<std::size_t>(code)]);
    return out;
}

// Exact equality, NaN equal to NaN (every NaN means "missing").
void expect_same_table(const Table& a, const Table& b) {
    ASSERT_EQ(a.cols(), b.cols());
    ASSERT_EQ(a.rows(), b.rows());
    EXPECT_EQ(a.row_lines, b.row_lines);
    for (std::size_t j = 0; j < a.cols(); ++j) {
        const Column& x = a.columns[j];
        const Column& y = b.columns[j];
        EXPECT_EQ(x.name, y.name);
        ASSERT_EQ(x.kind, y.kind) << x.name;
        EXPECT_EQ(x.levels, y.levels) << x.name;
        EXPECT_EQ(x.codes, y.codes) << x.name;
        EXPECT_EQ(x.first_text_line, y.first_text_line) << x.name;
        EXPECT_EQ(x.first_text, y.first_text) << x.name;
        ASSERT_EQ(x.numbers.size(), y.numbers.size());
        for (std::size_t i = 0; i < x.numbers.size(); ++i) {
            const double u = x.numbers[i], v = y.numbers[i];
            if (std::isnan(u) || std::isnan(v)) ASSERT_TRUE(std::isnan(u) && std::isnan(v)) << x.name << " row " << i;
            else ASSERT_EQ(u, v) << x.name << " row " << i;
        }
    }
}

moderato::detail::CsvTuning tiny_blocks(std::size_t block) {
    moderato::detail::CsvTuning t;
    t.block_size = block;
    t.min_piece = 1;
    return t;
}

}  // namespace

// ------------------------------------------------------------ RFC 4180

TEST(Csv, ReadsHeaderAndNumericColumns) {
    const Table t = read("a,b\n1,2.5\n-3,4e2\n");
    ASSERT_EQ(t.cols(), 2u);
    ASSERT_EQ(t.rows(), 2u);  // RFC 4180 section 2, rule 3: the first line is the header
    EXPECT_EQ(t.columns[0].name, "a");
    EXPECT_EQ(t.columns[0].kind, ColumnKind::Numeric);
    EXPECT_EQ(t.columns[0].numbers, (std::vector<double>{1.0, -3.0}));   // closed form: the text as written
    EXPECT_EQ(t.columns[1].numbers, (std::vector<double>{2.5, 400.0}));  // closed form: 4e2 = 400
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{2, 3}));            // closed form: counting lines
    EXPECT_EQ(t.source, "t.csv");
}

TEST(Csv, QuotedFieldMayHoldTheDelimiter) {
    const Table t = read("name,n\n\"Smith, J\",1\n\"Doe, A\",2\n");
    EXPECT_EQ(cells(t.at("name")), (std::vector<std::string>{"Smith, J", "Doe, A"}));  // RFC 4180 section 2, rule 6
    EXPECT_EQ(t.at("n").numbers, (std::vector<double>{1, 2}));                         // RFC 4180 section 2, rule 6
}

TEST(Csv, QuotedFieldMayHoldLineBreaksAndRowLinesCountThem) {
    const Table t = read("note,n\n\"first\nsecond\",1\nplain,2\n\"a\r\nb\",3\n");
    EXPECT_EQ(cells(t.at("note")),
              (std::vector<std::string>{"first\nsecond", "plain", "a\r\nb"}));  // RFC 4180 section 2, rule 6
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{2, 4, 5}));  // closed form: physical lines where records start
}

TEST(Csv, DoubledQuoteInsideQuotedField) {
    const Table t = read("q\n\"say \"\"hi\"\"\"\n\"\"\"\"\n");
    EXPECT_EQ(cells(t.at("q")), (std::vector<std::string>{"say \"hi\"", "\""}));  // RFC 4180 section 2, rule 7
}

TEST(Csv, CrlfLineEnds) {
    const Table t = read("a,b\r\n1,\"x\"\r\n2,y\r\n");
    EXPECT_EQ(t.at("a").numbers, (std::vector<double>{1, 2}));          // RFC 4180 section 2, rule 1 (CRLF)
    EXPECT_EQ(cells(t.at("b")), (std::vector<std::string>{"x", "y"}));  // RFC 4180 section 2, rule 1: CR is not data
}

TEST(Csv, LastRecordWithoutLineBreak) {
    const Table t = read("a,b\n1,2\n3,4");
    EXPECT_EQ(t.rows(), 2u);                                    // RFC 4180 section 2, rule 2
    EXPECT_EQ(t.at("b").numbers, (std::vector<double>{2, 4}));  // RFC 4180 section 2, rule 2
}

TEST(Csv, BlankLinesAreSkippedAnywhere) {
    const Table t = read("a,b\n1,2\n\n3,4\r\n\n\r\n\n");
    EXPECT_EQ(t.at("a").numbers, (std::vector<double>{1, 3}));  // common practice: blank lines carry no record
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{2, 4}));   // closed form: counting lines
}

TEST(Csv, QuoteInsideUnquotedFieldIsLiteral) {
    const Table t = read("item,n\n5\" screen,1\nab\"c,2\n");
    EXPECT_EQ(cells(t.at("item")),
              (std::vector<std::string>{"5\" screen", "ab\"c"}));  // common practice (lenient readers)
}

TEST(Csv, QuotedNumbersAreNumbers) {
    const Table t = read("a\n\"1.5\"\n\" 2 \"\n");
    EXPECT_EQ(t.at("a").kind, ColumnKind::Numeric);
    EXPECT_EQ(t.at("a").numbers, (std::vector<double>{1.5, 2.0}));  // common practice: quoting does not make text
}

// ------------------------------------------------------------ practice

TEST(Csv, Utf8ByteOrderMarkIsSkipped) {
    const Table t = read("\xEF\xBB\xBFid,v\n1,2\n");
    EXPECT_EQ(t.columns[0].name, "id");
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{2}));  // closed form: the BOM is on line 1
}

TEST(Csv, SniffsComma) {
    const Table t = read("a,b,c\n1,2,3\n");
    EXPECT_EQ(t.cols(), 3u);  // closed form: three fields split by ','
}

TEST(Csv, SniffsSemicolon) {
    const Table t = read("a;b;c\n1;2;3\n4;5;6\n");
    ASSERT_EQ(t.cols(), 3u);                                    // closed form: three fields split by ';'
    EXPECT_EQ(t.at("c").numbers, (std::vector<double>{3, 6}));  // closed form
}

TEST(Csv, SniffsTab) {
    const Table t = read("a\tb\n1\t2\n");
    ASSERT_EQ(t.cols(), 2u);                                 // closed form: two fields split by tab
    EXPECT_EQ(t.at("b").numbers, (std::vector<double>{2}));  // closed form
}

TEST(Csv, SniffingIgnoresDelimitersInsideQuotes) {
    const Table t = read("\"a;b\",c\n\"1;2\",3\n\"4;5\",6\n");
    ASSERT_EQ(t.cols(), 2u);  // closed form: ',' splits every line in two; ';' only occurs inside quotes
    EXPECT_EQ(t.columns[0].name, "a;b");
}

TEST(Csv, ForcedDelimiter) {
    CsvOptions o;
    o.delimiter = ',';
    const Table t = read("a;b,c\n1;2,3\n", o);
    ASSERT_EQ(t.cols(), 2u);  // closed form: split at ',' only
    EXPECT_EQ(t.columns[0].name, "a;b");
    EXPECT_EQ(cells(t.columns[0]), (std::vector<std::string>{"1;2"}));
}

TEST(Csv, NoHeaderNamesColumnsV1ToVk) {
    CsvOptions o;
    o.header = false;
    const Table t = read("1,x\n2,y\n", o);
    ASSERT_EQ(t.cols(), 2u);
    EXPECT_EQ(t.columns[0].name, "V1");
    EXPECT_EQ(t.columns[1].name, "V2");
    EXPECT_EQ(t.columns[0].numbers, (std::vector<double>{1, 2}));  // RFC 4180 section 2, rule 3: no header line
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{1, 2}));      // closed form: counting lines
}

TEST(Csv, DefaultMissingTokensAfterTrimming) {
    const Table t = read("x,g\n1,a\n,\n NA ,NA\nNaN,.\n . ,b\n");
    const Column& x = t.at("x");
    ASSERT_EQ(x.kind, ColumnKind::Numeric);
    EXPECT_EQ(x.numbers[0], 1.0);  // closed form
    for (std::size_t i = 1; i < 5; ++i) EXPECT_TRUE(std::isnan(x.numbers[i])) << i;
    EXPECT_EQ(x.missing_count(), 4u);  // closed form: rows 2-5 are "", "NA", "NaN", "."
    EXPECT_EQ(cells(t.at("g")), (std::vector<std::string>{"a", "<NA>", "<NA>", "<NA>", "b"}));
    EXPECT_EQ(t.at("g").missing_count(), 3u);  // closed form
}

TEST(Csv, UserMissingTokensReplaceTheDefaults) {
    CsvOptions o;
    o.missing_tokens = {"", "-99", "n/a"};
    const Table t = read("x,y\n-99,n/a\n-99.0,NA\n5,\n", o);
    const Column& x = t.at("x");
    ASSERT_EQ(x.kind, ColumnKind::Numeric);
    EXPECT_TRUE(std::isnan(x.numbers[0]));  // "-99" is listed
    EXPECT_EQ(x.numbers[1], -99.0);         // closed form: "-99.0" is not the text "-99"
    EXPECT_EQ(x.numbers[2], 5.0);           // closed form
    // "NA" is no longer missing, so y is text.
    EXPECT_EQ(cells(t.at("y")), (std::vector<std::string>{"<NA>", "NA", "<NA>"}));
}

TEST(Csv, DecimalComma) {
    CsvOptions o;
    o.decimal_comma = true;
    const Table t = read("a;b\n3,5;1\n-0,25;+2,\n", o);
    ASSERT_EQ(t.cols(), 2u);  // closed form: ',' is not a delimiter candidate here
    EXPECT_EQ(t.at("a").numbers, (std::vector<double>{3.5, -0.25}));  // closed form: 3,5 = 3.5
    EXPECT_EQ(t.at("b").numbers, (std::vector<double>{1.0, 2.0}));    // closed form: "+2," = 2
}

TEST(Csv, DecimalCommaTreatsPointAsText) {
    CsvOptions o;
    o.decimal_comma = true;
    const Table t = read("a;b\n1,5;x\n1.234;y\n", o);
    EXPECT_EQ(t.at("a").kind, ColumnKind::Categorical);  // common practice: "1.234" is ambiguous there
    EXPECT_EQ(t.at("a").first_text, "1.234");
}

TEST(Csv, SpacesAroundNumbersAndLeadingPlus) {
    const Table t = read("a,b\n  1.5 ,+2\n\t-3\t, +.5\n");
    EXPECT_EQ(t.at("a").numbers, (std::vector<double>{1.5, -3.0}));  // common practice: blanks trimmed
    EXPECT_EQ(t.at("b").numbers, (std::vector<double>{2.0, 0.5}));   // common practice: leading '+'
}

TEST(Csv, InfAndNanAreTextAndMakeTheColumnCategorical) {
    const Table t = read("a,b,c\n1,1,1\ninf,+-1,nan\n");
    for (const char* name : {"a", "b", "c"}) EXPECT_EQ(t.at(name).kind, ColumnKind::Categorical) << name;
    EXPECT_EQ(t.at("a").first_text, "inf");
    EXPECT_EQ(t.at("b").first_text, "+-1");
    EXPECT_EQ(t.at("c").first_text_line, 3u);  // closed form: counting lines
}

TEST(Csv, InferredCategoricalKeepsOriginalTextAndFirstTextCell) {
    const Table t = read("id,y\n007,1\n1.50,2\nabc,3\n007,4\n");
    const Column& id = t.at("id");
    ASSERT_EQ(id.kind, ColumnKind::Categorical);
    EXPECT_EQ(id.levels, (std::vector<std::string>{"007", "1.50", "abc"}));  // first appearance order
    EXPECT_EQ(id.codes, (std::vector<std::int32_t>{0, 1, 2, 0}));            // closed form
    EXPECT_EQ(id.first_text_line, 4u);                                       // closed form: "abc" is on line 4
    EXPECT_EQ(id.first_text, "abc");
    EXPECT_FALSE(id.kind_forced);
}

TEST(Csv, ForcedCategoricalKeepsText) {
    CsvOptions o;
    o.column_kinds["zip"] = ColumnKind::Categorical;
    const Table t = read("zip,n\n007,1\n 0100,2\n\"  7 \",3\n,4\n", o);
    const Column& zip = t.at("zip");
    ASSERT_EQ(zip.kind, ColumnKind::Categorical);
    // Unquoted cells are trimmed; quoted content is kept exactly.
    EXPECT_EQ(cells(zip), (std::vector<std::string>{"007", "0100", "  7 ", "<NA>"}));
    EXPECT_EQ(zip.first_text_line, 0u);  // closed form: no cell is text
    EXPECT_TRUE(zip.kind_forced);
    EXPECT_FALSE(t.at("n").kind_forced);
}

TEST(Csv, ForcedNumericWithTextIsAnError) {
    CsvOptions o;
    o.column_kinds["age"] = ColumnKind::Numeric;
    const Table ok = read("id,age\n1,30\n2,NA\n", o);
    EXPECT_EQ(ok.at("age").kind, ColumnKind::Numeric);
    EXPECT_TRUE(ok.at("age").kind_forced);
    EXPECT_EQ(ok.at("age").missing_count(), 1u);  // closed form: "NA" is a default missing token
    EXPECT_EQ(text_error("id,age\n1,30\n2,abc\n", o),
              "t.csv: line 3, column 2 ('age'): 'abc' is not a number, but the column is set to numeric; correct "
              "the cell, add 'abc' to the missing tokens, or read the column as categorical");
}

TEST(Csv, UnknownColumnInColumnKinds) {
    CsvOptions o;
    o.column_kinds["c"] = ColumnKind::Numeric;
    EXPECT_EQ(text_error("a,b\n1,2\n", o),
              "t.csv: column 'c' has a type override but is not a column of this file; columns are: a, b");
}

TEST(Csv, ValidUtf8TextIsKept) {
    const Table t = read("city\nZ\xC3\xBCrich\n\xE6\x9D\xB1\xE4\xBA\xAC\n\xF0\x9F\x99\x82\n");
    EXPECT_EQ(t.at("city").levels,
              (std::vector<std::string>{"Z\xC3\xBCrich", "\xE6\x9D\xB1\xE4\xBA\xAC", "\xF0\x9F\x99\x82"}));
}

// ------------------------------------------------------------ errors

TEST(CsvErrors, FileNotFound) {
    TempDir dir("csv");
    const std::string p = (dir.path() / "nope.csv").string();
    EXPECT_EQ(input_error_of([&] { moderato::read_csv(p); }), p + ": file not found; check the path and the file name");
}

TEST(CsvErrors, FolderInsteadOfFile) {
    TempDir dir("csv");
    const std::string p = dir.path().string();
    EXPECT_EQ(input_error_of([&] { moderato::read_csv(p); }),
              p + ": is a folder, not a file; choose a CSV or TSV file");
}

TEST(CsvErrors, EmptyFile) {
    EXPECT_EQ(text_error(""), "t.csv: the file is empty; expected a header row and data rows");
    EXPECT_EQ(text_error("\xEF\xBB\xBF\n\r\n\n"), "t.csv: the file is empty; expected a header row and data rows");
    CsvOptions o;
    o.header = false;
    EXPECT_EQ(text_error("", o), "t.csv: the file is empty; expected data rows");
}

TEST(CsvErrors, HeaderOnly) {
    EXPECT_EQ(text_error("\na,b\n\n"),
              "t.csv: the file has a header (line 2) but no data rows; add data rows below the header");
}

TEST(CsvErrors, EmptyColumnName) {
    EXPECT_EQ(text_error("a, ,c\n1,2,3\n"),
              "t.csv: line 1, column 2: the column name is empty; name every column in the header row, or read the "
              "file without a header");
}

TEST(CsvErrors, DuplicateColumnName) {
    EXPECT_EQ(text_error("a,b,a\n1,2,3\n"),
              "t.csv: line 1, column 3: the column name 'a' is also used by column 1; give each column a different "
              "name");
}

TEST(CsvErrors, RaggedRows) {
    EXPECT_EQ(text_error("a,b,c\n1,2,3\n4,5\n"),
              "t.csv: line 3 has 2 fields, expected 3; look for a missing or extra delimiter (',') on that line, and "
              "put quotes around any field that contains one");
    EXPECT_EQ(text_error("a;b\n1;2\n\"x\ny\";2;3\n"),
              "t.csv: line 3 has 3 fields, expected 2; look for a missing or extra delimiter (';') on that line, and "
              "put quotes around any field that contains one");
}

TEST(CsvErrors, UnterminatedQuote) {
    EXPECT_EQ(text_error("a,b\n1,x\n2,\"open\n3,y\n"),
              "t.csv: line 3, column 2 ('b'): the quoted field that starts here has no closing quote; add the missing "
              "'\"' (write a '\"' inside a quoted field as '\"\"')");
    EXPECT_EQ(text_error("a,\"b\n"),
              "t.csv: line 1, column 2: the quoted field that starts here has no closing quote; add the missing '\"' "
              "(write a '\"' inside a quoted field as '\"\"')");
}

TEST(CsvErrors, TextAfterClosingQuote) {
    EXPECT_EQ(text_error("a,b\n\"x\"y,1\n"),
              "t.csv: line 2, column 1 ('a'): text follows the closing quote of a quoted field; write a '\"' inside "
              "a quoted field as '\"\"', or remove the text after the closing quote");
    // Spaces after the closing quote are allowed (common practice).
    EXPECT_EQ(cells(read("a,b\n\"x\"  ,1\n").at("a")), (std::vector<std::string>{"x"}));
}

TEST(CsvErrors, InvalidUtf8) {
    EXPECT_EQ(text_error("id,city\n1,Paris\n2,Z\xFCrich\n"),
              "t.csv: line 3, column 2 ('city'): invalid UTF-8 (byte 0xFC); save the file as UTF-8 and read it "
              "again");
    // Overlong encoding, UTF-16 surrogate, truncated sequence: not UTF-8 (RFC 3629 sections 3-4, from memory).
    EXPECT_EQ(text_error("c\n\xC0\xAF\n"),
              "t.csv: line 2, column 1 ('c'): invalid UTF-8 (byte 0xC0); save the file as UTF-8 and read it again");
    EXPECT_EQ(text_error("c\nx\n\xED\xA0\x80\n"),
              "t.csv: line 3, column 1 ('c'): invalid UTF-8 (byte 0xED); save the file as UTF-8 and read it again");
    EXPECT_EQ(text_error("c\n\"a\nb\xE6\x9D\"\n"),
              "t.csv: line 3, column 1 ('c'): invalid UTF-8 (byte 0xE6); save the file as UTF-8 and read it again");
    EXPECT_EQ(text_error("a,b\xFF\n1,2\n"),
              "t.csv: line 1, column 2: invalid UTF-8 in the column name (byte 0xFF); save the file as UTF-8 and "
              "read it again");
}

TEST(CsvErrors, DecimalCommaWithCommaDelimiter) {
    CsvOptions o;
    o.decimal_comma = true;
    o.delimiter = ',';
    EXPECT_EQ(text_error("a,b\n1,2\n", o),
              "t.csv: a decimal comma cannot be used with ',' as the delimiter; choose ';' or tab as the delimiter");
}

// ------------------------------------------------------------ blocks, threads, files

TEST(CsvBlocks, RecordsStraddlingBlockBoundariesReadTheSame) {
    // Quoted fields with delimiters, doubled quotes and line breaks; CRLF;
    // blank lines; a column that turns text late (re-read from the start)
    // and one that is missing until it turns text.
    std::string text = "id;note;late;sparse\r\n";
    for (int i = 0; i < 60; ++i) {
        // (appends one by one: GCC 12 warns falsely on "literal" + std::string, -Wrestrict)
        text += std::to_string(i);
        if (i % 3 == 0) {
            text += ";\"multi\nline; \"\"q\"\" ";
            text += std::to_string(i % 7);
            text += '"';
        } else {
            text += ";w";
            text += std::to_string(i % 5);
        }
        text += ';';
        text += std::to_string(i * 0.5);
        text += ';';
        if (i < 50) {
            text += "NA";
        } else {
            text += 's';
            text += std::to_string(i % 2);
        }
        text += (i % 11 == 0) ? "\r\n\r\n" : "\r\n";
    }
    text += "60;\"end\";x;s1";  // no final newline
    CsvOptions one;
    one.threads = 1;
    const Table ref = moderato::read_csv_text(text, "t.csv", one);
    ASSERT_EQ(ref.rows(), 61u);  // closed form: 60 generated records + the last
    EXPECT_EQ(ref.at("late").kind, ColumnKind::Categorical);
    EXPECT_EQ(ref.at("late").levels[1], "0.500000");  // closed form: std::to_string(0.5), original text kept
    // closed form: header line 1, then 60 records + 20 quoted line breaks + 6 blank lines, so the last record is on 88
    EXPECT_EQ(ref.at("late").first_text_line, 88u);
    EXPECT_EQ(cells(ref.at("note"))[3], "multi\nline; \"q\" 3");  // RFC 4180 section 2, rules 6 and 7
    for (const std::size_t block : {1u, 7u, 64u, 200u}) {
        for (const unsigned threads : {1u, 2u, 3u}) {
            CsvOptions o;
            o.threads = threads;
            SCOPED_TRACE("block " + std::to_string(block) + ", threads " + std::to_string(threads));
            expect_same_table(ref, moderato::detail::read_csv_text_tuned(text, "t.csv", o, {}, tiny_blocks(block)));
        }
    }
}

TEST(CsvBlocks, ErrorsAreTheSameWhateverTheBlocks) {
    const std::string text = "a,b\n1,\"x\ny\"\n2,z\n3\n4,\"open\n";
    const std::string expected =
        "t.csv: line 5 has 1 field, expected 2; look for a missing or extra delimiter (',') on that line, and put "
        "quotes around any field that contains one";
    EXPECT_EQ(text_error(text), expected);  // closed form: the first bad record starts on line 5
    for (const std::size_t block : {1u, 5u, 64u}) {
        CsvOptions o;
        o.threads = 2;
        EXPECT_EQ(
            input_error_of([&] { moderato::detail::read_csv_text_tuned(text, "t.csv", o, {}, tiny_blocks(block)); }),
            expected)
            << block;
    }
}

TEST(CsvBlocks, ProgressAndCancel) {
    TempDir dir("csv");
    std::string text = "a,b\n";
    for (int i = 0; i < 1000; ++i) text += std::to_string(i) + "," + std::to_string(2 * i) + "\n";
    const fs::path p = dir.write("p.csv", text);
    std::vector<std::size_t> done;
    std::size_t total_seen = 0;
    moderato::CsvProgress progress;
    progress.callback = [&](std::size_t d, std::size_t total) {
        done.push_back(d);
        total_seen = total;
        return true;
    };
    const Table t = moderato::detail::read_csv_tuned(p.string(), {}, progress, tiny_blocks(1024));
    EXPECT_EQ(t.rows(), 1000u);  // closed form
    ASSERT_GE(done.size(), 2u);  // closed form: the file spans several 1 KiB blocks
    EXPECT_TRUE(std::is_sorted(done.begin(), done.end()));
    EXPECT_EQ(done.back(), text.size());  // closed form: all bytes done at the end
    EXPECT_EQ(total_seen, text.size());

    int calls = 0;
    moderato::CsvProgress stop;
    stop.callback = [&](std::size_t, std::size_t) { return ++calls < 3; };
    EXPECT_THROW(moderato::detail::read_csv_tuned(p.string(), {}, stop, tiny_blocks(1024)), moderato::Cancelled);
    EXPECT_EQ(calls, 3);  // closed form: stops at the first 'false'
}

TEST(CsvBlocks, ThreadCountDoesNotChangeTheTableAndTheFileIsUntouched) {
    // About 200k rows: numbers in shortest round-trip form (so the parsed
    // value must equal the generated one exactly), missing cells, a text
    // column with quoted delimiters and line breaks, and a column that turns
    // text near the end (so the reader has to go back for its early cells).
    constexpr int kRows = 200000;
    std::mt19937_64 rng(20240611);
    std::normal_distribution<double> normal(0.0, 1.0);
    std::vector<double> x(kRows);
    std::string text = "id,x,group,y,late\n";
    text.reserve(kRows * 60);
    char buf[64];
    for (int i = 0; i < kRows; ++i) {
        x[static_cast<std::size_t>(i)] = normal(rng) * 1000.0;
        const auto r = std::to_chars(buf, buf + sizeof buf, x[static_cast<std::size_t>(i)]);
        text += std::to_string(i);
        text += ',';
        text.append(buf, r.ptr);
        text += ',';
        const int g = static_cast<int>(rng() % 6);
        if (g == 0) {
            text += "\"North, \"\"upper\"\"\"";
        } else if (g == 1) {
            text += "\"South\nwing\"";
        } else {
            text += 'g';
            text += std::to_string(g);
        }
        text += ',';
        if (rng() % 10 == 0) text += "NA";
        else text += std::to_string(rng() % 1000);
        text += ',';
        text += i == kRows - 10 ? std::string("text") : std::to_string(i % 97);
        text += "\n";
    }
    TempDir dir("csv");
    const fs::path p = dir.write("big.csv", text);
    const auto mtime = fs::last_write_time(p);

    CsvOptions one, two;
    one.threads = 1;
    two.threads = 2;
    const Table a = moderato::read_csv(p.string(), one);
    const Table b = moderato::read_csv(p.string(), two);
    const Table c = moderato::detail::read_csv_tuned(p.string(), two, {}, tiny_blocks(1 << 16));
    ASSERT_EQ(a.rows(), static_cast<std::size_t>(kRows));  // closed form
    expect_same_table(a, b);
    expect_same_table(a, c);

    const Column& xc = a.at("x");
    ASSERT_EQ(xc.kind, ColumnKind::Numeric);
    for (std::size_t i = 0; i < x.size(); ++i)
        ASSERT_EQ(xc.numbers[i], x[i]) << i;     // closed form: std::to_chars shortest form reads back exactly
    EXPECT_EQ(a.at("group").levels.size(), 6u);  // closed form: six generated groups
    EXPECT_EQ(a.at("late").kind, ColumnKind::Categorical);
    EXPECT_EQ(a.at("late").first_text, "text");
    EXPECT_EQ(a.at("late").first_text_line, a.row_lines[kRows - 10]);  // closed form: same record

    EXPECT_EQ(read_file(p), text);  // the input is never written to
    EXPECT_EQ(fs::last_write_time(p), mtime);
}

TEST(CsvBlocks, ReadsFileWithBomAndCrlf) {
    TempDir dir("csv");
    const fs::path p = dir.write("bom.csv", "\xEF\xBB\xBFx;g\r\n1,5;a\r\n2;b\r\n");
    CsvOptions o;
    o.decimal_comma = true;
    const Table t = moderato::read_csv(p.string(), o);
    EXPECT_EQ(t.source, p.string());
    EXPECT_EQ(t.at("x").numbers, (std::vector<double>{1.5, 2.0}));  // closed form
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{2, 3}));       // closed form
}

// ------------------------------------------------------------ table

TEST(TableLookup, AtFindAndRowLocation) {
    const Table t = moderato::read_csv_text("a,b,c\n1,2,3\n\n4,5,6\n", "spend.csv");
    EXPECT_NE(t.find("b"), nullptr);
    EXPECT_EQ(t.find("B"), nullptr);  // names are case-sensitive
    EXPECT_EQ(input_error_of([&] { t.at("foo"); }), "column 'foo' not found in spend.csv; columns are: a, b, c");
    EXPECT_EQ(t.row_location(1), "line 4");  // closed form: the blank line 3 is skipped
    Table plain;
    plain.columns.push_back(Column{});
    plain.columns.back().name = "z";
    plain.columns.back().numbers = {1.0, moderato::missing_value()};
    EXPECT_EQ(plain.row_location(1), "row 2");            // closed form: 1-based row without lines
    EXPECT_EQ(plain.columns.back().missing_count(), 1u);  // closed form
    EXPECT_EQ(input_error_of([&] { plain.at("y"); }), "column 'y' not found; columns are: z");
}

// ------------------------------------------------------------ some columns

// read_csv_columns keeps the named columns exactly as read_csv reads them
// (reference: read_csv itself, whose results other tests check against
// RFC 4180 and hand-worked values), across block and piece boundaries.
TEST(CsvColumns, KeepsTheNamedColumnsAsReadCsvReadsThem) {
    std::string text = "id,x,label,y,note\n";
    std::mt19937_64 rng(29);
    std::uniform_int_distribution<int> digit(0, 9);
    for (int i = 0; i < 5000; ++i)
        text += std::to_string(i) + "," + std::to_string(digit(rng)) + ".5,\"lv" + std::to_string(digit(rng)) + "\"," +
                (i % 97 == 0 ? "NA" : std::to_string(digit(rng))) + ",free \"\"text\"\" " + std::to_string(i) + "\n";
    TempDir dir("csvcols");
    const std::string file = dir.write("t.csv", text).string();
    CsvOptions o;
    o.threads = 3;
    const Table all = moderato::read_csv(file, o);
    const Table some = moderato::read_csv_columns(file, o, {"y", "label"});
    Table expected;
    expected.columns = {all.columns[2], all.columns[3]};  // file order, not the order asked
    expected.row_lines = all.row_lines;
    expect_same_table(some, expected);
    EXPECT_EQ(some.source, all.source);
}

// The columns left out are checked as text, not converted: a broken record
// (wrong number of fields, text after a closing quote, invalid UTF-8) is
// refused with read_csv's own message and line, while text in a left-out
// numeric-looking column is not read.
TEST(CsvColumns, ChecksLeftOutCellsAsTextWithoutReadingThem) {
    TempDir dir("csvcols");
    for (const std::string body : {"1,2,3\n4,5\n", "1,2,3\n4,5,\"x\"y\n", "1,2,3\n4,5,\xC3\x28\n"}) {
        const std::string bad = dir.write("bad.csv", "a,b,c\n" + body).string();
        const std::string want = input_error_of([&] { moderato::read_csv(bad, {}); });
        EXPECT_NE(want.find("line 3"), std::string::npos) << want;
        EXPECT_EQ(input_error_of([&] { moderato::read_csv_columns(bad, {}, {"a"}); }), want);
    }
    const std::string mixed = dir.write("mixed.csv", "a,b\n1,2\n3,oops\n").string();
    const Table t = moderato::read_csv_columns(mixed, {}, {"a"});
    ASSERT_EQ(t.cols(), 1u);
    EXPECT_EQ(t.columns[0].name, "a");
    EXPECT_EQ(t.columns[0].numbers, (std::vector<double>{1, 3}));
}

// A name that is not a column: every column is read, so the caller's lookup
// lists them all when it reports the name (the common practice of naming the
// available choices in the error).
TEST(CsvColumns, AnUnknownNameReadsEveryColumn) {
    TempDir dir("csvcols");
    const std::string file = dir.write("t.csv", "a,b,c\n1,2,3\n").string();
    const Table t = moderato::read_csv_columns(file, {}, {"a", "B"});
    ASSERT_EQ(t.cols(), 3u);
    const std::string message = input_error_of([&] { t.at("B"); });
    EXPECT_NE(message.find("a, b, c"), std::string::npos) << message;
}
