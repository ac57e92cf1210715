// Batch fit of a BlendedObjective: the shared optimization loop (run_schedule, solver/fit/fit.h)
// for a fixed number of iterations. Early exaggeration applies to
// the neighbour term only; a judgments-only objective (no neighbour term) runs with the schedule's
// momenta and learning rate, without exaggeration. Used by `kith fit`, the held-out agreement
// and the tests and benchmarks. Runs on the calling thread.
#pragma once
#include <cstdint>
#include <string>

#include "solver/objective/blended_objective.h"
#include "solver/fit/schedule.h"

namespace kith {

struct BlendedFitOptions {
  int iterations = 1000;  // (default: 1000)
  Schedule schedule;      // (default: scikit-learn-like: 250 exaggerated iterations, auto learning rate)
  bool IsValid(std::string* error) const;
};

struct BlendedFitSummary {
  int iterations = 0;
  double cost = 0.0;
  TermCosts costs;
  bool finite = true;
  std::string report() const;  // one line
};

// Small random start (Gaussian, standard deviation `scale`), as t-SNE's random initialization.
Points random_start(size_t n, int dims, uint64_t seed, double scale = 1e-4);

// Optimizes y in place. finite = false (y then holds the last map) if the map diverged.
BlendedFitSummary fit_blended(BlendedObjective& objective, Points& y, const BlendedFitOptions& options = {});

}  // namespace kith
