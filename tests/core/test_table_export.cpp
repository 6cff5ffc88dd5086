// Table writers (CSV, Markdown, LaTeX, HTML). Expected values come from the
// rules they follow, named beside each check: OWASP CSV Injection guidance,
// RFC 4180, the GitHub Flavored Markdown spec, the LaTeX2e reserved
// characters, the HTML escaping every browser applies. Where an outside
// reader is installed the output is read back by it: Python's csv module
// (CSV), Python's html.parser (HTML), cmark-gfm, GitHub's reference Markdown
// renderer (Markdown), pdflatex (LaTeX); tests skip where it is absent.
// The tables of an analysis (analysis_tables) are checked against closed
// forms on the sample projects: their headings, the house column order and
// the numbers, and that the memo's sentences cite the same strings.
#include <gtest/gtest.h>

#include <unistd.h>

#include <array>
#include <atomic>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <regex>
#include <string>
#include <vector>

#include "common/input_error.hpp"
#include "common/sample_run.hpp"
#include "common/shell_command.hpp"
#include "common/temp_dir.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reporting/analysis_tables.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/memo.hpp"
#include "moderato/reporting/table_export.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using moderato::test::input_error_of;
using moderato::test::run_command;
using moderato::test::run_sample;
using moderato::test::SampleRun;
using moderato::test::shell_quote;
using moderato::test::TempDir;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// Parses HTML read from standard input with Python's html.parser and prints
// JSON: "errors" (a closing tag that does not match the open one, tags left
// open, text outside a caption/th/td/p, any <script>), and "items": the text
// of each caption, th, td and p in order (character references decoded) with
// its style or align attribute.
constexpr const char* kHtmlReader = R"PY(
import sys, json
from html.parser import HTMLParser
class Reader(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack, self.errors, self.items, self.current = [], [], [], None
    def handle_starttag(self, tag, attrs):
        if tag in ("wbr", "br"):  # void elements: no end tag
            return
        self.stack.append(tag)
        if tag == "script":
            self.errors.append("a script element")
        if tag in ("caption", "th", "td", "p") and self.current is None:
            a = dict(attrs)
            self.current = [tag, "", a.get("style") or a.get("align") or ""]
    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.errors.append("unexpected </%s> with %s open" % (tag, self.stack))
        else:
            self.stack.pop()
        if self.current is not None and tag == self.current[0]:
            self.items.append(self.current)
            self.current = None
    def handle_data(self, data):
        if self.current is not None:
            self.current[1] += data
        elif data.strip():
            self.errors.append("text outside a cell: %r" % data)
r = Reader()
r.feed(sys.stdin.buffer.read().decode("utf-8"))
r.close()
if r.stack:
    r.errors.append("left open: %s" % r.stack)
print(json.dumps({"errors": r.errors, "items": r.items}))
)PY";

// Reads a CSV file (argv[1]) with Python's csv module and prints its records as JSON.
constexpr const char* kCsvReader = R"PY(
import csv, json, sys
with open(sys.argv[1], newline="", encoding="utf-8") as f:
    data = f.read()
import io
print(json.dumps({"bom": data.startswith("\ufeff"), "rows": list(csv.reader(io.StringIO(data, newline="")))}))
)PY";

bool have_python() { return fs::exists("/usr/bin/python3"); }

json run_html_reader(const TempDir& dir, const std::string& html_command) {
    const fs::path script = dir.write("read_html.py", kHtmlReader);
    const std::string out = run_command(html_command + " | /usr/bin/python3 " + shell_quote(script));
    return json::parse(out);
}

// A table with something awkward in nearly every cell.
ExportTable awkward_table() {
    ExportTable t;
    t.title = "Effect of discount \u00D7 loyalty | \"quoted\" & <b>tagged</b>";
    t.columns = {"Moderator value", "Effect", "p", "Remark"};
    t.numeric = {false, true, true, false};
    t.rows = {
        {{"\u22121 SD (2.5)", ""}, {"\u22120.123", "-0.12345678901234567"}, {"<0.001", "0.000123"}, {"a|b \\ c", ""}},
        {{"Mean", ""},
         {"0.456", "0.45612345678901234"},
         {"0.04", ".04"},
         {"=HYPERLINK(\"http://example.com\",\"click\")", ""}},
        {{"+1 SD", ""}, {"1.2e\u22125", "1.2e-05"}, {"\u2014", ""}, {"line one\nline two\r\nthree", ""}},
        {{" padded ", ""}, {"x", "-cmd|' /C calc'!A0"}, {"@SUM(1)", ""}, {"\tTab", ""}},
        {{"\rCR", ""}, {"-1+2", ""}, {"+1-1", ""}, {"# heading *star* _u_ `code` ~s~ [l](http://x) &amp; <i>", ""}},
        {{"", ""}, {"1,234", "1234"}, {"'quoted'", ""}, {"caf\u00E9 \u03B1 \u03B2 \u03C7\u00B2 \u2264 5 \u00B1 1", ""}},
    };
    t.notes = {"# not a heading",
               "- not a list",
               "1. not a list either",
               "> not a quote",
               "=====",
               "[ref]: http://example.com",
               "Plain note with * and _ and <i>italic</i> & more",
               "---",
               "+ not a list",
               "2) not a list",
               "  - indented, not a list",
               "      not code",
               "-0.5 is a number",
               "1.25 is a number",
               "#5 is not a heading"};
    return t;
}

std::string csv_source(const ExportCell& c) { return c.exact.empty() ? c.text : c.exact; }

}  // namespace

// ---------------------------------------------------------------- CSV neutralising

