// `moderato-cli render PROJECT --out DIR [--accept-changed-data]` as a
// process: every sample project (copied to a temporary folder first, so the
// repository is never written) renders its figures, tables and memo; each
// file is checked against the standard of its format by a reader that is
// not ours (the PNG chunk layout by hand from the spec, Python's expat and
// html.parser, poppler's pdfinfo/pdfimages, cmark-gfm), renders repeat byte
// for byte, changed data stops the render, bad usage exits 2 and every
// user-supplied name is escaped in every format.
//
// Compiled only when the workbench is built (the render command draws with
// its widgets): tests/CMakeLists.txt defines MODERATO_RENDER_TESTS then.
#ifdef MODERATO_RENDER_TESTS

#include <gtest/gtest.h>
#include <stdlib.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "cli_runner.hpp"
#include "common/file_bytes.hpp"
#include "common/sample_projects.hpp"
#include "common/temp_dir.hpp"

namespace {

namespace fs = std::filesystem;
using moderato::test::copy_sample;
using moderato::test::FileSnapshot;
using moderato::test::read_file;
using moderato::test::run_cli;
using moderato::test::run_process;
using moderato::test::RunResult;
using moderato::test::TempDir;
using moderato::test::write_file;
using nlohmann::json;

const char* const kPython = "/usr/bin/python3";

bool contains(const std::string& hay, const std::string& needle) { return hay.find(needle) != std::string::npos; }

std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

RunResult render(const fs::path& project, const fs::path& out, bool accept = false) {
    std::vector<std::string> args{"render", project.string(), "--out", out.string()};
    if (accept) args.push_back("--accept-changed-data");
    return run_cli(args);
}

// Every regular file under `root`: relative path -> bytes.
std::map<std::string, std::string> tree(const fs::path& root) {
    std::map<std::string, std::string> out;
    if (!fs::exists(root)) return out;
    for (const auto& e : fs::recursive_directory_iterator(root))
        if (e.is_regular_file()) out[fs::relative(e.path(), root).generic_string()] = read_file(e.path());
    return out;
}

std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream in(text);
    std::string line;
    while (std::getline(in, line)) out.push_back(line);
    return out;
}

// ------------------------------------------------------------------ PNG
// PNG spec (ISO/IEC 15948:2004): the 8-byte signature; chunks of a 4-byte
// big-endian length, a 4-byte type, the data and a CRC-32 (ISO 3309, annex D)
// over type and data; IHDR first (width, height as 4-byte big-endian);
// pHYs = pixels per unit in x, in y, unit specifier (1 = the metre); IEND last.

std::uint32_t be32(const std::string& b, std::size_t at) {
    return (std::uint32_t(static_cast<unsigned char>(b[at])) << 24) |
           (std::uint32_t(static_cast<unsigned char>(b[at + 1])) << 16) |
           (std::uint32_t(static_cast<unsigned char>(b[at + 2])) << 8) |
           std::uint32_t(static_cast<unsigned char>(b[at + 3]));
}

std::uint32_t crc32(const char* data, std::size_t n) {
    std::uint32_t c = 0xFFFFFFFFu;
    for (std::size_t i = 0; i < n; ++i) {
        c ^= static_cast<unsigned char>(data[i]);
        for (int k = 0; k < 8; ++k) c = (c & 1) ? 0xEDB88320u ^ (c >> 1) : c >> 1;
    }
    return c ^ 0xFFFFFFFFu;
}

struct PngInfo {
    std::string error;  // empty: the chunk structure is sound
    std::uint32_t width = 0, height = 0;
    bool phys = false;
    std::uint32_t ppu_x = 0, ppu_y = 0;
    int unit = -1;
};

PngInfo read_png(const std::string& b) {
    PngInfo p;
    static const char sig[8] = {'\x89', 'P', 'N', 'G', '\r', '\n', '\x1a', '\n'};
    if (b.size() < 8 || std::memcmp(b.data(), sig, 8) != 0) {
        p.error = "no PNG signature";
        return p;
    }
    std::size_t at = 8;
    bool first = true, iend = false;
    while (at + 12 <= b.size()) {
        const std::uint32_t len = be32(b, at);
        const std::string type = b.substr(at + 4, 4);
        if (at + 12 + len > b.size()) {
            p.error = "chunk " + type + " runs past the end";
            return p;
        }
        if (crc32(b.data() + at + 4, len + 4) != be32(b, at + 8 + len)) {
            p.error = "bad CRC in chunk " + type;
            return p;
        }
        const std::size_t data = at + 8;
        if (first && type != "IHDR") {
            p.error = "first chunk is " + type + ", not IHDR";
            return p;
        }
        if (type == "IHDR") {
            p.width = be32(b, data);
            p.height = be32(b, data + 4);
        } else if (type == "pHYs" && len == 9) {
            p.phys = true;
            p.ppu_x = be32(b, data);
            p.ppu_y = be32(b, data + 4);
            p.unit = static_cast<unsigned char>(b[data + 8]);
        } else if (type == "IEND") {
            iend = true;
            at += 12 + len;
            break;
        }
        at += 12 + len;
        first = false;
    }
    if (!iend) p.error = "no IEND chunk";
    else if (at != b.size()) p.error = "bytes after IEND";
    return p;
}

// ------------------------------------------------------------------ PDF
// PDF 1.7 (ISO 32000-1): a page's MediaBox is in default user space units of
// 1/72 inch (section numbers from memory: 14.11.2 page boundaries, 8.3.2.3 user space).

struct PdfInfo {
    bool ok = false;
    int pages = -1;
    double width_pt = -1, height_pt = -1;
    std::string text;  // what pdfinfo said
};

