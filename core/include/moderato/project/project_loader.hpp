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

// A dataset's data file is not where the project says: `recorded` is the
// path as the project file holds it, `looked_at` the file it names.
class MissingDataFile : public InputError {
public:
    MissingDataFile(const std::string& project_path, std::string dataset, std::string recorded, std::string looked_at);
    std::string dataset, recorded, looked_at;
};

// Dataset id -> the file to read instead of the one the project names (a
// data file the user located after it moved). Absolute paths.
using DataLocations = std::map<std::string, std::string>;

// A PostgreSQL address (as the project records it, without a password) ->
// the password the user gave for it in this session. Held in memory only:
// never written to a project, a memo or a log.
using DatabasePasswords = std::map<std::string, std::string>;

// Reads a dataset's file with its import options (from `file` when given,
// else where the project names it). MissingDataFile when it is not there.
std::shared_ptr<const Table> load_data_source(const DataSource& source, const std::string& project_path,
                                              const CsvProgress& progress = {}, const std::string& file = {});

// The one wording of a data file that differs from the one the project was
// saved with: "FILE (dataset 'ID'): SHA-256 NOW now, RECORDED when the project
// was saved". The loader's warning and the renderer's refusal both use it.
std::string changed_data_text(const std::string& file, const std::string& dataset, const std::string& sha_now,
                              const std::string& sha_recorded);

// Reads everything. InputError (corrupt or newer project, a data file that
// is unreadable), MissingDataFile (a data file is not there); Cancelled when
// the progress callback says stop. `moved` reads those datasets from other
// files. A data file whose SHA-256 differs from the recorded one is read and
// a warning says so. A PostgreSQL dataset connects with its address's
// password from `passwords` (else libpq's password file), and throws
// PasswordNeeded when the server asks for one it was not given. Never
// writes anything.
LoadedProject load_project(const std::string& path, const CsvProgress& progress = {}, const DataLocations& moved = {},
                           const DatabasePasswords& passwords = {});

// The same for a project already in memory (a recovery copy) that belongs to
// `path` (empty: never saved; its data paths are then absolute).
LoadedProject load_project_data(Project project, const std::string& path, const CsvProgress& progress = {},
                                const DataLocations& moved = {}, const DatabasePasswords& passwords = {});

}  // namespace moderato