// OWASP CSV Injection guidance: a field beginning with '=', '+', '-', '@',
// tab (0x09) or carriage return (0x0D) is prefixed with a single quote.
TEST(CsvNeutralise, EveryAsciiTriggerGetsAQuote) {
    for (const std::string trigger : {"=", "+", "-", "@", "\t", "\r"}) {
        const std::string cell = trigger + "cmd";
        EXPECT_EQ(csv_neutralise(cell), "'" + cell) << "trigger byte " << int(trigger[0]);
        EXPECT_EQ(csv_neutralise(trigger), "'" + trigger) << "the trigger alone, byte " << int(trigger[0]);
    }
}

// OWASP CSV Injection guidance (look-alikes some spreadsheets accept as formula
// starters): U+2212 MINUS SIGN, U+FF1D, U+FF0B, U+FF0D, U+FF20.
TEST(CsvNeutralise, UnicodeLookAlikesGetAQuote) {
    for (const std::string trigger : {"\u2212", "\uFF1D", "\uFF0B", "\uFF0D", "\uFF20"}) {
        EXPECT_EQ(csv_neutralise(trigger + "1+1"), "'" + trigger + "1+1");
        // A number written with a typographic minus is text, not a C-locale number.
        EXPECT_EQ(csv_neutralise(trigger + "5"), "'" + trigger + "5");
    }
}

// Plain decimal numbers in the C locale, ^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$
// (the exception in our reading of the OWASP guidance: common practice, so
// negative numbers stay numbers in a spreadsheet).
TEST(CsvNeutralise, PlainNumbersStayNumbers) {
    for (const std::string number : {"-1", "+2", "0", "-0.125", "1e-5", ".5", "-.5", "+.5", "5.", "-5.", "+3E+10",
                                     "-12345678901234567e-300", "-0.12345678901234567", "1E5"}) {
        EXPECT_EQ(csv_neutralise(number), number);
    }
}

// Look like numbers but are not (the same pattern; "inf" and "nan" excluded by
// rule): each starts with a trigger, so each gets the quote (OWASP CSV
// Injection guidance).
TEST(CsvNeutralise, NearNumbersAndCommandsGetAQuote) {
    for (const std::string cell : {"-1+2",  "+1-1",   "-cmd|' /C calc'!A0",
                                   "-inf",  "+inf",   "-nan",
                                   "-",     "+",      "-.",
                                   "+e5",   "-1e",    "-1e+",
                                   "- 1",   "-1 ",    "-1,5",
                                   "-0x1A", "-1.2.3", "-1e5.5",
                                   "=1",    "@1"}) {
        EXPECT_EQ(csv_neutralise(cell), "'" + cell) << cell;
    }
}

// Cells that start with nothing a spreadsheet reads as a formula are returned
// as they are (OWASP CSV Injection guidance names only the triggers).
TEST(CsvNeutralise, HarmlessCellsUnchanged) {
    for (const std::string cell :
         {"", "abc", "0.5", "inf", "nan", "a=b", "x-1", "'=already", " 1", "1-2", "\u2014", "<0.001", "caf\u00E9"}) {
        EXPECT_EQ(csv_neutralise(cell), cell) << cell;
    }
}

// ---------------------------------------------------------------- CSV layout

// RFC 4180 section 2: CRLF after each record (rule 1-2), a header record
// (rule 3), fields with comma, quote, CR or LF enclosed in quotes (rule 6),
// inner quotes doubled (rule 7). Leading/trailing spaces quoted: common
// practice (some readers trim unquoted spaces). Title and notes not written.
TEST(TableToCsv, Rfc4180Layout) {
    ExportTable t;
    t.title = "Title not written";
    t.columns = {"name", "value"};
    t.rows = {{{"plain", ""}, {"0.5", "0.50000000000000001"}},
              {{"a,b", ""}, {"say \"hi\"", ""}},
              {{"two\nlines", ""}, {" lead", ""}},
              {{"trail ", ""}, {"cr\rhere", ""}}};
    t.notes = {"note not written"};
    const std::string expected =
        "name,value\r\n"
        "plain,0.50000000000000001\r\n"
        "\"a,b\",\"say \"\"hi\"\"\"\r\n"
        "\"two\nlines\",\" lead\"\r\n"
        "\"trail \",\"cr\rhere\"\r\n";
    EXPECT_EQ(table_to_csv(t), expected);
}

// OWASP CSV Injection guidance (the quote prefix) and RFC 4180 section 2 rules
// 6-7 (quotes inside the field doubled, the field enclosed in quotes).
TEST(TableToCsv, HyperlinkFormulaIsNeutralisedAndQuoted) {
    ExportTable t;
    t.columns = {"link"};
    t.rows = {{{"=HYPERLINK(\"http://example.com\",\"click\")", ""}}};
    EXPECT_EQ(table_to_csv(t), "link\r\n\"'=HYPERLINK(\"\"http://example.com\"\",\"\"click\"\")\"\r\n");
}

// A header cell is neutralised too (a variable name is user data: OWASP CSV
// Injection guidance covers every field).
TEST(TableToCsv, HeaderCellsAreNeutralised) {
    ExportTable t;
    t.columns = {"=cmd", "-x", "-1"};
    EXPECT_EQ(table_to_csv(t), "'=cmd,'-x,-1\r\n");
}

