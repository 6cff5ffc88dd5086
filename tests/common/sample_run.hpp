// A sample project's first analysis run straight through core, the route the
// renderer and `moderato-cli render` take: what tests compare the memo, the
// tables and the workbench with.
#pragma once

#include <string>

#include "common/sample_projects.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"

namespace moderato::test {

struct SampleRun {
    LoadedProject loaded;
    Analysis analysis;  // the project's first analysis
    AnalysisRun run;
};

inline SampleRun run_sample(const std::string& name) {
    SampleRun s{load_project(sample_project(name).string()), {}, {}};
    s.analysis = s.loaded.project.analyses.front();
    s.run = run_analysis(s.loaded.tables.at(s.analysis.dataset), s.analysis);
    return s;
}

}  // namespace moderato::test
