// The bad-input corpus: malformed files (tests/data/bad/) and malformed
// specifications, each run through the real moderato-cli process. Every case
// asserts (a) exit code exactly 2, (b) the exact, full, one-line stderr
// message, (c) nothing on stdout, (d) the input file's bytes and modification
// time unchanged and no file added next to it, (e) no crash (the process exits
// normally; under MODERATO_SANITIZE a sanitizer report would change the exit
// code and stderr, so the same assertions catch it).
//
// Source of the expected behaviour: the CLI contract in
// ../shared/design/ARCHITECTURE.md ("exit codes: 0 ok; 2 bad input or usage
// (message on stderr names the problem)") and the house rule that a message
// names the file, line, column or variable and says what to do. Each message
// below was read and judged against that rule.
//
// The CLI runs with tests/data as its working directory and relative paths,
// so the messages (which echo the path given) are stable and readable.
#include <gtest/gtest.h>

#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

#include "cli_runner.hpp"

namespace {

using moderato::test::FileSnapshot;
using moderato::test::run_cli;
using moderato::test::RunOptions;

struct BadCase {
    const char* name;               // test name (ctest lists each separately)
    std::vector<std::string> args;  // moderato-cli arguments, paths relative to tests/data
    const char* input;              // path (relative to tests/data) that must be left untouched; "" for none
    const char* message;            // the whole of stderr, without the final newline
};

// The case name is what gtest prints as the parameter (and ctest shows).
void PrintTo(const BadCase& c, std::ostream* os) { *os << c.name; }

// Files in tests/data/bad/ hold one defect each; ok/ files are well-formed
// inputs that the specification then gets wrong.
const std::vector<BadCase> kCases = {
    // ------------------------------------------------------------ malformed files
    {"ragged_row",
     {"fit", "--data", "bad/ragged_row.csv", "--outcome", "y", "--predictors", "x,z"},
     "bad/ragged_row.csv",
     "moderato-cli: bad/ragged_row.csv: line 3 has 2 fields, expected 3; look for a missing or extra delimiter "
     "(',') on that line, and put quotes around any field that contains one"},
    {"ragged_row_columns",
     {"columns", "--data", "bad/ragged_row.csv"},
     "bad/ragged_row.csv",
     "moderato-cli: bad/ragged_row.csv: line 3 has 2 fields, expected 3; look for a missing or extra delimiter "
     "(',') on that line, and put quotes around any field that contains one"},
    {"unterminated_quote",
     {"fit", "--data", "bad/unterminated_quote.csv", "--outcome", "y", "--predictors", "x"},
     "bad/unterminated_quote.csv",
     R"(moderato-cli: bad/unterminated_quote.csv: line 3, column 3 ('g'): the quoted field that starts here has no closing quote; add the missing '"' (write a '"' inside a quoted field as '""'))"},
    {"quoted_field_followed_by_text",
     {"fit", "--data", "bad/quoted_field_then_text.csv", "--outcome", "y", "--predictors", "x"},
     "bad/quoted_field_then_text.csv",
     R"(moderato-cli: bad/quoted_field_then_text.csv: line 3, column 3 ('g'): text follows the closing quote of a quoted field; write a '"' inside a quoted field as '""', or remove the text after the closing quote)"},
    {"invalid_utf8_in_cell",  // the file holds the Latin-1 byte 0xE9 ("café")
     {"fit", "--data", "bad/invalid_utf8.csv", "--outcome", "y", "--predictors", "x"},
     "bad/invalid_utf8.csv",
     "moderato-cli: bad/invalid_utf8.csv: line 3, column 3 ('g'): invalid UTF-8 (byte 0xE9); save the file as "
     "UTF-8 and read it again"},
    {"invalid_utf8_in_header",
     {"fit", "--data", "bad/invalid_utf8_header.csv", "--outcome", "y", "--predictors", "x"},
     "bad/invalid_utf8_header.csv",
     "moderato-cli: bad/invalid_utf8_header.csv: line 1, column 3: invalid UTF-8 in the column name (byte 0xE9); "
     "save the file as UTF-8 and read it again"},
    {"nul_byte",
     {"fit", "--data", "bad/nul_byte.csv", "--outcome", "y", "--predictors", "x"},
     "bad/nul_byte.csv",
     "moderato-cli: bad/nul_byte.csv: line 3, column 2 ('x'): a NUL byte (0x00), which text files do not "
     "contain; save the data as CSV text (UTF-8) and read it again"},
    {"empty_file",
     {"fit", "--data", "bad/empty.csv", "--outcome", "y", "--predictors", "x"},
     "bad/empty.csv",
     "moderato-cli: bad/empty.csv: the file is empty; expected a header row and data rows"},
    {"header_only",
     {"fit", "--data", "bad/header_only.csv", "--outcome", "y", "--predictors", "x"},
     "bad/header_only.csv",
     "moderato-cli: bad/header_only.csv: the file has a header (line 1) but no data rows; add data rows below the "
     "header"},
    {"duplicate_column_names",
     {"fit", "--data", "bad/duplicate_column_name.csv", "--outcome", "y", "--predictors", "x"},
     "bad/duplicate_column_name.csv",
     "moderato-cli: bad/duplicate_column_name.csv: line 1, column 3: the column name 'x' is also used by column 2; "
     "give each column a different name"},
    {"empty_column_name",
     {"fit", "--data", "bad/empty_column_name.csv", "--outcome", "y", "--predictors", "z"},
     "bad/empty_column_name.csv",
     "moderato-cli: bad/empty_column_name.csv: line 1, column 2: the column name is empty; name every column in "
     "the header row, or read the file without a header"},

    // ------------------------------------------------ data that cannot fit the model
    {"non_numeric_outcome",
     {"fit", "--data", "bad/text_outcome.csv", "--outcome", "y", "--predictors", "x"},
     "bad/text_outcome.csv",
     "moderato-cli: outcome 'y' is not numeric: line 4 of bad/text_outcome.csv holds 'high'; choose a numeric "
     "column or fix that cell"},
    {"numeric_predictor_with_stray_text",  // mostly numbers with one text cell: a slip, not a category
     {"fit", "--data", "bad/numeric_predictor_with_text.csv", "--outcome", "y", "--predictors", "x"},
     "bad/numeric_predictor_with_text.csv",
     "moderato-cli: predictor 'x' is not numeric: line 4 of bad/numeric_predictor_with_text.csv holds "
     "'3..5'; fix that cell, add '3..5' to the missing-value tokens, read 'x' as numbers with its cells of "
     "text missing, or set it to categorical to dummy-code it"},
    {"constant_predictor",
     {"fit", "--data", "bad/constant_predictor.csv", "--outcome", "y", "--predictors", "x,z"},
     "bad/constant_predictor.csv",
     "moderato-cli: predictor 'x' is constant (every used row holds 5); it cannot be estimated alongside the "
     "intercept — drop it or use --no-intercept"},
    {"rows_not_more_than_coefficients",  // 4 rows, 4 coefficients (intercept, x, z, x×z)
     {"fit", "--data", "bad/fewer_rows_than_coefficients.csv", "--outcome", "y", "--interaction", "x,z"},
     "bad/fewer_rows_than_coefficients.csv",
     "moderato-cli: too few rows: bad/fewer_rows_than_coefficients.csv has 4 complete rows for 4 "
     "coefficients (intercept, x, z, x×z); the model needs more rows than coefficients — add rows or drop "
     "terms"},
    {"every_row_misses_a_model_column",
     {"fit", "--data", "bad/every_row_missing.csv", "--outcome", "y", "--predictors", "x,z"},
     "bad/every_row_missing.csv",
     "moderato-cli: no complete rows: every row of bad/every_row_missing.csv misses a value of a model column "
     "(y: 1 missing, x: 2 missing, z: 1 missing)"},
    {"weights_zero",
     {"fit", "--data", "bad/weights_zero.csv", "--outcome", "y", "--predictors", "x", "--weights", "w"},
     "bad/weights_zero.csv",
     "moderato-cli: weights 'w' must be positive: line 4 of bad/weights_zero.csv holds 0; fix that row or "
     "choose another weights column"},
    {"weights_negative",
     {"fit", "--data", "bad/weights_negative.csv", "--outcome", "y", "--predictors", "x", "--weights", "w"},
     "bad/weights_negative.csv",
     "moderato-cli: weights 'w' must be positive: line 3 of bad/weights_negative.csv holds -0.5; fix that "
     "row or choose another weights column"},
    {"weights_non_numeric",
     {"fit", "--data", "bad/weights_text.csv", "--outcome", "y", "--predictors", "x", "--weights", "w"},
     "bad/weights_text.csv",
     "moderato-cli: weights 'w' is not numeric: line 3 of bad/weights_text.csv holds 'heavy'; choose a "
     "numeric weights column or fix that cell"},
    {"single_cluster",
     {"fit", "--data", "bad/single_cluster.csv", "--outcome", "y", "--predictors", "x", "--cluster", "site"},
     "bad/single_cluster.csv",
     "moderato-cli: cluster column 'site' has a single cluster among the 5 used rows; cluster-robust standard "
     "errors need at least 2 clusters (30 or more to be reliable)"},
    {"logistic_outcome_not_0_1",
     {"fit", "--data", "bad/logistic_outcome_not_binary.csv", "--outcome", "y", "--predictors", "x", "--family",
      "logistic"},
     "bad/logistic_outcome_not_binary.csv",
     "moderato-cli: logistic outcome 'y' must be 0 or 1: line 4 of bad/logistic_outcome_not_binary.csv holds 2"},
    {"log_of_zero",
     {"fit", "--data", "bad/log_of_zero.csv", "--outcome", "y", "--predictors", "x", "--log", "x"},
     "bad/log_of_zero.csv",
     "moderato-cli: column 'x' has the value 0 at line 2 of bad/log_of_zero.csv, but log needs values above 0; "
     "use log1p for data with zeros, or add a constant first"},
    {"log_of_categorical",
     {"fit", "--data", "ok/categorical.csv", "--outcome", "y", "--predictors", "x", "--log", "g"},
     "ok/categorical.csv",
     "moderato-cli: column 'g' is categorical; log needs a numeric column (dummy-code it, or choose another "
     "column)"},
    {"numeric_forced_on_text_column",
     {"fit", "--data", "ok/categorical.csv", "--outcome", "y", "--predictors", "x,g", "--numeric", "g"},
     "ok/categorical.csv",
     "moderato-cli: ok/categorical.csv: line 2, column 3 ('g'): 'b' is not a number, but the column is set to "
     "numeric; correct the cell, add 'b' to the missing tokens, or read the column as categorical"},

    // ------------------------------------------------------ unknown columns by role
    {"unknown_outcome_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "yy", "--predictors", "x"},
     "ok/exact_interaction.csv",
     "moderato-cli: outcome column 'yy' not found in ok/exact_interaction.csv; columns are: y, x, z"},
    {"unknown_predictor_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x,q"},
     "ok/exact_interaction.csv",
     "moderato-cli: predictor column 'q' not found in ok/exact_interaction.csv; columns are: y, x, z"},
    {"unknown_interaction_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,q"},
     "ok/exact_interaction.csv",
     "moderato-cli: interaction column 'q' not found in ok/exact_interaction.csv; columns are: y, x, z"},
    {"unknown_weights_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--weights", "wt"},
     "ok/exact_interaction.csv",
     "moderato-cli: weights column 'wt' not found in ok/exact_interaction.csv; columns are: y, x, z"},
    {"unknown_cluster_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--cluster", "site"},
     "ok/exact_interaction.csv",
     "moderato-cli: cluster column 'site' not found in ok/exact_interaction.csv; columns are: y, x, z"},
    {"numeric_option_names_unknown_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--numeric", "q"},
     "ok/exact_interaction.csv",
     "moderato-cli: ok/exact_interaction.csv: column 'q' has a type override but is not a column of this "
     "file; columns are: y, x, z"},

