#include "data/import_dialog.hpp"

#include <QCheckBox>
#include <QComboBox>
#include <QDialogButtonBox>
#include <QFileInfo>
#include <QFormLayout>
#include <QGroupBox>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QListWidget>
#include <QLocale>
#include <QProgressBar>
#include <QPushButton>
#include <QSignalBlocker>
#include <QSplitter>
#include <QStyledItemDelegate>
#include <QTableView>
#include <QTableWidget>
#include <QTimer>
#include <QVBoxLayout>
#include <algorithm>

#include "common/background_job.hpp"
#include "common/number_text.hpp"
#include "data/csv_head.hpp"
#include "data/source_choice.hpp"
#include "data/table_model.hpp"
#include "data/text_cell_list.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/reading/retype.hpp"
#include "moderato/reading/sqlite_source.hpp"
#include "moderato/reading/workbook.hpp"
#include "moderato/support/error.hpp"
#include "style/estuary.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

enum DelimiterChoice { Automatic, Comma, Semicolon, Tab, Other };
// The "Read as" choices of a column (automatic is -1).
enum KindChoice { AsNumbers = 0, AsCategories = 1, AsNumbersTextMissing = 2 };
static_assert(int(ColumnKind::Numeric) == AsNumbers && int(ColumnKind::Categorical) == AsCategories);

// Shows the empty token as "(empty cell)" in the missing-token list; the
// item's text itself stays empty so editing it edits the real token.
class TokenDelegate : public QStyledItemDelegate {
public:
    using QStyledItemDelegate::QStyledItemDelegate;

protected:
    void initStyleOption(QStyleOptionViewItem* option, const QModelIndex& index) const override {
        QStyledItemDelegate::initStyleOption(option, index);
        if (index.data(Qt::EditRole).toString().isEmpty()) {
            option->text = ImportDialog::tr("(empty cell)");
            option->font.setItalic(true);
            option->palette.setColor(QPalette::Text, mutedText(option->palette, QPalette::Base));
        }
    }
};

std::size_t numericColumns(const Table& t) {
    return static_cast<std::size_t>(std::count_if(t.columns.begin(), t.columns.end(),
                                                  [](const Column& c) { return c.kind == ColumnKind::Numeric; }));
}

QString kindName(ColumnKind k) {
    return k == ColumnKind::Numeric ? ImportDialog::tr("numeric") : ImportDialog::tr("categorical");
}

// Why "automatic" chose categorical: the first text cell and its line (or
// its row, in a sheet or a query's result).
QString kindTip(const Table& t, const Column& c) {
    if (c.kind != ColumnKind::Categorical || !c.first_text_line) return {};
    return (t.sheet_rows ? ImportDialog::tr("Read as categorical because of “%1” in row %2")
                         : ImportDialog::tr("Read as categorical because of “%1” on line %2"))
        .arg(QString::fromStdString(c.first_text))
        .arg(c.first_text_line);
}

QString delimiterText(char d) {
    switch (d) {
        case ',':
            return ImportDialog::tr("comma");
        case ';':
            return ImportDialog::tr("semicolon");
        case '\t':
            return ImportDialog::tr("tab");
        default:
            return QStringLiteral("“%1”").arg(QChar(d));
    }
}

// “twelve” on line 38, “n/a” on line 90 …
QString cellCount(std::size_t n) {
    return n == 1 ? ImportDialog::tr("1 cell") : ImportDialog::tr("%1 cells").arg(countText(static_cast<long long>(n)));
}

}  // namespace

ImportDialog::ImportDialog(const QString& path, QWidget* parent)
    : QDialog(parent), path_(path), kind_(sourceKindOfFile(path)) {
    setObjectName(QStringLiteral("import-dialog"));
    setWindowTitle(tr("Import %1").arg(QFileInfo(path).fileName()));
    buildUi();
    refreshPreview();
}

ImportDialog::ImportDialog(const std::string& location, const std::string& password,
                           const std::vector<std::string>& tables, QWidget* parent)
    : QDialog(parent),
      path_(QString::fromStdString(location)),
      kind_(SourceKind::PostgreSQL),
      password_(password),
      serverTables_(tables) {
    setObjectName(QStringLiteral("import-dialog"));
    setWindowTitle(tr("Import from PostgreSQL"));
    buildUi();
    refreshPreview();
}

