// A project's first analysis through core alone (load_project, build_design,
// fit_design, probe), the independent route tests compare the workbench's
// numbers with; and finding a term of the fit by its factors.
#pragma once

#include <algorithm>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"

namespace moderato::test {

using AnalysisEdit = std::function<void(Analysis&)>;

struct DirectFit {
    LoadedProject loaded;
    Analysis analysis;  // the project's first analysis, edited
    std::shared_ptr<const Table> table;
    Design design;
    FitResult fit;
};

// Loads `project`, applies `edit` (if any) to its first analysis and fits it.
inline DirectFit direct_fit(const std::string& project, const AnalysisEdit& edit = {}) {
    DirectFit d{load_project(project), {}, {}, {}, {}};
    d.analysis = d.loaded.project.analyses.front();
    if (edit) edit(d.analysis);
    d.table = d.loaded.tables.at(d.analysis.dataset);
    const ModelSpec spec = model_spec(d.analysis);
    d.design = build_design(*d.table, spec);
    d.fit = fit_design(d.design, spec);
    return d;
}

struct DirectProbe : DirectFit {
    ProbeResult probe;
};

// The same, probed as the analysis asks: its focal predictor and moderator,
// and a second moderator held where the analysis holds it.
inline DirectProbe direct_probe(const std::string& project, const AnalysisEdit& edit = {}) {
    DirectProbe d{direct_fit(project, edit), {}};
    ProbeSpec ps;
    ps.focal = d.analysis.roles.focal;
    ps.moderator = d.analysis.roles.moderator;
    ps.second_moderator = d.analysis.roles.second_moderator;
    ps.second_value = d.analysis.probe.second_value;
    d.probe = probe(d.design, d.fit, ps);
    return d;
}

// The index of the term made of `factors` ("x", or "x" and "z" for x×z, in
// either order), or -1 when the fit has no such term.
inline int coefficient_index(const FitResult& fit, std::vector<std::string> factors) {
    std::sort(factors.begin(), factors.end());
    do {
        std::string term;
        for (const auto& f : factors) term += (term.empty() ? "" : "×") + f;
        const int i = fit.index_of(term);
        if (i >= 0) return i;
    } while (std::next_permutation(factors.begin(), factors.end()));
    return -1;
}

}  // namespace moderato::test