// The CSV of an awkward table read back by Python's csv module (RFC 4180
// dialect, the module's default): every record has every field, each equal to
// the cell's exact value (else its text) after neutralising; no byte-order mark.
TEST(TableToCsv, RoundTripThroughPythonCsvModule) {
    if (!have_python()) GTEST_SKIP() << "/usr/bin/python3 is not installed";
    TempDir dir("table-export");
    ExportTable t = awkward_table();
    t.columns.push_back("=HYPERLINK(\"x\")");
    t.numeric.push_back(false);
    for (auto& row : t.rows) row.push_back({"", ""});
    t.rows.back().back() = {"last, \"cell\"", ""};
    const std::string csv = table_to_csv(t);
    const fs::path file = dir.write("t.csv", csv);
    const fs::path script = dir.write("read_csv.py", kCsvReader);
    const json got = json::parse(run_command("/usr/bin/python3 " + shell_quote(script) + " " + shell_quote(file)));

    EXPECT_FALSE(got["bom"].get<bool>());
    const auto& rows = got["rows"];
    ASSERT_EQ(rows.size(), t.rows.size() + 1);
    ASSERT_EQ(rows[0].size(), t.columns.size());
    for (std::size_t c = 0; c < t.columns.size(); ++c) EXPECT_EQ(rows[0][c], csv_neutralise(t.columns[c]));
    for (std::size_t r = 0; r < t.rows.size(); ++r) {
        ASSERT_EQ(rows[r + 1].size(), t.columns.size()) << "record " << r + 1;
        for (std::size_t c = 0; c < t.columns.size(); ++c)
            EXPECT_EQ(rows[r + 1][c].get<std::string>(), csv_neutralise(csv_source(t.rows[r][c])))
                << "row " << r << " column " << c;
    }
    // Spot checks written out by hand (OWASP CSV Injection guidance; the exact
    // value wins over the formatted text).
    EXPECT_EQ(rows[0][4], "'=HYPERLINK(\"x\")");
    EXPECT_EQ(rows[1][1], "-0.12345678901234567");
    EXPECT_EQ(rows[1][0], "'\u22121 SD (2.5)");
    EXPECT_EQ(rows[2][3], "'=HYPERLINK(\"http://example.com\",\"click\")");
    EXPECT_EQ(rows[3][3], "line one\nline two\r\nthree");
    EXPECT_EQ(rows[4][0], " padded ");
    EXPECT_EQ(rows[4][1], "'-cmd|' /C calc'!A0");
    EXPECT_EQ(rows[4][3], "'\tTab");
    EXPECT_EQ(rows[5][0], "'\rCR");
    EXPECT_EQ(rows[5][1], "'-1+2");
    EXPECT_EQ(rows[5][2], "'+1-1");
    EXPECT_EQ(rows[6][1], "1234");
    EXPECT_EQ(rows[6][4], "last, \"cell\"");
}

// A one-column record whose only field is empty is written as "" so a reader
// sees one empty field, not a blank line (Python csv module: a blank line
// reads as a record with no fields).
TEST(TableToCsv, LoneEmptyFieldSurvivesPythonCsvModule) {
    ExportTable t;
    t.columns = {"only"};
    t.rows = {{{"", ""}}, {{"x", ""}}};
    EXPECT_EQ(table_to_csv(t), "only\r\n\"\"\r\nx\r\n");
    if (!have_python()) GTEST_SKIP() << "/usr/bin/python3 is not installed";
    TempDir dir("table-export");
    const fs::path file = dir.write("t.csv", table_to_csv(t));
    const fs::path script = dir.write("read_csv.py", kCsvReader);
    const json got = json::parse(run_command("/usr/bin/python3 " + shell_quote(script) + " " + shell_quote(file)));
    EXPECT_EQ(got["rows"], json::parse(R"([["only"], [""], ["x"]])"));
}

// ---------------------------------------------------------------- shape checks

TEST(TableExportShape, RowWithWrongCellCountNamesTitleAndRow) {
    ExportTable t;
    t.title = "Simple slopes";
    t.columns = {"a", "b"};
    t.rows = {{{"1", ""}, {"2", ""}}, {{"1", ""}, {"2", ""}}, {{"only one", ""}}};
    for (TableFormat f : {TableFormat::Csv, TableFormat::Markdown, TableFormat::Latex, TableFormat::Html}) {
        const std::string message = input_error_of([&] { table_to_text(t, f); });
        EXPECT_TRUE(contains(message, "Simple slopes")) << message;
        EXPECT_TRUE(contains(message, "row 3")) << message;
        EXPECT_TRUE(contains(message, "has 1 cell,")) << message;
    }
    t.rows = {{{"1", ""}, {"2", ""}, {"3", ""}}};
    EXPECT_TRUE(contains(input_error_of([&] { table_to_csv(t); }), "row 1"));
}

TEST(TableExportShape, AlignmentListOfWrongSizeNamesTitle) {
    ExportTable t;
    t.title = "Regions";
    t.columns = {"a", "b", "c"};
    t.numeric = {true, false};
    for (TableFormat f : {TableFormat::Csv, TableFormat::Markdown, TableFormat::Latex, TableFormat::Html}) {
        const std::string message = input_error_of([&] { table_to_text(t, f); });
        EXPECT_TRUE(contains(message, "Regions")) << message;
    }
    t.numeric = {};
    EXPECT_EQ(input_error_of([&] { table_to_html(t); }), "");
}

TEST(TableExport, SuffixAndDispatch) {
    // The usual file name extensions (common practice).
    EXPECT_EQ(table_format_suffix(TableFormat::Csv), "csv");
    EXPECT_EQ(table_format_suffix(TableFormat::Markdown), "md");
    EXPECT_EQ(table_format_suffix(TableFormat::Latex), "tex");
    EXPECT_EQ(table_format_suffix(TableFormat::Html), "html");
    const ExportTable t = awkward_table();
    EXPECT_EQ(table_to_text(t, TableFormat::Csv), table_to_csv(t));
    EXPECT_EQ(table_to_text(t, TableFormat::Markdown), table_to_markdown(t));
    EXPECT_EQ(table_to_text(t, TableFormat::Latex), table_to_latex(t));
    EXPECT_EQ(table_to_text(t, TableFormat::Html), table_to_html(t));
}

// ---------------------------------------------------------------- Markdown