PdfInfo pdf_info(const fs::path& file) {
    PdfInfo info;
    if (fs::exists("/usr/bin/pdfinfo")) {
        const RunResult r = run_process("/usr/bin/pdfinfo", {file.string()});
        info.text = r.out + r.err;
        info.ok = r.exited && r.exit_code == 0;
        std::smatch m;
        static const std::regex pages(R"(Pages:\s+(\d+))");
        static const std::regex size(R"(Page size:\s+([\d.]+) x ([\d.]+) pts)");
        if (std::regex_search(r.out, m, pages)) info.pages = std::stoi(m[1]);
        if (std::regex_search(r.out, m, size)) {
            info.width_pt = std::stod(m[1]);
            info.height_pt = std::stod(m[2]);
        }
        return info;
    }
    // No poppler: read the first /MediaBox and count the page objects.
    const std::string b = read_file(file);
    info.text = "(pdfinfo absent: parsed the bytes)";
    info.ok = b.rfind("%PDF-", 0) == 0 && contains(b, "%%EOF");
    std::smatch m;
    static const std::regex box(R"(/MediaBox\s*\[\s*([-\d.]+)\s+([-\d.]+)\s+([-\d.]+)\s+([-\d.]+)\s*\])");
    if (std::regex_search(b, m, box)) {
        info.width_pt = std::stod(m[3]) - std::stod(m[1]);
        info.height_pt = std::stod(m[4]) - std::stod(m[2]);
    }
    static const std::regex page(R"(/Type\s*/Page[^s])");
    info.pages =
        static_cast<int>(std::distance(std::sregex_iterator(b.begin(), b.end(), page), std::sregex_iterator()));
    return info;
}

// The raster images in a PDF: the rows of type "image" that `pdfimages -list`
// prints (poppler); without poppler, the image XObjects in the bytes.
int pdf_raster_images(const fs::path& file) {
    if (fs::exists("/usr/bin/pdfimages")) {
        const RunResult r = run_process("/usr/bin/pdfimages", {"-list", file.string()});
        EXPECT_TRUE(r.exited && r.exit_code == 0) << r.describe();
        int n = 0;
        bool body = false;
        for (const auto& line : lines_of(r.out)) {
            if (line.rfind("----", 0) == 0) {
                body = true;
                continue;
            }
            if (!body) continue;
            std::istringstream cols(line);
            std::string page, num, type;
            if (cols >> page >> num >> type && type == "image") ++n;
        }
        return n;
    }
    const std::string b = read_file(file);
    static const std::regex image(R"(/Subtype\s*/Image)");
    return static_cast<int>(std::distance(std::sregex_iterator(b.begin(), b.end(), image), std::sregex_iterator()));
}

// ------------------------------------------------------------------ CSV
// RFC 4180 section 2: records end in CRLF; fields separated by commas; a
// field with comma, quote, CR or LF is enclosed in double quotes, an inner
// quote doubled; unquoted fields hold no quote, CR or LF. Returns the records
// or sets `error`.
std::vector<std::vector<std::string>> parse_rfc4180(const std::string& s, std::string& error) {
    std::vector<std::vector<std::string>> records;
    std::vector<std::string> record;
    std::size_t i = 0;
    if (s.empty()) {
        error = "empty file";
        return records;
    }
    while (i < s.size()) {
        std::string field;
        if (s[i] == '"') {
            ++i;
            for (;;) {
                if (i >= s.size()) {
                    error = "unterminated quoted field";
                    return records;
                }
                if (s[i] == '"') {
                    if (i + 1 < s.size() && s[i + 1] == '"') {
                        field += '"';
                        i += 2;
                        continue;
                    }
                    ++i;
                    break;
                }
                field += s[i++];
            }
        } else {
            while (i < s.size() && s[i] != ',' && s[i] != '\r' && s[i] != '\n') {
                if (s[i] == '"') {
                    error = "quote inside an unquoted field at byte " + std::to_string(i);
                    return records;
                }
                field += s[i++];
            }
        }
        record.push_back(field);
        if (i < s.size() && s[i] == ',') {
            ++i;
            continue;
        }
        if (s.compare(i, 2, "\r\n") == 0) {
            i += 2;
            records.push_back(std::move(record));
            record.clear();
            continue;
        }
        error = "a record does not end in CRLF near byte " + std::to_string(i);
        return records;
    }
    if (!record.empty()) error = "the last record has no CRLF";
    return records;
}

// A cell a spreadsheet would take for a formula (OWASP "CSV Injection":
// leading =, +, -, @, tab or carriage return), unless it is a plain number.
bool formula_like(const std::string& cell) {
    if (cell.empty()) return false;
    const char c = cell[0];
    if (c == '=' || c == '@' || c == '\t' || c == '\r') return true;
    if (c == '+' || c == '-') {
        static const std::regex number(R"([+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?)");
        return !std::regex_match(cell, number);
    }
    return false;
}

// ------------------------------------------------------------------ Python readers
// Python's xml.etree (expat) reads each SVG; html.parser reads an HTML file
// and lists every attribute that could fetch something, the tags, the text
// (entities decoded) and the SHA-256 of each embedded data: image.

const char* const kSvgScript = R"PY(
import sys, json, xml.etree.ElementTree as ET
out = []
for path in sys.argv[1:]:
    try:
        root = ET.parse(path).getroot()
    except Exception as e:
        out.append({"path": path, "error": str(e)})
        continue
    local = lambda t: t.rsplit('}', 1)[-1]
    counts = {}
    for e in root.iter():
        counts[local(e.tag)] = counts.get(local(e.tag), 0) + 1
    texts = [''.join(e.itertext()) for e in root.iter() if local(e.tag) == 'text']
    desc = [''.join(e.itertext()) for e in root.iter() if local(e.tag) == 'desc']
    hrefs = [(v or '')[:22] for e in root.iter() for k, v in e.attrib.items() if local(k) == 'href']
    out.append({"path": path, "root": local(root.tag), "width": root.get("width") or "",
                "height": root.get("height") or "", "counts": counts, "texts": texts, "desc": desc,
                "hrefs": hrefs})
print(json.dumps(out))
)PY";

const char* const kHtmlScript = R"PY(
import sys, json, hashlib, base64
from html.parser import HTMLParser
class P(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags, self.refs, self.images, self.text = [], [], [], []
    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for k, v in attrs:
            if k in ('src', 'href', 'srcset', 'xlink:href', 'action', 'data', 'poster', 'background'):
                v = v or ''
                if v.startswith('data:image/png;base64,'):
                    self.images.append(hashlib.sha256(base64.b64decode(v.split(',', 1)[1], validate=True)).hexdigest())
                else:
                    self.refs.append(k + '=' + v[:80])
    def handle_data(self, d):
        self.text.append(d)
p = P()
p.feed(open(sys.argv[1], encoding='utf-8').read())
p.close()
print(json.dumps({"tags": sorted(set(p.tags)), "refs": p.refs, "images": p.images, "text": ''.join(p.text)}))
)PY";

