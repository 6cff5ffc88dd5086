// Reading a workbook: the sheet chosen by name, its styles and shared
// strings, its cells through the cell table builder (workbook.hpp).
#include "moderato/reading/workbook.hpp"

#include <algorithm>
#include <cctype>

#include "reading/cell_table.hpp"
#include "reading/xlsx_sheet.hpp"

namespace moderato {

namespace {

using namespace xlsx_detail;

WorkbookSheet::Kind public_kind(SheetKind k) {
    switch (k) {
        case SheetKind::Worksheet:
            return WorkbookSheet::Kind::Worksheet;
        case SheetKind::Chartsheet:
            return WorkbookSheet::Kind::Chart;
        case SheetKind::Dialogsheet:
            return WorkbookSheet::Kind::Dialog;
        case SheetKind::Macrosheet:
            return WorkbookSheet::Kind::Macro;
        case SheetKind::Other:
            break;
    }
    return WorkbookSheet::Kind::Other;
}

std::string kind_words(SheetKind k) {
    switch (k) {
        case SheetKind::Worksheet:
            return "worksheet";
        case SheetKind::Chartsheet:
            return "chart sheet";
        case SheetKind::Dialogsheet:
            return "dialog sheet";
        case SheetKind::Macrosheet:
            return "macro sheet";
        case SheetKind::Other:
            break;
    }
    return "sheet of an unknown kind";
}

std::string sheet_list(const WorkbookInfo& info) {
    std::string s;
    for (const SheetEntry& e : info.sheets) {
        if (!s.empty()) s += ", ";
        s += "'" + e.name + "'";
        if (e.kind != SheetKind::Worksheet) s += " (" + kind_words(e.kind) + ")";
        else if (e.hidden) s += " (hidden)";
    }
    return s;
}

bool same_ignoring_case(const std::string& a, const std::string& b) {
    return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) {
               return std::tolower(static_cast<unsigned char>(x)) == std::tolower(static_cast<unsigned char>(y));
           });
}

const SheetEntry& choose_sheet(const Archive& a, const WorkbookInfo& info, const std::string& sheet) {
    const SheetEntry* hit = nullptr;
    if (sheet.empty()) {
        for (const SheetEntry& e : info.sheets)
            if (e.kind == SheetKind::Worksheet && !e.hidden && !hit) hit = &e;
        for (const SheetEntry& e : info.sheets)
            if (e.kind == SheetKind::Worksheet && !hit) hit = &e;
        if (!hit)
            a.fail("holds no worksheet (its sheets are " + sheet_list(info) +
                   "); only worksheets hold tables Moderato can read");
        return *hit;
    }
    for (const SheetEntry& e : info.sheets)
        if (e.name == sheet && !hit) hit = &e;
    for (const SheetEntry& e : info.sheets)
        if (same_ignoring_case(e.name, sheet) && !hit) hit = &e;
    if (!hit) a.fail("has no sheet '" + sheet + "'; its sheets are " + sheet_list(info));
    if (hit->kind != SheetKind::Worksheet)
        a.fail("sheet '" + hit->name + "' is a " + kind_words(hit->kind) +
               ", not a worksheet of cells; choose one of the worksheets: " + sheet_list(info));
    return *hit;
}

// How a sheet is written before "!C7": plain when it is letters, digits and
// '_' only, else quoted with '' for a quote, as spreadsheet formulas do.
std::string sheet_label(const std::string& name) {
    const bool plain = !name.empty() && std::all_of(name.begin(), name.end(), [](char c) {
        return std::isalnum(static_cast<unsigned char>(c)) || c == '_';
    });
    if (plain) return name;
    std::string s = "'";
    for (const char c : name) s += c == '\'' ? std::string("''") : std::string(1, c);
    return s + "'";
}

}  // namespace

std::vector<WorkbookSheet> workbook_sheets(const std::string& path) {
    const Archive a(path, path);
    std::vector<WorkbookSheet> out;
    for (const SheetEntry& e : read_workbook_info(a).sheets) out.push_back({e.name, public_kind(e.kind), e.hidden});
    return out;
}

Table read_workbook(const std::string& path, const std::string& sheet, const CsvOptions& options,
                    const CsvProgress& progress, std::size_t max_rows) {
    const Archive a(path, path);
    const WorkbookInfo info = read_workbook_info(a);
    const SheetEntry& chosen = choose_sheet(a, info, sheet);
    const std::vector<DateStyle> styles = read_date_styles(a, info.styles_part);
    const std::vector<std::string> shared = read_shared_strings(a, info.shared_strings_part);
    SheetContext ctx{&a, chosen.name, sheet_label(chosen.name), chosen.part, &shared, &styles, info.date1904, max_rows};
    const std::string label = ctx.label;
    cell_detail::CellTableBuilder builder(
        path, "sheet '" + chosen.name + "' of " + path, options,
        [label](std::size_t row, std::size_t col) { return label + "!" + cell_name(col, row); });
    read_sheet_cells(ctx, builder, [&](std::size_t done, std::size_t total) {
        if (progress.callback && !progress.callback(done, total)) throw Cancelled{};
    });
    Table t = builder.finish(true);
    t.sheet_rows = true;
    return t;
}

}  // namespace moderato
