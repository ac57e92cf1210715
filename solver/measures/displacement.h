// Displacement: what people's judgments changed. The reference map is fitted from the features
// alone (no judgments); the current map holds the judgments. After aligning the reference onto
// the current map (map_alignment.h), each item's displacement is
//   D_i = | aligned reference_i - current_i |.
// Which judgments moved item i most (our attribution, documented in the README): among the
// active judgments naming i (as anchor, nearer or farther), each one's pull on i is the t-STE
// force it exerts on i at the current map, projected on i's direction of travel u_i:
//   pull_j = -(d cost_j / d y_i) . u_i,   u_i = (current_i - aligned reference_i) / D_i
// computed by the judgment term itself (solver/objective/judgment_term.h) on that judgment alone. Positive
// pulls pushed the item the way it went; the largest come first. (When D_i = 0 the force's length
// is used instead.) Pure functions; any thread.
#pragma once
#include <cstdint>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/fit/map_alignment.h"
#include "solver/base/points.h"

namespace kith {

struct Displacement {
  MapAlignment alignment;        // reference -> current
  Points aligned_reference;      // N x dims
  std::vector<double> distance;  // N
  std::vector<int32_t> ranking;  // most moved first (ties: lower index first)
};

// Throws std::invalid_argument if the maps differ in shape.
Displacement measure_displacement(const Points& reference, const Points& current, bool allow_scale = true);

struct JudgmentPull {
  size_t index = 0;   // position in the judgments vector
  int64_t id = -1;    // the judgment's id
  double pull = 0.0;  // force along the item's direction of travel (see above)
  double force = 0.0; // length of the force on the item
};

// Judgments naming `item`, strongest pull first; at most `count`. alpha: the t-STE degrees of
// freedom used by the map (default 1).
std::vector<JudgmentPull> judgments_moving(int32_t item, const Points& current, const Displacement& displacement,
                                           const std::vector<Judgment>& judgments, size_t count = 10,
                                           double alpha = 1.0);

}  // namespace kith
