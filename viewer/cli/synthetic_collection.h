// A generated collection for tests and benchmarks: `n` items in `groups` Gaussian clusters in a
// 12-dimensional feature space, a tag column "material" naming each item's cluster (invented
// interior-studio materials) and ids "s00000"... Deterministic for a seed. Any thread.
#pragma once
#include <cstdint>

#include "solver/io/collection.h"

namespace kith {

Collection synthetic_collection(size_t n, int groups = 6, uint64_t seed = 7);

}  // namespace kith