// GitHub Flavored Markdown spec 0.29-gfm, "Tables (extension)": header row,
// delimiter row ("---:" right-aligns), one row per line, "\|" for a pipe inside
// a cell (from memory).
TEST(TableToMarkdown, PipeTableLayout) {
    ExportTable t;
    t.title = "Slopes";
    t.columns = {"Group", "Slope"};
    t.numeric = {false, true};
    t.rows = {{{"A|B", ""}, {"\u22120.5", "-0.5"}}, {{"back\\slash", ""}, {"1.25", ""}}};
    t.notes = {"First note.", "Second note."};
    EXPECT_EQ(table_to_markdown(t),
              "**Slopes**\n"
              "\n"
              "| Group | Slope |\n"
              "| --- | ---: |\n"
              "| A\\|B | \u22120.5 |\n"
              "| back\\\\slash | 1.25 |\n"
              "\n"
              "First note.\n"
              "\n"
              "Second note.\n");
}

// CommonMark 0.30 section 2.4 (any ASCII punctuation may be backslash-escaped)
// and the block starts of sections 4.2 (headings), 5.1 (block quotes), 5.2
// (list items), 4.3 (setext underlines), from memory.
TEST(MarkdownEscape, InlineAndBlockMarkers) {
    EXPECT_EQ(markdown_escape("a|b"), "a\\|b");
    EXPECT_EQ(markdown_escape("a\\b"), "a\\\\b");
    EXPECT_EQ(markdown_escape("one\ntwo\r\nthree\rfour"), "one two three four");
    EXPECT_EQ(markdown_escape("*x* _y_ `z` ~w~"), "\\*x\\* \\_y\\_ \\`z\\` \\~w\\~");
    EXPECT_EQ(markdown_escape("<script>"), "\\<script>");
    EXPECT_EQ(markdown_escape("</b> <!-- <?x"), "\\</b> \\<!-- \\<?x");
    EXPECT_EQ(markdown_escape("<0.001 a < b"), "<0.001 a < b");
    EXPECT_EQ(markdown_escape("[t](http://x)"), "[t\\](http://x)");
    EXPECT_EQ(markdown_escape("[t][r] [r]: u"), "[t\\][r] [r\\]: u");
    EXPECT_EQ(markdown_escape("[0.12, 0.45]"), "[0.12, 0.45]");
    EXPECT_EQ(markdown_escape("&amp; &#35; R&D"), "\\&amp; \\&#35; R&D");
    EXPECT_EQ(markdown_escape("# h"), "\\# h");
    EXPECT_EQ(markdown_escape("> q"), "\\> q");
    EXPECT_EQ(markdown_escape("- i"), "\\- i");
    EXPECT_EQ(markdown_escape("+ i"), "\\+ i");
    EXPECT_EQ(markdown_escape("---"), "\\---");
    EXPECT_EQ(markdown_escape("-"), "\\-");
    EXPECT_EQ(markdown_escape("-0.5"), "-0.5");
    EXPECT_EQ(markdown_escape("+.5"), "+.5");
    EXPECT_EQ(markdown_escape("1."), "1\\.");
    EXPECT_EQ(markdown_escape("1.25"), "1.25");
    EXPECT_EQ(markdown_escape("==="), "\\===");
    EXPECT_EQ(markdown_escape("12. x"), "12\\. x");
    EXPECT_EQ(markdown_escape("3) x"), "3\\) x");
    EXPECT_EQ(markdown_escape("0.5"), "0.5");
    EXPECT_EQ(markdown_escape("a - b > c"), "a - b > c");
    EXPECT_EQ(markdown_escape("  - i"), "\\- i");
    EXPECT_EQ(markdown_escape("     code?"), "code?");
}

// Each line of the table has exactly one more unescaped pipe than there are
// columns (GFM spec, "Tables (extension)": a row is cells between pipes).
TEST(TableToMarkdown, EveryLineHasTheRightNumberOfCells) {
    const ExportTable t = awkward_table();
    const std::string md = table_to_markdown(t);
    std::size_t table_lines = 0;
    std::size_t start = 0;
    while (start < md.size()) {
        const std::size_t end = md.find('\n', start);
        const std::string line = md.substr(start, end - start);
        start = end + 1;
        if (line.empty() || line[0] != '|') continue;
        ++table_lines;
        std::size_t pipes = 0;
        for (std::size_t i = 0; i < line.size(); ++i) {
            if (line[i] == '\\') {
                ++i;  // the escaped character
                continue;
            }
            if (line[i] == '|') ++pipes;
        }
        EXPECT_EQ(pipes, t.columns.size() + 1) << line;
    }
    EXPECT_EQ(table_lines, t.rows.size() + 2);
}

