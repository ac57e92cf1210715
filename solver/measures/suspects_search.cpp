// find_suspects: score_suspects on graphs searched with find_neighbours. Kept apart from
// suspects.cpp so that code scoring precomputed graphs does not pull in the search.
#include <algorithm>
#include <stdexcept>

#include "solver/measures/suspects.h"

namespace kith {

SuspectScores find_suspects(const std::vector<std::string>& tags, const Points& features, const Points& map,
                            const SuspectOptions& options, const NeighbourOptions& search) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  const size_t n = tags.size();
  if (n < 2) throw std::invalid_argument("suspects: need at least 2 items");
  const size_t k = std::min(options.k, n - 1);
  NeighbourGraph fg, mg;
  if (options.space != SuspectSpace::kMap) {
    if (size_t(features.rows()) != n || features.cols() == 0)
      throw std::invalid_argument("suspects: feature-space scores need one feature row per item");
    fg = find_neighbours(features, k, search);
  }
  if (options.space != SuspectSpace::kFeatures) {
    if (size_t(map.rows()) != n) throw std::invalid_argument("suspects: map-space scores need one map row per item");
    mg = find_neighbours(map, k, search);
  }
  return score_suspects(tags, options.space == SuspectSpace::kMap ? nullptr : &fg,
                        options.space == SuspectSpace::kFeatures ? nullptr : &mg, options);
}

}  // namespace kith
