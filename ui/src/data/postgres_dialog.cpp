#include "data/postgres_dialog.hpp"

#include <QDialogButtonBox>
#include <QFormLayout>
#include <QIntValidator>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QSettings>
#include <QVBoxLayout>
#include <memory>

#include "common/background_job.hpp"
#include "moderato/support/error.hpp"

namespace moderato::ui {

namespace {

QLineEdit* field(QWidget* parent, const char* name, const QString& text, const QString& hint) {
    auto* edit = new QLineEdit(text, parent);
    edit->setObjectName(QString::fromLatin1(name));
    edit->setPlaceholderText(hint);
    return edit;
}

QString setting(const char* key, const QString& fallback) {
    return QSettings().value(QStringLiteral("postgres/") + QLatin1String(key), fallback).toString();
}

}  // namespace

PostgresDialog::PostgresDialog(QWidget* parent) : QDialog(parent) {
    setObjectName(QStringLiteral("postgres-dialog"));
    setWindowTitle(tr("Connect to PostgreSQL"));
    auto* layout = new QVBoxLayout(this);
    auto* form = new QFormLayout;
    host_ = field(this, "postgres-host", setting("host", {}), tr("a host name, or the folder of the server's socket"));
    port_ = field(this, "postgres-port", setting("port", {}), tr("5432"));
    port_->setValidator(new QIntValidator(1, 65535, port_));
    database_ = field(this, "postgres-database", setting("database", {}), tr("the database's name"));
    user_ = field(this, "postgres-user", setting("user", qEnvironmentVariable("USER")), tr("your user name"));
    password_ = field(this, "postgres-password", {}, tr("empty: the password file (~/.pgpass)"));
    password_->setEchoMode(QLineEdit::Password);
    password_->setToolTip(tr("Used while Moderato runs; never saved in the project, the settings or a log"));
    form->addRow(tr("Host or socket folder"), host_);
    form->addRow(tr("Port"), port_);
    form->addRow(tr("Database"), database_);
    form->addRow(tr("User"), user_);
    form->addRow(tr("Password"), password_);
    layout->addLayout(form);
    message_ = new QLabel(this);
    message_->setObjectName(QStringLiteral("postgres-message"));
    message_->setWordWrap(true);
    message_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    layout->addWidget(message_);
    buttons_ = new QDialogButtonBox(QDialogButtonBox::Cancel, this);
    connect_ = buttons_->addButton(tr("Connect"), QDialogButtonBox::AcceptRole);
    connect_->setObjectName(QStringLiteral("postgres-connect"));
    connect_->setDefault(true);
    layout->addWidget(buttons_);
    connect(connect_, &QPushButton::clicked, this, &PostgresDialog::connectToServer);
    connect(buttons_, &QDialogButtonBox::rejected, this, &PostgresDialog::reject);
    if (!database_->text().isEmpty()) password_->setFocus();
    resize(520, sizeHint().height());
}

PostgresDialog::~PostgresDialog() = default;

PostgresAddress PostgresDialog::address() const {
    return {host_->text().trimmed().toStdString(), port_->text().trimmed().toStdString(),
            database_->text().trimmed().toStdString(), user_->text().trimmed().toStdString()};
}

std::string PostgresDialog::password() const { return password_->text().toStdString(); }

QString PostgresDialog::message() const { return message_->text(); }

void PostgresDialog::connectToServer() {
    if (job_) return;
    if (database_->text().trimmed().isEmpty()) {
        message_->setText(tr("Give the database's name."));
        database_->setFocus();
        return;
    }
    const std::string where = location(), secret = password();
    auto outcome = std::make_shared<Outcome>();
    job_ = new BackgroundJob(this);
    connect(job_, &BackgroundJob::finished, this, [this, outcome](bool cancelled) { finished(*outcome, cancelled); });
    setBusy(true);
    message_->setText(tr("Connecting to %1…").arg(QString::fromStdString(where)));
    job_->start([outcome, where, secret](const BackgroundJob::Progress&) {
        try {
            outcome->tables = postgres_tables(where, secret);
        } catch (const PasswordNeeded& e) {
            outcome->error = QString::fromStdString(e.what());
            outcome->needsPassword = true;
        } catch (const InputError& e) {
            outcome->error = QString::fromStdString(e.what());
        }
    });
}

void PostgresDialog::finished(const Outcome& outcome, bool cancelled) {
    job_->deleteLater();
    job_ = nullptr;
    setBusy(false);
    if (cancelled) {  // Cancel while connecting: the dialog goes
        QDialog::reject();
        return;
    }
    if (!outcome.error.isEmpty()) {
        message_->setText(outcome.needsPassword ? tr("The server asks for a password. Type it above, or put it in "
                                                     "the password file (~/.pgpass).")
                                                : outcome.error);
        (outcome.needsPassword ? password_ : host_)->setFocus();
        return;
    }
    tables_ = outcome.tables;
    remember();
    accept();
}

void PostgresDialog::setBusy(bool busy) {
    for (QWidget* w : {static_cast<QWidget*>(host_), static_cast<QWidget*>(port_), static_cast<QWidget*>(database_),
                       static_cast<QWidget*>(user_), static_cast<QWidget*>(password_), static_cast<QWidget*>(connect_)})
        w->setEnabled(!busy);
}

void PostgresDialog::remember() const {
    QSettings s;
    s.setValue(QStringLiteral("postgres/host"), host_->text().trimmed());
    s.setValue(QStringLiteral("postgres/port"), port_->text().trimmed());
    s.setValue(QStringLiteral("postgres/database"), database_->text().trimmed());
    s.setValue(QStringLiteral("postgres/user"), user_->text().trimmed());
}

void PostgresDialog::reject() {
    if (job_) {
        job_->cancel();  // closes the dialog once libpq returns (at most its connect_timeout)
        message_->setText(tr("Cancelling…"));
        return;
    }
    QDialog::reject();
}

}  // namespace moderato::ui
