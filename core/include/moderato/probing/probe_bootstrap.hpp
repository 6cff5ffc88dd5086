// Bootstrap intervals for what a probe reports: the conditional effects at
// the probe's moderator values, the Johnson–Neyman boundaries and the
// crossover point. Every replicate keeps the probe's held values fixed (they
// are the question, not an estimate), refits, and recomputes.
#pragma once

#include <string>
#include <vector>

#include "moderato/estimation/bootstrap.hpp"
#include "moderato/probing/probe.hpp"

namespace moderato {

// What a bootstrapped statistic of a probe is: a conditional effect, a
// Johnson–Neyman boundary or the crossover point.
enum class ProbeStatistic { Effect, Boundary, Crossover };
const char* to_string(ProbeStatistic statistic);  // "effect", "boundary", "crossover"

struct ProbeBootstrap {
    std::vector<std::string> labels;  // one per statistic, e.g. "effect at z = 1.5", "boundary 1", "crossover"
    std::vector<ProbeStatistic> kinds;
    std::vector<double> at;  // moderator value (effects), index (boundaries), NaN (crossover)
    BootstrapResult result;
    std::uint64_t seed = 0;
};

// Link-scale probes use the effect and gap functions' fixed bases with each
// replicate's coefficients and covariance; response-scale probes recompute
// the probability effects on each replicate's rows (their boundaries are not
// bootstrapped: each would need a scan per replicate).
ProbeBootstrap bootstrap_probe(const Design& design, const ModelSpec& spec, const ProbeSpec& probe_spec,
                               const ProbeResult& probe, const BootstrapOptions& options);

}  // namespace moderato