// Rendered by cmark-gfm (GitHub's reference renderer, with the table,
// strikethrough, autolink and tagfilter extensions) and read with Python's
// html.parser: every cell and note reads as the original text (line breaks
// as spaces, ends trimmed, as GFM trims cells), numeric columns align right.
TEST(TableToMarkdown, RendersAsTheOriginalTextInCmarkGfm) {
    if (!fs::exists("/usr/bin/cmark-gfm")) GTEST_SKIP() << "cmark-gfm is not installed (Debian package cmark-gfm)";
    if (!have_python()) GTEST_SKIP() << "/usr/bin/python3 is not installed";
    TempDir dir("table-export");
    const ExportTable t = awkward_table();
    const fs::path md = dir.write("t.md", table_to_markdown(t));
    const json got = run_html_reader(
        dir, "/usr/bin/cmark-gfm -e table -e strikethrough -e autolink -e tagfilter " + shell_quote(md));
    EXPECT_EQ(got["errors"], json::array());

    const auto plain = [](const std::string& s) {
        std::string flat = std::regex_replace(s, std::regex("\r\n|\r|\n"), " ");
        const std::size_t a = flat.find_first_not_of(" \t");
        const std::size_t b = flat.find_last_not_of(" \t");
        return a == std::string::npos ? std::string() : flat.substr(a, b - a + 1);
    };
    std::vector<std::array<std::string, 3>> expected;
    expected.push_back({"p", t.title, ""});
    for (std::size_t c = 0; c < t.columns.size(); ++c)
        expected.push_back({"th", t.columns[c], t.numeric[c] ? "right" : ""});
    for (const auto& row : t.rows)
        for (std::size_t c = 0; c < row.size(); ++c)
            expected.push_back({"td", plain(row[c].text), t.numeric[c] ? "right" : ""});
    for (const std::string& note : t.notes) expected.push_back({"p", plain(note), ""});

    const auto& items = got["items"];
    ASSERT_EQ(items.size(), expected.size()) << got.dump(1);
    for (std::size_t i = 0; i < expected.size(); ++i) {
        EXPECT_EQ(items[i][0], expected[i][0]) << "item " << i;
        EXPECT_EQ(items[i][1], expected[i][1]) << "item " << i;
        EXPECT_EQ(items[i][2], expected[i][2]) << "item " << i;
    }
}

// ---------------------------------------------------------------- LaTeX

// The ten LaTeX special characters and their text-mode spellings (LaTeX2e
// reference manual, "Reserved characters" and "Text symbols", from memory).
TEST(LatexEscape, TheTenSpecialCharacters) {
    EXPECT_EQ(latex_escape("#"), "\\#");
    EXPECT_EQ(latex_escape("$"), "\\$");
    EXPECT_EQ(latex_escape("%"), "\\%");
    EXPECT_EQ(latex_escape("&"), "\\&");
    EXPECT_EQ(latex_escape("~"), "\\textasciitilde{}");
    EXPECT_EQ(latex_escape("_"), "\\_");
    EXPECT_EQ(latex_escape("^"), "\\textasciicircum{}");
    EXPECT_EQ(latex_escape("\\"), "\\textbackslash{}");
    EXPECT_EQ(latex_escape("{"), "\\{");
    EXPECT_EQ(latex_escape("}"), "\\}");
    EXPECT_EQ(latex_escape("50% of a_b & c#1 costs $2 {x} ^ ~ \\"),
              "50\\% of a\\_b \\& c\\#1 costs \\$2 \\{x\\} \\textasciicircum{} \\textasciitilde{} \\textbackslash{}");
}

// Typographic characters as LaTeX math or ligatures (LaTeX2e reference manual,
// "Math symbols" and "Dashes", from memory); other UTF-8 passes through.
TEST(LatexEscape, TypographicCharacters) {
    EXPECT_EQ(latex_escape("\u22120.12"), "$-$0.12");
    EXPECT_EQ(latex_escape("a \u00D7 b"), "a $\\times$ b");
    EXPECT_EQ(latex_escape("\u2264 \u2265"), "$\\le$ $\\ge$");
    EXPECT_EQ(latex_escape("R\u00B2"), "R$^2$");
    EXPECT_EQ(latex_escape("1\u20132 \u2014 x"), "1--2 --- x");
    EXPECT_EQ(latex_escape("\u2248 3 \u00B1 1"), "$\\approx$ 3 $\\pm$ 1");
    EXPECT_EQ(latex_escape("\u03B1 \u03B2 \u03C7\u00B2"), "$\\alpha$ $\\beta$ $\\chi^2$");
    EXPECT_EQ(latex_escape("\u03B1\u03B2 \u2264\u22121"), "$\\alpha\\beta$ $\\le-$1");
    EXPECT_EQ(latex_escape("\u0394y"), "$\\Delta$y");
    EXPECT_EQ(latex_escape("<0.001 > |x|"), "$<$0.001 $>$ \\textbar{}x\\textbar{}");
    EXPECT_EQ(latex_escape("a--b -c"), "a-{}-b -c");
    EXPECT_EQ(latex_escape("two\nlines"), "two lines");
    EXPECT_EQ(latex_escape("caf\u00E9 \u00FC"), "caf\u00E9 \u00FC");
}

// booktabs layout (booktabs package documentation: \toprule, \midrule,
// \bottomrule; from memory) inside a table float with a caption.
TEST(TableToLatex, BooktabsLayout) {
    ExportTable t;
    t.title = "Effects & 95% intervals";
    t.columns = {"Group", "Effect", "p"};
    t.numeric = {false, true, true};
    t.rows = {{{"A_1", ""}, {"\u22120.50", "-0.5"}, {"<0.001", ""}}, {{"B", ""}, {"1.25", ""}, {"0.30", ""}}};
    t.notes = {"Standard errors: HC3."};
    EXPECT_EQ(table_to_latex(t),
              "% requires \\usepackage{booktabs}\n"
              "\\begin{table}[htbp]\n"
              "\\centering\n"
              "\\caption{Effects \\& 95\\% intervals}\n"
              "\\begin{tabular}{l r r}\n"
              "\\toprule\n"
              "Group & Effect & p \\\\\n"
              "\\midrule\n"
              "A\\_1 & $-$0.50 & $<$0.001 \\\\\n"
              "B & 1.25 & 0.30 \\\\\n"
              "\\bottomrule\n"
              "\\end{tabular}\n"
              "\\par\\smallskip\n"
              "{\\small\n"
              "Standard errors: HC3.\\par\n"
              "}\n"
              "\\end{table}\n");
}

