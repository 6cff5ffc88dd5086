#include "data/source_choice.hpp"

#include <QComboBox>
#include <QFileInfo>
#include <QFormLayout>
#include <QPlainTextEdit>
#include <QRadioButton>

#include "moderato/reading/sqlite_source.hpp"
#include "moderato/reading/workbook.hpp"
#include "moderato/support/error.hpp"

namespace moderato::ui {

SourceKind sourceKindOfFile(const QString& path) {
    const QString ext = QFileInfo(path).suffix().toLower();
    if (ext == QLatin1String("xlsx") || ext == QLatin1String("xlsm")) return SourceKind::Workbook;
    if (ext == QLatin1String("sqlite") || ext == QLatin1String("sqlite3") || ext == QLatin1String("db"))
        return SourceKind::SQLite;
    return is_sqlite_file(path.toStdString()) ? SourceKind::SQLite : SourceKind::TextFile;
}

SourceChoice::SourceChoice(const QString& path, SourceKind kind, QWidget* parent)
    : QGroupBox(parent), path_(path), kind_(kind) {
    setObjectName(QStringLiteral("import-source"));
    if (kind_ == SourceKind::Workbook) createWorkbook();
    else createDatabase();
}

void SourceChoice::createWorkbook() {
    setTitle(tr("Workbook"));
    auto* form = new QFormLayout(this);
    sheets_ = new QComboBox(this);
    sheets_->setObjectName(QStringLiteral("import-sheet"));
    form->addRow(tr("Sheet"), sheets_);
    try {
        for (const WorkbookSheet& s : workbook_sheets(path_.toStdString())) {
            if (s.kind != WorkbookSheet::Kind::Worksheet) continue;  // charts and macros hold no cells
            const QString name = QString::fromStdString(s.name);
            sheets_->addItem(s.hidden ? tr("%1 (hidden)").arg(name) : name, name);
        }
    } catch (const InputError& e) {
        error_ = QString::fromStdString(e.what());
    }
    connect(sheets_, &QComboBox::currentIndexChanged, this, &SourceChoice::changed);
}

SourceChoice::SourceChoice(const QString& location, const std::vector<std::string>& tables, QWidget* parent)
    : QGroupBox(parent), path_(location), kind_(SourceKind::PostgreSQL) {
    setObjectName(QStringLiteral("import-source"));
    createDatabaseChoice();
    for (const std::string& t : tables) tables_->addItem(QString::fromStdString(t));
    if (tables.empty()) useQuery_->setChecked(true);  // nothing to choose: write a query
}

void SourceChoice::createDatabase() {
    createDatabaseChoice();
    try {
        for (const std::string& t : sqlite_tables(path_.toStdString())) tables_->addItem(QString::fromStdString(t));
    } catch (const InputError& e) {
        error_ = QString::fromStdString(e.what());
    }
}

void SourceChoice::createDatabaseChoice() {
    setTitle(tr("Database"));
    auto* form = new QFormLayout(this);
    useTable_ = new QRadioButton(tr("Table"), this);
    useTable_->setObjectName(QStringLiteral("import-use-table"));
    useTable_->setChecked(true);
    tables_ = new QComboBox(this);
    tables_->setObjectName(QStringLiteral("import-table"));
    form->addRow(useTable_, tables_);
    useQuery_ = new QRadioButton(tr("Query"), this);
    useQuery_->setObjectName(QStringLiteral("import-use-query"));
    query_ = new QPlainTextEdit(this);
    query_->setObjectName(QStringLiteral("import-query"));
    query_->setPlaceholderText(tr("One read-only SELECT, e.g. SELECT * FROM sales WHERE year = 2024"));
    query_->setMaximumHeight(query_->fontMetrics().lineSpacing() * 4 + 12);
    query_->setEnabled(false);
    form->addRow(useQuery_, query_);
    connect(tables_, &QComboBox::currentIndexChanged, this, &SourceChoice::changed);
    connect(useQuery_, &QRadioButton::toggled, this, [this](bool on) {
        query_->setEnabled(on);
        tables_->setEnabled(!on);
        Q_EMIT changed();
    });
    connect(query_, &QPlainTextEdit::textChanged, this, &SourceChoice::changed);
}

bool SourceChoice::incomplete() const {
    if (kind_ == SourceKind::Workbook) return sheets_->count() == 0;
    return useQuery_->isChecked() ? query_->toPlainText().trimmed().isEmpty() : tables_->count() == 0;
}

SourceSpec SourceChoice::spec() const {
    SourceSpec s;
    s.kind = kind_;
    s.location = path_.toStdString();
    if (kind_ == SourceKind::Workbook) {
        s.sheet = sheets_->currentData().toString().toStdString();
    } else if (useQuery_->isChecked()) {
        s.query = query_->toPlainText().trimmed().toStdString();
    } else {
        s.table = tables_->currentText().toStdString();
    }
    return s;
}

}  // namespace moderato::ui
