// Health measures of a map against its features. The map's paths pass the prepared features
// (solver/features/feature_prep.h), which under the cosine metric are the unit rows (reduced by
// PCA when wider, as for the neighbour search), so the figures then judge the map by angle.
//   trustworthiness (Venna & Kaski 2001), exactly as scikit-learn's
//   sklearn.manifold.trustworthiness defines it (Euclidean distances):
//     T(k) = 1 - 2 / (n k (2n - 3k - 1)) * sum_i sum_{j in U_i} (r(i, j) - k)
//   where U_i are i's k nearest map neighbours that are not among its k nearest feature
//   neighbours and r(i, j) is j's rank among i's feature-space neighbours (nearest = 1; ties in
//   index order). 1 means no false neighbours in the map.
//   neighbour recall at k (Kobak & Berens 2019): mean over items of |kNN_features(i) n kNN_map(i)| / k.
// Both cost O(n^2 (F + k)) time and O(n) memory per thread, so above HealthOptions::sample_above
// items they are computed on a fixed-seed random subsample of sample_above items (neighbours are
// then taken within the subsample). KL(P||Q) comes from the neighbour term (NeighbourTerm::evaluate
// at exaggeration 1), not from here. Pure functions; any thread.
#pragma once
#include <cstddef>
#include <cstdint>
#include <string>

#include "solver/base/points.h"

namespace kith {

struct HealthOptions {
  int trust_k = 5;              // trustworthiness neighbours, scikit-learn's default (default: 5)
  int recall_k = 10;            // neighbour recall neighbours (default: 10)
  size_t sample_above = 5000;   // subsample to this many items when there are more (default: 5000)
  uint64_t seed = 42;           // subsample seed (default: 42)
  int threads = 0;              // 0 = all hardware threads (default: 0)
};

struct MapHealth {
  double kl = -1.0;              // filled by the caller when known; -1 otherwise
  double trustworthiness = -1.0;
  double neighbour_recall = -1.0;
  size_t sample = 0;             // items the two neighbour measures were computed on
  std::string BriefReport() const;  // one line
};

// On all rows (no subsampling). k must satisfy k < n / 2 for trustworthiness (as scikit-learn
// requires) and k < n for recall; throws std::invalid_argument otherwise.
double trustworthiness(const Points& features, const Points& map, int k, int threads = 0);
double neighbour_recall(const Points& features, const Points& map, int k, int threads = 0);

// Both, subsampled as documented above.
MapHealth measure_health(const Points& features, const Points& map, const HealthOptions& options = {});

}  // namespace kith