ImportDialog::~ImportDialog() { password_.assign(password_.size(), '\0'); }

bool ImportDialog::inDatabase() const { return inDatabase_ && inDatabase_->isChecked(); }

QString ImportDialog::sourceName() const {
    return kind_ == SourceKind::PostgreSQL ? path_ : QFileInfo(path_).fileName();
}

void ImportDialog::buildUi() {
    auto* layout = new QVBoxLayout(this);
    layout->addWidget(createFileLabel());
    auto* top = new QHBoxLayout;
    if (kind_ == SourceKind::PostgreSQL) {
        sourceChoice_ = new SourceChoice(path_, serverTables_, this);
        top->addWidget(sourceChoice_, 3);
    } else if (kind_ != SourceKind::TextFile) {
        sourceChoice_ = new SourceChoice(path_, kind_, this);
        top->addWidget(sourceChoice_, 3);
    }
    top->addWidget(createReadingOptions(), 3);
    top->addWidget(createMissingValues(), 2);
    layout->addLayout(top);
    if (kind_ == SourceKind::PostgreSQL) {
        inDatabase_ = new QCheckBox(tr("Fit linear models inside the database, over every row; read a random "
                                       "sample of at most %1 rows for plots and checks")
                                        .arg(countText(static_cast<long long>(kPlotSampleRows))),
                                    this);
        inDatabase_->setObjectName(QStringLiteral("import-in-database"));
        inDatabase_->setToolTip(
            tr("For tables too large to copy: only sums come back from the server. The "
               "sample is the same each time for the same rows."));
        layout->addWidget(inDatabase_);
        connect(inDatabase_, &QCheckBox::toggled, this,
                &ImportDialog::schedulePreview);  // the message says what Load reads
    }
    layout->addWidget(createPreview(), 1);
    createFooter(layout);
    connectSignals();
    resize(920, 640);
}

QWidget* ImportDialog::createFileLabel() {
    const QFileInfo info(path_);
    auto* file = new QLabel(this);
    file->setObjectName(QStringLiteral("import-file"));
    file->setTextFormat(Qt::RichText);
    if (kind_ == SourceKind::PostgreSQL)
        file->setText(tr("<b>PostgreSQL</b> &nbsp;·&nbsp; %1").arg(path_.toHtmlEscaped()));
    else
        file->setText(tr("<b>%1</b> &nbsp;·&nbsp; %2 &nbsp;·&nbsp; %3")
                          .arg(info.fileName().toHtmlEscaped(), info.absolutePath().toHtmlEscaped(),
                               QLocale().formattedDataSize(info.size())));
    file->setTextInteractionFlags(Qt::TextSelectableByMouse);
    return file;
}

// ---- reading options
QWidget* ImportDialog::createReadingOptions() {
    auto* reading = new QGroupBox(tr("Reading"), this);
    auto* form = new QFormLayout(reading);
    delimiter_ = new QComboBox(reading);
    delimiter_->setObjectName(QStringLiteral("import-delimiter"));
    delimiter_->addItem(tr("Detect"), int(Automatic));
    delimiter_->addItem(tr("Comma  ,"), int(Comma));
    delimiter_->addItem(tr("Semicolon  ;"), int(Semicolon));
    delimiter_->addItem(tr("Tab"), int(Tab));
    delimiter_->addItem(tr("Other character"), int(Other));
    otherDelimiter_ = new QLineEdit(reading);
    otherDelimiter_->setObjectName(QStringLiteral("import-delimiter-other"));
    otherDelimiter_->setMaxLength(1);
    otherDelimiter_->setFixedWidth(otherDelimiter_->fontMetrics().horizontalAdvance(QStringLiteral("MMM")) + 12);
    otherDelimiter_->setEnabled(false);
    otherDelimiter_->setPlaceholderText(QStringLiteral("|"));
    auto* delimRow = new QHBoxLayout;
    delimRow->addWidget(delimiter_, 1);
    delimRow->addWidget(otherDelimiter_);
    form->addRow(tr("Delimiter"), delimRow);
    header_ = new QCheckBox(tr("The first row holds the column names"), reading);
    header_->setObjectName(QStringLiteral("import-header"));
    header_->setChecked(true);
    form->addRow(tr("Header"), header_);
    decimal_ = new QComboBox(reading);
    decimal_->setObjectName(QStringLiteral("import-decimal"));
    decimal_->addItem(tr("Point  (3.14)"), false);
    decimal_->addItem(tr("Comma  (3,14)"), true);
    decimalNote_ = new QLabel(reading);
    decimalNote_->setObjectName(QStringLiteral("import-decimal-note"));
    auto* decimalRow = new QHBoxLayout;
    decimalRow->addWidget(decimal_, 1);
    decimalRow->addWidget(decimalNote_);
    form->addRow(tr("Decimal mark"), decimalRow);
    if (kind_ != SourceKind::TextFile) {  // workbooks and databases hold cells, not delimited text
        form->setRowVisible(delimRow, false);
        form->setRowVisible(decimalRow, false);
    }
    reading->setVisible(kind_ == SourceKind::TextFile ||
                        kind_ == SourceKind::Workbook);  // a database names its columns
    reading_ = reading;
    return reading;
}

