// A probe as JSON (output_version 2: ARCHITECTURE.md's CLI contract, every
// field in docs/cli-output.md) and as readable text.
#pragma once

#include <string>

#include "moderato/probing/probe.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

// Writes the probe's fields into an object the caller has opened.
void write_probe_fields(JsonWriter& w, const ProbeResult& probe);
std::string probe_to_text(const ProbeResult& probe, const FitResult& fit);

}  // namespace moderato
