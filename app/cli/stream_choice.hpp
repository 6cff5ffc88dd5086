// Whether `fit` streams its file (--stream, --memory-budget): the memory an
// in-memory fit would need, estimated from the file, against the budget.
#pragma once

#include <cstddef>
#include <string>

#include "arguments.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato::cli {

struct StreamChoice {
    bool stream = false;
    bool forced = false;   // --stream
    double need_mb = 0;    // estimated peak of an in-memory fit
    double budget_mb = 0;  // --memory-budget, or the default
    std::string note;      // why it streams (or could not), for the fit's notes
};

// The default budget: a quarter of physical memory (see the .cpp).
double default_memory_budget_mb();

// Decides from --stream, --memory-budget and the file. A model that cannot be
// streamed (generalized families, multilevel models, an exposure, column
// transforms) is refused under --stream and fitted in memory, with a note,
// when only the budget asked for streaming.
StreamChoice choose_streaming(const Arguments& args, const ModelSpec& spec);

}  // namespace moderato::cli
