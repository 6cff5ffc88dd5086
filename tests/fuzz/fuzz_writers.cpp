// libFuzzer target: the table and memo writers fed hostile strings (column
// and level names, titles, notes, cells: any bytes, NUL and invalid UTF-8
// included). Properties, each from the writer's contract in
// table_export.hpp / memo.hpp:
// - CSV (RFC 4180) re-reads to the header and cells, each through csv_neutralise;
// - html_escape leaves none of < > " ' and unescapes to its input; the HTML
//   table and memo hold exactly as many '<' as with harmless strings of the
//   same shape (no markup comes from the strings);
// - latex_escape leaves no line break and no bare # % & _ { };
// - markdown_escape leaves no line break and no bare '|';
// - JsonWriter::quote is a JSON string (RFC 8259) that reads back as its
//   input, or with U+FFFD where the input is not UTF-8;
// - file_slug is 1-60 characters of [a-z0-9-], with no '-' at either end.
#include <fuzzer/FuzzedDataProvider.h>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "fuzz_common.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/memo.hpp"
#include "moderato/reporting/table_export.hpp"

namespace {

using namespace moderato;
using fuzz::require;

constexpr const char* kTarget = "fuzz_writers";

// RFC 4180 records of `csv` (CRLF after each; quoted fields may hold anything).
std::vector<std::vector<std::string>> read_rfc4180(const std::string& csv) {
    std::vector<std::vector<std::string>> out(1, std::vector<std::string>(1));
    std::size_t i = 0;
    while (i < csv.size()) {
        std::string& cell = out.back().back();
        if (csv[i] == '"' && cell.empty()) {
            for (++i; i < csv.size(); ++i) {
                if (csv[i] != '"') cell += csv[i];
                else if (i + 1 < csv.size() && csv[i + 1] == '"') cell += '"', ++i;
                else break;
            }
            ++i;
        } else if (csv[i] == ',') {
            out.back().emplace_back(), ++i;
        } else if (csv.compare(i, 2, "\r\n") == 0) {
            i += 2;
            if (i < csv.size()) out.emplace_back(1);
        } else {
            cell += csv[i++];
        }
    }
    return out;
}

void check_csv(const ExportTable& t) {
    if (t.columns.empty()) return;  // no header cells: an empty record is all there is to read
    const auto records = read_rfc4180(table_to_csv(t));
    std::vector<std::vector<std::string>> expected(1);
    for (const auto& c : t.columns) expected[0].push_back(csv_neutralise(c));
    for (const auto& row : t.rows) {
        expected.emplace_back();
        for (const auto& cell : row)
            expected.back().push_back(csv_neutralise(cell.exact.empty() ? cell.text : cell.exact));
    }
    require(records == expected, kTarget, "the CSV does not re-read to the cells");
}

std::string html_unescape(const std::string& s) {
    static const std::pair<const char*, char> kEntities[] = {
        {"&amp;", '&'}, {"&lt;", '<'}, {"&gt;", '>'}, {"&quot;", '"'}, {"&#39;", '\''}};
    std::string out;
    for (std::size_t i = 0; i < s.size();) {
        bool found = false;
        for (const auto& [entity, c] : kEntities)
            if (s.compare(i, std::char_traits<char>::length(entity), entity) == 0) {
                out += c, i += std::char_traits<char>::length(entity), found = true;
                break;
            }
        if (!found) out += s[i++];
    }
    return out;
}

bool bare(const std::string& s, std::size_t i) { return i == 0 || s[i - 1] != '\\'; }

void check_string(const std::string& s) {
    const std::string h = html_escape(s);
    require(h.find_first_of("<>\"'") == std::string::npos, kTarget, "html_escape left markup");
    require(html_unescape(h) == s, kTarget, "html_escape does not unescape to its input");
    const std::string l = latex_escape(s);
    require(l.find_first_of("\r\n") == std::string::npos, kTarget, "latex_escape left a line break");
    for (std::size_t i = 0; i < l.size(); ++i)
        if (std::string("#%&_").find(l[i]) != std::string::npos)
            require(!bare(l, i), kTarget, "latex_escape left a bare special character");
    const std::string m = markdown_escape(s);
    require(m.find_first_of("\r\n") == std::string::npos, kTarget, "markdown_escape left a line break");
    for (std::size_t i = 0; i < m.size(); ++i)
        if (m[i] == '|') require(!bare(m, i), kTarget, "markdown_escape left a bare '|'");
    nlohmann::json quoted;
    try {
        quoted = nlohmann::json::parse(JsonWriter::quote(s));
    } catch (const nlohmann::json::exception&) {
        require(false, kTarget, "JsonWriter::quote wrote text that is not JSON");
    }
    if (quoted.get_ref<const std::string&>().find("\xEF\xBF\xBD") == std::string::npos)
        require(quoted == s, kTarget, "JsonWriter::quote does not read back as its input");
    const std::string slug = file_slug(s);
    require(!slug.empty() && slug.size() <= 60 && slug.front() != '-' && slug.back() != '-', kTarget,
            "file_slug is empty, too long or has a '-' at an end");
    for (const char c : slug)
        require((c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '-', kTarget, "file_slug kept a character");
}

// The same text with every character that is not layout (space, tab, line
// break) replaced by 'x': what a harmless string of the same shape looks like.
std::string harmless(const std::string& s) {
    std::string out = s;
    for (char& c : out)
        if (c != ' ' && c != '\t' && c != '\n' && c != '\r') c = 'x';
    return out;
}

template <class F>
void for_each_string(ExportTable& t, F f) {
    f(t.title);
    for (auto& c : t.columns) f(c);
    for (auto& row : t.rows)
        for (auto& cell : row) f(cell.text), f(cell.exact);
    for (auto& n : t.notes) f(n);
}

ExportTable table_from(FuzzedDataProvider& in) {
    ExportTable t;
    const std::size_t columns = in.ConsumeIntegralInRange<std::size_t>(0, 4);
    const std::size_t rows = in.ConsumeIntegralInRange<std::size_t>(0, 4);
    t.title = in.ConsumeRandomLengthString(64);
    for (std::size_t j = 0; j < columns; ++j) {
        t.columns.push_back(in.ConsumeRandomLengthString(32));
        if (in.ConsumeBool()) t.numeric.resize(columns, false), t.numeric[j] = true;
    }
    for (std::size_t i = 0; i < rows; ++i) {
        t.rows.emplace_back();
        for (std::size_t j = 0; j < columns; ++j)
            t.rows.back().push_back({in.ConsumeRandomLengthString(32), in.ConsumeRandomLengthString(16)});
    }
    if (in.ConsumeBool()) t.notes.push_back(in.ConsumeRandomLengthString(64));
    return t;
}

Memo memo_from(FuzzedDataProvider& in, const ExportTable& table) {
    Memo m;
    m.title = in.ConsumeRandomLengthString(32);
    m.subtitle = in.ConsumeRandomLengthString(32);
    m.notes = in.ConsumeRandomLengthString(128);
    m.findings = {in.ConsumeRandomLengthString(32)};
    m.equation_text = in.ConsumeRandomLengthString(32);
    m.fitted_text = in.ConsumeRandomLengthString(32);
    m.tables = {NamedTable{"estimates", table}};
    m.figures = {MemoFigure{in.ConsumeRandomLengthString(16), in.ConsumeRandomLengthString(16), "", 6.5, 4.0}};
    m.cautions = {in.ConsumeRandomLengthString(32)};
    m.footer = {{in.ConsumeRandomLengthString(16), in.ConsumeRandomLengthString(16)}};
    return m;
}

Memo harmless(Memo m) {
    for (std::string* s :
         {&m.title, &m.subtitle, &m.notes, &m.findings[0], &m.equation_text, &m.fitted_text, &m.figures[0].title,
          &m.figures[0].file, &m.cautions[0], &m.footer[0].first, &m.footer[0].second})
        *s = harmless(*s);
    for_each_string(m.tables[0].table, [](std::string& s) { s = harmless(s); });
    return m;
}

// Tags in the text, leaving out the line-break opportunities (<wbr>) the
// writers add after a "×" on purpose: text without "×" has none.
std::size_t count_lt(const std::string& s) {
    std::size_t wbr = 0;
    for (std::size_t at = s.find("<wbr>"); at != std::string::npos; at = s.find("<wbr>", at + 1)) ++wbr;
    return static_cast<std::size_t>(std::count(s.begin(), s.end(), '<')) - wbr;
}

void check_all(FuzzedDataProvider& in) {
    ExportTable t = table_from(in);
    for_each_string(t, [](std::string& s) { check_string(s); });
    check_csv(t);
    ExportTable plain = t;
    for_each_string(plain, [](std::string& s) { s = harmless(s); });
    require(count_lt(table_to_html(t)) == count_lt(table_to_html(plain)), kTarget, "table HTML gained markup");
    (void)table_to_markdown(t);
    (void)table_to_latex(t);
    const Memo m = memo_from(in, t);
    require(count_lt(memo_to_html(m)) == count_lt(memo_to_html(harmless(m))), kTarget, "memo HTML gained markup");
    (void)memo_to_html(m, false);
    (void)memo_to_markdown(m);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    FuzzedDataProvider in(data, size);
    fuzz::run_guarded(kTarget, [&] { check_all(in); });
    return 0;
}
