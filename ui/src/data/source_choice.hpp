// Where in a workbook or a database the table is: the sheet of a workbook,
// or a database's table or view, or one read-only query. Part of the import
// dialog; an SQLite file's sheets and tables are listed when it is made (a
// file that cannot be listed shows why in `error()`), a PostgreSQL server's
// when it was connected to.
#pragma once

#include <QGroupBox>
#include <QString>
#include <string>
#include <vector>

#include "moderato/reading/data_source.hpp"

class QComboBox;
class QPlainTextEdit;
class QRadioButton;

namespace moderato::ui {

// The kind of source a file is: .xlsx/.xlsm a workbook; .sqlite, .sqlite3,
// .db or a file that begins with SQLite's header a database; else text.
SourceKind sourceKindOfFile(const QString& path);

class SourceChoice : public QGroupBox {
    Q_OBJECT
public:
    SourceChoice(const QString& path, SourceKind kind, QWidget* parent = nullptr);
    // A database server's choice (PostgreSQL): `location` its address,
    // `tables` what it offers (listed when it was connected to).
    SourceChoice(const QString& location, const std::vector<std::string>& tables, QWidget* parent = nullptr);

    // The source as chosen now (location: the file).
    SourceSpec spec() const;
    // Why the sheets or tables could not be listed ("" when they were).
    QString error() const { return error_; }
    // A query chosen but not written yet.
    bool incomplete() const;

    QComboBox* sheets() const { return sheets_; }
    QComboBox* tables() const { return tables_; }
    QRadioButton* queryChoice() const { return useQuery_; }
    QPlainTextEdit* queryText() const { return query_; }

Q_SIGNALS:
    void changed();

private:
    void createWorkbook();
    void createDatabase();
    void createDatabaseChoice();

    QString path_;
    SourceKind kind_;
    QString error_;
    QComboBox* sheets_ = nullptr;
    QComboBox* tables_ = nullptr;
    QRadioButton* useTable_ = nullptr;
    QRadioButton* useQuery_ = nullptr;
    QPlainTextEdit* query_ = nullptr;
};

}  // namespace moderato::ui