// A row starting with '[' or '*' right after \\ or \midrule would be read as
// their optional argument (LaTeX2e: \\[len] and \\*; booktabs: \midrule[wd];
// from memory), so it is shielded with {}.
TEST(TableToLatex, LeadingBracketOrStarIsShielded) {
    ExportTable t;
    t.columns = {"[lo, hi]", "x"};
    t.rows = {{{"[0.1, 0.2]", ""}, {"[a]", ""}}, {{"*", ""}, {"1", ""}}};
    const std::string tex = table_to_latex(t);
    EXPECT_TRUE(contains(tex, "\\toprule\n{}[lo, hi] & x \\\\\n")) << tex;
    EXPECT_TRUE(contains(tex, "\\midrule\n{}[0.1, 0.2] & [a] \\\\\n")) << tex;
    EXPECT_TRUE(contains(tex, "\\\\\n{}* & 1 \\\\\n")) << tex;
}

// The awkward table compiles (pdflatex with inputenc utf8 and T1 fonts).
TEST(TableToLatex, CompilesWithPdflatex) {
    const std::string pdflatex = run_command("command -v pdflatex");
    if (pdflatex.empty()) GTEST_SKIP() << "pdflatex is not installed";
    TempDir dir("table-export");
    ExportTable t = awkward_table();
    t.rows[0][0].text = "[0.1, 0.2]";
    const std::string doc =
        "\\documentclass{article}\n\\usepackage[utf8]{inputenc}\n\\usepackage[T1]{fontenc}\n"
        "\\usepackage{booktabs}\n\\begin{document}\n" +
        table_to_latex(t) + "\\end{document}\n";
    dir.write("t.tex", doc);
    const std::string log = run_command("cd " + shell_quote(dir.path()) +
                                        " && pdflatex -interaction=nonstopmode -halt-on-error t.tex 2>&1");
    EXPECT_TRUE(fs::exists(dir.path() / "t.pdf")) << log;
}

// ---------------------------------------------------------------- HTML

// The five characters HTML escapes in text and attributes (HTML Living
// Standard, "Serializing HTML fragments", plus &#39; for the apostrophe:
// common practice).
TEST(HtmlEscape, FiveCharacters) {
    EXPECT_EQ(html_escape("& < > \" '"), "&amp; &lt; &gt; &quot; &#39;");
    EXPECT_EQ(html_escape("plain \u2212 text"), "plain \u2212 text");
    EXPECT_EQ(html_escape("&amp;"), "&amp;amp;");
}

TEST(TableToHtml, ScriptInAColumnNameIsText) {
    ExportTable t;
    t.title = "x";
    t.columns = {"<script>alert(1)</script>"};
    t.rows = {{{"<script>", ""}}};
    t.notes = {"<script>bad()</script>"};
    const std::string html = table_to_html(t);
    EXPECT_TRUE(contains(html, "&lt;script&gt;alert(1)&lt;/script&gt;")) << html;
    EXPECT_FALSE(contains(html, "<script")) << html;
}

// Our layout: table class, caption, thead/tbody, right-aligned numeric
// columns whose cells do not wrap (a browser would otherwise break "< 0.001"
// or "−0.5" over two lines in a narrow column; checked in Chromium by
// tests/browser/memo_layout.py), a break opportunity after a product's "×".
TEST(TableToHtml, Layout) {
    ExportTable t;
    t.title = "Slopes";
    t.columns = {"Group", "Slope"};
    t.numeric = {false, true};
    t.rows = {{{"A", ""}, {"\u22120.5", "-0.5"}}, {{"dose\u00D7moisture", ""}, {"< 0.001", "0.0004"}}};
    t.notes = {"Note."};
    EXPECT_EQ(table_to_html(t),
              "<table class=\"moderato-table\">\n"
              "<caption>Slopes</caption>\n"
              "<thead>\n"
              "<tr><th scope=\"col\">Group</th><th scope=\"col\" style=\"text-align:right\">Slope</th></tr>\n"
              "</thead>\n"
              "<tbody>\n"
              "<tr><td>A</td><td style=\"text-align:right;white-space:nowrap\">\u22120.5</td></tr>\n"
              "<tr><td>dose\u00D7<wbr>moisture</td><td style=\"text-align:right;white-space:nowrap\">&lt; "
              "0.001</td></tr>\n"
              "</tbody>\n"
              "</table>\n"
              "<p class=\"table-note\">Note.</p>\n");
}

// Python's html.parser reads the fragment as balanced tags with no script,
// and every caption, header cell, cell and note as the original text.
TEST(TableToHtml, WellFormedInPythonHtmlParser) {
    if (!have_python()) GTEST_SKIP() << "/usr/bin/python3 is not installed";
    TempDir dir("table-export");
    ExportTable t = awkward_table();
    t.columns[3] = "<script>alert(1)</script>";
    t.rows[1][0].text = "dose\u00D7moisture";  // a <wbr> after the "×": no text of its own
    const fs::path file = dir.write("t.html", table_to_html(t));
    const json got = run_html_reader(dir, "cat " + shell_quote(file));
    EXPECT_EQ(got["errors"], json::array());

    std::vector<std::array<std::string, 3>> expected;
    expected.push_back({"caption", t.title, ""});
    const std::string right = "text-align:right", number = "text-align:right;white-space:nowrap";
    for (std::size_t c = 0; c < t.columns.size(); ++c)
        expected.push_back({"th", t.columns[c], t.numeric[c] ? right : ""});
    for (const auto& row : t.rows)
        for (std::size_t c = 0; c < row.size(); ++c)
            expected.push_back({"td", row[c].text, t.numeric[c] ? number : ""});
    for (const std::string& note : t.notes) expected.push_back({"p", note, ""});
    const auto& items = got["items"];
    ASSERT_EQ(items.size(), expected.size()) << got.dump(1);
    for (std::size_t i = 0; i < expected.size(); ++i) {
        EXPECT_EQ(items[i][0], expected[i][0]) << "item " << i;
        EXPECT_EQ(items[i][1], expected[i][1]) << "item " << i;
        EXPECT_EQ(items[i][2], expected[i][2]) << "item " << i;
    }
}

