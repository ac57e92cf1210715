// DemoCeilings: what a map could score on the demo's measures if it knew the hidden distance
// itself, so the trial's figures have something to stand beside.
//   t-SNE ceiling:  the same t-SNE as the features-only map (perplexity, k = neighbour_count
//                   neighbours, the default schedule and iterations, Barnes-Hut) but with the
//                   neighbours and squared distances of the hidden distance d (SimulatedPeople::
//                   distance) instead of the features', started from the classical scaling of
//                   d^2 (solver/features/feature_prep.h) scaled to a first-column spread of 1e-4
//                   as the PCA start is;
//   metric MDS:     SMACOF (de Leeuw's majorization of the raw stress sum_{i<j} (|x_i - x_j| -
//                   d_ij)^2, the Guttman transform X <- B(X) X / n, as in Borg and Groenen,
//                   Modern Multidimensional Scaling, ch. 8, and scikit-learn's smacof), from the
//                   classical scaling, `mds_iterations` steps or until the stress falls by less
//                   than a relative 1e-6.
// Both are measured like the trial's maps: held-out triplet agreement and the local k-NN measure
// (solver/demo/demo_trial.h). Deterministic; any thread.
#pragma once
#include <cstdint>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"
#include "solver/demo/simulated_people.h"

namespace kith {

struct CeilingOptions {
  int dims = 3;                // (default: 3, as the demo's map)
  double perplexity = 30.0;    // (default: 30, as the trial)
  int iterations = 750;        // t-SNE steps (default: 750, as the trial's features-only map)
  int mds_iterations = 300;    // SMACOF steps at most (default: 300)
  int threads = 0;             // (default: 0 = all)
};

struct DemoCeilings {
  Points tsne_map, mds_map;
  double tsne_heldout = -1, tsne_local = -1;
  double mds_heldout = -1, mds_local = -1;
  double mds_stress = -1;      // raw stress / sum d^2 at the end (Kruskal's stress-1 squared)
};

// `heldout` and `hidden` (each item's local_k nearest by d, from hidden_neighbours) as the trial uses.
DemoCeilings demo_ceilings(const SimulatedPeople& people, const std::vector<Judgment>& heldout,
                           const std::vector<int32_t>& hidden, int local_k, const CeilingOptions& options = {});

}  // namespace kith