QWidget* ImportDialog::createMissingValues() {
    auto* missingBox = new QGroupBox(tr("Missing values"), this);
    auto* missingLayout = new QHBoxLayout(missingBox);
    missing_ = new QListWidget(missingBox);
    missing_->setObjectName(QStringLiteral("import-missing"));
    missing_->setItemDelegate(new TokenDelegate(missing_));
    missing_->setToolTip(tr("Cells equal to one of these (after trimming spaces) are missing. Double-click to edit."));
    for (const auto& t : CsvOptions{}.missing_tokens) {
        auto* item = new QListWidgetItem(QString::fromStdString(t), missing_);
        item->setFlags(item->flags() | Qt::ItemIsEditable);
    }
    missing_->setMaximumHeight(missing_->sizeHintForRow(0) * 5 + 2 * missing_->frameWidth() + 4);
    auto* missingButtons = new QVBoxLayout;
    addMissing_ = new QPushButton(tr("Add"), missingBox);
    addMissing_->setObjectName(QStringLiteral("import-missing-add"));
    removeMissing_ = new QPushButton(tr("Remove"), missingBox);
    removeMissing_->setObjectName(QStringLiteral("import-missing-remove"));
    missingButtons->addWidget(addMissing_);
    missingButtons->addWidget(removeMissing_);
    missingButtons->addStretch(1);
    missingLayout->addWidget(missing_, 1);
    missingLayout->addLayout(missingButtons);
    return missingBox;
}

// ---- preview and column types
QWidget* ImportDialog::createPreview() {
    auto* split = new QSplitter(Qt::Horizontal, this);
    preview_ = new QTableView(split);
    preview_->setObjectName(QStringLiteral("import-preview"));
    previewModel_ = new TableModel(preview_);
    preview_->setModel(previewModel_);
    preview_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    preview_->verticalHeader()->setSectionResizeMode(QHeaderView::Fixed);
    preview_->verticalHeader()->setDefaultSectionSize(preview_->fontMetrics().height() + 6);
    preview_->verticalHeader()->setToolTip(tr("Line numbers of the file"));
    preview_->setAlternatingRowColors(true);
    kindsList_ = new QTableWidget(0, 3, split);
    kindsList_->setObjectName(QStringLiteral("import-column-types"));
    kindsList_->setHorizontalHeaderLabels({tr("Column"), tr("Missing"), tr("Read as")});
    kindsList_->horizontalHeaderItem(1)->setToolTip(tr("Missing cells among the rows of the preview"));
    kindsList_->verticalHeader()->hide();
    kindsList_->horizontalHeader()->setSectionResizeMode(0, QHeaderView::Stretch);
    kindsList_->horizontalHeader()->setSectionResizeMode(1, QHeaderView::ResizeToContents);
    kindsList_->horizontalHeader()->setSectionResizeMode(2, QHeaderView::ResizeToContents);
    kindsList_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    kindsList_->setSelectionMode(QAbstractItemView::NoSelection);
    split->addWidget(preview_);
    split->addWidget(kindsList_);
    split->setStretchFactor(0, 3);
    split->setStretchFactor(1, 1);
    split->setSizes({600, 300});
    return split;
}

