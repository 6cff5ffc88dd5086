// The tables of an analysis, ready for export and for the memo: estimates,
// fit statistics, the comparison with the model without the product terms,
// the effects at chosen moderator values (pick-a-point), and for two
// categorical predictors the cell table and its contrasts; a multilevel
// analysis adds its variance components and random-slope tests, shows each
// term's df, and reports no R². A generalized model's fit statistics add its
// deviance and likelihood-ratio test, a negative binomial's dispersion alpha
// with its interval, a Poisson model's overdispersion statistics; a count
// model's effects table adds each effect's rate ratio and interval. Display text
// follows support/report_text.hpp; the CSV column holds the exact doubles.
// The effects and the contrasts list each estimate in the house order, as the
// Probe section does: the value, its interval (low, high), SE, test value, p.
// The estimates table keeps the order regression coefficients are usually
// printed in (estimate, SE, test value, p, interval).
#pragma once

#include <string>
#include <vector>

#include "moderato/project/analysis_run.hpp"
#include "moderato/reporting/table_export.hpp"

namespace moderato {

struct NamedTable {
    std::string key;  // file stem: "estimates", "fit-statistics", "variance-components",
                      // "random-slope-tests", "model-comparison", "conditional-effects",
                      // "cell-table", "cell-contrasts"
    ExportTable table;
};

// "classical", "HC3", "cluster-robust (shop, 40 clusters)", "model-based"
// (logistic or multilevel classical); `clusters` names the cluster column
// (may be empty).
std::string se_description(const FitResult& fit, const std::string& clusters = {});

// "t" for linear models, "z" for generalized ones (logistic, probit, Poisson, negative binomial).
std::string statistic_name(const FitResult& fit);

// How a moderator value reads in a table or sentence: "12.5 (mean − 1 SD)",
// "12.5 (mean)", or just the value.
std::string moderator_value_label(const ProbeResult& probe, const EffectPoint& point);

// Every table the run holds, in memo order.
std::vector<NamedTable> analysis_tables(const Analysis& analysis, const AnalysisRun& run);

}  // namespace moderato
