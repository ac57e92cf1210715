// Teach: turn a drag release into judgments, so the intent of a move survives as data that can be
// reviewed, exported or retracted. The item moved from `from` to `to`; its new map neighbours are
// the k items nearest to `to`, the old ones the k items nearest to `from` that are not also new
// neighbours. Every (new, old) pair gives the judgment
//   (moved item, nearer = new neighbour, farther = old neighbour),   kind = drag,
// at most max_judgments of them (nearest pairs first). No judgment comes out when the move left
// no old neighbour behind (e.g. a tiny nudge). Pure function; safe from any thread.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"

namespace kith {

struct TeachOptions {
  int neighbours = 4;       // k new and k old neighbours considered (default: 4)
  int max_judgments = 16;   // at most this many judgments from one drag (default: 16 = 4 x 4)
  double weight = 1.0;      // weight of each judgment (default: 1)
  bool IsValid(std::string* error) const;
};

// `map` holds every item's position (the moved item's own row is ignored); `from` and `to` have
// map.cols() numbers. Throws std::invalid_argument for an unknown item or bad options.
std::vector<Judgment> teach_from_drag(const Points& map, int32_t item, const double* from, const double* to,
                                      const std::string& person, double time, const TeachOptions& options = {});

}  // namespace kith
