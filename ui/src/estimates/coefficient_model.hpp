// The coefficient table of a fit: term, estimate, SE, t or z, p, the
// interval at the fit's level, VIF; for a multilevel fit (which has no VIF)
// the last column holds each term's own degrees of freedom instead, as
// format_df writes them. The display role holds every digit (so
// copied text keeps full precision); FormattedRole holds what the table
// shows (a few significant digits, "< 0.001"), drawn by CoefficientDelegate.
#pragma once

#include <QAbstractTableModel>
#include <QStringList>
#include <QStyledItemDelegate>
#include <vector>

#include "moderato/estimation/fit.hpp"

namespace moderato::ui {

class CoefficientModel : public QAbstractTableModel {
    Q_OBJECT
public:
    enum Col { Term = 0, Estimate, StdError, Statistic, P, Lower, Upper, Vif, ColumnCount };
    // A multilevel fit's last column: each term's df (where a single-level fit has its VIF).
    static constexpr int Df = Vif;
    static constexpr int FormattedRole = Qt::UserRole + 1;
    static constexpr int ValueRole = Qt::UserRole + 2;  // the double (NaN where there is none)
    static constexpr int AliasedRole = Qt::UserRole + 3;

    explicit CoefficientModel(QObject* parent = nullptr);
    // `labels`: the term shown for each coefficient (empty: the fit's own labels).
    void setFit(const FitResult* fit, const QStringList& labels = {});
    void clear();
    bool isLogistic() const { return logistic_; }
    // Whether the last column holds each term's df (a multilevel fit).
    bool showsDf() const { return multilevel_; }

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role) const override;
    QVariant headerData(int section, Qt::Orientation o, int role) const override;

private:
    double value(const Coefficient& c, int column) const;
    std::vector<Coefficient> rows_;
    QStringList labels_;
    bool logistic_ = false;  // any generalized family: z tests, coefficients on scale_
    QString scale_;          // "log-odds", "probit", "log expected count", "log rate"
    bool multilevel_ = false;
    bool normalDf_ = false;  // multilevel tests against the normal distribution (z)
    QString dfMethod_;       // "Satterthwaite", "between–within" (multilevel)
    double level_ = 0.95;
    double df_ = 0;
};

// Draws FormattedRole instead of the full-precision display text.
class CoefficientDelegate : public QStyledItemDelegate {
public:
    using QStyledItemDelegate::QStyledItemDelegate;

protected:
    void initStyleOption(QStyleOptionViewItem* option, const QModelIndex& index) const override;
};

}  // namespace moderato::ui