json python_json(const char* script, const std::vector<std::string>& args) {
    std::vector<std::string> a{"-c", script};
    a.insert(a.end(), args.begin(), args.end());
    const RunResult r = run_process(kPython, a);
    EXPECT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    try {
        return json::parse(r.out);
    } catch (const std::exception& e) {
        ADD_FAILURE() << "python printed no JSON: " << e.what() << "\n" << r.describe();
        return json();
    }
}

std::string sha256_of(const fs::path& file) {
    // coreutils' sha256sum (FIPS 180-4), not our own hash.
    const RunResult r = run_process("/usr/bin/sha256sum", {file.string()});
    EXPECT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    return r.out.substr(0, 64);
}

// ------------------------------------------------------------------ the samples

// What each sample should render. The plots follow LOOK.md's vocabulary: the
// Lines and Effect plots for a focal predictor with a moderator, plus the
// Surface plot when both are continuous; the Cells plot (with the cell table
// and its contrasts) for two categorical predictors. Which kind a sample is
// follows from its data: coffee-discount's moderator is 0/1, helpdesk's a
// three-level text column, orchard's and trial's both numeric, volunteer's
// two text columns.
struct SampleCase {
    std::string name;
    std::vector<std::vector<std::string>> figures;  // per analysis, in project order
    std::vector<std::string> tables;                // the same for each analysis
};

const std::vector<std::string> kProbeTables{"estimates", "fit-statistics", "model-comparison", "conditional-effects"};
// A multilevel analysis adds its random part.
const std::vector<std::string> kMultilevelTables{"estimates",           "fit-statistics",      "model-comparison",
                                                 "conditional-effects", "variance-components", "random-slope-tests"};
const std::vector<std::string> kCellTables{"estimates", "fit-statistics", "model-comparison", "cell-table",
                                           "cell-contrasts"};

const std::vector<SampleCase>& samples() {
    static const std::vector<SampleCase> s{
        {"coffee-discount", {{"lines-plot", "effect-plot"}}, kProbeTables},
        {"orchard-nitrogen", {{"lines-plot", "effect-plot", "surface-plot"}}, kProbeTables},
        {"volunteer-onboarding", {{"cells-plot"}}, kCellTables},
        {"helpdesk-staffing", {{"lines-plot", "effect-plot"}}, kProbeTables},
        {"trial-conversion", {{"lines-plot", "effect-plot", "surface-plot"}}, kProbeTables},
        {"turbine-repairs",
         {{"lines-plot", "effect-plot"}, {"lines-plot", "effect-plot", "surface-plot"}},
         kProbeTables},
        {"warehouse-picking", {{"lines-plot", "effect-plot", "surface-plot"}}, kMultilevelTables},
        {"desk-complaints", {{"lines-plot", "effect-plot", "surface-plot"}}, kProbeTables},
    };
    return s;
}

void PrintTo(const SampleCase& c, std::ostream* os) { *os << c.name; }

class RenderSample : public ::testing::TestWithParam<SampleCase> {};

// Checks one figure file set (png/svg/pdf) against the analysis's figure
// settings. `rasters`: the raster images the SVG and PDF may hold. Only the
// Surface plot has any: its colour field (a smoothly interpolated colour map)
// and the colour scale's ramp are images by nature, as in any plotting
// library; its axes, text and outlines are vectors like every other plot's.
void check_figure(const fs::path& stem, const json& figure, const json& svg, int rasters = 0) {
    const double w_in = figure.at("width_in").get<double>(), h_in = figure.at("height_in").get<double>();
    const int dpi = figure.at("dpi").get<int>();
    SCOPED_TRACE(stem.string());

    // PNG: closed form, inches × dpi pixels, rounded.
    const PngInfo png = read_png(read_file(stem.string() + ".png"));
    ASSERT_EQ(png.error, "");
    EXPECT_EQ(png.width, static_cast<std::uint32_t>(std::lround(w_in * dpi)));
    EXPECT_EQ(png.height, static_cast<std::uint32_t>(std::lround(h_in * dpi)));
    // pHYs: dots per inch / 0.0254 m per inch, rounded to whole pixels per metre.
    ASSERT_TRUE(png.phys) << "no pHYs chunk";
    EXPECT_EQ(png.unit, 1);
    EXPECT_NEAR(png.ppu_x, dpi / 0.0254, 1.0);
    EXPECT_NEAR(png.ppu_y, dpi / 0.0254, 1.0);

    // SVG: well-formed XML (expat), size in mm = inches × 25.4 (exact by definition of the inch),
    // drawn as vectors, no embedded raster.
    const std::string svgBytes = read_file(stem.string() + ".svg");
    ASSERT_FALSE(svg.contains("error")) << svg.dump();
    EXPECT_EQ(svg.at("root"), "svg");
    const std::string width = svg.at("width"), height = svg.at("height");
    ASSERT_TRUE(width.size() > 2 && width.substr(width.size() - 2) == "mm") << width;
    ASSERT_TRUE(height.size() > 2 && height.substr(height.size() - 2) == "mm") << height;
    EXPECT_NEAR(std::stod(width), w_in * 25.4, 0.05);
    EXPECT_NEAR(std::stod(height), h_in * 25.4, 0.05);
    const json& counts = svg.at("counts");
    EXPECT_GT(counts.value("path", 0) + counts.value("polyline", 0), 10) << counts.dump();
    EXPECT_LE(counts.value("image", 0), rasters) << counts.dump();
    EXPECT_GT(counts.value("text", 0), 5) << "labels drawn as text: " << counts.dump();
    if (rasters == 0) {
        EXPECT_FALSE(contains(svgBytes, "<image")) << "raster in " << stem;
    }
    for (const auto& href : svg.at("hrefs"))  // anything embedded is inside the file
        EXPECT_EQ(href.get<std::string>().rfind("data:image/", 0), 0u) << href;

    // PDF: one page of the figure size in points, vectors only.
    const std::string pdf = read_file(stem.string() + ".pdf");
    EXPECT_EQ(pdf.rfind("%PDF-", 0), 0u);
    const PdfInfo info = pdf_info(stem.string() + ".pdf");
    EXPECT_TRUE(info.ok) << info.text;
    EXPECT_EQ(info.pages, 1) << info.text;
    EXPECT_NEAR(info.width_pt, w_in * 72, 0.5) << info.text;
    EXPECT_NEAR(info.height_pt, h_in * 72, 0.5) << info.text;
    EXPECT_LE(pdf_raster_images(stem.string() + ".pdf"), rasters) << "raster image in " << stem << ".pdf";
}

