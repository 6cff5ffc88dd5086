// The scale a probe reports on, and how effects on the outcome's own scale
// are summarised. Project settings and probe results share these; their
// names as text live only where project files and reports are read and
// written.
#pragma once

namespace moderato {

// Model: the scale the coefficients live on (the linear predictor: the
// outcome itself for a linear model, log-odds for a logistic one).
// Outcome: the outcome's own scale (probability for a logistic model).
enum class ProbeScale { Model, Outcome };

enum class Averaging {
    Sample,    // every observation at its own covariate values, then averaged
    AtValues,  // one profile: covariates at their means / reference levels (or as given)
};

}  // namespace moderato
