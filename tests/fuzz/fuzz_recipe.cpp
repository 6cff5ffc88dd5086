// libFuzzer target: derived-column recipes as a project stores them (the
// input is the "derived_columns" value of a project whose one dataset is a
// small fixed table), read by the project reader and applied to the table.
// Properties (derive.hpp, analysis_run.hpp): each recipe adds one numeric
// column with one value per row, the base columns are unchanged, and a row
// missing in a recipe's source column is missing in the new column.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/recipes.hpp"
#include "moderato/reading/csv.hpp"

namespace {

using namespace moderato;

constexpr const char* kTarget = "fuzz_recipe";

// Numeric with a missing row, with zero and negatives, constant, 0/1, and a
// categorical column with a missing row.
const Table& base_table() {
    static const Table t = read_csv_text(
        "x,z,k,w,g\n1.5,0,3,0,a\nNA,-2,3,1,b\n4,1e300,3,1,\n-7.25,5,3,0,c\n0,2,3,1,a\n", "base.csv", CsvOptions{});
    return t;
}

void check(const Table& base, const Table& out, const std::vector<DerivedRecipe>& recipes) {
    using fuzz::require;
    require(out.columns.size() == base.columns.size() + recipes.size(), kTarget, "not one column per recipe");
    for (std::size_t j = 0; j < base.columns.size(); ++j)
        require(out.columns[j].name == base.columns[j].name && out.columns[j].kind == base.columns[j].kind, kTarget,
                "a base column changed");
    for (std::size_t k = 0; k < recipes.size(); ++k) {
        const Column& c = out.columns[base.columns.size() + k];
        require(c.kind == ColumnKind::Numeric && c.size() == base.rows(), kTarget, "a recipe's column is malformed");
        require(c.name == recipes[k].name, kTarget, "a recipe's column has another name");
        const Column* source = out.find(recipes[k].source);
        require(source != nullptr, kTarget, "a recipe's source column vanished");
        for (std::size_t i = 0; i < base.rows(); ++i)
            if (source->is_missing(i)) require(std::isnan(c.numbers[i]), kTarget, "missing did not stay missing");
    }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text =
        R"({"schema_version": 2, "datasets": [{"id": "d", "path": "base.csv"}], "derived_columns": )" +
        std::string(reinterpret_cast<const char*>(data), size) + "}";
    fuzz::run_guarded(kTarget, [&] {
        const Project p = project_from_json(text, "fuzz.moderato");
        const std::vector<DerivedRecipe> recipes = p.recipes_for("d");
        const Table out = apply_recipes(base_table(), recipes);
        check(base_table(), out, recipes);
    });
    return 0;
}
