// Linear models (OLS and WLS) fitted to a file read in chunks, for tables
// larger than memory: memory holds one chunk and p x p matrices, never n x p.
//
// Pass A reads the file once for the columns' kinds and levels (csv_stream)
// and the facts the design rests on: complete rows and exclusions, the
// categorical levels held by used rows (reference levels), constant
// predictors, clusters. Pass B builds the triangular factor of the weighted
// [X | y] chunk by chunk (streamed_factor) and solves as least_squares does.
// Pass C, only for the sandwich kinds (HC0-HC4, cluster), reads the residuals
// again: leverages from the inverse factor, the meat or the per-cluster score
// sums, and the RSS. Classical standard errors take 2 passes (the RSS from
// the factor), every other kind 3; one fewer when no term has a categorical
// factor and the problem is large enough for least_squares' double-precision
// path (n (p + 1)^2 over FitOptions::extended_budget): the layout is then
// known from the header and pass B is folded into pass A. Pass A runs once
// more when a column meets its first text after numbers (as read_csv does). Each chunk's design rows
// are made by build_design's own fill_rows, so the results equal fit_model's
// on the whole table to rounding (1e-9 relative in the tests).
#pragma once

#include <cstddef>

#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/reading/csv_stream.hpp"

namespace moderato {

// Passes over the file a streamed fit with this SE kind takes (no restart,
// no folding of pass B into pass A).
std::size_t streamed_passes(SeKind se);

// Fits the model to the stream's file. The result is fit_model's but for
// `fitted` and `residuals` (empty), the numeric summaries, and a note and
// `streamed` saying how it was read. Throws InputError for what fit_model
// refuses (naming the file and line where a cell is at fault), and for what
// is not streamed: generalized families, multilevel models, an exposure.
FitResult fit_streamed(CsvStream& stream, const ModelSpec& spec, const FitOptions& options = {});

}  // namespace moderato
