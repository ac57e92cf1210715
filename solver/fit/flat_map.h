// Flat map: a 2-D arrangement of a session for print or a slide, made by running the same blended
// objective as the live map (t-SNE neighbour term + blend * t-STE judgments, pins held) in 2-D,
// started from the 3-D map projected onto its own principal plane (PCA of the map's rows), with
// no early exaggeration (the structure is already there). The neighbour term's P is rebuilt from
// the features exactly as solver/fit/fit.h does. Pure function; runs on the calling thread (plus the
// objective's worker threads).
#pragma once
#include <cstdint>
#include <vector>

#include "solver/io/collection.h"
#include "solver/base/judgment.h"
#include "solver/base/map_parameters.h"
#include "solver/base/points.h"

namespace kith {

// The session's map settings (dims is ignored: the flat map is 2-D), 500 steps by default.
struct FlatMapOptions : MapParameters {
  FlatMapOptions() { iterations = 500; }  // gradient steps in 2-D (default: 500)
  int threads = 0;                        // (default: all)
};

// map3d: N x 3 (N x 2 is accepted and simply refined). Returns N x 2. Throws
// std::invalid_argument on sizes that do not match, or DivergenceError (solver/fit/fit.h).
Points flatten_map(const Collection& collection, const Points& map3d, const std::vector<Judgment>& judgments,
                   const std::vector<int32_t>& pinned, const FlatMapOptions& options = {});

}  // namespace kith
