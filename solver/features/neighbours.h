// k nearest neighbours in feature space (squared Euclidean distance), excluding the item itself.
// Exact (blocked Eigen products) below NeighbourOptions::exact_below items, HNSW (hnswlib) above.
// Deterministic for a given seed. Pure functions; safe to call from any thread.
#pragma once
#include <cstdint>
#include <vector>

#include "solver/base/points.h"

namespace kith {

// Row i's neighbours are index[i*k .. i*k+k), nearest first, with squared distances alongside.
struct NeighbourGraph {
  size_t n = 0;
  size_t k = 0;
  std::vector<int32_t> index;
  std::vector<double> distance2;
};

struct NeighbourOptions {
  size_t exact_below = 20000;  // exact search for fewer items than this (default: 20000)
  uint64_t seed = 42;          // HNSW level generator seed (default: 42)
  int threads = 0;             // 0 = all hardware threads (default: 0)
};

NeighbourGraph find_neighbours(const Points& x, size_t k, const NeighbourOptions& options = {});

}  // namespace kith
