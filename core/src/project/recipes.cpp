// Derived columns of a dataset: its recipes applied in order to the base table.
#include "moderato/project/recipes.hpp"

#include "moderato/reading/derive.hpp"
#include "moderato/reading/retype.hpp"
#include "moderato/support/error.hpp"

namespace moderato {

namespace {

std::string quoted(const std::string& s) { return "'" + s + "'"; }

Column compute_recipe(const Table& t, const DerivedRecipe& r) {
    const std::string what =
        "derived column " + quoted(r.name) + " (" + to_string(r.kind) + " of " + quoted(r.source) + ")";
    const Column* x = t.find(r.source);
    if (!x) throw InputError(what + ": the column " + quoted(r.source) + " is not in " + t.source);
    try {
        if (r.kind == RecipeKind::CentreMean) return centre(*x, CentreAt::Mean, 0.0, r.name);
        if (r.kind == RecipeKind::CentreMedian) return centre(*x, CentreAt::Median, 0.0, r.name);
        if (r.kind == RecipeKind::CentreValue) return centre(*x, CentreAt::Value, r.value, r.name);
        if (r.kind == RecipeKind::Standardise) return standardise(*x, r.name);
        if (r.kind == RecipeKind::Log) return log_column(*x, t, r.name);
        if (r.kind == RecipeKind::Log1p) return log1p_column(*x, t, r.name);
        if (r.kind == RecipeKind::Square) return square(*x, r.name);
        if (r.kind == RecipeKind::Dummy) return dummy(*x, r.level, r.name);
        if (r.kind == RecipeKind::Product) {
            const Column* y = t.find(r.other);
            if (!y) throw InputError("the column " + quoted(r.other) + " is not in " + t.source);
            return product(*x, *y, r.name);
        }
    } catch (const InputError& e) {
        throw InputError(what + ": " + e.what());
    }
    throw InputError(what + ": unknown kind of derived column");
}

}  // namespace

Table apply_recipes(const Table& base, const std::vector<DerivedRecipe>& recipes) {
    Table t = base;
    for (const auto& r : recipes) {
        if (t.find(r.name))
            throw InputError("derived column " + quoted(r.name) + ": " + t.source +
                             " already has a column of that name; choose another name");
        t.columns.push_back(compute_recipe(t, r));
    }
    return t;
}

std::shared_ptr<const Table> with_recipes(std::shared_ptr<const Table> base,
                                          const std::vector<DerivedRecipe>& recipes) {
    if (recipes.empty() || !base) return base;
    return std::make_shared<const Table>(apply_recipes(*base, recipes));
}

std::shared_ptr<const Table> dataset_table(std::shared_ptr<const Table> read, const DataSource& source,
                                           const std::vector<DerivedRecipe>& recipes) {
    if (!read || source.retyped.empty()) return with_recipes(std::move(read), recipes);
    auto retyped = std::make_shared<const Table>(retype_columns(*read, source.retyped, source.import.decimal_comma));
    return with_recipes(std::move(retyped), recipes);
}

}  // namespace moderato