void check_csv(const fs::path& file) {
    SCOPED_TRACE(file.string());
    std::string error;
    const auto records = parse_rfc4180(read_file(file), error);
    ASSERT_EQ(error, "");
    ASSERT_GE(records.size(), 2u) << "a header and at least one row";
    for (std::size_t r = 0; r < records.size(); ++r) {
        EXPECT_EQ(records[r].size(), records[0].size()) << "record " << r;
        for (const auto& cell : records[r]) EXPECT_FALSE(formula_like(cell)) << "record " << r << ": " << cell;
    }
    const std::string bytes = read_file(file);
    EXPECT_NE(bytes.rfind("\xEF\xBB\xBF", 0), 0u) << "byte-order mark";
}

// memo.html: self-contained (nothing a browser would fetch), figures as
// data: URIs identical to the PNG files beside it.
void check_memo_html(const fs::path& dir, const std::vector<std::string>& figures) {
    const std::string html = read_file(dir / "memo.html");
    for (const char* bad :
         {"http://", "https://", "<link", "<script", "@import", "url(", "<iframe", "<object", "<embed"})
        EXPECT_FALSE(contains(lower(html), bad)) << "memo.html contains " << bad;
    // Every src= (scanned by hand: std::regex recurses per character of a long data: URI).
    const std::string low = lower(html);
    int n = 0;
    for (std::size_t at = low.find("src="); at != std::string::npos; at = low.find("src=", at + 4), ++n)
        EXPECT_EQ(low.compare(at + 4, 6, "\"data:"), 0) << html.substr(at, 60);
    EXPECT_EQ(n, static_cast<int>(figures.size()));

    const json parsed = python_json(kHtmlScript, {(dir / "memo.html").string()});
    EXPECT_TRUE(parsed.at("refs").empty()) << parsed.at("refs").dump();
    std::vector<std::string> expected;
    for (const auto& f : figures) expected.push_back(sha256_of(dir / (f + ".png")));
    EXPECT_EQ(parsed.at("images").get<std::vector<std::string>>(), expected)
        << "the memo embeds the figure files, in order";
}

// memo.md: each image it names is a PNG file beside it.
void check_memo_markdown(const fs::path& dir, const std::vector<std::string>& figures) {
    const std::string md = read_file(dir / "memo.md");
    static const std::regex image(R"(!\[[^\]]*\]\(([^)\s]+)\))");
    std::vector<std::string> named;
    for (auto it = std::sregex_iterator(md.begin(), md.end(), image); it != std::sregex_iterator(); ++it) {
        const std::string target = (*it)[1];
        named.push_back(target);
        EXPECT_EQ(target.find('/'), std::string::npos) << target << " is not beside the memo";
        ASSERT_TRUE(fs::is_regular_file(dir / target)) << target;
        EXPECT_EQ(read_png(read_file(dir / target)).error, "") << target;
    }
    std::vector<std::string> expected;
    for (const auto& f : figures) expected.push_back(f + ".png");
    EXPECT_EQ(named, expected);
}

TEST_P(RenderSample, WritesEveryFileAtItsSettingsAndRepeatsByteForByte) {
    const SampleCase& c = GetParam();
    TempDir tmp{"render"};
    const fs::path project = copy_sample(c.name, tmp.path() / "project");
    const FileSnapshot projectBefore = FileSnapshot::take((tmp.path() / "project").string());
    const json doc = json::parse(read_file(project));
    ASSERT_EQ(doc.at("analyses").size(), c.figures.size());
    const json& figure = doc.at("analyses").at(0).at("figure");
    // The samples all use the memo preset: 6.5 × 4 in at 300 dpi (LOOK.md, "Figures for memos").
    for (const auto& analysis : doc.at("analyses")) ASSERT_EQ(analysis.at("figure"), figure);
    ASSERT_EQ(figure.at("width_in").get<double>(), 6.5);
    ASSERT_EQ(figure.at("height_in").get<double>(), 4.0);
    ASSERT_EQ(figure.at("dpi").get<int>(), 300);
    auto folder_of = [&](std::size_t k) { return doc.at("analyses").at(k).at("id").get<std::string>(); };

    const fs::path outA = tmp.path() / "out-a", outB = tmp.path() / "out b";  // a space in the path, too
    const RunResult a = render(project, outA);
    ASSERT_TRUE(a.exited && a.exit_code == 0) << a.describe();
    EXPECT_EQ(a.err, "") << a.describe();

    // The files: exactly these, each listed on stdout, none empty.
    std::set<std::string> expected;
    for (std::size_t k = 0; k < c.figures.size(); ++k) {
        const std::string folder = folder_of(k);
        for (const auto& f : c.figures[k])
            for (const char* ext : {".png", ".svg", ".pdf"}) expected.insert(folder + "/" + f + ext);
        for (const auto& t : c.tables)
            for (const char* ext : {".csv", ".md", ".tex", ".html"}) expected.insert(folder + "/" + t + ext);
        for (const char* ext : {".html", ".md", ".pdf"}) expected.insert(folder + "/memo" + ext);
    }
    for (const auto& kept : doc.at("figures"))
        for (const char* ext : {".png", ".svg", ".pdf"})
            expected.insert("figures/" + kept.at("id").get<std::string>() + ext);
    const auto filesA = tree(outA);
    std::set<std::string> written;
    for (const auto& [name, bytes] : filesA) {
        written.insert(name);
        EXPECT_FALSE(bytes.empty()) << name;
    }
    EXPECT_EQ(written, expected);
    std::set<std::string> listed;
    for (const auto& line : lines_of(a.out)) listed.insert(fs::relative(line, outA).generic_string());
    EXPECT_EQ(listed, expected) << a.out;

    // Figures, analysis and kept.
    std::vector<std::string> svgs;
    std::vector<fs::path> stems;
    for (std::size_t k = 0; k < c.figures.size(); ++k)
        for (const auto& f : c.figures[k]) stems.push_back(outA / folder_of(k) / f);
    for (const auto& kept : doc.at("figures")) stems.push_back(outA / "figures" / kept.at("id").get<std::string>());
    for (const auto& s : stems) svgs.push_back(s.string() + ".svg");
    const json svgInfo = python_json(kSvgScript, svgs);
    ASSERT_EQ(svgInfo.size(), stems.size());
    for (std::size_t i = 0; i < stems.size(); ++i)
        check_figure(stems[i], figure, svgInfo[i], stems[i].filename() == "surface-plot" ? 2 : 0);
    // A kept Lines plot is the analysis's Lines plot at the same settings: the same bytes.
    for (const auto& kept : doc.at("figures")) {
        if (kept.at("plot") != "lines") continue;
        for (const char* ext : {".png", ".svg", ".pdf"}) {
            EXPECT_TRUE(filesA.at("figures/" + kept.at("id").get<std::string>() + ext) ==
                        filesA.at(kept.at("analysis").get<std::string>() + "/lines-plot" + ext))
                << ext;
        }
    }

    for (std::size_t k = 0; k < c.figures.size(); ++k) {
        SCOPED_TRACE(folder_of(k));
        const std::string folder = folder_of(k);
        // Tables.
        for (const auto& t : c.tables) check_csv(outA / folder / (t + ".csv"));

        // Memo.
        check_memo_html(outA / folder, c.figures[k]);
        check_memo_markdown(outA / folder, c.figures[k]);
        const PdfInfo memoPdf = pdf_info(outA / folder / "memo.pdf");
        EXPECT_TRUE(memoPdf.ok) << memoPdf.text;
        EXPECT_GE(memoPdf.pages, 1);
        // US Letter, 8.5 × 11 in = 612 × 792 pt (PDF 1.7: 1/72 inch units).
        EXPECT_NEAR(memoPdf.width_pt, 612, 0.5) << memoPdf.text;
        EXPECT_NEAR(memoPdf.height_pt, 792, 0.5) << memoPdf.text;
        EXPECT_GE(pdf_raster_images(outA / folder / "memo.pdf"), static_cast<int>(c.figures[k].size()))
            << "the memo PDF shows its figures";
        // The footer names the data file's SHA-256 (as sha256sum computes it) and says it matches the project's.
        const std::string md = read_file(outA / folder / "memo.md");
        const std::string dataFile = doc.at("datasets").at(0).at("path");
        EXPECT_TRUE(contains(md, sha256_of(project.parent_path() / dataFile))) << md;
        EXPECT_TRUE(contains(md, "matches")) << md;
    }

    // Determinism: a second render into another folder gives the same bytes.
    const RunResult b = render(project, outB);
    ASSERT_TRUE(b.exited && b.exit_code == 0) << b.describe();
    const auto filesB = tree(outB);
    ASSERT_EQ(filesA.size(), filesB.size());
    for (const auto& [name, bytes] : filesA) {
        ASSERT_TRUE(filesB.count(name)) << name;
        EXPECT_TRUE(bytes == filesB.at(name)) << name << " differs between two renders";
    }

    // The project folder (project file and data) is as it was.
    EXPECT_TRUE(FileSnapshot::take((tmp.path() / "project").string()) == projectBefore);
    for (const auto& e : fs::directory_iterator(tmp.path() / "project"))
        EXPECT_TRUE(read_file(e.path()) == read_file(moderato::test::sample_file(c.name, e.path().filename().string())))
            << e.path();
}

