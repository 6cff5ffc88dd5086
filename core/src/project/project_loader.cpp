// Opening a project with its data files.
#include "moderato/project/project_loader.hpp"

#include <filesystem>

#include "moderato/project/analysis_run.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/sha256.hpp"

namespace moderato {

std::shared_ptr<const Table> load_data_source(const DataSource& source, const std::string& project_path,
                                              const CsvProgress& progress) {
    const std::string file = resolve_data_path(source, project_path);
    std::error_code ec;
    if (!std::filesystem::exists(file, ec))
        throw InputError(project_path + ": the data file of dataset '" + source.id + "' is missing: " + file +
                         " (named \"" + source.path +
                         "\" in the project). Put the file back there, or open the data file and rebuild the "
                         "analysis; the project was not changed.");
    return std::make_shared<const Table>(read_csv(file, source.import, progress));
}

LoadedProject load_project(const std::string& path, const CsvProgress& progress) {
    LoadedProject out;
    out.path = path;
    out.project = read_project_file(path);
    out.warnings = out.project.migration_notes;
    const std::size_t count = out.project.datasets.size();
    for (std::size_t i = 0; i < count; ++i) {
        const DataSource& source = out.project.datasets[i];
        const std::string file = resolve_data_path(source, path);
        // Progress over all files: each file is an equal share.
        CsvProgress part;
        if (progress.callback)
            part.callback = [&, i](std::size_t done, std::size_t total) {
                const double share = total ? static_cast<double>(done) / static_cast<double>(total) : 1.0;
                return progress.callback(static_cast<std::size_t>((static_cast<double>(i) + share) * 1000.0),
                                         count * 1000);
            };
        auto table = load_data_source(source, path, part);
        const std::string hash = sha256_file(file);
        out.sha256[source.id] = hash;
        if (!source.sha256.empty() && hash != source.sha256)
            out.warnings.push_back("The data file " + file + " (dataset '" + source.id +
                                   "') changed since the project was saved: its SHA-256 differs. Every analysis is "
                                   "recomputed from the file as it is now; save the project to accept the change.");
        out.base[source.id] = table;
        try {
            out.tables[source.id] = with_recipes(table, out.project.recipes_for(source.id));
        } catch (const InputError& e) {
            out.tables[source.id] = table;
            out.table_errors[source.id] = e.what();
            out.warnings.push_back(std::string("Dataset '") + source.id + "': " + e.what());
        }
    }
    return out;
}

}  // namespace moderato
