// Workbooks (.xlsx): files written by openpyxl (tests/data/workbooks, made
// by make_workbooks.py, which records the values it was given in
// expected.json) and workbooks built here part by part with libzip for what
// openpyxl does not write (shared strings with rich text, missing `r`
// attributes, the 1900 leap-day quirk) and for damaged or foreign files.
#include <gtest/gtest.h>
#include <zip.h>

#include <cmath>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <string>

#include "common/file_bytes.hpp"
#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/reading/workbook.hpp"

namespace moderato {
namespace {

using test::input_error_of;
using test::TempDir;

const std::string kDir = std::string(MODERATO_TEST_DATA_DIR) + "/workbooks/";

nlohmann::json expected() {
    std::ifstream in(kDir + "expected.json");
    return nlohmann::json::parse(in);
}

// A zip archive holding `parts` (name -> bytes), written with libzip.
void write_zip(const std::filesystem::path& path, const std::map<std::string, std::string>& parts) {
    int err = 0;
    zip_t* z = zip_open(path.c_str(), ZIP_CREATE | ZIP_TRUNCATE, &err);
    ASSERT_NE(z, nullptr);
    for (const auto& [name, bytes] : parts) {
        zip_source_t* src = zip_source_buffer(z, bytes.data(), bytes.size(), 0);
        ASSERT_GE(zip_file_add(z, name.c_str(), src, ZIP_FL_OVERWRITE), 0);
    }
    ASSERT_EQ(zip_close(z), 0);  // the buffers are read here, while `parts` lives
}

const char* kNs = "http://schemas.openxmlformats.org/spreadsheetml/2006/main";
const char* kRel = "http://schemas.openxmlformats.org/officeDocument/2006/relationships";

// The smallest workbook around the given sheet XML (sheetData contents),
// with optional shared strings, styles and workbookPr.
std::map<std::string, std::string> workbook_parts(const std::string& sheet_data, const std::string& shared = "",
                                                  const std::string& styles = "", const std::string& wb_pr = "") {
    std::map<std::string, std::string> p;
    p["_rels/.rels"] = std::string(
                           "<Relationships xmlns=\"http://schemas.openxmlformats.org/package/2006/"
                           "relationships\"><Relationship Id=\"r1\" Type=\"") +
                       kRel + "/officeDocument\" Target=\"xl/workbook.xml\"/></Relationships>";
    p["xl/workbook.xml"] = std::string("<workbook xmlns=\"") + kNs + "\" xmlns:r=\"" + kRel + "\">" + wb_pr +
                           "<sheets><sheet name=\"S\" sheetId=\"1\" r:id=\"rId1\"/></sheets></workbook>";
    std::string rels = std::string(
                           "<Relationships xmlns=\"http://schemas.openxmlformats.org/package/2006/"
                           "relationships\"><Relationship Id=\"rId1\" Type=\"") +
                       kRel + "/worksheet\" Target=\"worksheets/sheet1.xml\"/>";
    if (!shared.empty()) {
        rels += std::string("<Relationship Id=\"rId2\" Type=\"") + kRel + "/sharedStrings\" Target=\"sst.xml\"/>";
        p["xl/sst.xml"] = std::string("<sst xmlns=\"") + kNs + "\">" + shared + "</sst>";
    }
    if (!styles.empty()) {
        rels += std::string("<Relationship Id=\"rId3\" Type=\"") + kRel + "/styles\" Target=\"styles.xml\"/>";
        p["xl/styles.xml"] = std::string("<styleSheet xmlns=\"") + kNs + "\">" + styles + "</styleSheet>";
    }
    p["xl/_rels/workbook.xml.rels"] = rels + "</Relationships>";
    p["xl/worksheets/sheet1.xml"] =
        std::string("<worksheet xmlns=\"") + kNs + "\"><sheetData>" + sheet_data + "</sheetData></worksheet>";
    return p;
}

double json_number(const nlohmann::json& v) { return v.is_null() ? std::nan("") : v.get<double>(); }

TEST(Workbook, OpenpyxlValuesReadBack) {
    const auto want = expected()["mixed"];
    const Table t = read_workbook(kDir + "mixed.xlsx", "");
    ASSERT_EQ(t.cols(), 6u);
    for (std::size_t j = 0; j < 6; ++j) EXPECT_EQ(t.columns[j].name, want["columns"][j].get<std::string>());
    ASSERT_EQ(t.rows(), want["id"].size());
    for (const char* name : {"id", "x", "flag", "when", "stamp"}) {
        const Column& c = t.at(name);
        ASSERT_EQ(c.kind, ColumnKind::Numeric) << name;
        for (std::size_t i = 0; i < t.rows(); ++i) {
            const double w = json_number(want[name][i]);  // openpyxl 3.0.9 wrote these values
            if (std::isnan(w)) EXPECT_TRUE(c.is_missing(i)) << name << " row " << i;
            else EXPECT_NEAR(c.numbers[i], w, 1e-9 * (1 + std::abs(w))) << name << " row " << i;
        }
    }
    const Column& g = t.at("group");
    ASSERT_EQ(g.kind, ColumnKind::Categorical);
    for (std::size_t i = 0; i < t.rows(); ++i) {
        if (want["group"][i].is_null()) EXPECT_TRUE(g.is_missing(i));  // "NA" text is a missing token
        else EXPECT_EQ(g.levels[static_cast<std::size_t>(g.codes[i])], want["group"][i].get<std::string>());
    }
    EXPECT_TRUE(t.sheet_rows);
    EXPECT_TRUE(t.at("when").dates);  // written as dates by make_workbooks.py
    EXPECT_TRUE(t.at("stamp").dates);
    EXPECT_FALSE(t.at("x").dates);
    EXPECT_EQ(t.row_lines.front(), 2u);  // the header is sheet row 1
    EXPECT_EQ(t.row_location(0), "row 2");
    EXPECT_NE(t.source.find("sheet 'Data'"), std::string::npos);
    const Table head = read_workbook(kDir + "mixed.xlsx", "", {}, {}, 5);  // a preview's first rows
    ASSERT_EQ(head.rows(), 5u);
    EXPECT_EQ(head.at("id").numbers, (std::vector<double>{1, 2, 3, 4, 5}));
}

TEST(Workbook, SheetsListedAndChosenByName) {
    const auto want = expected()["mixed"]["sheets"];
    const auto sheets = workbook_sheets(kDir + "mixed.xlsx");
    ASSERT_EQ(sheets.size(), want.size());
    for (std::size_t i = 0; i < sheets.size(); ++i) EXPECT_EQ(sheets[i].name, want[i].get<std::string>());
    EXPECT_EQ(sheets[2].kind, WorkbookSheet::Kind::Chart);
    EXPECT_TRUE(sheets[3].hidden);
    const Table other = read_workbook(kDir + "mixed.xlsx", "other ROWS");  // names match without case
    ASSERT_EQ(other.rows(), 2u);
    EXPECT_EQ(other.at("b").levels, (std::vector<std::string>{"one", "two"}));
    const std::string unknown = input_error_of([] { read_workbook(kDir + "mixed.xlsx", "Sales"); });
    EXPECT_NE(unknown.find("has no sheet 'Sales'"), std::string::npos) << unknown;
    EXPECT_NE(unknown.find("'Data', 'Other rows', 'Chart1' (chart sheet), 'Hidden' (hidden)"), std::string::npos)
        << unknown;
    const std::string chart = input_error_of([] { read_workbook(kDir + "mixed.xlsx", "Chart1"); });
    EXPECT_NE(chart.find("'Chart1' is a chart sheet"), std::string::npos) << chart;
}

TEST(Workbook, WithoutHeaderNamesAreGenerated) {
    CsvOptions o;
    o.header = false;
    const Table t = read_workbook(kDir + "mixed.xlsx", "Other rows", o);
    ASSERT_EQ(t.rows(), 3u);
    EXPECT_EQ(t.columns[0].name, "V1");
    EXPECT_EQ(t.columns[0].kind, ColumnKind::Categorical);  // "a" is text, as read_csv would see it
    EXPECT_EQ(t.columns[0].levels, (std::vector<std::string>{"a", "1", "2"}));
}

TEST(Workbook, NumberFormatsDecideDates) {
    const auto want = expected()["formats"];
    const Table t = read_workbook(kDir + "formats.xlsx", "");
    for (const auto& [name, value] : want.items()) {
        const Column& c = t.at(name);
        ASSERT_EQ(c.kind, ColumnKind::Numeric) << name;
        // openpyxl 3.0.9 wrote these; dates as days since 1970-01-01 by Python's calendar
        EXPECT_NEAR(c.numbers[0], value.get<double>(), 1e-9) << name;
        EXPECT_NEAR(c.numbers[1], value.get<double>(), 1e-9) << name;
    }
    CsvOptions o;
    o.column_kinds = {{"dmy", ColumnKind::Categorical}, {"clock", ColumnKind::Categorical}};
    const Table cat = read_workbook(kDir + "formats.xlsx", "", o);
    EXPECT_EQ(cat.at("dmy").levels, (std::vector<std::string>{"2023-07-14"}));  // ISO 8601, as documented
    EXPECT_EQ(cat.at("clock").levels, (std::vector<std::string>{"18:00:00"}));  // 0.75 of a day
}

TEST(Workbook, DateSystem1904) {
    const auto want = expected()["epoch1904"]["d"];
    const Table t = read_workbook(kDir + "epoch1904.xlsx", "");
    ASSERT_EQ(t.rows(), want.size());
    for (std::size_t i = 0; i < want.size(); ++i)
        EXPECT_NEAR(t.at("d").numbers[i], want[i].get<double>(), 1e-9);  // openpyxl 3.0.9, 1904 epoch
}

TEST(Workbook, ErrorCellsRefusedUnlessMissingTokens) {
    const std::string path = kDir + "errors.xlsx";
    const std::string plain = input_error_of([&] { read_workbook(path, ""); });
    EXPECT_NE(plain.find("E!A3 holds the error value #N/A"), std::string::npos) << plain;
    EXPECT_EQ(plain.rfind(path + ": ", 0), 0u) << plain;
    CsvOptions o;
    o.missing_tokens.push_back("#N/A");
    const std::string div = input_error_of([&] { read_workbook(path, "", o); });
    EXPECT_NE(div.find("E!B4 holds the error value #DIV/0!"), std::string::npos) << div;
    o.missing_tokens.push_back("#DIV/0!");
    const Table t = read_workbook(path, "", o);
    const auto want = expected()["errors"]["y"];
    for (std::size_t i = 0; i < 3; ++i) {
        if (want[i].is_null()) EXPECT_TRUE(t.at("y").is_missing(i));
        else EXPECT_EQ(t.at("y").numbers[i], want[i].get<double>());
    }
    EXPECT_TRUE(t.at("z").is_missing(2));
}

TEST(Workbook, SharedRichAndInlineStringsWithoutReferences) {
    TempDir dir("xlsx");
    // Shared strings: plain, rich text in two runs, and a phonetic guide that is not text of the cell.
    const std::string sst =
        "<si><t>name</t></si><si><r><rPr><b/></rPr><t>Ri</t></r><r><t xml:space=\"preserve\">ver side</t></r></si>"
        "<si><t>hill</t><rPh sb=\"0\" eb=\"1\"><t>HIDDEN</t></rPh></si><si><t>score</t></si>";
    // Row 1 without `r` on its cells; row 2 skipped; row 3 with its cells' `r`; row 4 without any `r`, its
    // second cell an inline rich string; then row 7 (rows 5 and 6 absent) with a gap in columns.
    const std::string data =
        "<row><c t=\"s\"><v>0</v></c><c t=\"s\"><v>3</v></c></row>"
        "<row r=\"3\"><c r=\"A3\" t=\"s\"><v>1</v></c><c r=\"B3\"><v>2.5</v></c></row>"
        "<row><c t=\"inlineStr\"><is><r><t>fo</t></r><r><t>rest</t></r></is></c><c><v>4</v></c></row>"
        "<row r=\"7\"><c r=\"A7\" t=\"s\"><v>2</v></c><c r=\"B7\" t=\"b\"><v>1</v></c></row>";
    const auto file = dir / "strings.xlsx";
    write_zip(file, workbook_parts(data, sst));
    const Table t = read_workbook(file.string(), "");
    ASSERT_EQ(t.rows(), 3u);
    EXPECT_EQ(t.at("name").levels, (std::vector<std::string>{"River side", "forest", "hill"}));  // written above
    EXPECT_EQ(t.at("score").numbers, (std::vector<double>{2.5, 4, 1}));                          // TRUE is 1
    EXPECT_EQ(t.row_lines, (std::vector<std::size_t>{3, 4, 7}));  // row 4 follows the row 3 before it
}

TEST(Workbook, LeapDayQuirkOf1900) {
    TempDir dir("xlsx");
    const std::string styles = "<cellXfs count=\"2\"><xf numFmtId=\"0\"/><xf numFmtId=\"14\"/></cellXfs>";
    const auto row = [](int r, const std::string& v) {
        return "<row r=\"" + std::to_string(r) + "\"><c r=\"A" + std::to_string(r) + "\" s=\"1\"><v>" + v +
               "</v></c></row>";
    };
    const std::string header = "<row r=\"1\"><c r=\"A1\" t=\"inlineStr\"><is><t>d</t></is></c></row>";
    write_zip(dir / "ok.xlsx", workbook_parts(header + row(2, "1") + row(3, "59") + row(4, "61"), "", styles));
    const Table t = read_workbook((dir / "ok.xlsx").string(), "");
    // Python: date(1900,1,1), date(1900,2,28), date(1900,3,1) minus date(1970,1,1), in days
    EXPECT_EQ(t.at("d").numbers, (std::vector<double>{-25567, -25509, -25508}));
    write_zip(dir / "leap.xlsx", workbook_parts(header + row(2, "60"), "", styles));
    const std::string msg = input_error_of([&] { read_workbook((dir / "leap.xlsx").string(), ""); });
    EXPECT_NE(msg.find("S!A2 holds the date 1900-02-29, which does not exist"), std::string::npos) << msg;
    // 1904 system: serial 0 is 1904-01-01 (Python: -24107 days from 1970-01-01)
    write_zip(dir / "mac.xlsx", workbook_parts(header + row(2, "0"), "", styles, "<workbookPr date1904=\"1\"/>"));
    EXPECT_EQ(read_workbook((dir / "mac.xlsx").string(), "").at("d").numbers[0], -24107);
}

TEST(Workbook, CellProblemsNameTheCell) {
    TempDir dir("xlsx");
    const std::string head = "<row r=\"1\"><c r=\"A1\" t=\"inlineStr\"><is><t>x</t></is></c></row>";
    write_zip(dir / "text.xlsx",
              workbook_parts(head + "<row r=\"2\"><c r=\"A2\"><v>1</v></c></row><row r=\"3\"><c r=\"A3\" "
                                    "t=\"inlineStr\"><is><t>n/a</t></is></c></row>"));
    CsvOptions o;
    o.column_kinds = {{"x", ColumnKind::Numeric}};
    const std::string forced = input_error_of([&] { read_workbook((dir / "text.xlsx").string(), "", o); });
    EXPECT_NE(forced.find("S!A3: 'n/a' is not a number"), std::string::npos) << forced;
    o.column_kinds.clear();
    o.text_as_missing = {"x"};
    const Table t = read_workbook((dir / "text.xlsx").string(), "", o);
    EXPECT_EQ(t.at("x").text_as_missing, 1u);
    EXPECT_EQ(t.at("x").text_examples.front(), (TextCell{3, "n/a"}));
    write_zip(dir / "wide.xlsx", workbook_parts(head + "<row r=\"2\"><c r=\"C2\"><v>1</v></c></row>"));
    const std::string wide = input_error_of([&] { read_workbook((dir / "wide.xlsx").string(), ""); });
    EXPECT_NE(wide.find("S!C2 holds a value, but its column has no name in the header row (S!C1)"), std::string::npos)
        << wide;
    // A formula with its saved value reads as the value; one without a value is refused.
    write_zip(dir / "f.xlsx", workbook_parts(head + "<row r=\"2\"><c r=\"A2\"><f>1+1</f><v>2</v></c></row>"));
    EXPECT_EQ(read_workbook((dir / "f.xlsx").string(), "").at("x").numbers[0], 2.0);
    write_zip(dir / "nof.xlsx", workbook_parts(head + "<row r=\"2\"><c r=\"A2\"><f>1+1</f></c></row>"));
    const std::string formula = input_error_of([&] { read_workbook((dir / "nof.xlsx").string(), ""); });
    EXPECT_NE(formula.find("S!A2 holds a formula without its computed value"), std::string::npos) << formula;
    write_zip(dir / "sst.xlsx", workbook_parts(head + "<row r=\"2\"><c r=\"A2\" t=\"s\"><v>9</v></c></row>"));
    const std::string sst = input_error_of([&] { read_workbook((dir / "sst.xlsx").string(), ""); });
    EXPECT_NE(sst.find("S!A2 refers to shared string '9'"), std::string::npos) << sst;
}

TEST(Workbook, ForeignAndDamagedFilesRefused) {
    TempDir dir("xlsx");
    std::string ole = "\xD0\xCF\x11\xE0\xA1\xB1\x1A\xE1";
    ole.resize(2048, '\0');
    const auto legacy = dir.write("old.xls", ole);
    std::string encrypted = ole;
    for (const char c : std::string("EncryptedPackage")) encrypted += c, encrypted += '\0';
    const auto locked = dir.write("locked.xlsx", encrypted);
    const auto text = dir.write("plain.xlsx", "a,b\n1,2\n");
    const std::string good = test::read_file(kDir + "mixed.xlsx");
    const auto cut = dir.write("cut.xlsx", good.substr(0, good.size() / 2));
    const auto refused = [](const std::filesystem::path& p) { return input_error_of([&] { read_workbook(p, ""); }); };
    EXPECT_NE(refused(legacy).find("legacy binary workbook (.xls"), std::string::npos) << refused(legacy);
    EXPECT_NE(refused(locked).find("encrypted (password-protected) workbook"), std::string::npos);
    EXPECT_NE(refused(text).find("is not a workbook"), std::string::npos) << refused(text);
    EXPECT_NE(refused(cut).find("zip archive is damaged"), std::string::npos) << refused(cut);
    EXPECT_EQ(refused(cut).rfind(cut.string() + ": ", 0), 0u);

    auto bad_xml = workbook_parts("<row r=\"1\"><c r=\"A1\"><v>1</v></row>");
    write_zip(dir / "xml.xlsx", bad_xml);
    const std::string xml = refused(dir / "xml.xlsx");
    EXPECT_NE(xml.find("sheet 'S' (xl/worksheets/sheet1.xml), line 1"), std::string::npos) << xml;
    EXPECT_NE(xml.find("damaged XML"), std::string::npos) << xml;

    auto xlsb = workbook_parts("");
    xlsb["_rels/.rels"] = std::string("<Relationships xmlns=\"x\"><Relationship Id=\"r1\" Type=\"") + kRel +
                          "/officeDocument\" Target=\"xl/workbook.bin\"/></Relationships>";
    write_zip(dir / "bin.xlsb", xlsb);
    EXPECT_NE(refused(dir / "bin.xlsb").find("binary workbook (.xlsb)"), std::string::npos);

    auto macro = workbook_parts("");
    macro["xl/_rels/workbook.xml.rels"] =
        "<Relationships xmlns=\"x\"><Relationship Id=\"rId1\" "
        "Type=\"http://schemas.microsoft.com/office/2006/relationships/xlMacrosheet\" "
        "Target=\"macrosheets/sheet1.xml\"/></Relationships>";
    write_zip(dir / "macro.xlsm", macro);
    EXPECT_NE(refused(dir / "macro.xlsm").find("holds no worksheet"), std::string::npos) << refused(dir / "macro.xlsm");
    EXPECT_NE(input_error_of([&] { read_workbook((dir / "macro.xlsm").string(), "S"); }).find("is a macro sheet"),
              std::string::npos);
}

}  // namespace
}  // namespace moderato
