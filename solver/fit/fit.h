// Batch fit: features -> map, the whole t-SNE pipeline on the calling thread (plus the worker
// threads the neighbour search and the objective use inside).
//   prepare features (feature_prep.h) -> k = min(N-1, floor(3 perplexity)) neighbours
//   (neighbours.h) -> calibrated P (affinities.h) -> PCA start (first column std 1e-4)
//   -> run_schedule(NeighbourTerm) for `iterations` steps of the Schedule (schedule.h).
// run_schedule is the loop itself and takes any ObjectiveTerm plus a hook that sets the
// exaggeration, so the blended objective (solver/objective/blended_objective.h) runs the same schedule.
// With options.neighbours (a given graph, solver/io/neighbour_graph_file.h) P comes from that
// graph (joint_affinities_from_graph, perplexity_for_graph) instead of a search; the features are
// then optional: with them the start is PCA as above, without (N x 0) a seeded Gaussian of
// standard deviation 1e-4, and FitResult::features stays empty.
// Items without features nor a graph are placed from options.judgments alone: the t-STE
// term from a seeded Gaussian start, no KL term, no exaggeration; FitResult::features and p stay
// empty. Divergence (NaN, infinite or exploding coordinates) throws DivergenceError; the map is not
// returned. Functions here may be called from any thread; they share no state.
#pragma once
#include <cstdint>
#include <functional>
#include <memory>
#include <stdexcept>
#include <string>

#include <vector>

#include "solver/features/affinities.h"
#include "solver/base/judgment.h"
#include "solver/base/map_parameters.h"
#include "solver/base/neighbour_graph.h"
#include "solver/objective/objective_term.h"
#include "solver/base/points.h"
#include "solver/base/stage_log.h"
#include "solver/fit/schedule.h"

namespace kith {

// The map's settings (MapParameters; the exaggeration after the early phase is not used by a
// batch fit) and how the fit runs.
struct FitOptions : MapParameters {
  bool exact = false;           // exact O(N^2) repulsion and exact neighbours (default: false)
  int threads = 0;              // 0 = all hardware threads (default: 0)
  bool standardize = false;     // scale feature columns to unit variance (default: false)
  int pca_dims = 50;            // PCA features down to this many dims when wider, 0 = never (default: 50)
  std::vector<Judgment> judgments;  // blended in as t-STE (blended_objective.h) when given (default: none)
  // A given neighbour graph of the N items, not owned: P comes from it (default: none, searched)
  const NeighbourGraph* neighbours = nullptr;
  // Receives one stage for each step of the pipeline (features, neighbours, affinities, start,
  // optimization) with its time and peak memory; not owned (default: none)
  StageLog* stages = nullptr;
  // A readable message for the first impossible value; n (if > 0) also checks perplexity < n.
  bool IsValid(std::string* error, size_t n = 0) const;
};

struct FitProgress {
  int64_t iteration = 0;        // steps done
  int64_t total = 0;            // steps planned
  double cost = 0.0;            // objective at the last step (exaggerated while exaggerating)
  bool exaggerating = false;
  double iterations_per_second = 0.0;
  double seconds_left = 0.0;
};
// Called every `progress_every` steps and at the end; return false to stop early.
using ProgressFn = std::function<bool(const FitProgress&)>;

struct FitSummary {
  int64_t iterations = 0;       // steps done
  double kl = 0.0;              // KL(P||Q) of the final map, exaggeration 1
  double seconds = 0.0;         // whole fit, wall clock
  double setup_seconds = 0.0;   // features, neighbours and affinities
  double learning_rate = 0.0;   // the rate used
  bool stopped_early = false;   // the progress callback asked to stop
  std::string BriefReport() const;  // one line
};

class DivergenceError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// The optimization loop, for any objective. `set_exaggeration` is called whenever the schedule's
// factor changes (at the start and when exaggeration ends). Starts at schedule iteration `first`.
struct LoopOptions {
  Schedule schedule;
  int64_t first = 0;            // schedule iteration of the first step (default: 0)
  int64_t iterations = 1000;    // steps to run (default: 1000)
  int progress_every = 50;      // (default: 50)
  double explode_above = 1e6;   // |coordinate| beyond this counts as divergence (default: 1e6)
};
FitSummary run_schedule(ObjectiveTerm& objective, const std::function<void(double)>& set_exaggeration, Points& y,
                        const LoopOptions& options, const ProgressFn& progress = {});

struct FitResult {
  Points map;                                    // N x dims
  Points features;                               // the prepared features the neighbours came from
  std::shared_ptr<const SparseAffinities> p;     // joint P
  FitSummary summary;
  std::string features_note;                     // what preparation did
};

// Throws std::invalid_argument for bad options or features (NaN, too few rows), DivergenceError.
FitResult fit_map(const Points& features, const FitOptions& options, const ProgressFn& progress = {});

}  // namespace kith
