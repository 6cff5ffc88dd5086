#include "data/derived_column_dialog.hpp"

#include <QComboBox>
#include <QDialogButtonBox>
#include <QDoubleValidator>
#include <QFormLayout>
#include <QLabel>
#include <QLineEdit>
#include <QLocale>
#include <QPushButton>
#include <QVBoxLayout>
#include <cmath>

#include "data/table_model.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/reading/derive.hpp"
#include "moderato/support/error.hpp"
#include "style/estuary.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

struct KindInfo {
    RecipeKind kind;
    const char* label;
    bool categoricalSource;  // else numeric
    bool other, level, value;
};

const KindInfo kKinds[] = {
    {RecipeKind::CentreMean, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Centre at the mean"), false, false, false,
     false},
    {RecipeKind::CentreMedian, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Centre at the median"), false, false, false,
     false},
    {RecipeKind::CentreValue, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Centre at a value"), false, false, false, true},
    {RecipeKind::Standardise, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Standardise (mean 0, SD 1)"), false, false,
     false, false},
    {RecipeKind::Log, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Natural log"), false, false, false, false},
    {RecipeKind::Log1p, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Natural log of 1 + value"), false, false, false,
     false},
    {RecipeKind::Square, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Square"), false, false, false, false},
    {RecipeKind::Dummy, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Indicator of one level (1 / 0)"), true, false, true,
     false},
    {RecipeKind::Product, QT_TRANSLATE_NOOP("DerivedColumnDialog", "Product of two columns"), false, true, false,
     false},
};

const KindInfo* info(RecipeKind kind) {
    for (const auto& k : kKinds)
        if (k.kind == kind) return &k;
    return nullptr;
}

// The kind the combo box shows (its item data is the RecipeKind).
RecipeKind kindOf(const QComboBox* box) { return static_cast<RecipeKind>(box->currentData().toInt()); }

// Letters, digits and '_' only, for names built from level text.
QString plainName(const QString& s) {
    QString out;
    for (const QChar c : s) out += (c.isLetterOrNumber() || c == QLatin1Char('_')) ? c : QLatin1Char('_');
    return out;
}

QString q(const std::string& s) { return QString::fromStdString(s); }

}  // namespace

QStringList DerivedColumnDialog::kinds() {
    QStringList out;
    for (const auto& k : kKinds) out << QString::fromLatin1(to_string(k.kind));
    return out;
}

QString DerivedColumnDialog::describe(const DerivedRecipe& r) {
    const QString s = q(r.source);
    switch (r.kind) {
        case RecipeKind::CentreMean:
            return tr("%1 centred at its mean").arg(s);
        case RecipeKind::CentreMedian:
            return tr("%1 centred at its median").arg(s);
        case RecipeKind::CentreValue:
            return tr("%1 minus %2").arg(s, TableModel::numberText(r.value));
        case RecipeKind::Standardise:
            return tr("%1 standardised").arg(s);
        case RecipeKind::Log:
            return tr("natural log of %1").arg(s);
        case RecipeKind::Log1p:
            return tr("natural log of 1 + %1").arg(s);
        case RecipeKind::Square:
            return tr("%1 squared").arg(s);
        case RecipeKind::Dummy:
            return tr("1 where %1 is “%2”, else 0").arg(s, q(r.level));
        case RecipeKind::Product:
            return tr("%1 × %2").arg(s, q(r.other));
    }
    return tr("%1 of %2").arg(q(to_string(r.kind)), s);
}

DerivedColumnDialog::DerivedColumnDialog(std::shared_ptr<const Table> table, std::set<std::string> taken,
                                         const QString& datasetId, QWidget* parent)
    : QDialog(parent), table_(std::move(table)), taken_(std::move(taken)), datasetId_(datasetId) {
    setObjectName(QStringLiteral("derived-dialog"));
    setWindowTitle(tr("Add derived column"));
    auto* layout = new QVBoxLayout(this);
    auto* form = new QFormLayout;
    kind_ = new QComboBox(this);
    kind_->setObjectName(QStringLiteral("derived-kind"));
    for (const auto& k : kKinds) kind_->addItem(tr(k.label), static_cast<int>(k.kind));
    form->addRow(tr("Kind"), kind_);
    source_ = new QComboBox(this);
    source_->setObjectName(QStringLiteral("derived-source"));
    form->addRow(tr("Column"), source_);
    other_ = new QComboBox(this);
    other_->setObjectName(QStringLiteral("derived-other"));
    form->addRow(tr("Times column"), other_);
    otherLabel_ = form->labelForField(other_);
    level_ = new QComboBox(this);
    level_->setObjectName(QStringLiteral("derived-level"));
    form->addRow(tr("Level"), level_);
    levelLabel_ = form->labelForField(level_);
    value_ = new QLineEdit(QStringLiteral("0"), this);
    value_->setObjectName(QStringLiteral("derived-value"));
    auto* validator = new QDoubleValidator(value_);
    validator->setLocale(QLocale::c());
    validator->setNotation(QDoubleValidator::StandardNotation);
    value_->setValidator(validator);
    form->addRow(tr("Value"), value_);
    valueLabel_ = form->labelForField(value_);
    name_ = new QLineEdit(this);
    name_->setObjectName(QStringLiteral("derived-name"));
    form->addRow(tr("New column"), name_);
    layout->addLayout(form);
    hint_ = new QLabel(this);
    hint_->setObjectName(QStringLiteral("derived-hint"));
    hint_->setWordWrap(true);
    layout->addWidget(hint_);
    message_ = new QLabel(this);
    message_->setObjectName(QStringLiteral("derived-message"));
    message_->setWordWrap(true);
    layout->addWidget(message_);
    buttons_ = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, this);
    buttons_->button(QDialogButtonBox::Ok)->setText(tr("Add"));
    buttons_->button(QDialogButtonBox::Ok)->setObjectName(QStringLiteral("derived-ok"));
    buttons_->button(QDialogButtonBox::Cancel)->setObjectName(QStringLiteral("derived-cancel"));
    layout->addWidget(buttons_);
    connect(buttons_, &QDialogButtonBox::accepted, this, &DerivedColumnDialog::accept);
    connect(buttons_, &QDialogButtonBox::rejected, this, &DerivedColumnDialog::reject);

    connect(kind_, &QComboBox::currentIndexChanged, this, &DerivedColumnDialog::kindChanged);
    connect(source_, &QComboBox::currentIndexChanged, this, [this] {
        fillLevels();
        suggestName();
        updateHint();
    });
    connect(other_, &QComboBox::currentIndexChanged, this, &DerivedColumnDialog::suggestName);
    connect(level_, &QComboBox::currentIndexChanged, this, &DerivedColumnDialog::suggestName);
    connect(value_, &QLineEdit::textChanged, this, &DerivedColumnDialog::updateHint);
    connect(name_, &QLineEdit::textEdited, this, [this] { nameEdited_ = !name_->text().isEmpty(); });
    connect(name_, &QLineEdit::textChanged, this, [this] { setMessage({}, false); });
    setMinimumWidth(420);
    kindChanged();
}

void DerivedColumnDialog::setKind(RecipeKind kind) {
    const int i = kind_->findData(static_cast<int>(kind));
    if (i >= 0) kind_->setCurrentIndex(i);
}

void DerivedColumnDialog::setSource(const QString& column) {
    const int i = source_->findText(column);
    if (i >= 0) source_->setCurrentIndex(i);
}

void DerivedColumnDialog::kindChanged() {
    const KindInfo* k = info(kindOf(kind_));
    if (!k) return;
    const struct {
        QWidget* field;
        QWidget* label;
        bool shown;
    } rows[] = {{other_, otherLabel_, k->other}, {level_, levelLabel_, k->level}, {value_, valueLabel_, k->value}};
    for (const auto& row : rows) {
        row.field->setVisible(row.shown);
        if (row.label) row.label->setVisible(row.shown);
    }
    fillSources();
    suggestName();
    updateHint();
}

void DerivedColumnDialog::fillSources() {
    const KindInfo* k = info(kindOf(kind_));
    const QString keep = source_->currentText(), keepOther = other_->currentText();
    const QSignalBlocker b1(source_), b2(other_);
    source_->clear();
    other_->clear();
    if (table_)
        for (const auto& c : table_->columns) {
            const bool categorical = c.kind == ColumnKind::Categorical;
            if (categorical == k->categoricalSource) source_->addItem(q(c.name));
            if (!categorical) other_->addItem(q(c.name));
        }
    if (const int i = source_->findText(keep); i >= 0) source_->setCurrentIndex(i);
    if (const int i = other_->findText(keepOther); i >= 0) other_->setCurrentIndex(i);
    if (k->other && other_->currentText() == source_->currentText() && other_->count() > 1)
        other_->setCurrentIndex(source_->currentIndex() == 0 ? 1 : 0);
    fillLevels();
    buttons_->button(QDialogButtonBox::Ok)->setEnabled(source_->count() > 0);
    if (source_->count() == 0)
        setMessage(k->categoricalSource ? tr("This dataset has no categorical column.")
                                        : tr("This dataset has no numeric column."),
                   true);
    else setMessage({}, false);
}

void DerivedColumnDialog::fillLevels() {
    const QSignalBlocker block(level_);
    const QString keep = level_->currentText();
    level_->clear();
    if (!table_) return;
    if (const Column* c = table_->find(source_->currentText().toStdString()); c && c->kind == ColumnKind::Categorical)
        for (const auto& l : c->levels) level_->addItem(q(l));
    if (const int i = level_->findText(keep); i >= 0) level_->setCurrentIndex(i);
}

void DerivedColumnDialog::suggestName() {
    if (nameEdited_) return;
    const RecipeKind kind = kindOf(kind_);
    const QString s = source_->currentText();
    if (s.isEmpty()) {
        name_->clear();
        return;
    }
    QString base;
    if (kind == RecipeKind::CentreMean || kind == RecipeKind::CentreValue) base = s + QStringLiteral("_c");
    else if (kind == RecipeKind::CentreMedian) base = s + QStringLiteral("_cmed");
    else if (kind == RecipeKind::Standardise) base = s + QStringLiteral("_z");
    else if (kind == RecipeKind::Log) base = QStringLiteral("log_") + s;
    else if (kind == RecipeKind::Log1p) base = QStringLiteral("log1p_") + s;
    else if (kind == RecipeKind::Square) base = s + QStringLiteral("_sq");
    else if (kind == RecipeKind::Dummy) base = s + QLatin1Char('_') + plainName(level_->currentText());
    else if (kind == RecipeKind::Product) base = s + QStringLiteral("_x_") + other_->currentText();
    QString name = base;
    for (int k = 2; taken_.count(name.toStdString()); ++k) name = base + QLatin1Char('_') + QString::number(k);
    name_->setText(name);
}

void DerivedColumnDialog::updateHint() {
    // What the recipe will use, computed by core.
    const RecipeKind kind = kindOf(kind_);
    const Column* c = table_ ? table_->find(source_->currentText().toStdString()) : nullptr;
    QString text;
    try {
        if (c && kind == RecipeKind::CentreMean)
            text =
                tr("The mean of %1 is %2.").arg(q(c->name), TableModel::numberText(centre_value(*c, CentreAt::Mean)));
        else if (c && kind == RecipeKind::CentreMedian)
            text = tr("The median of %1 is %2.")
                       .arg(q(c->name), TableModel::numberText(centre_value(*c, CentreAt::Median)));
        else if (kind == RecipeKind::Standardise) text = tr("(value − mean) / SD, with the sample SD (divisor n − 1).");
        else if (kind == RecipeKind::Log) text = tr("Every value must be above 0.");
        else if (kind == RecipeKind::Log1p) text = tr("Every value must be above −1.");
        else if (kind == RecipeKind::Dummy) text = tr("Missing cells stay missing.");
    } catch (const InputError& e) {
        text = QString::fromStdString(e.what());
    }
    hint_->setText(text);
    growToFit();
}

void DerivedColumnDialog::growToFit() {
    // Wrapped text needs height for the dialog's width, which a dialog's
    // minimum size does not follow: grow the dialog rather than squeeze the
    // fields (before it is shown, showing sizes it).
    if (!isVisible()) return;
    layout()->activate();
    const int need =
        layout()->hasHeightForWidth() ? layout()->totalHeightForWidth(width()) : layout()->totalMinimumSize().height();
    if (need > height()) resize(width(), need);
}

void DerivedColumnDialog::setMessage(const QString& text, bool error) {
    message_->setText(text);
    keepAccentText(message_, error ? estuary::series(1) : QColor());
    growToFit();
}

QString DerivedColumnDialog::message() const { return message_->text(); }

DerivedRecipe DerivedColumnDialog::recipe() const {
    DerivedRecipe r;
    r.dataset = datasetId_.toStdString();
    r.name = name_->text().trimmed().toStdString();
    r.kind = kindOf(kind_);
    r.source = source_->currentText().toStdString();
    const KindInfo* k = info(r.kind);
    if (k && k->other) r.other = other_->currentText().toStdString();
    if (k && k->level) r.level = level_->currentText().toStdString();
    if (k && k->value) r.value = QLocale::c().toDouble(value_->text());
    return r;
}

void DerivedColumnDialog::accept() {
    const DerivedRecipe r = recipe();
    if (r.source.empty()) {
        setMessage(tr("Choose a column."), true);
        return;
    }
    if (r.name.empty()) {
        setMessage(tr("Give the new column a name."), true);
        return;
    }
    if (taken_.count(r.name)) {
        setMessage(tr("The dataset already has a column named “%1”; choose another name.").arg(q(r.name)), true);
        return;
    }
    if (r.kind == RecipeKind::Dummy && r.level.empty()) {
        setMessage(tr("Choose the level the indicator marks."), true);
        return;
    }
    bool ok = false;
    if (r.kind == RecipeKind::CentreValue && (QLocale::c().toDouble(value_->text(), &ok), !ok)) {
        setMessage(tr("Type the centring value as a number (with a point as the decimal mark)."), true);
        return;
    }
    // Try the recipe on the columns it reads (core computes; nothing is kept).
    if (table_) {
        Table part;
        part.source = table_->source;
        part.row_lines = table_->row_lines;
        for (const std::string& col : {r.source, r.other})
            if (const Column* c = table_->find(col); c && !part.find(col)) part.columns.push_back(*c);
        try {
            (void)apply_recipes(part, {r});
        } catch (const InputError& e) {
            setMessage(QString::fromStdString(e.what()), true);
            return;
        }
    }
    QDialog::accept();
}

}  // namespace moderato::ui
