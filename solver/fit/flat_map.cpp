#include "solver/fit/flat_map.h"

#include <algorithm>
#include <cmath>
#include <memory>
#include <stdexcept>

#include "solver/features/affinities.h"
#include "solver/objective/blended_objective.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"
#include "solver/features/neighbours.h"

namespace kith {

Points flatten_map(const Collection& collection, const Points& map3d, const std::vector<Judgment>& judgments,
                   const std::vector<int32_t>& pinned, const FlatMapOptions& options) {
  const size_t n = collection.size();
  if (size_t(map3d.rows()) != n) throw std::invalid_argument("the map and the collection differ in size");
  if (map3d.cols() != 2 && map3d.cols() != 3) throw std::invalid_argument("the map must be 2-D or 3-D");
  if (n < 3) throw std::invalid_argument("a map needs at least 3 items");

  // The start: the 3-D map on its own principal plane (distances within the plane kept).
  Points y;
  if (map3d.cols() == 2) {
    y = map3d;
  } else {
    const Pca pca = fit_pca(map3d, 2);
    y = pca.project(map3d);
    // Pinned items keep their place in that plane (a pin holds; the rest settles around it).
  }

  BlendedObjective objective(n, 2);
  std::shared_ptr<NeighbourTerm> term;
  if (collection.features.cols() > 0) {
    const Points features = prepare_features(collection.features, map_prep(options.metric));
    NeighbourTermOptions topt;
    topt.dof = options.dof;
    topt.theta = options.theta;
    topt.threads = options.threads;
    term = std::make_shared<NeighbourTerm>(
        std::make_shared<SparseAffinities>(joint_affinities_for(features, options.perplexity_for(n), {options.seed, options.threads})),
        topt);
  }
  objective.set_neighbour_term(term);
  objective.set_blend(options.blend);
  objective.set_alpha(options.dof);  // as the engine does: the judgments' kernel matches the map's
  objective.set_judgments(judgments);
  for (int32_t item : pinned)
    if (item >= 0 && size_t(item) < n) objective.pin(item);

  LoopOptions loop;
  loop.schedule.learning_rate = options.learning_rate;
  loop.first = loop.schedule.exaggeration_iterations;  // no early exaggeration: start from a settled map
  loop.iterations = options.iterations;
  run_schedule(
      objective, [&term](double e) { if (term) term->set_exaggeration(e); }, y, loop);
  return y;
}

}  // namespace kith
