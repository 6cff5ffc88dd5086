// How the workbench writes numbers: core's one formatter
// (moderato/support/report_text.hpp, where the rules are) with QString in
// and out. Nothing else lives here, so a number reads the same in the memo,
// the tables, the readout, the plot axes and the dataset grid.
#pragma once

#include <QString>

#include "moderato/support/report_text.hpp"

namespace moderato::ui {

inline QString numberText(double x) { return QString::fromStdString(format_sig(x)); }
inline QString rangeText(double lo, double hi) { return QString::fromStdString(format_range(lo, hi)); }
inline QString pValueText(double p) { return QString::fromStdString(format_p_value(p)); }
inline QString pClauseText(double p) { return QString::fromStdString(p_clause(p)); }
inline QString countText(long long n) { return QString::fromStdString(format_count(n)); }
inline QString levelText(double level) { return QString::fromStdString(level_text(level)); }
inline QString statisticText(double df) { return QString::fromStdString(statistic_label(df)); }
inline QString dfText(double df) { return QString::fromStdString(format_df(df)); }
inline QString exactText(double x) { return QString::fromStdString(exact_text(x)); }
inline QString dataText(double x) { return QString::fromStdString(format_data(x)); }
inline QString tickText(double x, double step) { return QString::fromStdString(format_tick(x, step)); }
inline QString subscriptText(int n) { return QString::fromStdString(subscript_text(n)); }
inline QString superscriptText(int n) { return QString::fromStdString(superscript_text(n)); }

}  // namespace moderato::ui