// ---------------------------------------------------------------- file names

// Portable file names: POSIX portable filename characters are letters, digits,
// '.', '_' and '-' (POSIX.1 "Portable Filename Character Set", from memory);
// we keep lower-case letters, digits and '-'. Windows reserves CON, PRN, AUX,
// NUL, COM1-9 and LPT1-9 with any extension (Microsoft "Naming Files, Paths,
// and Namespaces", from memory).
TEST(FileSlug, Cases) {
    EXPECT_EQ(file_slug("discount \u00D7 loyalty: Lines plot"), "discount-loyalty-lines-plot");
    EXPECT_EQ(file_slug("  Hello   World  "), "hello-world");
    EXPECT_EQ(file_slug("R\u00B2 by group"), "r-by-group");
    EXPECT_EQ(file_slug("../../etc/passwd"), "etc-passwd");
    EXPECT_EQ(file_slug("a/b\\c:d*e?f\"g<h>i|j"), "a-b-c-d-e-f-g-h-i-j");
    EXPECT_EQ(file_slug("x--y__z"), "x-y-z");
    EXPECT_EQ(file_slug(""), "table");
    EXPECT_EQ(file_slug("\u00D7\u00D7 -- !!"), "table");
    EXPECT_EQ(file_slug("CON"), "con-table");
    EXPECT_EQ(file_slug("nul"), "nul-table");
    EXPECT_EQ(file_slug("Com1"), "com1-table");
    EXPECT_EQ(file_slug("console"), "console");
    EXPECT_EQ(file_slug(std::string(100, 'a')), std::string(60, 'a'));
    // Cut at 60 right after a separator: no '-' left at the end.
    EXPECT_EQ(file_slug(std::string(59, 'a') + " bcd"), std::string(59, 'a'));
    EXPECT_EQ(file_slug(std::string(58, 'a') + " bcd"), std::string(58, 'a') + "-b");
}

// Any bytes at all give a name of the promised shape (fixed seed).
TEST(FileSlug, AnyBytesGiveAPortableName) {
    std::mt19937 rng(20240531);
    std::uniform_int_distribution<int> byte(0, 255), length(0, 120);
    const std::regex shape("[a-z0-9]+(-[a-z0-9]+)*");
    for (int trial = 0; trial < 2000; ++trial) {
        std::string label(static_cast<std::size_t>(length(rng)), '\0');
        for (char& c : label) c = static_cast<char>(byte(rng));
        const std::string slug = file_slug(label);
        EXPECT_TRUE(std::regex_match(slug, shape)) << slug;
        EXPECT_LE(slug.size(), 60u);
    }
}

// ---------------------------------------------------------------------------
// The tables of an analysis on the sample projects.

namespace {

const ExportTable& table_of(const std::vector<NamedTable>& tables, const std::string& key) {
    for (const auto& t : tables)
        if (t.key == key) return t.table;
    ADD_FAILURE() << "no table " << key;
    static const ExportTable none;
    return none;
}

// A number as the tables write it (U+2212 minus) read back as a double.
double read_display(std::string text) {
    for (std::size_t at; (at = text.find("\xE2\x88\x92")) != std::string::npos;) text.replace(at, 3, "-");
    return std::stod(text);
}

// `text` is `value` correctly rounded: within half a unit in its last digit.
void expect_rounded(const std::string& text, double value) {
    const auto dot = text.find('.');
    const int decimals = dot == std::string::npos ? 0 : static_cast<int>(text.size() - dot - 1);
    EXPECT_NEAR(read_display(text), value, 0.5 * std::pow(10.0, -decimals) * (1 + 1e-9)) << text;
}

}  // namespace

TEST(AnalysisTables, EffectsAtChosenValuesInTheHouseOrderMatchTheClosedForm) {
    const SampleRun s = run_sample("orchard-nitrogen");
    const auto tables = analysis_tables(s.analysis, s.run);
    const ExportTable& t = table_of(tables, "conditional-effects");
    // Our own heading and the house order: moderator value, effect, interval, SE, test value, p, note.
    EXPECT_EQ(t.title, "Effect of nitrogen_kg_ha on yield_t_ha at chosen values of soil_moisture_pct");
    EXPECT_EQ(t.columns, (std::vector<std::string>{"soil_moisture_pct", "Effect", "95% CI low", "95% CI high", "SE",
                                                   "t", "p", "Note"}));
    ASSERT_EQ(t.rows.size(), 3u);  // mean − 1 SD, mean, mean + 1 SD
    // Closed form for a two-way product: effect b1 + b3 m, variance V11 + 2 m V13 + m² V33, interval effect ± t SE
    // with t the 97.5% quantile of t(df) (Boost.Math), p = 2 P(T > |effect / SE|).
    const FitResult& f = s.run.fit;
    const int i1 = f.index_of("nitrogen_kg_ha"), i3 = f.index_of("nitrogen_kg_ha×soil_moisture_pct");
    ASSERT_GE(i1, 0);
    ASSERT_GE(i3, 0);
    const auto& V = f.covariance;
    const boost::math::students_t dist(f.df_inference);
    const double q = boost::math::quantile(dist, 0.975);
    for (const auto& row : t.rows) {
        ASSERT_EQ(row.size(), t.columns.size());
        const double m = std::stod(row[0].exact);
        const double effect = f.beta(i1) + f.beta(i3) * m;
        const double se = std::sqrt(V(i1, i1) + 2 * m * V(i1, i3) + m * m * V(i3, i3));
        const double p = 2 * boost::math::cdf(boost::math::complement(dist, std::fabs(effect / se)));
        const double expected[] = {effect, effect - q * se, effect + q * se, se, effect / se};
        for (int k = 0; k < 5; ++k) {
            EXPECT_NEAR(std::stod(row[static_cast<std::size_t>(k + 1)].exact), expected[k],
                        1e-9 * (1 + std::fabs(expected[k])));
            expect_rounded(row[static_cast<std::size_t>(k + 1)].text, expected[k]);
        }
        EXPECT_NEAR(std::stod(row[6].exact), p, 1e-9 + 1e-6 * p);
    }
}

