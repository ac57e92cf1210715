// Suspects: tagged items whose nearest neighbours mostly carry other tags (likely mislabelled,
// or genuinely between crowds).
//
// For an item i with a non-empty tag t_i, over its k nearest neighbours j in one space (the
// features or the map) that carry a tag:
//   h_i  = distance from i to its k-th neighbour            (adaptive bandwidth)
//   w_ij = exp(-(d_ij / h_i)^2)                              (near neighbours count more; 1 at d=0, e^-1 at h_i)
//   s_i  = sum_j w_ij [t_j != t_i] / sum_j w_ij              (0: all agree, 1: none agree)
// With both spaces the score is the mean of the two. Untagged neighbours are skipped; an item
// with no tagged neighbour, or no tag itself, has no score (NaN) and is left out of the ranking.
// The ranking sorts by score, then by how strongly the neighbours agree on one other tag (the
// weighted share of the most common other tag, `likely_share`), then by item index.
//
// score_suspects works on neighbour graphs the caller already has (solver/features/neighbours.h);
// find_suspects searches them itself with find_neighbours. Pure functions; any thread.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "solver/features/neighbours.h"
#include "solver/base/points.h"

namespace kith {

enum class SuspectSpace : int { kFeatures = 0, kMap = 1, kBoth = 2 };
const char* to_string(SuspectSpace space);
bool suspect_space_from_string(const std::string& text, SuspectSpace* space);

struct SuspectOptions {
  size_t k = 10;                          // neighbours looked at per item (default: 10)
  SuspectSpace space = SuspectSpace::kBoth;  // where the neighbours come from (default: both)
  bool IsValid(std::string* error) const;
};

struct SuspectScores {
  std::vector<double> score;          // N; NaN where there is no score
  std::vector<double> feature_score;  // N; NaN if not computed in that space
  std::vector<double> map_score;      // N; NaN if not computed in that space
  std::vector<std::string> likely_tag;  // N; the other tag the neighbours favour most ("" if none)
  std::vector<double> likely_share;   // N; its weighted share among the tagged neighbours
  std::vector<int32_t> ranking;       // scored items, most suspect first
  // "1797 tagged items scored in features and map (k = 10); 41 with score >= 0.5"
  std::string summary() const;
};

// Either graph may be null when the space is not used (both must be given for kBoth). The graphs'
// distance2 are squared distances, nearest first. Throws std::invalid_argument on a size mismatch
// or an invalid option.
SuspectScores score_suspects(const std::vector<std::string>& tags, const NeighbourGraph* features,
                             const NeighbourGraph* map, const SuspectOptions& options = {});

// Searches the neighbour graphs with find_neighbours. `features` or `map` may be empty (0 rows)
// when the chosen space does not need it.
SuspectScores find_suspects(const std::vector<std::string>& tags, const Points& features, const Points& map,
                            const SuspectOptions& options = {}, const NeighbourOptions& search = {});

}  // namespace kith
