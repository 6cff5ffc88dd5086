// The Estimates section's "Random part" of a multilevel fit: a table of
// each random effect's variance and SD with their correlations (full
// covariance) and the residual's, then the groups and their sizes, the
// intraclass correlation where it is defined, each random slope's
// likelihood-ratio test with the mixture it is referred to, the estimation
// and the degrees of freedom; a banner when the fit is singular or did not
// settle. Every number comes from core's MultilevelResult.
#pragma once

#include <QWidget>

#include "moderato/estimation/fit.hpp"

class QLabel;
class QTableWidget;

namespace moderato::ui {

class RandomPartView : public QWidget {
    Q_OBJECT
public:
    explicit RandomPartView(QWidget* parent = nullptr);
    // Shows the random part of `fit`; hides itself for a single-level fit (or none).
    void setFit(const FitResult* fit);

    QTableWidget* table() const { return table_; }
    QLabel* detailsLabel() const { return details_; }
    QLabel* singularLabel() const { return singular_; }

private:
    void fillTable(const MultilevelResult& m);
    QString detailsText(const FitResult& fit) const;
    void fitTableSize();

    QLabel* singular_;
    QTableWidget* table_;
    QLabel* details_;
};

}  // namespace moderato::ui
