// The workbook part and its relationships: the sheets, the date system, where
// the shared strings and styles are.
#include "reading/xlsx_workbook.hpp"

#include <map>

namespace moderato::xlsx_detail {

namespace {

struct Relationship {
    std::string type, target;
};

bool ends_with(const std::string& s, std::string_view tail) {
    return s.size() >= tail.size() && s.compare(s.size() - tail.size(), tail.size(), tail) == 0;
}

// The relationships part of `part` ("xl/workbook.xml" -> "xl/_rels/workbook.xml.rels").
std::string rels_of(const std::string& part) {
    const auto slash = part.rfind('/');
    if (slash == std::string::npos) return "_rels/" + part + ".rels";
    return part.substr(0, slash + 1) + "_rels/" + part.substr(slash + 1) + ".rels";
}

struct RelsHandler : XmlHandler {
    std::map<std::string, Relationship> rels;
    void start(std::string_view name, const char** atts) override {
        if (name != "Relationship") return;
        const char* id = attribute(atts, "Id");
        const char* type = attribute(atts, "Type");
        const char* target = attribute(atts, "Target");
        const char* mode = attribute(atts, "TargetMode");
        if (!id || !type || !target || (mode && std::string_view(mode) == "External")) return;
        rels[id] = {type, target};
    }
    void end(std::string_view) override {}
};

std::map<std::string, Relationship> read_rels(const Archive& a, const std::string& part) {
    RelsHandler h;
    if (a.has(part)) a.parse(part, "the relationships part", h);
    return std::move(h.rels);
}

struct SheetRef {
    std::string name, rel;
    bool hidden = false;
};

struct WorkbookHandler : XmlHandler {
    std::vector<SheetRef> sheets;
    bool date1904 = false;
    void start(std::string_view name, const char** atts) override {
        if (name == "workbookPr") {
            const char* v = attribute(atts, "date1904");
            date1904 = v && (std::string_view(v) == "1" || std::string_view(v) == "true");
        } else if (name == "sheet") {
            const char* n = attribute(atts, "name");
            const char* id = attribute(atts, "id");  // r:id
            const char* state = attribute(atts, "state");
            sheets.push_back({n ? n : "", id ? id : "", state && std::string_view(state) != "visible"});
        }
    }
    void end(std::string_view) override {}
};

SheetKind kind_of(const std::string& type) {
    if (ends_with(type, "/worksheet")) return SheetKind::Worksheet;
    if (ends_with(type, "/chartsheet")) return SheetKind::Chartsheet;
    if (ends_with(type, "/dialogsheet")) return SheetKind::Dialogsheet;
    if (ends_with(type, "Macrosheet")) return SheetKind::Macrosheet;  // xlMacrosheet, xlIntlMacrosheet
    return SheetKind::Other;
}

std::string find_workbook_part(const Archive& a) {
    for (const auto& [id, rel] : read_rels(a, "_rels/.rels"))
        if (ends_with(rel.type, "/officeDocument")) return resolve_target("", rel.target);
    if (a.has("xl/workbook.xml")) return "xl/workbook.xml";
    if (a.has("xl/workbook.bin")) return "xl/workbook.bin";
    a.fail("is a zip archive but not a workbook (it has no workbook part); save the data as .xlsx or CSV");
}

}  // namespace

WorkbookInfo read_workbook_info(const Archive& a) {
    WorkbookInfo info;
    info.workbook_part = find_workbook_part(a);
    if (ends_with(info.workbook_part, ".bin"))
        a.fail(
            "is a binary workbook (.xlsb), which Moderato does not read; save it as .xlsx or CSV in your "
            "spreadsheet program and read that file");
    if (info.workbook_part.rfind("xl/", 0) != 0 && !ends_with(info.workbook_part, "workbook.xml"))
        a.fail("is a zip archive but not a workbook (its main part is " + info.workbook_part +
               "); save the data as .xlsx or CSV");
    WorkbookHandler wb;
    a.parse(info.workbook_part, "the workbook part", wb);
    info.date1904 = wb.date1904;
    const auto rels = read_rels(a, rels_of(info.workbook_part));
    for (const auto& [id, rel] : rels) {
        if (ends_with(rel.type, "/sharedStrings"))
            info.shared_strings_part = resolve_target(info.workbook_part, rel.target);
        if (ends_with(rel.type, "/styles")) info.styles_part = resolve_target(info.workbook_part, rel.target);
    }
    for (const SheetRef& s : wb.sheets) {
        const auto it = rels.find(s.rel);
        if (it == rels.end())
            a.fail("the workbook lists sheet '" + s.name + "' but not where it is (relationship '" + s.rel +
                   "' is missing); the workbook is damaged");
        info.sheets.push_back(
            {s.name, resolve_target(info.workbook_part, it->second.target), kind_of(it->second.type), s.hidden});
    }
    if (info.sheets.empty()) a.fail("the workbook has no sheets; the workbook is damaged");
    return info;
}

std::string cell_name(std::size_t col, std::size_t row) {
    std::string letters;
    for (std::size_t c = col + 1; c > 0; c = (c - 1) / 26) letters.insert(letters.begin(), char('A' + (c - 1) % 26));
    return letters + std::to_string(row);
}

}  // namespace moderato::xlsx_detail
