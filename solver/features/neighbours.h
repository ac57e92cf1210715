// k nearest neighbours in feature space, excluding the item itself, by squared Euclidean distance,
// or under Metric::kCosine by the squared Euclidean distance of the rows scaled to length 1:
//   |x/|x| - y/|y||^2 = 2 (1 - cos(x, y)),  twice the cosine distance (same order, same neighbours).
// Exact (blocked Eigen products) below NeighbourOptions::exact_below items, HNSW (hnswlib) above.
// Deterministic for a given seed. Pure functions; safe to call from any thread.
#pragma once
#include <cstdint>
#include <vector>

#include "solver/base/map_parameters.h"
#include "solver/base/neighbour_graph.h"
#include "solver/base/points.h"

namespace kith {

struct NeighbourOptions {
  size_t exact_below = 20000;  // exact search for fewer items than this (default: 20000)
  uint64_t seed = 42;          // HNSW level generator seed (default: 42)
  int threads = 0;             // 0 = all hardware threads (default: 0)
  Metric metric = Metric::kEuclidean;  // see above (default: euclidean)
  // HNSW's graph: links per item (M), candidates kept while building (ef_construction) and while
  // searching (ef, at least 2k + 2 and at least this). Measured (tests/bench/bench_hnsw.cpp,
  // RESULTS-scale.md): at 100,000 x 50 and k = 90, 64 build candidates keep 0.994 of the exact
  // neighbours (200 keep 0.999) in about 0.6 of the time; the default stays 200 until the
  // suite has run with 64.
  size_t hnsw_links = 16;            // (default: 16)
  size_t hnsw_build_candidates = 200;  // (default: 200)
  size_t hnsw_search_candidates = 100;  // (default: 100)
  // After an HNSW search, the exact neighbours of this many seeded items are found by brute force
  // (sample x N distances) and compared with HNSW's; while the share found is below min_recall
  // the search runs again with twice the search candidates (at most hnsw_retries times).
  // NeighbourGraph::recall records the share of the search kept. 0.98 is our choice.
  size_t recall_sample = 200;  // (default: 200)
  double min_recall = 0.98;    // (default: 0.98)
  int hnsw_retries = 2;        // (default: 2)
};

// Row r divided by its length; throws std::invalid_argument naming the first row (1-based) whose
// length is 0 (or not finite), which has no direction.
Points unit_rows(const Points& x);
// The first row (0-based) without a direction (length 0 or not finite), or -1.
Eigen::Index first_zero_row(const Points& x);

// True when find_neighbours searches N items with HNSW (N >= options.exact_below), else exact.
inline bool searches_with_hnsw(size_t n, const NeighbourOptions& options) { return n >= options.exact_below; }

NeighbourGraph find_neighbours(const Points& x, size_t k, const NeighbourOptions& options = {});

}  // namespace kith
