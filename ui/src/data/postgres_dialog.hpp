// Connecting to a PostgreSQL server: where it is (a host or a folder holding
// its socket, a port), the database and the user, and a password that is
// used for this session only. Connect lists the server's tables in a worker
// (the dialog stays responsive; Cancel stops waiting); the dialog is accepted
// when the server answered, and the import dialog then takes the table.
//
// The address parts are remembered for the next time (QSettings); the
// password never is: it is not written to the settings, the project, the
// memo or a log. Left empty, libpq's password file (~/.pgpass) is used, and
// a server that still asks for one says so in the dialog.
#pragma once

#include <QDialog>
#include <string>
#include <vector>

#include "moderato/reading/postgres_source.hpp"

class QDialogButtonBox;
class QLabel;
class QLineEdit;
class QPushButton;

namespace moderato::ui {

class BackgroundJob;

class PostgresDialog : public QDialog {
    Q_OBJECT
public:
    explicit PostgresDialog(QWidget* parent = nullptr);
    ~PostgresDialog() override;

    PostgresAddress address() const;
    // The libpq address of the fields (never holds the password).
    std::string location() const { return postgres_address(address()); }
    // The password typed (empty: the password file).
    std::string password() const;
    // The tables the server offered when it was connected to.
    const std::vector<std::string>& tables() const { return tables_; }

    QLineEdit* hostField() const { return host_; }
    QLineEdit* portField() const { return port_; }
    QLineEdit* databaseField() const { return database_; }
    QLineEdit* userField() const { return user_; }
    QLineEdit* passwordField() const { return password_; }
    QPushButton* connectButton() const { return connect_; }
    QString message() const;

public Q_SLOTS:
    // Connects in a worker and lists the tables; accepted when it succeeds.
    void connectToServer();
    void reject() override;

private:
    struct Outcome {
        std::vector<std::string> tables;
        QString error;
        bool needsPassword = false;
    };
    void finished(const Outcome& outcome, bool cancelled);
    void setBusy(bool busy);
    void remember() const;

    QLineEdit* host_ = nullptr;
    QLineEdit* port_ = nullptr;
    QLineEdit* database_ = nullptr;
    QLineEdit* user_ = nullptr;
    QLineEdit* password_ = nullptr;
    QLabel* message_ = nullptr;
    QPushButton* connect_ = nullptr;
    QDialogButtonBox* buttons_ = nullptr;
    BackgroundJob* job_ = nullptr;
    std::vector<std::string> tables_;
};

}  // namespace moderato::ui