INSTANTIATE_TEST_SUITE_P(Samples, RenderSample, ::testing::ValuesIn(samples()),
                         [](const ::testing::TestParamInfo<SampleCase>& info) {
                             std::string n = info.param.name;
                             for (char& ch : n)
                                 if (ch == '-') ch = '_';
                             return n;
                         });

// ------------------------------------------------------------------ changed data

// Appends a copy of the last data row: the file's SHA-256 changes.
void append_last_row(const fs::path& csv) {
    std::string bytes = read_file(csv);
    if (!bytes.empty() && bytes.back() == '\n') bytes.pop_back();
    const auto nl = bytes.rfind('\n');
    write_file(csv, read_file(csv) + bytes.substr(nl + 1) + "\n");
}

TEST(RenderChangedData, StopsWithExit2NamingTheFileAndWritesNothing) {
    TempDir tmp{"render"};
    const fs::path project = copy_sample("coffee-discount", tmp.path() / "p");
    const fs::path csv = tmp.path() / "p" / "spend.csv";
    append_last_row(csv);
    const FileSnapshot csvBefore = FileSnapshot::take(csv.string());
    const FileSnapshot projectBefore = FileSnapshot::take(project.string());
    const fs::path out = tmp.path() / "out";

    const RunResult r = render(project, out);
    ASSERT_TRUE(r.exited) << r.describe();
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    EXPECT_TRUE(contains(r.err, "spend.csv")) << r.err;
    EXPECT_TRUE(contains(r.err, "--accept-changed-data")) << r.err;
    EXPECT_EQ(r.out, "");
    EXPECT_TRUE(tree(out).empty()) << "files were written although the render stopped";
    EXPECT_TRUE(FileSnapshot::take(csv.string()) == csvBefore) << "the data file was touched";
    EXPECT_TRUE(FileSnapshot::take(project.string()) == projectBefore) << "the project file was touched";
}

TEST(RenderMovedData, RefusedWithExit2NamingTheRecordedPathAndWhereItLooked) {
    TempDir tmp{"render"};
    const fs::path project = copy_sample("coffee-discount", tmp.path() / "p");
    const fs::path csv = tmp.path() / "p" / "spend.csv";
    fs::rename(csv, tmp.path() / "spend.csv");  // moved out of the project's folder
    const FileSnapshot projectBefore = FileSnapshot::take(project.string());
    const fs::path out = tmp.path() / "out";

    const RunResult r = render(project, out);
    ASSERT_TRUE(r.exited) << r.describe();
    EXPECT_EQ(r.exit_code, 2) << r.describe();               // bad input, not an internal error
    EXPECT_TRUE(contains(r.err, "\"spend.csv\"")) << r.err;  // as the sample project records it
    EXPECT_TRUE(contains(r.err, csv.string())) << r.err;     // where that points
    EXPECT_TRUE(contains(r.err, "'spend'")) << r.err;
    EXPECT_TRUE(tree(out).empty()) << "files were written although the render stopped";
    EXPECT_TRUE(FileSnapshot::take(project.string()) == projectBefore) << "the project file was touched";
}

