// Derived columns: a dataset's recipes (project.hpp, DerivedRecipe) applied
// to its base table.
#pragma once

#include <memory>
#include <vector>

#include "moderato/project/project.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

// The base table with the dataset's recipes applied in order (new columns
// appended). InputError naming the recipe and column when one cannot be
// computed (unknown column, log of a non-positive value, ...).
Table apply_recipes(const Table& base, const std::vector<DerivedRecipe>& recipes);
// The same on a shared table: without recipes the base itself is returned
// (no copy of a possibly large table).
std::shared_ptr<const Table> with_recipes(std::shared_ptr<const Table> base, const std::vector<DerivedRecipe>& recipes);

// The table a dataset's analyses see: the table as read, with the column
// kinds changed after import (DataSource::retyped), then the dataset's
// recipes. Without either, the table as read itself. InputError as above, or
// naming a retyped column the table does not have.
std::shared_ptr<const Table> dataset_table(std::shared_ptr<const Table> read, const DataSource& source,
                                           const std::vector<DerivedRecipe>& recipes);

}  // namespace moderato
