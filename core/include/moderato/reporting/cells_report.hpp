// A cell table and a surface grid as JSON and as readable text.
#pragma once

#include <string>

#include "moderato/probing/cells.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

void write_cell_table(JsonWriter& w, const CellTable& table);
std::string cell_table_to_text(const CellTable& table);
void write_surface(JsonWriter& w, const SurfaceGrid& grid);

}  // namespace moderato
