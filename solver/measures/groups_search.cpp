// find_groups with its own neighbour search (find_neighbours); apart from groups.cpp so that
// callers with a graph do not pull in the search.
#include <algorithm>

#include "solver/measures/groups.h"

namespace kith {

Grouping find_groups(const Points& map, const GroupOptions& options) {
  const size_t n = size_t(map.rows());
  if (n < 2) return find_groups(map, NeighbourGraph{n, 0, {}, {}}, options);
  const size_t k = std::min(group_min_points(options, int(map.cols())) - 1, n - 1);
  return find_groups(map, find_neighbours(map, std::max<size_t>(k, 1)), options);
}

}  // namespace kith
