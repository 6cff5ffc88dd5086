// Builds small in-memory tables for tests without going through a file.
#pragma once

#include <string>
#include <vector>

#include "moderato/reading/table.hpp"

namespace moderato::test {

inline Column numeric_column(const std::string& name, const std::vector<double>& values) {
    Column c;
    c.name = name;
    c.kind = ColumnKind::Numeric;
    c.numbers = values;
    return c;
}

inline Column categorical_column(const std::string& name, const std::vector<std::string>& values) {
    Column c;
    c.name = name;
    c.kind = ColumnKind::Categorical;
    for (const auto& v : values) {
        if (v.empty()) {
            c.codes.push_back(kMissingCode);
            continue;
        }
        std::size_t k = 0;
        while (k < c.levels.size() && c.levels[k] != v) ++k;
        if (k == c.levels.size()) c.levels.push_back(v);
        c.codes.push_back(static_cast<std::int32_t>(k));
    }
    return c;
}

inline Table make_table(std::vector<Column> columns, const std::string& source = "test.csv") {
    Table t;
    t.columns = std::move(columns);
    t.source = source;
    for (std::size_t r = 0; r < t.rows(); ++r) t.row_lines.push_back(r + 2);  // header on line 1
    return t;
}

}  // namespace moderato::test