#ifdef MODERATO_RENDER_TESTS  // `render` exists only with the workbench's drawing code
    // ---------------------------------------------- malformed project files (render)
    // Each names the file, the place (line and column, or the JSON path) and
    // what was expected; the render output folder is never made.
    {"project_number_overflow",
     {"render", "bad/project_number_overflow.moderato", "--out", "bad/never"},
     "bad/project_number_overflow.moderato",
     "moderato-cli: bad/project_number_overflow.moderato: line 8, column 30 (at analyses[0].probe.pinned[1]): the "
     "number 1e999 is too large to hold (a number must lie within about ±1.8e308); the file was not changed"},
    {"project_deep_nesting",
     {"render", "bad/project_deep_nesting.moderato", "--out", "bad/never"},
     "bad/project_deep_nesting.moderato",
     "moderato-cli: bad/project_deep_nesting.moderato: line 8, column 81: lists and objects nest more than 64 levels "
     "deep here, so it is not a Moderato project (which nests a few levels); the file was not changed"},
    {"project_missing_token_number",
     {"render", "bad/project_missing_token_number.moderato", "--out", "bad/never"},
     "bad/project_missing_token_number.moderato",
     "moderato-cli: bad/project_missing_token_number.moderato: datasets[0].import.missing_tokens[1]: expected text"},
    {"project_nul_in_font",
     {"render", "bad/project_nul_in_font.moderato", "--out", "bad/never"},
     "bad/project_nul_in_font.moderato",
     "moderato-cli: bad/project_nul_in_font.moderato: analyses[0].figure.font_family: contains a NUL character "
     "(\\u0000), which no name or setting may hold"},
    {"project_dpi_huge",
     {"render", "bad/project_dpi_huge.moderato", "--out", "bad/never"},
     "bad/project_dpi_huge.moderato",
     "moderato-cli: bad/project_dpi_huge.moderato: analyses[0].figure.dpi: must lie between 72 and 1200"},
    {"project_recipe_value_text",
     {"render", "bad/project_recipe_value_text.moderato", "--out", "bad/never"},
     "bad/project_recipe_value_text.moderato",
     "moderato-cli: bad/project_recipe_value_text.moderato: derived_columns[0].value: expected a number"},
    {"project_notes_not_text",
     {"render", "bad/project_notes_not_text.moderato", "--out", "bad/never"},
     "bad/project_notes_not_text.moderato",
     "moderato-cli: bad/project_notes_not_text.moderato: analyses[0].memo_notes: expected text"},
