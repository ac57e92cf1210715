// NeighbourGraph: each item's k nearest other items, nearest first, with squared distances.
// Found in the features (solver/features/neighbours.h) or read from a file the user made
// elsewhere (solver/io/neighbour_graph_file.h); either way the affinities are calibrated on it
// (solver/features/affinities.h). A plain value type; const access from many threads is fine.
#pragma once
#include <cstddef>
#include <cstdint>
#include <vector>

namespace kith {

// Row i's neighbours are index[i*k .. i*k+k), nearest first, with squared distances alongside.
// n == 0: no graph.
struct NeighbourGraph {
  size_t n = 0;
  size_t k = 0;
  std::vector<int32_t> index;
  std::vector<double> distance2;
  // Of an HNSW search: the share of the exact k neighbours it found, measured by brute force on a
  // seeded sample of items (solver/features/neighbours.h); -1 when exact or given.
  double recall = -1.0;
  size_t recall_sample = 0;      // items that share was measured on
  size_t search_candidates = 0;  // HNSW's ef in the search that was kept

  bool empty() const { return n == 0; }
};

}  // namespace kith