// ---- the message, the progress of a load and the buttons
void ImportDialog::createFooter(QVBoxLayout* layout) {
    textNotes_ = new QWidget(this);
    textNotes_->setObjectName(QStringLiteral("import-text-notes"));
    auto* notes = new QVBoxLayout(textNotes_);
    notes->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(textNotes_);
    message_ = new QLabel(this);
    message_->setObjectName(QStringLiteral("import-message"));
    message_->setWordWrap(true);
    message_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    message_->setMinimumHeight(message_->fontMetrics().lineSpacing() * 2);
    layout->addWidget(message_);

    progress_ = new QProgressBar(this);
    progress_->setObjectName(QStringLiteral("import-progress"));
    progress_->setRange(0, 1000);
    progress_->setFormat(tr("Reading… %p%"));
    progress_->setVisible(false);
    layout->addWidget(progress_);

    buttons_ = new QDialogButtonBox(this);
    loadButton_ = buttons_->addButton(tr("Load"), QDialogButtonBox::AcceptRole);
    loadButton_->setObjectName(QStringLiteral("import-load"));
    loadButton_->setDefault(true);
    cancelButton_ = buttons_->addButton(QDialogButtonBox::Cancel);
    cancelButton_->setObjectName(QStringLiteral("import-cancel"));
    layout->addWidget(buttons_);
}

void ImportDialog::connectSignals() {
    connect(buttons_, &QDialogButtonBox::accepted, this, &ImportDialog::startLoad);
    connect(buttons_, &QDialogButtonBox::rejected, this, &ImportDialog::reject);
    previewTimer_ = new QTimer(this);
    previewTimer_->setSingleShot(true);
    previewTimer_->setInterval(0);
    connect(previewTimer_, &QTimer::timeout, this, &ImportDialog::refreshPreview);

    connect(delimiter_, &QComboBox::currentIndexChanged, this, [this] {
        otherDelimiter_->setEnabled(delimiter_->currentData().toInt() == Other);
        if (otherDelimiter_->isEnabled()) otherDelimiter_->setFocus();
        schedulePreview();
    });
    connect(otherDelimiter_, &QLineEdit::textChanged, this, &ImportDialog::schedulePreview);
    connect(header_, &QCheckBox::toggled, this, &ImportDialog::schedulePreview);
    connect(decimal_, &QComboBox::activated, this, [this] { decimalChosen_ = true; });
    connect(decimal_, &QComboBox::currentIndexChanged, this, &ImportDialog::schedulePreview);
    connect(missing_, &QListWidget::itemChanged, this, &ImportDialog::schedulePreview);
    connect(addMissing_, &QPushButton::clicked, this, [this] {
        // Starts empty (the same as the empty-cell token, so the preview does not change until typed in).
        auto* item = new QListWidgetItem(QString(), missing_);
        item->setFlags(item->flags() | Qt::ItemIsEditable);
        missing_->setCurrentItem(item);
        missing_->editItem(item);
        schedulePreview();
    });
    connect(removeMissing_, &QPushButton::clicked, this, [this] {
        delete missing_->currentItem();
        schedulePreview();
    });
    if (sourceChoice_) connect(sourceChoice_, &SourceChoice::changed, this, &ImportDialog::schedulePreview);
}

SourceSpec ImportDialog::source() const {
    if (sourceChoice_) return sourceChoice_->spec();
    return {SourceKind::TextFile, path_.toStdString(), {}, {}, {}};
}

void ImportDialog::schedulePreview() { previewTimer_->start(); }

void ImportDialog::setMessage(const QString& text, bool error) {
    messageIsError_ = error;
    message_->setText(text);
    keepAccentText(message_, error ? estuary::series(1) : QColor());
}

QString ImportDialog::message() const { return message_->text(); }

const Table* ImportDialog::previewTable() const { return previewModel_->table(); }

bool ImportDialog::isLoading() const { return loading_; }

bool ImportDialog::baseOptions(CsvOptions& o, QString& why) const {
    o = CsvOptions{};
    switch (delimiter_->currentData().toInt()) {
        case Comma:
            o.delimiter = ',';
            break;
        case Semicolon:
            o.delimiter = ';';
            break;
        case Tab:
            o.delimiter = '\t';
            break;
        case Other: {
            const QString t = otherDelimiter_->text();
            if (t.isEmpty()) {
                why = tr("Type the delimiter character in the box beside “Other character”.");
                return false;
            }
            if (t.at(0).unicode() > 126 || t.at(0).unicode() < 32) {
                why = tr("The delimiter must be one plain ASCII character (“%1” is not).").arg(t);
                return false;
            }
            o.delimiter = static_cast<char>(t.at(0).unicode());
            break;
        }
        default:
            o.delimiter = 0;
    }
    o.header = header_->isChecked();
    o.decimal_comma = decimal_->currentData().toBool();
    o.missing_tokens.clear();
    for (int i = 0; i < missing_->count(); ++i) o.missing_tokens.push_back(missing_->item(i)->text().toStdString());
    return true;
}

