#include "estimates/coefficient_model.hpp"

#include <QApplication>
#include <QBrush>
#include <QFont>
#include <QPalette>
#include <cmath>
#include <limits>

#include "common/number_text.hpp"
#include "common/scale_words.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

CoefficientModel::CoefficientModel(QObject* parent) : QAbstractTableModel(parent) {}

void CoefficientModel::setFit(const FitResult* fit, const QStringList& labels) {
    beginResetModel();
    rows_.clear();
    labels_.clear();
    if (fit) {
        rows_ = fit->coefficients;
        logistic_ = generalized(fit->family);
        scale_ = scaleWords(fit->family, fit->exposure, QString()).modelScale;
        multilevel_ = fit->multilevel.has_value();
        normalDf_ = multilevel_ && fit->multilevel->df == FixedEffectDf::Normal;
        dfMethod_ = multilevel_ && fit->multilevel->df_used() == FixedEffectDf::BetweenWithin
                        ? tr("between\u2013within")
                        : tr("Satterthwaite");
        level_ = fit->level;
        df_ = fit->df_inference;
        for (std::size_t i = 0; i < rows_.size(); ++i)
            labels_ << (static_cast<qsizetype>(i) < labels.size() ? labels[static_cast<qsizetype>(i)]
                                                                  : QString::fromStdString(rows_[i].term));
    }
    endResetModel();
    Q_EMIT headerDataChanged(Qt::Horizontal, 0, ColumnCount - 1);
}

void CoefficientModel::clear() { setFit(nullptr); }

int CoefficientModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() ? 0 : static_cast<int>(rows_.size());
}

int CoefficientModel::columnCount(const QModelIndex& parent) const { return parent.isValid() ? 0 : ColumnCount; }

double CoefficientModel::value(const Coefficient& c, int column) const {
    switch (column) {
        case Estimate:
            return c.estimate;
        case StdError:
            return c.std_error;
        case Statistic:
            return c.statistic;
        case P:
            return c.p_value;
        case Lower:
            return c.ci_lower;
        case Upper:
            return c.ci_upper;
        case Vif:
            return multilevel_ ? c.df : c.vif;
    }
    return std::numeric_limits<double>::quiet_NaN();
}

QVariant CoefficientModel::data(const QModelIndex& index, int role) const {
    if (!index.isValid() || index.row() >= rowCount()) return {};
    const auto r = static_cast<std::size_t>(index.row());
    const Coefficient& c = rows_[r];
    const int col = index.column();
    if (role == AliasedRole) return c.aliased;
    if (col == Term) {
        if (role == Qt::DisplayRole || role == FormattedRole)
            return c.aliased ? tr("%1 (aliased)").arg(labels_[index.row()]) : labels_[index.row()];
        if (role == Qt::ToolTipRole)
            return c.aliased ? tr("%1 is a linear combination of other columns and was not estimated.")
                                   .arg(labels_[index.row()])
                             : labels_[index.row()];
    } else {
        const double v = value(c, col);
        if (role == ValueRole) return v;
        if (role == Qt::DisplayRole) {
            if (c.aliased) return col == Estimate ? tr("aliased") : QString();
            return exactText(v);
        }
        if (role == FormattedRole) {
            if (c.aliased) return col == Estimate ? tr("aliased") : QString();
            if (std::isnan(v)) return QString();
            if (col == P) return pValueText(v);
            if (col == Df && multilevel_) return dfText(v);
            return numberText(v);
        }
        if (role == Qt::ToolTipRole && !c.aliased && !std::isnan(v)) return exactText(v);
        if (role == Qt::TextAlignmentRole) return QVariant(Qt::AlignRight | Qt::AlignVCenter);
    }
    if (role == Qt::ForegroundRole && c.aliased) return QBrush(mutedText(QApplication::palette(), QPalette::Base));
    if (role == Qt::FontRole && c.aliased) {
        QFont f;
        f.setItalic(true);
        return f;
    }
    return {};
}

QVariant CoefficientModel::headerData(int section, Qt::Orientation o, int role) const {
    if (o != Qt::Horizontal) return {};
    const QString pct = levelText(level_);
    if (role == Qt::TextAlignmentRole)
        return QVariant((section == Term ? Qt::AlignLeft : Qt::AlignRight) | Qt::AlignVCenter);
    if (role == Qt::DisplayRole) {
        switch (section) {
            case Term:
                return tr("Term");
            case Estimate:
                return tr("Estimate");
            case StdError:
                return tr("SE");
            case Statistic:
                return logistic_ || normalDf_ ? QStringLiteral("z") : QStringLiteral("t");
            case P:
                return QStringLiteral("p");
            case Lower:
                return tr("Lower %1").arg(pct);
            case Upper:
                return tr("Upper %1").arg(pct);
            case Vif:
                return multilevel_ ? QStringLiteral("df") : QStringLiteral("VIF");
        }
    }
    if (role == Qt::ToolTipRole) {
        switch (section) {
            case Estimate:
                return logistic_ ? tr("Coefficient on the %1 scale").arg(scale_)
                                 : tr("Coefficient in units of the outcome");
            case StdError:
                return tr("Standard error");
            case Statistic:
                if (logistic_ || normalDf_) return tr("Estimate / SE, compared with the standard normal distribution");
                if (multilevel_) return tr("Estimate / SE, compared with the t distribution on the term's own df");
                return tr("Estimate / SE, compared with the t distribution on %1 df").arg(df_);
            case P:
                return tr("Two-sided p-value for the coefficient being zero");
            case Lower:
            case Upper:
                return tr("Bounds of the %1 confidence interval").arg(pct);
            case Vif:
                if (multilevel_)
                    return normalDf_ ? tr("Degrees of freedom: none (tests against the normal distribution)")
                                     : tr("Degrees of freedom of the term's t test (%1)").arg(dfMethod_);
                return tr(
                    "Variance inflation factor: how much collinearity with the other columns inflates the variance");
        }
    }
    return {};
}

void CoefficientDelegate::initStyleOption(QStyleOptionViewItem* option, const QModelIndex& index) const {
    QStyledItemDelegate::initStyleOption(option, index);
    option->text = index.data(CoefficientModel::FormattedRole).toString();
}

}  // namespace moderato::ui
