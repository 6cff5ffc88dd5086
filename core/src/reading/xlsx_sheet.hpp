// Private: one worksheet's cells (sheetData) into a CellTableBuilder.
#pragma once

#include <string>
#include <vector>

#include "reading/cell_table.hpp"
#include "reading/xlsx_workbook.hpp"

namespace moderato::xlsx_detail {

struct SheetContext {
    const Archive* archive = nullptr;
    std::string sheet;  // its name, for messages
    std::string label;  // how cells are prefixed: "Sheet1" or "'My data'"
    std::string part;
    const std::vector<std::string>* shared = nullptr;
    const std::vector<DateStyle>* styles = nullptr;
    bool date1904 = false;
    std::size_t max_rows = 0;  // stop after this many data rows (0: read all)
};

// Parses the sheet part into `builder` (up to ctx.max_rows data rows);
// progress(done, total) in uncompressed bytes of the part.
void read_sheet_cells(const SheetContext& ctx, cell_detail::CellTableBuilder& builder,
                      const std::function<void(std::size_t, std::size_t)>& progress);

}  // namespace moderato::xlsx_detail
