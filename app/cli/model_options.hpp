// The options shared by every subcommand that reads data and specifies a
// model (fit and probe): import settings, roles, family, SE kind.
#pragma once

#include <set>
#include <string>
#include <vector>

#include "arguments.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/data_source.hpp"
#include "moderato/reading/table.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato::cli {

std::set<std::string> import_flags();
std::set<std::string> import_valued();
std::set<std::string> model_flags();
std::set<std::string> model_valued();
std::set<std::string> repeatable_options();

// The import options (--delimiter, --no-header, --missing, --decimal-comma,
// --categorical, --numeric, --text-missing, --threads).
CsvOptions csv_options(const Arguments& args);

// Where --data points, with --sheet, --table and --query (data_source.hpp).
SourceSpec source_spec(const Arguments& args);

// Reads --data (a text file, a workbook's sheet, an SQLite table or query)
// with the import options (--delimiter, --no-header, --missing,
// --decimal-comma, --categorical, --numeric, --threads).
Table load_table(const Arguments& args);

struct LoadedModel {
    Table table;
    ModelSpec spec;
    std::vector<std::string> notes;  // what the column transforms did
};

// The specification alone (everything load_model reads but the table and
// its transforms).
ModelSpec read_spec(const Arguments& args);

// load_table, then the transforms (--centre, --standardise, --log, --log1p)
// and the specification (--outcome, --predictors, --interaction, --poly,
// --no-intercept, --family, --se, --cluster, --weights, --level, --reference,
// --test). With `named_only`, only the columns the options name are read
// (for `fit`, whose output needs no other column).
LoadedModel load_model(const Arguments& args, bool named_only = false);

// Opens a JSON document with what every model-based output starts with:
// "output_version" (2), the program version, the data file and the outcome.
JsonWriter begin_output(const Arguments& args, const ModelSpec& spec);

// "json" (default "text" when absent); usage error otherwise.
std::string output_format(const Arguments& args);

}  // namespace moderato::cli
