#include "model/project_document.hpp"

#include <QFileInfo>
#include <algorithm>
#include <cmath>
#include <limits>
#include <set>

#include "model/project_commands.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/sha256.hpp"

namespace moderato::ui {

namespace {

const int kAnalysisMergeId = 1;

std::string stem_id(const QString& path) {
    QString stem = QFileInfo(path).completeBaseName().toLower();
    QString out;
    for (const QChar c : stem) out += (c.isLetterOrNumber() ? c : QChar('-'));
    return out.isEmpty() ? std::string("data") : out.toStdString();
}

bool zero_one(const Column& c) {
    if (c.kind != ColumnKind::Numeric) return false;
    for (const double v : c.numbers)
        if (v == v && v != 0 && v != 1) return false;
    return true;
}

}  // namespace

ProjectDocument::ProjectDocument(QObject* parent) : QObject(parent) {}

const Analysis* ProjectDocument::analysis(const QString& id) const { return project_.analysis(id.toStdString()); }

QString ProjectDocument::displayName() const {
    return path_.isEmpty() ? tr("Untitled project") : QFileInfo(path_).fileName();
}

std::shared_ptr<const Table> ProjectDocument::table(const std::string& id) const {
    const auto it = tables_.find(id);
    return it == tables_.end() ? nullptr : it->second;
}

std::shared_ptr<const Table> ProjectDocument::baseTable(const std::string& id) const {
    const auto it = base_.find(id);
    return it == base_.end() ? nullptr : it->second;
}

QString ProjectDocument::tableError(const std::string& id) const {
    const auto it = tableErrors_.find(id);
    return it == tableErrors_.end() ? QString() : QString::fromStdString(it->second);
}

std::string ProjectDocument::readHash(const std::string& datasetId) const {
    const auto it = readHashes_.find(datasetId);
    return it == readHashes_.end() ? std::string() : it->second;
}

QString ProjectDocument::dataPath(const std::string& id) const {
    const auto abs = absolutePaths_.find(id);
    if (abs != absolutePaths_.end()) return QString::fromStdString(abs->second);
    const DataSource* s = project_.dataset(id);
    if (!s) return {};
    return QString::fromStdString(resolve_data_path(*s, path_.toStdString()));
}

QString ProjectDocument::dataName(const std::string& id) const {
    const DataSource* s = project_.dataset(id);
    if (!s || s->kind != SourceKind::PostgreSQL) return QFileInfo(dataPath(id)).fileName();
    const QString table = s->query.empty() ? QString::fromStdString(s->table) : tr("query");
    const QString address = QString::fromStdString(s->path);
    const QString database = address.section(QLatin1Char('/'), 3).section(QLatin1Char('?'), 0, 0);
    return database.isEmpty() ? table : tr("%1 in %2").arg(table, database);
}

std::shared_ptr<const ServerFit> ProjectDocument::serverFit(const std::string& id) const {
    const DataSource* s = project_.dataset(id);
    if (!s || !s->in_database) return nullptr;
    const std::string where = dataPath(id).toStdString();
    const auto given = passwords_.find(where);
    return std::make_shared<const ServerFit>(
        ServerFit{source_spec(*s, where), s->import, given != passwords_.end() ? given->second : std::string()});
}

QString ProjectDocument::dataPlace(const std::string& id) const {
    const DataSource* s = project_.dataset(id);
    if (s && s->kind == SourceKind::PostgreSQL) return QString::fromStdString(s->path);
    return QFileInfo(dataPath(id)).absolutePath();
}

void ProjectDocument::adopt(LoadedProject loaded) {
    project_ = std::move(loaded.project);
    path_ = QString::fromStdString(loaded.path);
    base_ = std::move(loaded.base);
    tables_ = std::move(loaded.tables);
    tableErrors_ = std::move(loaded.table_errors);
    absolutePaths_.clear();
    saved_.clear();
    for (const auto& d : project_.datasets) {
        absolutePaths_[d.id] = resolve_data_path(d, loaded.path);
        saved_[d.id] = {d.path, d.sha256};
    }
    readHashes_ = std::move(loaded.sha256);
    confirmSaveTarget_ = false;
    undo_.clear();
    Q_EMIT filePathChanged(path_);
    Q_EMIT projectReset();
}

void ProjectDocument::clear() {
    project_ = Project{};
    path_.clear();
    base_.clear();
    tables_.clear();
    tableErrors_.clear();
    absolutePaths_.clear();
    readHashes_.clear();
    saved_.clear();
    confirmSaveTarget_ = false;
    undo_.clear();
    Q_EMIT filePathChanged(path_);
    Q_EMIT projectReset();
}

void ProjectDocument::rebuildTable(const std::string& id) {
    const auto base = baseTable(id);
    tableErrors_.erase(id);
    if (!base) {
        tables_.erase(id);
        return;
    }
    try {
        const DataSource* source = project_.dataset(id);
        tables_[id] = source ? dataset_table(base, *source, project_.recipes_for(id))
                             : with_recipes(base, project_.recipes_for(id));
    } catch (const InputError& e) {
        tables_[id] = base;
        tableErrors_[id] = e.what();
    }
}

std::string ProjectDocument::addDataset(const QString& dataPath, const CsvOptions& import,
                                        std::shared_ptr<const Table> table, const std::string& sha256,
                                        const SourceSpec& place, bool inDatabase) {
    Project after = project_;
    DataSource s;
    const bool server = place.kind == SourceKind::PostgreSQL;  // an address, not a file
    // A server's dataset is named after its table (the last part), or "query".
    const QString tableName =
        QString::fromStdString(place.table).section(QLatin1Char('.'), -1).remove(QLatin1Char('"'));
    s.id = after.unique_id(stem_id(!server ? dataPath : place.query.empty() ? tableName : QStringLiteral("query")));
    s.path = server ? dataPath.toStdString() : QFileInfo(dataPath).absoluteFilePath().toStdString();
    s.import = import;
    s.kind = place.kind;
    s.sheet = place.sheet;
    s.table = place.table;
    s.query = place.query;
    s.in_database = server && inDatabase;
    after.datasets.push_back(s);
    // The id may have belonged to a dataset whose addition was undone: forget
    // everything about that one.
    base_[s.id] = table;
    tables_.erase(s.id);
    tableErrors_.erase(s.id);
    readHashes_.erase(s.id);
    if (!sha256.empty()) readHashes_[s.id] = sha256;
    saved_.erase(s.id);
    absolutePaths_[s.id] = s.path;
    QString text = tr("Add dataset %1").arg(server ? QString::fromStdString(s.id) : QFileInfo(dataPath).fileName());
    if (table) {  // a new dataset has no analysis yet: start one, as for the first dataset
        Analysis a = guess_analysis(*table, s.id, after.unique_id("analysis"));
        after.analyses.push_back(a);
    }
    setProject(after, text);
    return s.id;
}

void ProjectDocument::setAnalysis(const Analysis& after, const QString& description, const QString& mergeKey) {
    Project next = project_;
    Analysis* slot = next.analysis(after.id);
    if (!slot || *slot == after) return;
    *slot = after;
    undo_.push(new ProjectStateCommand(this, project_, next, description, mergeKey.isEmpty() ? -1 : kAnalysisMergeId,
                                       mergeKey));
}

void ProjectDocument::setProject(const Project& after, const QString& description) {
    undo_.push(new ProjectStateCommand(this, project_, after, description));
}

void ProjectDocument::applyState(const Project& p) {
    const Project before = std::move(project_);
    project_ = p;
    for (auto& d : project_.datasets) {
        const auto it = saved_.find(d.id);
        if (it != saved_.end()) d.path = it->second.path, d.sha256 = it->second.sha256;
    }
    bool structure = before.datasets.size() != p.datasets.size() || before.analyses.size() != p.analyses.size() ||
                     !(before.figures == p.figures);
    for (std::size_t i = 0; !structure && i < p.datasets.size(); ++i)
        structure = before.datasets[i].id != p.datasets[i].id;
    for (std::size_t i = 0; !structure && i < p.analyses.size(); ++i)
        structure = before.analyses[i].id != p.analyses[i].id || before.analyses[i].name != p.analyses[i].name;
    // Derived columns: rebuild the tables whose recipes changed.
    std::set<std::string> changedData;
    for (const auto& d : p.datasets) {
        const DataSource* was = before.dataset(d.id);
        if (!tables_.count(d.id) || before.recipes_for(d.id) != p.recipes_for(d.id) || !was ||
            was->retyped != d.retyped) {
            rebuildTable(d.id);
            changedData.insert(d.id);
        }
    }
    if (structure) Q_EMIT structureChanged();
    for (const auto& id : changedData) Q_EMIT datasetChanged(QString::fromStdString(id));
    for (const auto& a : p.analyses) {
        const Analysis* old = before.analysis(a.id);
        if (!old || !(*old == a) || changedData.count(a.dataset)) Q_EMIT analysisChanged(QString::fromStdString(a.id));
    }
}

void ProjectDocument::relocateData(const DataLocations& moved, const QString& description) {
    DataLocations before;
    for (const auto& [id, file] : moved) before[id] = dataPath(id).toStdString();
    undo_.push(new DataLocationCommand(this, before, moved, description));
}

void ProjectDocument::setDataLocations(const DataLocations& files) {
    const std::string project = path_.toStdString();
    for (const auto& [id, file] : files) {
        const std::string recorded = project.empty() ? file : relative_data_path(file, project);
        absolutePaths_[id] = file;
        saved_[id].path = recorded;
        for (auto& d : project_.datasets)
            if (d.id == id) d.path = recorded, saved_[id].sha256 = d.sha256;
    }
    Q_EMIT structureChanged();  // the sidebar names the data file
}

void ProjectDocument::saveAs(const QString& path) {
    const QFileInfo info(path);
    const std::string target = info.absoluteFilePath().toStdString();
    Project out = project_;
    std::map<std::string, std::string> hashes;
    for (auto& d : out.datasets) {
        const QString dataFile = dataPath(d.id);
        const std::string file = dataFile.toStdString();
        if (d.kind == SourceKind::PostgreSQL) {  // an address: kept as it is, with the fingerprint read
            const auto read = readHashes_.find(d.id);
            if (read != readHashes_.end()) d.sha256 = read->second;
            hashes[d.id] = d.sha256;
            continue;
        }
        if (QFileInfo(dataFile).absoluteFilePath() == info.absoluteFilePath() ||
            (info.exists() && QFileInfo(dataFile).canonicalFilePath() == info.canonicalFilePath()))
            throw InputError(target + ": this is the data file of dataset '" + d.id +
                             "'; a project is saved in its own file (name.moderato), never over data");
        const auto read = readHashes_.find(d.id);
        d.sha256 = read != readHashes_.end() ? read->second : sha256_file(file);
        hashes[d.id] = d.sha256;
        d.path = relative_data_path(file, target);
    }
    write_project_file(out, target);
    // Only paths and hashes changed: not an edit, so no undo step.
    saved_.clear();
    for (auto& d : out.datasets) {
        absolutePaths_[d.id] = resolve_data_path(d, target);
        readHashes_[d.id] = hashes[d.id];
        saved_[d.id] = {d.path, d.sha256};
    }
    project_.datasets = out.datasets;
    path_ = QString::fromStdString(target);
    confirmSaveTarget_ = false;
    undo_.setClean();
    Q_EMIT filePathChanged(path_);
}

std::string roleBasedName(const Roles& roles) {
    if (roles.focal.empty()) return "analysis";
    return roles.moderator.empty() ? roles.focal : roles.focal + " × " + roles.moderator;
}

namespace {

// A column that names rows rather than measuring them: called "id" (or
// "..._id"), or a categorical column with a level for every row, or whole
// numbers all different that run from their smallest to their largest.
bool identifier_like(const Column& c, std::size_t rows) {
    QString name = QString::fromStdString(c.name).toLower();
    if (name == QLatin1String("id") || name.endsWith(QLatin1String("_id"))) return true;
    if (rows < 10) return false;
    if (c.kind == ColumnKind::Categorical) return c.levels.size() == rows;
    // One pass for whole numbers and their range (most measures stop at their
    // first fraction), then one to see each value once: no sort, since this
    // runs on the UI thread when a dataset is added.
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    for (const double x : c.numbers) {
        if (!std::isfinite(x) || x != std::floor(x)) return false;
        lo = std::min(lo, x);
        hi = std::max(hi, x);
    }
    if (hi - lo + 1 != static_cast<double>(rows)) return false;
    std::vector<bool> seen(rows, false);
    for (const double x : c.numbers) {
        const auto k = static_cast<std::size_t>(x - lo);
        if (seen[k]) return false;
        seen[k] = true;
    }
    return true;
}

}  // namespace

Analysis guess_analysis(const Table& t, const std::string& datasetId, const std::string& id) {
    Analysis a;
    a.id = id;
    a.dataset = datasetId;
    std::vector<std::string> numeric, grouping;
    for (const auto& c : t.columns) {
        if (identifier_like(c, t.rows())) continue;
        if (c.kind == ColumnKind::Categorical || zero_one(c)) grouping.push_back(c.name);
        if (c.kind == ColumnKind::Numeric && !zero_one(c)) numeric.push_back(c.name);
    }
    if (!numeric.empty()) a.roles.outcome = numeric[0];
    if (numeric.size() >= 2) a.roles.focal = numeric[1];
    if (!grouping.empty()) a.roles.moderator = grouping[0];
    else if (numeric.size() >= 3) a.roles.moderator = numeric[2];
    a.name = roleBasedName(a.roles);
    return a;
}

}  // namespace moderato::ui
