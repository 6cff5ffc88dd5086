// Opening a project with its data: the project file, then each data file
// (checked against its recorded SHA-256), then the derived columns.
#pragma once

#include <map>
#include <memory>
#include <string>
#include <vector>

#include "moderato/project/project.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

struct LoadedProject {
    Project project;
    std::string path;                                            // the project file
    std::map<std::string, std::shared_ptr<const Table>> base;    // dataset id -> table as read
    std::map<std::string, std::shared_ptr<const Table>> tables;  // dataset id -> with derived columns
    std::map<std::string, std::string> table_errors;             // dataset id -> why its recipes failed
    std::map<std::string, std::string> sha256;                   // dataset id -> hash of the file as read now
    std::vector<std::string> warnings;                           // changed data files, migrations
};

// Reads a dataset's file with its import options. InputError naming the
// dataset, the project and the path when the file is missing.
std::shared_ptr<const Table> load_data_source(const DataSource& source, const std::string& project_path,
                                              const CsvProgress& progress = {});

// Reads everything. InputError (corrupt or newer project, a data file that
// is missing or unreadable); Cancelled when the progress callback says stop.
// A data file whose SHA-256 differs from the recorded one is read and a
// warning says so. Never writes anything.
LoadedProject load_project(const std::string& path, const CsvProgress& progress = {});

}  // namespace moderato
