// The model of an analysis written as an equation with the column names
// (ŷ = b₀ + b₁·x + …, or logit P(y = 1) = … for a logistic model), with
// categorical columns as their sets of 0/1 indicators, and one sentence that
// reads the interaction coefficient. Uses the labels of a fitted run when
// there is one for these roles, else expands the roles itself.
#pragma once

#include <QString>
#include <QStringList>
#include <string>
#include <vector>

#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::ui {

struct ModelEquation {
    QStringList terms;  // coefficient labels in order ("intercept", "x", "region=North", "x×z")
    QString html;       // the equation as rich text
    QString plain;      // the same as plain text
    QString legend;     // what ŷ and the indicators mean (plain text)
    QString reading;    // "b₃ is how much the slope of x changes per unit of z."
};

// Whether a run was fitted for this analysis's current roles and family.
bool runMatches(const AnalysisRun& run, const Analysis& a);

// `run` may be null (or stale: then it is not used). `table` may be null.
ModelEquation modelEquation(const Analysis& a, const Table* table, const AnalysisRun* run);

// "n = 150 rows used; 3 excluded (rows missing soil_moisture_pct: 2)".
QString rowsUsedText(const FitResult& fit);

}  // namespace moderato::ui
