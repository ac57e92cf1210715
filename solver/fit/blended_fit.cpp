#include "solver/fit/blended_fit.h"

#include <random>
#include <sstream>
#include <stdexcept>

#include "solver/base/portable_random.h"
#include "solver/fit/fit.h"

namespace kith {

bool BlendedFitOptions::IsValid(std::string* error) const {
  if (iterations < 0) {
    if (error) *error = "iterations must be 0 or more, got " + std::to_string(iterations);
    return false;
  }
  return true;
}

std::string BlendedFitSummary::report() const {
  std::ostringstream m;
  m.precision(4);
  m << iterations << " iterations, cost " << cost << " (KL " << costs.neighbour << ", mean -log p " << costs.judgment
    << ")" << (finite ? "" : ", stopped: the map went NaN or infinite");
  return m.str();
}

Points random_start(size_t n, int dims, uint64_t seed, double scale) {
  std::mt19937_64 rng(seed);
  Points y(Eigen::Index(n), dims);
  for (Eigen::Index i = 0; i < y.size(); ++i) y.data()[i] = normal(rng, 0.0, scale);
  return y;
}

BlendedFitSummary fit_blended(BlendedObjective& objective, Points& y, const BlendedFitOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  NeighbourTerm* neighbour = objective.neighbour_term();
  LoopOptions loop;
  loop.schedule = options.schedule;
  if (!neighbour) loop.schedule.exaggeration_iterations = 0;  // nothing to exaggerate
  loop.iterations = options.iterations;
  BlendedFitSummary summary;
  try {
    const FitSummary s = run_schedule(
        objective, [neighbour](double e) { if (neighbour) neighbour->set_exaggeration(e); }, y, loop);
    summary.iterations = int(s.iterations);
    summary.cost = s.kl;  // run_schedule's final evaluation: the whole objective here
  } catch (const DivergenceError&) {
    summary.finite = false;
  }
  summary.costs = objective.last_costs();
  return summary;
}

}  // namespace kith