#endif

    // ------------------------------------------------------ malformed specifications
    {"unknown_se_kind",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--se", "hc5"},
     "ok/exact_interaction.csv",
     "moderato-cli: unknown standard-error kind 'hc5'; use classical, hc0, hc1, hc2, hc3, hc4 or cluster"},
    {"unknown_family",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--family", "ordinal"},
     "ok/exact_interaction.csv",
     "moderato-cli: unknown family 'ordinal'; use linear, logistic, probit, poisson or negative-binomial"},
    {"level_above_one",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--level", "1.5"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --level must be between 0 and 1 (e.g. 0.95), got '1.5'"},
    {"level_zero",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--level", "0"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --level must be between 0 and 1 (e.g. 0.95), got '0'"},
    {"level_one",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--level", "1"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --level must be between 0 and 1 (e.g. 0.95), got '1'"},
    {"level_as_percent",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--level", "95"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --level must be between 0 and 1 (e.g. 0.95), got '95'"},
    {"level_not_a_number",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--level", "abc"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --level needs a number, got 'abc'"},
    {"hc3_with_cluster",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--se", "hc3", "--cluster",
      "z"},
     "ok/exact_interaction.csv",
     "moderato-cli: --se hc3 and --cluster z ask for two kinds of standard error; choose one"},
    {"se_cluster_without_cluster_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--se", "cluster"},
     "ok/exact_interaction.csv",
     "moderato-cli: cluster-robust standard errors need a cluster column; name one with --cluster"},
    {"hc3_for_logistic",
     {"fit", "--data", "ok/logistic_small.csv", "--outcome", "y", "--predictors", "x", "--family", "logistic", "--se",
      "hc3"},
     "ok/logistic_small.csv",
     "moderato-cli: hc3 is not offered for logistic models; use classical (model-based), hc0 or hc1 (sandwich), "
     "or cluster"},
    {"interaction_of_one_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x"},
     "ok/exact_interaction.csv",
     "moderato-cli: an interaction needs 2 or 3 columns, got 1 (x); a single column is a main effect: "
     "list it among the predictors"},
    {"interaction_of_four_columns",
     {"fit", "--data", "ok/four_predictors.csv", "--outcome", "y", "--interaction", "a,b,c,d"},
     "ok/four_predictors.csv",
     "moderato-cli: an interaction needs 2 or 3 columns, got 4 (a, b, c, d)"},
    {"outcome_also_predictor",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "y,x"},
     "ok/exact_interaction.csv",
     "moderato-cli: column 'y' is the outcome and cannot also be a predictor"},
    {"outcome_in_interaction",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,y"},
     "ok/exact_interaction.csv",
     "moderato-cli: column 'y' is the outcome and cannot also be a predictor"},
    {"unknown_reference_level",
     {"fit", "--data", "ok/categorical.csv", "--outcome", "y", "--predictors", "x,g", "--reference", "g=d"},
     "ok/categorical.csv",
     "moderato-cli: reference level 'd' not found in column 'g'; levels are: a, b, c"},
    {"reference_level_for_numeric_column",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--reference", "x=1"},
     "ok/exact_interaction.csv",
     "moderato-cli: reference level given for 'x', which is numeric; declare it categorical to dummy-code it"},
    {"poly_degree_zero",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--poly", "x=0"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --poly needs a whole number from 1 to 12, got '0'"},
    {"poly_degree_beyond_int",  // must not wrap around to a small degree
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--poly", "x=4294967298"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --poly needs a whole number from 1 to 12, got '4294967298'"},
    {"categorical_raised_to_power",
     {"fit", "--data", "ok/categorical.csv", "--outcome", "y", "--poly", "g=2"},
     "ok/categorical.csv",
     "moderato-cli: categorical column 'g' cannot be raised to a power"},
    {"test_term_not_in_model",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z", "--test", "x*w"},
     "ok/exact_interaction.csv",
     "moderato-cli: term 'x×w' is not in the model; terms are: intercept, x, z, x×z"},
    {"test_aliased_term",
     {"fit", "--data", "ok/collinear.csv", "--outcome", "y", "--predictors", "x,z,z2", "--test", "z2"},
     "ok/collinear.csv",
     "moderato-cli: term 'z2' is aliased (not estimable) and cannot be tested"},
    {"no_predictors",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y"},
     "ok/exact_interaction.csv",
     "moderato-cli: no predictors: give --predictors, --interaction or --poly"},
    {"empty_name_in_list",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x,,z"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --predictors has an empty name in 'x,,z'"},
    {"decimal_comma_on_comma_separated_file",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--decimal-comma"},
     "ok/exact_interaction.csv",
     "moderato-cli: ok/exact_interaction.csv: the file looks comma-separated, but with decimal commas the "
     "delimiter cannot be ','; read it without the decimal-comma option, or save it with ';' or tab as "
     "the delimiter"},

    // --------------------------------------------------------------- usage errors
    {"unknown_option",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--bogus"},
     "ok/exact_interaction.csv",
     "moderato-cli: unknown option --bogus; see moderato-cli --help"},
    {"option_missing_its_value",
     {"fit", "--data", "ok/exact_interaction.csv", "--predictors", "x", "--outcome"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --outcome needs a value"},
    {"flag_given_a_value",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--no-intercept=1"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --no-intercept takes no value"},
    {"unexpected_positional_argument",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "extra"},
     "ok/exact_interaction.csv",
     "moderato-cli: unexpected argument 'extra'"},
    {"unknown_format",
     {"fit", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--predictors", "x", "--format", "xml"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --format must be json or text, got 'xml'"},
    {"data_option_absent",
     {"fit", "--outcome", "y", "--predictors", "x"},
     "",
     "moderato-cli: option --data is required"},
    {"outcome_option_absent",
     {"fit", "--data", "ok/exact_interaction.csv", "--predictors", "x"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --outcome is required"},
    {"unknown_subcommand",
     {"frobnicate", "--data", "ok/exact_interaction.csv"},
     "ok/exact_interaction.csv",
     "moderato-cli: unknown command 'frobnicate'; commands are fit, probe, power, columns and render (see --help)"},
    {"no_command",
     {},
     "",
     "moderato-cli: no command given; commands are fit, probe, power, columns and render (see --help)"},

    // ------------------------------------------- old spellings name the new word
    {"old_command_describe",
     {"describe", "--data", "ok/exact_interaction.csv"},
     "ok/exact_interaction.csv",
     "moderato-cli: the command 'describe' is now called 'columns' (moderato-cli columns --data FILE); see --help"},
    {"old_option_at",
     {"probe", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z", "--focal", "x",
      "--moderator", "z", "--at", "1,2"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --at is now called --moderator-values (probe: --moderator-values v1,v2,...); see "
     "moderato-cli --help"},
    {"old_option_at_percentiles",
     {"probe", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z", "--focal", "x",
      "--moderator", "z", "--at-percentiles=10,90"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --at-percentiles is now called --moderator-percentiles (probe: "
     "--moderator-percentiles 10,50,90); see moderato-cli --help"},
    {"old_scale_link",
     {"probe", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z", "--focal", "x",
      "--moderator", "z", "--scale", "link"},
     "ok/exact_interaction.csv",
     "moderato-cli: --scale link is now called --scale model (the scale the coefficients live on, e.g. "
     "log-odds)"},
    {"old_scale_response",
     {"probe", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z", "--focal", "x",
      "--moderator", "z", "--scale", "response"},
     "ok/exact_interaction.csv",
     "moderato-cli: --scale response is now called --scale outcome (the outcome's own scale, e.g. probability)"},
    {"unknown_scale",
     {"probe", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z", "--focal", "x",
      "--moderator", "z", "--scale", "probability"},
     "ok/exact_interaction.csv",
     "moderato-cli: option --scale must be model or outcome, got 'probability'"},
    {"missing_data_file",
     {"fit", "--data", "bad/no_such_file.csv", "--outcome", "y", "--predictors", "x"},
     "bad/no_such_file.csv",  // must still not exist afterwards
     "moderato-cli: bad/no_such_file.csv: file not found; check the path and the file name"},
    {"directory_as_data",
     {"fit", "--data", "bad", "--outcome", "y", "--predictors", "x"},
     "bad",
     "moderato-cli: bad: is a folder, not a file; choose a CSV or TSV file"},
};

class BadInput : public ::testing::TestWithParam<BadCase> {};

TEST_P(BadInput, Rejects) {
    const BadCase& c = GetParam();
    SCOPED_TRACE(std::string("case ") + c.name);
    const std::filesystem::path data_dir = MODERATO_TEST_DATA_DIR;
    const std::string input = *c.input ? (data_dir / c.input).string() : std::string();
    // The directory holding the input (or tests/data): no file may appear in it.
    const std::string parent = *c.input ? (data_dir / c.input).parent_path().string() : data_dir.string();

    const FileSnapshot input_before = input.empty() ? FileSnapshot{} : FileSnapshot::take(input);
    const FileSnapshot parent_before = FileSnapshot::take(parent);

    RunOptions options;
    options.cwd = data_dir.string();
    const auto r = run_cli(c.args, options);

    // (e) no crash: the process ended by exit(), not by a signal or our timeout.
    ASSERT_TRUE(r.exited) << r.describe();
    // (a) exit code exactly 2 (bad input or usage).
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    // (b) the exact, whole stderr: one line.
    EXPECT_EQ(r.err, std::string(c.message) + "\n");
    // (c) nothing on stdout.
    EXPECT_EQ(r.out, "");
    // (d) the input is unchanged (bytes and mtime; a missing file stays missing),
    // and no file was added beside it.
    if (!input.empty()) {
        EXPECT_TRUE(FileSnapshot::take(input) == input_before) << input << " changed";
    }
    EXPECT_EQ(FileSnapshot::take(parent).entries, parent_before.entries)
        << "files appeared in or vanished from " << parent;
}

// gtest names the cases Corpus/BadInput.Rejects/0, /1, ...; PrintTo gives
// each its name, and gtest_discover_tests turns that into the ctest name
// Corpus/BadInput.Rejects/<name> (so `ctest -R ragged_row` finds one case).
INSTANTIATE_TEST_SUITE_P(Corpus, BadInput, ::testing::ValuesIn(kCases));

// The corpus itself: the files really hold the defect their name says (a
// re-save by an editor could silently "repair" them), and there are enough.
TEST(BadInputCorpus, FilesHoldTheirDefects) {
    const std::filesystem::path bad = std::filesystem::path(MODERATO_TEST_DATA_DIR) / "bad";
    EXPECT_EQ(FileSnapshot::take((bad / "empty.csv").string()).bytes, "");
    const std::string latin1 = FileSnapshot::take((bad / "invalid_utf8.csv").string()).bytes;
    EXPECT_NE(latin1.find("caf\xE9\n"), std::string::npos) << "invalid_utf8.csv must hold the raw byte 0xE9";
    const std::string header = FileSnapshot::take((bad / "invalid_utf8_header.csv").string()).bytes;
    EXPECT_EQ(header.rfind("y,x,caf\xE9\n", 0), 0u) << "invalid_utf8_header.csv must hold the raw byte 0xE9";
    const std::string nul = FileSnapshot::take((bad / "nul_byte.csv").string()).bytes;
    EXPECT_NE(nul.find(std::string("3,\0"
                                   "4\n",
                                   4)),
              std::string::npos)
        << "nul_byte.csv must hold a NUL byte";
    EXPECT_FALSE(std::filesystem::exists(bad / "no_such_file.csv"));
    EXPECT_GE(kCases.size(), 30u);
}

}  // namespace
