// A first map for a large collection in a fraction of a full fit's time (a multiscale start):
//   1. a seeded random sample S of the items (multiscale_sample_size: a tenth, 5,000 .. 20,000);
//   2. S's own affinities: exact neighbours among S (k = 3 perplexity), the same perplexity, so
//      each sampled item's neighbourhood spans about N / |S| times more of the collection;
//   3. S's map: PCA start, the usual schedule (early exaggeration included) for
//      `sample_iterations` steps;
//   4. every other item at the p_ij-weighted mean of its sampled neighbours (its row of the full
//      joint P); an item with none in S takes its placed neighbours' mean in a later pass, and
//      the map's centre after the last; seeded jitter of half the sample's typical spacing keeps
//      items with the same neighbours apart (the kernel's gradient between coincident points is 0).
// The caller then refines the whole map with the full P from the schedule's first step after
// early exaggeration (Schedule::exaggeration_iterations). Pure function; any thread.
#pragma once
#include <cstddef>
#include <cstdint>
#include <vector>

#include "solver/base/map_parameters.h"
#include "solver/base/points.h"
#include "solver/features/affinities.h"

namespace kith {

// Collections of at least this many items start this way in the live engine (default of
// EngineOptions::multiscale_above).
constexpr size_t kMultiscaleAbove = 20000;

// N / 10, at least 5,000 and at most 20,000 (and never more than N).
size_t multiscale_sample_size(size_t n);

struct MultiscaleOptions {
  size_t sample = 0;                // items in S; 0 = multiscale_sample_size(N) (default: 0)
  int64_t sample_iterations = 500;  // schedule steps on S, the first 250 exaggerated (default: 500)
  int dims = 3;                     // (default: 3)
  double dof = 1.0;                 // Student-t degrees of freedom (default: 1)
  double perplexity = 30.0;         // S's perplexity (default: 30)
  double theta = 0.5;               // Barnes-Hut opening angle for S (default: 0.5)
  uint64_t seed = 42;               // sample, PCA and jitter (default: 42)
  int threads = 0;                  // 0 = all (default: 0)
};

// Steps 1-3 need only the features, so a caller may run them while the full P is being built.
struct MultiscaleSample {
  std::vector<int32_t> items;  // the sampled items, in table order
  Points map;                  // their map, one row each
};
// `prepared`: the prepared features (feature_prep.h). Throws std::invalid_argument when the sample
// is too small for the perplexity.
MultiscaleSample fit_multiscale_sample(const Points& prepared, const MultiscaleOptions& options);
// Step 4 with the full joint P of all items.
Points place_from_sample(const MultiscaleSample& sample, const SparseAffinities& p, const MultiscaleOptions& options);
// Both in turn.
Points multiscale_start(const Points& prepared, const SparseAffinities& p, const MultiscaleOptions& options);

}  // namespace kith
