// The steps of build_design that a streamed fit takes one chunk of rows at a
// time (private to core). build_design runs them over the whole table; a
// streamed fit decides the layout from facts gathered over every chunk
// (complete rows, levels held, constant columns) and then fills the rows of
// each chunk with the same fill_rows, so both paths make the same numbers.
#pragma once

#include <Eigen/Dense>
#include <cstddef>
#include <map>
#include <string>
#include <utility>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::detail {

// Categorical column -> its levels among the used rows (reference first) and
// the level index of each of its codes (-1: a level no used row holds).
using LevelMap = std::map<std::string, std::pair<std::vector<std::string>, std::vector<int>>>;
// Categorical column -> for each of its codes, whether a used row holds it.
using LevelsPresent = std::map<std::string, std::vector<char>>;

// The outcome column, after the checks of the outcome's name and the level.
const Column& outcome_column(const Table& table, const ModelSpec& spec);

// 1. Terms, with the lower-order terms of every product, sorted by degree.
//    `added_notes` says which lower-order terms were added. Needs only the
//    columns' names and kinds.
std::vector<DesignTerm> model_terms(const Table& table, const ModelSpec& spec, std::vector<std::string>& added_notes);

// The model's columns: the outcome, every factor of the terms, then the
// weights and cluster columns (each once), with the checks of their kinds.
std::vector<std::string> used_columns(const Table& table, const ModelSpec& spec, const Column& outcome,
                                      const std::vector<DesignTerm>& terms);

// 2. Listwise deletion over the table's rows: appends the complete rows and
//    adds each used column's missing cells to missing_per (sized on first use).
void count_complete(const Table& table, const std::vector<std::string>& used, std::vector<std::size_t>& missing_per,
                    std::vector<std::size_t>& rows);
// The exclusions into `d`; InputError when no row is complete (`table` names the file).
void record_exclusions(const Table& table, const std::vector<std::string>& used,
                       const std::vector<std::size_t>& missing_per, std::size_t table_rows, std::size_t complete,
                       Design& d);

// 3. The levels each categorical factor holds among `rows` (added to `present`).
void mark_levels(const Table& table, const std::vector<DesignTerm>& terms, const std::vector<std::size_t>& rows,
                 LevelsPresent& present);
// The levels used (reference first) into d.categoricals and the level map;
// the check that every reference level given belongs to a categorical model column.
LevelMap categorical_levels(const Table& table, const ModelSpec& spec, const std::vector<DesignTerm>& terms,
                            const LevelsPresent& present, Design& d);
// The design's size against DesignLimits, before anything of that size exists.
void check_design_size(const Table& table, const std::vector<DesignTerm>& terms, const LevelMap& cat_map,
                       bool intercept, std::size_t n);
// 4. Design columns: the intercept, then each term expanded over the
//    non-reference levels of its categorical factors.
void design_columns(const Table& table, const std::vector<DesignTerm>& terms, const LevelMap& cat_map, bool intercept,
                    Design& d);

// 5. The rows `rows` of `table` into X (rows.size() x columns.size(), sized by the caller).
void fill_rows(const Table& table, const LevelMap& cat_map, const std::vector<DesignColumn>& columns,
               const std::vector<std::size_t>& rows, Eigen::MatrixXd& X);
// The weights of `rows` into out (sized by the caller); InputError for one not positive.
void fill_weights(const Table& table, const ModelSpec& spec, const std::vector<std::size_t>& rows,
                  Eigen::VectorXd& out);

// Cluster ids 0..G-1 in order of first appearance, kept across tables (chunks).
struct ClusterCodes {
    std::vector<int> code_id;        // categorical: code -> id (-1: not seen)
    std::map<double, int> num_ids;   // numeric: value -> id
    std::vector<std::string> names;  // id -> name
    // Appends the ids of `rows` to out.
    void code_rows(const Table& table, const std::string& column, const std::vector<std::size_t>& rows,
                   std::vector<int>& out);
};
// At least two clusters among the n used rows.
void check_clusters(const ModelSpec& spec, std::size_t clusters, std::size_t n);

// 6. A constant numeric main effect beside the intercept, and n <= p.
[[noreturn]] void refuse_constant(const std::string& column, double value);
void check_enough_rows(const Table& table, const std::vector<DesignColumn>& columns, std::size_t n);

// What was done, for the reader: added terms, excluded rows, dummy coding.
void add_notes(const std::vector<std::string>& added_notes, std::size_t table_rows, Design& d);

}  // namespace moderato::detail