CsvOptions ImportDialog::currentOptions() const {
    CsvOptions o;
    QString why;
    if (!baseOptions(o, why)) return o;
    for (const auto& name : previewNames_) {
        const auto it = kinds_.find(name);
        if (it != kinds_.end()) o.column_kinds[name] = it->second;
        if (textMissing_.count(name)) o.text_as_missing.insert(name);
    }
    return o;
}

void ImportDialog::refreshPreview() {
    previewTimer_->stop();
    if (isLoading()) return;
    CsvOptions base;
    QString why;
    if (!baseOptions(base, why)) {
        previewModel_->setTable(nullptr);
        setMessage(why, true);
        loadButton_->setEnabled(false);
        return;
    }
    base.threads = 1;
    if (kind_ != SourceKind::TextFile) return refreshSourcePreview(base);
    if (!decimalChosen_) base.decimal_comma = false;  // guessed from the file below
    const CsvHead head = readCsvHead(path_.toStdString(), kPreviewRecords, base.delimiter);
    if (!head.error.empty()) {
        previewModel_->setTable(nullptr);
        setMessage(QString::fromStdString(head.error), true);
        loadButton_->setEnabled(false);
        return;
    }
    std::shared_ptr<const Table> shown;
    try {
        shown = readPreview(head, base);
    } catch (const InputError& e) {
        previewModel_->setTable(nullptr);
        QString text = QString::fromStdString(e.what());
        if (head.truncated)
            text += tr(" (The preview stopped after %1 without finding the end of this record.)")
                        .arg(QLocale().formattedDataSize(static_cast<qint64>(head.text.size())));
        setMessage(text, true);
        loadButton_->setEnabled(true);  // the whole file may still be read (and report the same)
        return;
    } catch (const std::exception& e) {
        previewModel_->setTable(nullptr);
        setMessage(tr("The preview failed: %1").arg(QString::fromUtf8(e.what())), true);
        return;
    }
    showPreview(shown, head.wholeFile);
}

std::shared_ptr<const Table> ImportDialog::readPreview(const CsvHead& head, const CsvOptions& base) {
    const std::string name = QFileInfo(path_).fileName().toStdString();
    // First without the type overrides: the columns and what they hold.
    auto plain = std::make_shared<const Table>(read_csv_text(head.text, name, base));
    if (!decimalChosen_) {
        // Numbers written with a decimal comma ("3,14", fields split by ';'
        // or tab) read as text with the point: take the comma when it
        // makes more columns numeric, until the user picks a mark.
        bool comma = false;
        CsvOptions withComma = base;
        withComma.decimal_comma = true;
        try {
            auto t = std::make_shared<const Table>(read_csv_text(head.text, name, withComma));
            if (numericColumns(*t) > numericColumns(*plain)) {
                plain = std::move(t);
                comma = true;
            }
        } catch (const InputError&) {
            // e.g. a comma-separated file: the point it is
        }
        const QSignalBlocker quiet(decimal_);
        decimal_->setCurrentIndex(decimal_->findData(comma));
    }
    decimalNote_->setText(decimalChosen_ ? QString() : tr("found in the file"));
    rebuildKinds(*plain);
    plain_ = plain;
    CsvOptions withKinds = currentOptions();
    withKinds.threads = 1;
    if (withKinds.column_kinds.empty() && withKinds.text_as_missing.empty()) return plain;
    return std::make_shared<const Table>(read_csv_text(head.text, name, withKinds));
}

void ImportDialog::refreshSourcePreview(const CsvOptions& base) {
    QString why = sourceChoice_->error();
    if (why.isEmpty() && sourceChoice_->incomplete())
        why = kind_ == SourceKind::Workbook ? tr("The workbook has no worksheet to read.")
                                            : tr("Choose a table, or write a query.");
    if (!why.isEmpty()) {
        previewModel_->setTable(nullptr);
        setMessage(why, true);
        loadButton_->setEnabled(false);
        return;
    }
    try {
        const std::shared_ptr<const Table> shown = readSourcePreview(base);
        showPreview(shown, shown->rows() < kPreviewRecords - 1);
    } catch (const InputError& e) {
        previewModel_->setTable(nullptr);
        setMessage(QString::fromStdString(e.what()), true);
        loadButton_->setEnabled(false);
    }
}

