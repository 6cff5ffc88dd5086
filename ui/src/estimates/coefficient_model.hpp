// The coefficient table of a fit: term, estimate, SE, t or z, p, the
// interval at the fit's level, VIF. The display role holds every digit (so
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
    static constexpr int FormattedRole = Qt::UserRole + 1;
    static constexpr int ValueRole = Qt::UserRole + 2;  // the double (NaN where there is none)
    static constexpr int AliasedRole = Qt::UserRole + 3;

    explicit CoefficientModel(QObject* parent = nullptr);
    // `labels`: the term shown for each coefficient (empty: the fit's own labels).
    void setFit(const FitResult* fit, const QStringList& labels = {});
    void clear();
    bool isLogistic() const { return logistic_; }

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role) const override;
    QVariant headerData(int section, Qt::Orientation o, int role) const override;

private:
    double value(const Coefficient& c, int column) const;
    std::vector<Coefficient> rows_;
    QStringList labels_;
    bool logistic_ = false;
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