TEST(RenderChangedData, AcceptedWithAWarningAndTheMemoSaysTheHashDiffers) {
    TempDir tmp{"render"};
    const fs::path project = copy_sample("coffee-discount", tmp.path() / "p");
    const fs::path csv = tmp.path() / "p" / "spend.csv";
    const std::string recorded = json::parse(read_file(project)).at("datasets").at(0).at("sha256");
    ASSERT_EQ(sha256_of(csv), recorded) << "the sample's recorded hash is the file's (sha256sum)";
    append_last_row(csv);
    const std::string now = sha256_of(csv);
    ASSERT_NE(now, recorded);
    const FileSnapshot csvBefore = FileSnapshot::take(csv.string());
    const fs::path out = tmp.path() / "out";

    const RunResult r = render(project, out, true);
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    EXPECT_TRUE(contains(r.err, "warning")) << r.err;
    EXPECT_TRUE(contains(r.err, "spend.csv")) << r.err;
    EXPECT_TRUE(FileSnapshot::take(csv.string()) == csvBefore);
    for (const char* memo : {"memo.md", "memo.html"}) {
        const std::string text = read_file(out / "discount-loyalty" / memo);
        EXPECT_TRUE(contains(text, now)) << memo << ": the SHA-256 of the data as rendered";
        EXPECT_TRUE(contains(text, recorded)) << memo << ": the SHA-256 the project recorded";
        EXPECT_TRUE(contains(text, "differs")) << memo;
        EXPECT_FALSE(contains(text, "matches")) << memo;
    }
    // 901 lines = header + 900 rows; one more row is used now (invented sample, counted with wc -l).
    EXPECT_TRUE(contains(read_file(out / "discount-loyalty" / "memo.md"), "901 of 901")) << "rows used";
}

// A project file holding numbers no double can hold (beyond about 1.8e308,
// IEEE 754; some of those a random mutation of a sample file produces):
// exit 2 naming the file and the number's line, never an internal error.
TEST(RenderHostileProject, NumberTooLargeIsBadInputNamingItsLine) {
    TempDir tmp{"render"};
    const fs::path project = copy_sample("coffee-discount", tmp.path() / "p");
    std::string text = read_file(project);
    const std::string level = "\"level\": 0.95";
    const auto at = text.find(level);
    ASSERT_NE(at, std::string::npos) << "the sample states its confidence level";
    text.replace(at, level.size(), "\"level\": 9999e99999");
    write_file(project, text);
    const int line = 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<long>(at), '\n'));
    const FileSnapshot before = FileSnapshot::take((tmp.path() / "p").string());

    const RunResult r = render(project, tmp.path() / "out");
    ASSERT_TRUE(r.exited) << r.describe();
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    EXPECT_TRUE(contains(r.err, project.filename().string() + ": line " + std::to_string(line) + ",")) << r.err;
    EXPECT_TRUE(contains(r.err, "9999e99999")) << r.err;
    EXPECT_FALSE(contains(r.err, "internal error")) << r.err;
    EXPECT_TRUE(tree(tmp.path() / "out").empty());
    EXPECT_TRUE(FileSnapshot::take((tmp.path() / "p").string()) == before) << "the project folder was touched";
}

// ------------------------------------------------------------------ usage errors

TEST(RenderUsage, BadArgumentsExit2AndWriteNothing) {
    TempDir tmp{"render"};
    const fs::path project = copy_sample("coffee-discount", tmp.path() / "p");
    const FileSnapshot before = FileSnapshot::take((tmp.path() / "p").string());

    const RunResult noOut = run_cli({"render", project.string()});
    EXPECT_TRUE(noOut.exited && noOut.exit_code == 2) << noOut.describe();
    EXPECT_TRUE(contains(noOut.err, "--out")) << noOut.err;

    const RunResult unknown = run_cli({"render", project.string(), "--out", (tmp.path() / "o").string(), "--bogus"});
    EXPECT_TRUE(unknown.exited && unknown.exit_code == 2) << unknown.describe();
    EXPECT_TRUE(contains(unknown.err, "--bogus")) << unknown.err;

    const RunResult noProject = run_cli({"render", "--out", (tmp.path() / "o").string()});
    EXPECT_TRUE(noProject.exited && noProject.exit_code == 2) << noProject.describe();

    const fs::path missing = tmp.path() / "no such folder" / "nothing.moderato";
    const RunResult absent = run_cli({"render", missing.string(), "--out", (tmp.path() / "o").string()});
    EXPECT_TRUE(absent.exited && absent.exit_code == 2) << absent.describe();
    EXPECT_TRUE(contains(absent.err, missing.string())) << absent.err;

    const RunResult outNeedsValue = run_cli({"render", project.string(), "--out"});
    EXPECT_TRUE(outNeedsValue.exited && outNeedsValue.exit_code == 2) << outNeedsValue.describe();

    // A file that is not a project: exit 2 naming it.
    const fs::path notProject = tmp.path() / "p" / "spend.csv";
    const FileSnapshot csvBefore = FileSnapshot::take(notProject.string());
    const RunResult csvAsProject = run_cli({"render", notProject.string(), "--out", (tmp.path() / "o").string()});
    EXPECT_TRUE(csvAsProject.exited && csvAsProject.exit_code == 2) << csvAsProject.describe();
    EXPECT_TRUE(contains(csvAsProject.err, "spend.csv")) << csvAsProject.err;
    EXPECT_TRUE(FileSnapshot::take(notProject.string()) == csvBefore);

    // A project whose data file is gone: exit 2 naming the data file.
    TempDir other{"render"};
    const fs::path orphan = copy_sample("coffee-discount", other.path());
    fs::remove(other.path() / "spend.csv");
    const RunResult noData = run_cli({"render", orphan.string(), "--out", (tmp.path() / "o").string()});
    EXPECT_TRUE(noData.exited && noData.exit_code == 2) << noData.describe();
    EXPECT_TRUE(contains(noData.err, "spend.csv")) << noData.err;

    for (const RunResult* r : {&noOut, &unknown, &noProject, &absent, &outNeedsValue, &csvAsProject, &noData})
        EXPECT_EQ(r->out, "") << r->describe();
    EXPECT_FALSE(fs::exists(tmp.path() / "o")) << "an output folder was made for a failed render";
    EXPECT_TRUE(FileSnapshot::take((tmp.path() / "p").string()) == before);
}

// ------------------------------------------------------------------ escaping

// A column literally named <script>alert(1)</script> and an analysis name with
// & and <b>: every format shows them as text (HTML: entities; Markdown:
// backslash escapes; LaTeX: $<$ in math mode), never as markup.
constexpr const char* kScriptColumn = "<script>alert(1)</script>";
constexpr const char* kAwkwardName = "dose & <b>bold</b> check";

