// Columnar table: look-ups by name and human-readable row locations.
#include "moderato/reading/table.hpp"

#include <algorithm>

#include "moderato/support/error.hpp"

namespace moderato {

std::size_t Column::missing_count() const {
    if (kind == ColumnKind::Numeric)
        return static_cast<std::size_t>(std::count_if(numbers.begin(), numbers.end(), [](double v) { return v != v; }));
    return static_cast<std::size_t>(std::count_if(codes.begin(), codes.end(), [](std::int32_t c) { return c < 0; }));
}

const Column* Table::find(const std::string& name) const {
    for (const auto& c : columns)
        if (c.name == name) return &c;
    return nullptr;
}

Column* Table::find(const std::string& name) {
    for (auto& c : columns)
        if (c.name == name) return &c;
    return nullptr;
}

const Column& Table::at(const std::string& name) const {
    if (const Column* c = find(name)) return *c;
    std::string message = "column '" + name + "' not found";
    if (!source.empty()) message += " in " + source;
    if (columns.empty()) {
        message += "; the table has no columns";
    } else {
        // Long tables: list the first names only, so the message stays readable.
        constexpr std::size_t kListed = 30;
        message += "; columns are: ";
        const std::size_t shown = std::min(columns.size(), kListed);
        for (std::size_t i = 0; i < shown; ++i) {
            if (i) message += ", ";
            message += columns[i].name;
        }
        if (columns.size() > shown) message += ", ... (" + std::to_string(columns.size() - shown) + " more)";
    }
    throw InputError(message);
}

std::string Table::row_location(std::size_t row) const {
    if (row < row_lines.size()) return line_word() + (" " + std::to_string(row_lines[row]));
    return "row " + std::to_string(row + 1);
}

std::string Table::row_place(std::size_t row) const {
    std::string s = row_location(row);
    if (!source.empty()) s += " of " + source;
    return s;
}

}  // namespace moderato
