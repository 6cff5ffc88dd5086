// Opening a project with its data files.
#include "moderato/project/project_loader.hpp"

#include <atomic>
#include <filesystem>
#include <future>

#include "moderato/project/analysis_run.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/sha256.hpp"

namespace moderato {

MissingDataFile::MissingDataFile(const std::string& project_path, std::string dataset_id, std::string recorded_path,
                                 std::string file)
    : InputError((project_path.empty() ? std::string("the project") : project_path) + ": the data file of dataset '" +
                 dataset_id + "' is missing: the project records it as \"" + recorded_path + "\" and no file is at " +
                 file +
                 ". Put the file back there, or open the project in the workbench and point it at the file's new "
                 "place; the project was not changed."),
      dataset(std::move(dataset_id)),
      recorded(std::move(recorded_path)),
      looked_at(std::move(file)) {}

std::shared_ptr<const Table> load_data_source(const DataSource& source, const std::string& project_path,
                                              const CsvProgress& progress, const std::string& moved_to) {
    const std::string file = moved_to.empty() ? resolve_data_path(source, project_path) : moved_to;
    std::error_code ec;
    if (source.kind != SourceKind::PostgreSQL && !std::filesystem::exists(file, ec))
        throw MissingDataFile(project_path, source.id, source.path, file);
    return std::make_shared<const Table>(read_source(source_spec(source, file), source.import, progress));
}

std::string changed_data_text(const std::string& file, const std::string& dataset, const std::string& sha_now,
                              const std::string& sha_recorded) {
    return file + " (dataset '" + dataset + "'): SHA-256 " + sha_now + " now, " + sha_recorded +
           " when the project was saved";
}

namespace {

// A PostgreSQL dataset's rows: all of them, or the sample for plots when
// its fits run in the database.
Table read_server(const DataSource& source, const std::string& address, const CsvProgress& progress,
                  const std::string& password, std::string& fingerprint) {
    const SourceSpec spec = source_spec(source, address);
    if (!source.in_database) return read_postgres(spec, source.import, progress, password, &fingerprint);
    std::size_t total = 0;
    return read_postgres_sample(spec, kPlotSampleRows, &total, source.import, progress, password, &fingerprint);
}

}  // namespace

LoadedProject load_project(const std::string& path, const CsvProgress& progress, const DataLocations& moved,
                           const DatabasePasswords& passwords) {
    return load_project_data(read_project_file(path), path, progress, moved, passwords);
}

LoadedProject load_project_data(Project project, const std::string& path, const CsvProgress& progress,
                                const DataLocations& moved, const DatabasePasswords& passwords) {
    LoadedProject out;
    out.path = path;
    out.project = std::move(project);
    out.warnings = out.project.migration_notes;
    const std::size_t count = out.project.datasets.size();
    for (std::size_t i = 0; i < count; ++i) {
        const DataSource& source = out.project.datasets[i];
        const auto relocated = moved.find(source.id);
        const std::string file = relocated != moved.end() ? relocated->second : resolve_data_path(source, path);
        // Progress over all files: each file is an equal share.
        CsvProgress part;
        if (progress.callback)
            part.callback = [&, i](std::size_t done, std::size_t total) {
                const double share = total ? static_cast<double>(done) / static_cast<double>(total) : 1.0;
                return progress.callback(static_cast<std::size_t>((static_cast<double>(i) + share) * 1000.0),
                                         count * 1000);
            };
        // The fingerprint is computed while the file is parsed: the parse
        // leaves a core idle in its serial stretches, and both read the same
        // cached pages. (A missing file: the hash fails too and is not read.)
        // A PostgreSQL source has no file to hash: its fingerprint (rows and
        // an order-free checksum) comes from the same snapshot as its rows.
        const bool has_file = source.kind != SourceKind::PostgreSQL;
        std::string fingerprint;
        std::atomic<bool> stop{false};
        std::future<std::string> hashing = std::async(std::launch::async, [&file, &stop, has_file] {
            return has_file ? sha256_file(file, stop) : std::string();
        });
        std::shared_ptr<const Table> table;
        const auto given = passwords.find(file);
        const std::string password = given != passwords.end() ? given->second : std::string();
        try {
            table = has_file ? load_data_source(source, path, part, file)
                             : std::make_shared<const Table>(read_server(source, file, part, password, fingerprint));
        } catch (...) {
            stop = true;  // cancelled or refused: the hash is not needed
            throw;
        }
        const std::string hash = has_file ? hashing.get() : fingerprint;
        out.sha256[source.id] = hash;
        if (!source.sha256.empty() && hash != source.sha256)
            out.warnings.push_back(
                has_file
                    ? "The data changed since the project was saved: " +
                          changed_data_text(file, source.id, hash, source.sha256) +
                          ". Every analysis is recomputed from the file as it is now; save the project to "
                          "accept the change."
                    : "The data changed since the project was saved: " + describe_source(source_spec(source, file)) +
                          " (dataset '" + source.id + "'): fingerprint " + hash + " now, " + source.sha256 +
                          " when the project was saved. Every analysis is recomputed from the rows as they "
                          "are now; save the project to accept the change.");
        out.base[source.id] = table;
        try {
            out.tables[source.id] = dataset_table(table, source, out.project.recipes_for(source.id));
        } catch (const InputError& e) {
            out.tables[source.id] = table;
            out.table_errors[source.id] = e.what();
            out.warnings.push_back(std::string("Dataset '") + source.id + "': " + e.what());
        }
    }
    return out;
}

}  // namespace moderato