// Writes `dir`/esc.moderato: one analysis (id "escaping", named kAwkwardName)
// of invented data at `dir`/`data_path` whose moderator column is named kScriptColumn.
fs::path write_awkward_project(const fs::path& dir, const std::string& data_path) {
    const char* const kColumn = kScriptColumn;
    const char* const kName = kAwkwardName;
    // Invented data with a known-nonzero product term: y = 1 + 0.5x + 0.3m + 0.2xm + noise.
    std::string csv = std::string("score,dose,") + kColumn + "\n";
    unsigned state = 12345;
    for (int i = 0; i < 60; ++i) {
        state = state * 1103515245u + 12345u;
        const double noise = ((state >> 16) % 1000) / 1000.0 - 0.5;
        const double x = i % 10, m = ((i * 7) % 13) / 2.0;
        char row[96];
        std::snprintf(row, sizeof row, "%.4f,%g,%g\n", 1 + 0.5 * x + 0.3 * m + 0.2 * x * m + noise, x, m);
        csv += row;
    }
    fs::create_directories((dir / data_path).parent_path());
    write_file(dir / data_path, csv);
    const json project = {{"schema_version", 2},
                          {"datasets",
                           {{{"id", "esc"},
                             {"path", data_path},
                             {"sha256", ""},
                             {"import",
                              {{"delimiter", ","},
                               {"header", true},
                               {"missing_tokens", {"", "NA", "NaN", "."}},
                               {"decimal_comma", false},
                               {"column_kinds", json::object()}}}}}},
                          {"derived_columns", json::array()},
                          {"analyses",
                           {{{"id", "escaping"},
                             {"name", kName},
                             {"dataset", "esc"},
                             {"roles",
                              {{"outcome", "score"},
                               {"focal", "dose"},
                               {"moderator", kColumn},
                               {"second_moderator", ""},
                               {"controls", json::array()},
                               {"weights", ""},
                               {"clusters", ""}}},
                             {"family", "linear"},
                             {"standard_errors", "model-based"},
                             {"level", 0.95},
                             {"centring", "none"},
                             {"probe",
                              {{"current", nullptr},
                               {"pinned", json::array()},
                               {"second_value", nullptr},
                               {"scale", "model"},
                               {"averaging", "sample"},
                               {"simultaneous_band", false},
                               {"show_points", true}}},
                             {"figure",
                              {{"preset", "memo"},
                               {"width_in", 6.5},
                               {"height_in", 4.0},
                               {"dpi", 100},
                               {"font_family", "DejaVu Sans"},
                               {"font_pt", 9},
                               {"greyscale", false},
                               {"caption", true}}},
                             {"memo_notes", "Notes with <i>tags</i> & an ampersand"}}}},
                          {"figures", json::array()}};
    write_file(dir / "esc.moderato", project.dump(2));
    return dir / "esc.moderato";
}

class RenderEscaping : public ::testing::Test {
protected:
    static constexpr const char* kColumn = kScriptColumn;
    static constexpr const char* kName = kAwkwardName;

    void SetUp() override {
        const RunResult r = render(write_awkward_project(tmp_.path(), "esc.csv"), tmp_.path() / "out");
        ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
        dir_ = tmp_.path() / "out" / "escaping";
    }

    TempDir tmp_{"render"};
    fs::path dir_;
};

// ------------------------------------------------------------------ data files are never written

// A data file where the render would put a table (<out>/escaping/estimates.csv):
// refused with exit 2 naming it, whether --out names the project's folder
// directly or through a symbolic link; the data's bytes and time unchanged.
TEST(RenderDataFiles, NeverWritesOverADataFileEvenThroughASymbolicLink) {
    TempDir tmp{"render"};
    const fs::path dir = tmp.path() / "p";
    const fs::path project = write_awkward_project(dir, "escaping/estimates.csv");
    const fs::path data = dir / "escaping" / "estimates.csv";
    const FileSnapshot before = FileSnapshot::take(data.string());
    fs::create_directory_symlink(dir, tmp.path() / "link");
    for (const fs::path& out : {dir, tmp.path() / "link"}) {
        const RunResult r = render(project, out);
        EXPECT_TRUE(r.exited && r.exit_code == 2) << out << "\n" << r.describe();
        EXPECT_TRUE(contains(r.err, "estimates.csv")) << r.err;
        EXPECT_TRUE(FileSnapshot::take(data.string()) == before) << "the data file was written through " << out;
    }
}

TEST_F(RenderEscaping, HtmlMemoAndTablesShowTheNamesAsText) {
    const std::string html = read_file(dir_ / "memo.html");
    EXPECT_TRUE(contains(html, "&lt;script&gt;alert(1)&lt;/script&gt;")) << html.substr(0, 3000);
    EXPECT_FALSE(contains(lower(html), "<script"));
    EXPECT_TRUE(contains(html, "dose &amp; &lt;b&gt;bold&lt;/b&gt; check"));
    EXPECT_FALSE(contains(html, "<b>bold"));
    EXPECT_TRUE(contains(html, "&lt;i&gt;tags&lt;/i&gt; &amp; an ampersand"));
    // Python's html.parser: no script or b element; the decoded text reads the names as written.
    const json parsed = python_json(kHtmlScript, {(dir_ / "memo.html").string()});
    const auto tags = parsed.at("tags").get<std::vector<std::string>>();
    for (const char* t : {"script", "b"})
        EXPECT_EQ(std::count(tags.begin(), tags.end(), t), 0) << t << " element in memo.html";
    EXPECT_TRUE(contains(parsed.at("text").get<std::string>(), kColumn));
    EXPECT_TRUE(contains(parsed.at("text").get<std::string>(), kName));
    EXPECT_TRUE(parsed.at("refs").empty()) << parsed.at("refs").dump();

    int tables = 0;
    for (const auto& e : fs::directory_iterator(dir_)) {
        if (e.path().extension() != ".html" || e.path().filename() == "memo.html") continue;
        ++tables;
        const std::string t = read_file(e.path());
        EXPECT_FALSE(contains(lower(t), "<script")) << e.path();
        const json p = python_json(kHtmlScript, {e.path().string()});
        const auto ttags = p.at("tags").get<std::vector<std::string>>();
        EXPECT_EQ(std::count(ttags.begin(), ttags.end(), "script"), 0) << e.path();
    }
    EXPECT_EQ(tables, 4);
    // The estimates and the conditional effects name the moderator.
    for (const char* key : {"estimates.html", "conditional-effects.html"})
        EXPECT_TRUE(contains(read_file(dir_ / key), "&lt;script&gt;alert(1)&lt;/script&gt;")) << key;
}

