// A SampleWindow on the Probe section of the analysis it shows, with the
// plots laid out at their size: the start of every Probe section test.
#pragma once

#include <qcustomplot.h>
#include <QCoreApplication>

#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "sample_window.hpp"
#include "sections/probe_section.hpp"

namespace moderato::test {

struct ProbeWindow : SampleWindow {
    ui::ProbeSection* section = nullptr;

    explicit ProbeWindow(const QString& project, QSize size = {1400, 900}) : SampleWindow(project, size) {
        showSection(ui::AnalysisPage::Probe);
        section = w.analysisPage()->probe();
        settle();
    }
    // Lets layouts and queued replots finish, then lays the plots out at their size.
    void settle() {
        for (int i = 0; i < 5; ++i) QCoreApplication::processEvents();
        section->effectPlot()->figurePlot()->replot();
        section->linesPlot()->figurePlot()->replot();
        QCoreApplication::processEvents();
    }
};

}  // namespace moderato::test