std::shared_ptr<const Table> ImportDialog::readSourcePreview(const CsvOptions& base) {
    const SourceSpec s = source();
    const auto read = [&](const CsvOptions& o) {
        constexpr std::size_t rows = kPreviewRecords - 1;
        if (s.kind == SourceKind::PostgreSQL)
            return std::make_shared<const Table>(read_postgres(s, o, {}, password_, nullptr, rows));
        return std::make_shared<const Table>(s.kind == SourceKind::Workbook
                                                 ? read_workbook(s.location, s.sheet, o, {}, rows)
                                                 : read_sqlite(s.location, s.table, s.query, o, {}, rows));
    };
    auto plain = read(base);
    rebuildKinds(*plain);
    plain_ = plain;
    const CsvOptions withKinds = currentOptions();
    if (withKinds.column_kinds.empty() && withKinds.text_as_missing.empty()) return plain;
    return read(withKinds);
}

void ImportDialog::showPreview(const std::shared_ptr<const Table>& shown, bool wholeFile) {
    previewModel_->setTable(shown);
    preview_->resizeColumnsToContents();
    for (int c = 0; c < previewModel_->columnCount(); ++c)
        preview_->setColumnWidth(c, std::min(preview_->columnWidth(c), 220));
    loadButton_->setEnabled(true);
    const std::size_t rows = shown->rows();
    QString text;
    const auto plural = [](std::size_t n, const QString& one, const QString& many) {
        return countText(static_cast<long long>(n)) + QLatin1Char(' ') + (n == 1 ? one : many);
    };
    const bool sheet = kind_ == SourceKind::Workbook, text_file = kind_ == SourceKind::TextFile;
    const QString rowsText = plural(rows, tr("data row"), tr("data rows"));
    if (wholeFile)
        text = (text_file ? tr("The whole file: %1")
                : sheet   ? tr("The whole sheet: %1")
                          : tr("Every row: %1"))
                   .arg(rowsText);
    else if (inDatabase())
        text = tr("Preview of the first %1; Load reads a random sample of at most %2 rows")
                   .arg(rowsText, countText(static_cast<long long>(kPlotSampleRows)));
    else
        text = (text_file ? tr("Preview of the first %1; Load reads the whole file")
                : sheet   ? tr("Preview of the first %1; Load reads the whole sheet")
                          : tr("Preview of the first %1; Load reads every row"))
                   .arg(rowsText);
    text += QStringLiteral(" · ") + plural(shown->cols(), tr("column"), tr("columns"));
    QStringList dates;  // numbers that are dates: say what the numbers mean
    for (const Column& c : shown->columns)
        if (c.kind == ColumnKind::Numeric && c.dates) dates << QString::fromStdString(c.name);
    if (!dates.isEmpty()) text += tr(" · dates as days since 1970-01-01: %1").arg(dates.join(QStringLiteral(", ")));
    if (shown->sheet_rows && kind_ == SourceKind::Workbook) text += tr(" · row numbers are the sheet's rows");
    else if (!shown->row_lines.empty() && !shown->sheet_rows) text += tr(" · row numbers are line numbers of the file");
    setMessage(text + QLatin1Char('.'), false);
    delimiter_->setItemText(
        0, shown->delimiter ? tr("Detect (found: %1)").arg(delimiterText(shown->delimiter)) : tr("Detect"));
    updateMissingCounts(*shown);
    if (plain_) updateTextNotes(*plain_, *shown);
}

void ImportDialog::updateMissingCounts(const Table& shown) {
    for (int r = 0; r < kindsList_->rowCount() && r < static_cast<int>(shown.cols()); ++r) {
        const Column& c = shown.columns[static_cast<std::size_t>(r)];
        auto* item = new QTableWidgetItem(countText(static_cast<long long>(c.missing_count())));
        item->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
        if (c.text_as_missing) item->setToolTip(tr("%1 of text read as missing").arg(cellCount(c.text_as_missing)));
        kindsList_->setItem(r, 1, item);
    }
}