TEST_F(RenderEscaping, MarkdownEscapesEveryTagAndCmarkRendersItAsText) {
    // markdown_escape's promise: a '<' before a letter, '/', '!' or '?' is
    // preceded by a backslash, so no raw HTML reaches a Markdown reader.
    for (const auto& e : fs::directory_iterator(dir_)) {
        if (e.path().extension() != ".md") continue;
        const std::string md = read_file(e.path());
        for (std::size_t i = md.find('<'); i != std::string::npos; i = md.find('<', i + 1)) {
            const char next = i + 1 < md.size() ? md[i + 1] : ' ';
            if (std::isalpha(static_cast<unsigned char>(next)) || next == '/' || next == '!' || next == '?') {
                EXPECT_TRUE(i > 0 && md[i - 1] == '\\')
                    << e.path() << " raw '<' at byte " << i << ": " << md.substr(i > 20 ? i - 20 : 0, 60);
            }
        }
    }
    // cmark-gfm (GitHub's reference renderer), told to pass raw HTML through,
    // still shows the names as text.
    if (!fs::exists("/usr/bin/cmark-gfm")) GTEST_SKIP() << "cmark-gfm is not installed (Debian package cmark-gfm)";
    for (const char* file : {"memo.md", "estimates.md", "conditional-effects.md"}) {
        const RunResult r = run_process("/usr/bin/cmark-gfm", {"--unsafe", "-e", "table", (dir_ / file).string()});
        ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
        EXPECT_FALSE(contains(lower(r.out), "<script")) << file << "\n" << r.out;
        EXPECT_TRUE(contains(r.out, "&lt;script&gt;alert(1)&lt;/script&gt;")) << file << "\n" << r.out;
        if (std::string(file) == "memo.md") {
            EXPECT_FALSE(contains(r.out, "<b>bold")) << r.out;
            EXPECT_FALSE(contains(r.out, "<i>tags")) << r.out;
            EXPECT_TRUE(contains(r.out, "&lt;b&gt;bold&lt;/b&gt;")) << r.out;
        }
    }
}

TEST_F(RenderEscaping, LatexTablesKeepAngleBracketsInMathMode) {
    // In LaTeX's text mode with the OT1 encoding '<' and '>' print other
    // glyphs (from memory: ¡ and ¿), so they must appear only inside $...$.
    int files = 0;
    for (const auto& e : fs::directory_iterator(dir_)) {
        if (e.path().extension() != ".tex") continue;
        ++files;
        const std::string tex = read_file(e.path());
        EXPECT_FALSE(contains(tex, "<script")) << e.path();
        bool math = false;
        for (std::size_t i = 0; i < tex.size(); ++i) {
            if (tex[i] == '%' && (i == 0 || tex[i - 1] != '\\')) {  // a comment runs to the end of the line
                i = tex.find('\n', i);
                if (i == std::string::npos) break;
                continue;
            }
            if (tex[i] == '$' && (i == 0 || tex[i - 1] != '\\')) math = !math;
            if ((tex[i] == '<' || tex[i] == '>') && !math)
                ADD_FAILURE() << e.path() << ": '" << tex[i]
                              << "' in text mode: " << tex.substr(i > 30 ? i - 30 : 0, 70);
        }
        EXPECT_FALSE(math) << e.path() << ": unbalanced $";
    }
    EXPECT_EQ(files, 4);
    EXPECT_TRUE(contains(read_file(dir_ / "estimates.tex"), "script")) << "the moderator is named";
}

TEST_F(RenderEscaping, SvgFiguresAreWellFormedWithTheNameAsText) {
    std::vector<std::string> svgs;
    for (const char* f : {"lines-plot.svg", "effect-plot.svg", "surface-plot.svg"}) svgs.push_back((dir_ / f).string());
    const json info = python_json(kSvgScript, svgs);
    ASSERT_EQ(info.size(), svgs.size());
    bool named = false;
    for (const auto& s : info) {
        ASSERT_FALSE(s.contains("error")) << s.dump();
        EXPECT_EQ(s.at("counts").value("script", 0), 0) << s.at("path");
        // The caption, as the SVG's description, reads the name as written (entities decoded by expat).
        ASSERT_EQ(s.at("desc").size(), 1u) << s.dump();
        EXPECT_TRUE(contains(s.at("desc")[0].get<std::string>(), kColumn)) << s.at("desc")[0];
        for (const auto& t : s.at("texts"))
            if (contains(t.get<std::string>(), kColumn)) named = true;
    }
    EXPECT_TRUE(named) << "the moderator's name appears as text in some figure";
}

// A figure preset over FigureLimits::max_pixels (40 × 40 in at 1200 DPI is
// 48,000 × 48,000 px, a 9 GB image by closed form: 48,000² × 4 bytes) is bad
// input: exit 2 naming the project file and the JSON path, nothing drawn,
// nothing written.
TEST(RenderFigureLimits, AnOversizedFigurePresetStopsWithExit2NamingTheJsonPath) {
    TempDir tmp{"render"};
    const fs::path project = copy_sample("coffee-discount", tmp.path() / "p");
    json doc = json::parse(read_file(project));
    doc["analyses"][0]["figure"]["width_in"] = 40;
    doc["analyses"][0]["figure"]["height_in"] = 40;
    doc["analyses"][0]["figure"]["dpi"] = 1200;
    write_file(project, doc.dump(2));
    const FileSnapshot projectBefore = FileSnapshot::take(project.string());
    const fs::path out = tmp.path() / "out";

    const RunResult r = render(project, out);
    ASSERT_TRUE(r.exited) << r.describe();
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    EXPECT_TRUE(contains(r.err, project.string())) << r.err;
    // 200,000,000 / 1,600 in² = 125,000 px per in², √ = 353.6, so at most 353 DPI (closed form)
    EXPECT_TRUE(contains(r.err,
                         "analyses[0].figure: 40 × 40 in at 1200 DPI is 48,000 × 48,000 pixels, over the "
                         "limit of 200,000,000 pixels for a figure; at this size the DPI may be at most 353"))
        << r.err;
    EXPECT_EQ(r.out, "");
    EXPECT_TRUE(tree(out).empty()) << "files were written although the render stopped";
    EXPECT_TRUE(FileSnapshot::take(project.string()) == projectBefore) << "the project file was touched";
}

}  // namespace

#endif  // MODERATO_RENDER_TESTS
