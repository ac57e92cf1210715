// Neighbour comparison: how well the map keeps each item's feature-space neighbourhood.
//
// For item i with its k nearest in the features F_i and in the map M_i (from two neighbour
// graphs, nearest first):
//   gained = M_i \ F_i  (map neighbours that are not feature neighbours), in map order
//   lost   = F_i \ M_i  (feature neighbours the map moved away), in feature order
//   kept_i = |F_i ∩ M_i| / k           (1: the map keeps the neighbourhood whole)
// The map's mean kept_i is the usual k-nearest-neighbour recall of an embedding.
// The items whose neighbourhoods are worst preserved are those with the smallest kept_i.
// Pure functions; any thread.
#pragma once
#include <cstdint>
#include <vector>

#include "solver/features/neighbours.h"

namespace kith {

struct NeighbourRank {
  int32_t item = -1;
  int feature_rank = 0;  // 1-based rank among the item's k feature neighbours; 0 = not among them
  int map_rank = 0;      // 1-based rank among its k map neighbours; 0 = not among them
};

struct NeighbourComparison {
  int32_t item = -1;
  size_t k = 0;
  std::vector<NeighbourRank> features;  // the k feature neighbours, nearest first, with their map ranks
  std::vector<NeighbourRank> map;       // the k map neighbours, nearest first, with their feature ranks
  std::vector<int32_t> gained;
  std::vector<int32_t> lost;
  double kept = 0.0;
};

// k <= both graphs' k (0 = the smaller of the two). Throws std::invalid_argument on bad sizes.
NeighbourComparison compare_neighbours(int32_t item, const NeighbourGraph& features, const NeighbourGraph& map,
                                       size_t k = 0);
// kept_i for every item.
std::vector<double> neighbourhood_kept(const NeighbourGraph& features, const NeighbourGraph& map, size_t k = 0);
// The `count` items with the smallest kept, worst first (ties: lower index first).
std::vector<int32_t> worst_kept(const std::vector<double>& kept, size_t count);

}  // namespace kith
