// A probe's bootstrap intervals as JSON (inside the probe report) and as text.
#pragma once

#include <string>

#include "moderato/probing/probe_bootstrap.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

void write_probe_bootstrap(JsonWriter& w, const ProbeBootstrap& b);
std::string probe_bootstrap_to_text(const ProbeBootstrap& b);

}  // namespace moderato