void ImportDialog::updateTextNotes(const Table& plain, const Table& shown) {
    auto* layout = textNotes_->layout();
    while (QLayoutItem* item = layout->takeAt(0)) {
        delete item->widget();
        delete item;
    }
    const bool comma = decimal_->currentData().toBool();
    for (const Column& c : plain.columns) {
        if (kinds_.count(c.name) || textMissing_.count(c.name)) continue;
        const StrayText stray = stray_text(plain, c, comma);
        if (!mostly_numbers(stray)) continue;
        auto* row = new QWidget(textNotes_);
        row->setObjectName(QStringLiteral("import-text-note-") + QString::fromStdString(c.name));
        auto* h = new QHBoxLayout(row);
        h->setContentsMargins(0, 0, 0, 0);
        auto* label = new QLabel(row);
        label->setWordWrap(true);
        label->setText(tr("<b>%1</b> reads as categorical because %2 of its %3 non-missing cells %4: %5.")
                           .arg(QString::fromStdString(c.name).toHtmlEscaped(),
                                countText(static_cast<long long>(stray.text_cells)),
                                countText(static_cast<long long>(stray.text_cells + stray.number_cells)),
                                stray.text_cells == 1 ? tr("is not a number") : tr("are not numbers"),
                                textCellList(stray.first, stray.text_cells)));
        auto* button = new QPushButton(tr("Read as numbers; these cells missing"), row);
        button->setObjectName(QStringLiteral("import-text-missing-") + QString::fromStdString(c.name));
        const std::string name = c.name;
        connect(button, &QPushButton::clicked, this, [this, name] { chooseKind(name, AsNumbersTextMissing); });
        h->addWidget(label, 1);
        h->addWidget(button);
        layout->addWidget(row);
        row->show();  // at once: a layout shows a new child only on the next turn of the event loop
    }
    for (const Column& c : shown.columns) {
        if (!c.text_as_missing) continue;
        auto* label = new QLabel(textNotes_);
        label->setObjectName(QStringLiteral("import-text-read-missing-") + QString::fromStdString(c.name));
        label->setWordWrap(true);
        label->setText(tr("<b>%1</b>: %2 of text read as missing (%3).")
                           .arg(QString::fromStdString(c.name).toHtmlEscaped(), cellCount(c.text_as_missing),
                                textCellList(c.text_examples, c.text_as_missing)));
        layout->addWidget(label);
        label->show();
    }
}

void ImportDialog::chooseKind(const std::string& column, int choice) {
    for (int r = 0; r < kindsList_->rowCount(); ++r)
        if (kindsList_->item(r, 0) && kindsList_->item(r, 0)->text().toStdString() == column)
            if (auto* combo = qobject_cast<QComboBox*>(kindsList_->cellWidget(r, 2)))
                combo->setCurrentIndex(combo->findData(choice));
}

void ImportDialog::rebuildKinds(const Table& base) {
    std::vector<std::string> names;
    for (const auto& c : base.columns) names.push_back(c.name);
    if (names == previewNames_ && kindsList_->rowCount() == static_cast<int>(names.size())) {
        // Same columns: keep the combo boxes (and the keyboard focus), update what "automatic" found.
        for (int r = 0; r < kindsList_->rowCount(); ++r)
            if (auto* combo = qobject_cast<QComboBox*>(kindsList_->cellWidget(r, 2))) {
                const Column& c = base.columns[static_cast<std::size_t>(r)];
                combo->setItemText(0, tr("automatic (%1)").arg(kindName(c.kind)));
                if (auto* item = kindsList_->item(r, 0)) item->setToolTip(kindTip(base, c));
            }
        return;
    }
    previewNames_ = names;
    kindsList_->setRowCount(static_cast<int>(names.size()));
    for (int r = 0; r < static_cast<int>(names.size()); ++r) {
        const Column& c = base.columns[static_cast<std::size_t>(r)];
        auto* item = new QTableWidgetItem(QString::fromStdString(c.name));
        item->setToolTip(kindTip(base, c));
        kindsList_->setItem(r, 0, item);
        auto* combo = new QComboBox(kindsList_);
        combo->setObjectName(QStringLiteral("import-kind-") + QString::fromStdString(c.name));
        combo->addItem(tr("automatic (%1)").arg(kindName(c.kind)), -1);
        combo->addItem(tr("numeric"), int(AsNumbers));
        combo->addItem(tr("categorical"), int(AsCategories));
        combo->addItem(tr("numeric, text as missing"), int(AsNumbersTextMissing));
        combo->setItemData(3, tr("Numbers; a cell of text is read as missing and counted"), Qt::ToolTipRole);
        const auto it = kinds_.find(c.name);
        if (textMissing_.count(c.name)) combo->setCurrentIndex(combo->findData(int(AsNumbersTextMissing)));
        else if (it != kinds_.end()) combo->setCurrentIndex(combo->findData(int(it->second)));
        const std::string name = c.name;
        connect(combo, &QComboBox::currentIndexChanged, this, [this, combo, name] {
            const int k = combo->currentData().toInt();
            kinds_.erase(name);
            textMissing_.erase(name);
            if (k == AsNumbersTextMissing) textMissing_.insert(name);
            else if (k >= 0) kinds_[name] = static_cast<ColumnKind>(k);
            schedulePreview();
        });
        kindsList_->setCellWidget(r, 2, combo);
    }
}

