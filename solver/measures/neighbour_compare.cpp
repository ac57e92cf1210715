// Neighbour comparison between the feature and map neighbour graphs (see neighbour_compare.h).
#include "solver/measures/neighbour_compare.h"

#include <algorithm>
#include <numeric>
#include <stdexcept>
#include <string>

namespace kith {

namespace {

size_t checked_k(const NeighbourGraph& f, const NeighbourGraph& m, size_t k) {
  if (f.n != m.n) throw std::invalid_argument("neighbour comparison: the graphs have " + std::to_string(f.n) + " and " +
                                              std::to_string(m.n) + " items");
  const size_t most = std::min(f.k, m.k);
  if (k == 0) k = most;
  if (k > most)
    throw std::invalid_argument("neighbour comparison: k = " + std::to_string(k) + " but the graphs hold only " +
                                std::to_string(most) + " neighbours per item");
  return k;
}

int rank_in(const int32_t* list, size_t k, int32_t item) {
  for (size_t r = 0; r < k; ++r)
    if (list[r] == item) return int(r + 1);
  return 0;
}

}  // namespace

NeighbourComparison compare_neighbours(int32_t item, const NeighbourGraph& features, const NeighbourGraph& map,
                                       size_t k) {
  k = checked_k(features, map, k);
  if (item < 0 || size_t(item) >= features.n)
    throw std::invalid_argument("neighbour comparison: item " + std::to_string(item) + " is unknown (there are " +
                                std::to_string(features.n) + " items)");
  const int32_t* f = features.index.data() + size_t(item) * features.k;
  const int32_t* m = map.index.data() + size_t(item) * map.k;
  NeighbourComparison c;
  c.item = item;
  c.k = k;
  size_t both = 0;
  for (size_t r = 0; r < k; ++r) {
    const int mr = rank_in(m, k, f[r]);
    c.features.push_back({f[r], int(r + 1), mr});
    if (mr == 0) c.lost.push_back(f[r]);
    else ++both;
  }
  for (size_t r = 0; r < k; ++r) {
    const int fr = rank_in(f, k, m[r]);
    c.map.push_back({m[r], fr, int(r + 1)});
    if (fr == 0) c.gained.push_back(m[r]);
  }
  c.kept = k ? double(both) / double(k) : 1.0;
  return c;
}

std::vector<double> neighbourhood_kept(const NeighbourGraph& features, const NeighbourGraph& map, size_t k) {
  k = checked_k(features, map, k);
  std::vector<double> kept(features.n, 1.0);
  std::vector<int32_t> a(k), b(k);
  for (size_t i = 0; i < features.n; ++i) {
    std::copy_n(features.index.data() + i * features.k, k, a.begin());
    std::copy_n(map.index.data() + i * map.k, k, b.begin());
    std::sort(a.begin(), a.end());
    std::sort(b.begin(), b.end());
    std::vector<int32_t> common;
    std::set_intersection(a.begin(), a.end(), b.begin(), b.end(), std::back_inserter(common));
    kept[i] = k ? double(common.size()) / double(k) : 1.0;
  }
  return kept;
}

std::vector<int32_t> worst_kept(const std::vector<double>& kept, size_t count) {
  std::vector<int32_t> order(kept.size());
  std::iota(order.begin(), order.end(), 0);
  count = std::min(count, order.size());
  std::partial_sort(order.begin(), order.begin() + long(count), order.end(), [&](int32_t a, int32_t b) {
    return kept[size_t(a)] != kept[size_t(b)] ? kept[size_t(a)] < kept[size_t(b)] : a < b;
  });
  order.resize(count);
  return order;
}

}  // namespace kith