TEST(AnalysisTables, GroupsAndCellsKeepTheHouseOrder) {
    // A categorical moderator: one row per group, headed by the group.
    const SampleRun helpdesk = run_sample("helpdesk-staffing");
    const auto helpdeskTables = analysis_tables(helpdesk.analysis, helpdesk.run);
    const ExportTable& e = table_of(helpdeskTables, "conditional-effects");
    EXPECT_EQ(e.title, "Effect of agents_on_shift on resolution_hours in each group of shift");
    EXPECT_EQ(e.columns,
              (std::vector<std::string>{"shift", "Effect", "95% CI low", "95% CI high", "SE", "t", "p", "Note"}));
    // The reference group's effect is the focal coefficient b1 (closed form).
    ASSERT_FALSE(e.rows.empty());
    const int i1 = helpdesk.run.fit.index_of("agents_on_shift");
    ASSERT_GE(i1, 0);
    EXPECT_NEAR(std::stod(e.rows[0][1].exact), helpdesk.run.fit.beta(i1), 1e-12);

    // Two categorical predictors: the contrasts in the same order; the cells list the interval before the SE.
    const SampleRun cells = run_sample("volunteer-onboarding");
    ASSERT_TRUE(cells.run.cells);
    const auto tables = analysis_tables(cells.analysis, cells.run);
    const ExportTable& c = table_of(tables, "cell-contrasts");
    EXPECT_EQ(c.columns,
              (std::vector<std::string>{"Comparison", "Estimate", "95% CI low", "95% CI high", "SE", "t", "p"}));
    const CellTable& ct = *cells.run.cells;
    // Closed form: the difference in differences (mu11 - mu01) - (mu10 - mu00) from the cells' predictions.
    const double did = (ct.at(1, 1).estimate - ct.at(0, 1).estimate) - (ct.at(1, 0).estimate - ct.at(0, 0).estimate);
    ASSERT_FALSE(c.rows.empty());
    const auto& last = c.rows.back();  // the interaction contrast comes last
    EXPECT_NEAR(std::stod(last[1].exact), did, 1e-9 * (1 + std::fabs(did)));
    EXPECT_LT(std::stod(last[2].exact), did);
    EXPECT_GT(std::stod(last[3].exact), did);
    const ExportTable& cellTable = table_of(tables, "cell-table");
    ASSERT_GE(cellTable.columns.size(), 8u);
    EXPECT_EQ(std::vector<std::string>(cellTable.columns.begin() + 4, cellTable.columns.begin() + 8),
              (std::vector<std::string>{"Predicted", "95% CI low", "95% CI high", "SE"}));
}

TEST(AnalysisTables, MemoSentencesCiteTheTableStrings) {
    // The same number reads the same in a sentence and in a table: the memo's effects at chosen values are the
    // table's display strings, character for character (orchard: continuous; helpdesk: groups and crossovers).
    for (const char* name : {"orchard-nitrogen", "helpdesk-staffing"}) {
        SCOPED_TRACE(name);
        const SampleRun s = run_sample(name);
        const auto tables = analysis_tables(s.analysis, s.run);
        const ExportTable& t = table_of(tables, "conditional-effects");
        std::string memo;
        for (const auto& line : memo_findings(s.analysis, s.run)) memo += line + "\n";
        ASSERT_FALSE(t.rows.empty());
        for (const auto& row : t.rows) {
            std::string value = row[0].text;
            const auto dagger = value.find(" \xE2\x80\xA0");  // the table marks rows beyond the data with " †"
            if (dagger != std::string::npos) value.erase(dagger);
            const std::string cited = row[1].text + " (95% CI " + row[2].text + " to " + row[3].text + ") " +
                                      (s.run.kind == ProbeKind::Groups ? "for " : "at ") + t.columns[0] + " = " + value;
            EXPECT_NE(memo.find(cited), std::string::npos) << cited << "\n" << memo;
        }
    }
}

TEST(JsonWriterText, BytesThatAreNotUtf8BecomeReplacementCharacters) {
    // JSON text is UTF-8 (RFC 8259 §8.1): a Latin-1 file name given on the
    // command line ("caf\xE9.csv") must not make the CLI's JSON unreadable. Each
    // byte that does not start a valid sequence becomes U+FFFD (the Unicode
    // replacement character, EF BF BD in UTF-8); valid text is unchanged.
    EXPECT_EQ(moderato::JsonWriter::quote("caf\xE9.csv"), "\"caf\xEF\xBF\xBD.csv\"");
    EXPECT_EQ(moderato::JsonWriter::quote("\xC3\xA9\xFF\x80"), "\"\xC3\xA9\xEF\xBF\xBD\xEF\xBF\xBD\"");
    EXPECT_EQ(moderato::JsonWriter::quote("a\xE2\x82"), "\"a\xEF\xBF\xBD\xEF\xBF\xBD\"");  // cut-off sequence
    const std::string odd = std::string("x\0y", 3) + "\xED\xA0\x80";                       // NUL, a lone surrogate
    const auto parsed = nlohmann::json::parse(moderato::JsonWriter::quote(odd));
    EXPECT_EQ(parsed.get<std::string>(), std::string("x\0y", 3) + "\xEF\xBF\xBD\xEF\xBF\xBD\xEF\xBF\xBD");
}
