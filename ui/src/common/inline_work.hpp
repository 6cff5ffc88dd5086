// How much work the workbench still does on the UI thread. Anything bigger
// (a fit, a re-probe that scans the rows, a diagnostics pass) runs in a
// worker, so the window never stops answering.
//
// The measure is table cells (rows × columns of the dataset, or rows ×
// design columns for the checks). A fit costs about 0.25 µs a cell on the
// development machine (0.17 s for 100,000 rows × 7 columns), so 50,000 cells
// is about 12 ms: less than one frame at 60 Hz, and well under the 50 ms a
// user notices as a stall (tests/benchmarks/bench_ui_stall.cpp measures it).
// Below it, a worker would only add a thread hop and a frame of flicker; the
// sample projects (at most 2,000 rows) stay synchronous, which keeps typing
// and dragging on small data immediate.
#pragma once

namespace moderato::ui {

inline constexpr double kInlineWorkCells = 5e4;

}  // namespace moderato::ui