void ImportDialog::startLoad() {
    if (isLoading()) return;
    CsvOptions base;
    QString why;
    if (!baseOptions(base, why)) {
        setMessage(why, true);
        return;
    }
    if (sourceChoice_ && sourceChoice_->incomplete()) return;
    loadingOptions_ = currentOptions();
    loadingSource_ = source();
    const SourceSpec file = loadingSource_;
    const CsvOptions o = loadingOptions_;
    auto result = std::make_shared<LoadResult>();
    job_ = new BackgroundJob(this);
    connect(job_, &BackgroundJob::progressChanged, progress_, &QProgressBar::setValue);
    connect(job_, &BackgroundJob::finished, this, [this, result](bool cancelled) { loadFinished(*result, cancelled); });
    setLoading(true);
    setMessage(tr("Reading %1…").arg(sourceName()), false);
    const bool sample = inDatabase();
    job_->start([result, file, o, sample, password = password_](const BackgroundJob::Progress& progress) {
        try {
            std::size_t total = 0;
            if (file.kind == SourceKind::PostgreSQL && sample)
                result->table = std::make_shared<const Table>(read_postgres_sample(
                    file, kPlotSampleRows, &total, o, CsvProgress{progress}, password, &result->fingerprint));
            else if (file.kind == SourceKind::PostgreSQL)
                result->table = std::make_shared<const Table>(
                    read_postgres(file, o, CsvProgress{progress}, password, &result->fingerprint));
            else result->table = std::make_shared<const Table>(read_source(file, o, CsvProgress{progress}));
        } catch (const Cancelled&) {
            result->cancelled = true;
        } catch (const InputError& e) {
            result->error = QString::fromStdString(e.what());
        } catch (const std::bad_alloc&) {
            result->error = tr("There is not enough memory to read this file.");
        } catch (const std::exception& e) {
            result->error = tr("Internal error while reading: %1").arg(QString::fromUtf8(e.what()));
        }
    });
}

void ImportDialog::setLoading(bool on) {
    loading_ = on;
    for (QWidget* w : std::initializer_list<QWidget*>{delimiter_, otherDelimiter_, header_, decimal_, missing_,
                                                      addMissing_, removeMissing_, kindsList_, textNotes_, loadButton_})
        w->setEnabled(!on);
    if (sourceChoice_) sourceChoice_->setEnabled(!on);
    if (inDatabase_) inDatabase_->setEnabled(!on);
    if (!on) otherDelimiter_->setEnabled(delimiter_->currentData().toInt() == Other);
    progress_->setValue(0);
    progress_->setVisible(on);
}

void ImportDialog::loadFinished(const LoadResult& r, bool cancelled) {
    job_->deleteLater();
    job_ = nullptr;
    setLoading(false);
    // Asked to stop: keep nothing, even if reading had just finished.
    if (cancelled || r.cancelled) {
        setMessage(tr("Loading was cancelled; nothing was read. Change the options or press Load again."), false);
        return;
    }
    if (!r.error.isEmpty() || !r.table) {
        setMessage(r.error.isEmpty() ? tr("The file could not be read.") : r.error, true);
        return;
    }
    table_ = r.table;
    fingerprint_ = r.fingerprint;
    options_ = loadingOptions_;
    options_.threads = 0;
    accept();
}

void ImportDialog::reject() {
    if (isLoading()) {
        job_->cancel();
        setMessage(tr("Cancelling…"), false);
        return;
    }
    QDialog::reject();
}

}  // namespace moderato::ui
