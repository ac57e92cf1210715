#include "viewer/cli/synthetic_collection.h"

#include <cstdio>
#include <random>

#include "solver/base/portable_random.h"

namespace kith {

Collection synthetic_collection(size_t n, int groups, uint64_t seed) {
  static const char* kMaterials[] = {"linen", "oak", "slate", "brass", "wool", "terracotta", "cork", "glass",
                                     "walnut", "jute"};
  const int dims = 12;
  std::mt19937_64 rng(seed);
  Points centres(groups, dims);
  for (int g = 0; g < groups; ++g)
    for (int d = 0; d < dims; ++d) centres(g, d) = normal(rng) * 6.0;
  Collection c;
  c.source = "generated:" + std::to_string(n);
  c.features.resize(Eigen::Index(n), dims);
  c.tags.push_back({"material", {}});
  for (int d = 0; d < dims; ++d) c.feature_names.push_back("f" + std::to_string(d));
  for (size_t i = 0; i < n; ++i) {
    const int g = int(i % size_t(groups));
    char id[32];
    std::snprintf(id, sizeof id, "s%05zu", i);
    c.ids.push_back(id);
    for (int d = 0; d < dims; ++d) c.features(Eigen::Index(i), d) = centres(g, d) + normal(rng);
    c.tags[0].values.push_back(kMaterials[g % 10]);
  }
  return c;
}

}  // namespace kith
