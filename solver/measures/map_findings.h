// MapFindings: everything "looking into the structure" computes for one map, in one pass:
// suspects (suspects.h), groups (groups.h) and how well each neighbourhood is kept
// (neighbour_compare.h). Each space's neighbour graph is searched once with find_neighbours,
// with as many neighbours as the largest user needs, and shared. Used by `kith fit`,
// `kith report` and the window's structure panels. Pure function; any thread.
#pragma once
#include <string>
#include <vector>

#include "solver/measures/groups.h"
#include "solver/features/neighbours.h"
#include "solver/measures/suspects.h"

namespace kith {

struct FindingsOptions {
  SuspectOptions suspects;      // (default: k 10, both spaces)
  GroupOptions groups;          // (default: automatic DBSCAN)
  size_t compare_k = 10;        // neighbours compared for "kept" (default: 10)
  NeighbourOptions search;      // (default: exact below 20000 items, HNSW above)
  bool IsValid(std::string* error) const;
};

struct MapFindings {
  NeighbourGraph feature_graph;  // empty (n == 0) when the collection has no features
  NeighbourGraph map_graph;
  bool have_suspects = false;    // false without tags
  SuspectScores suspects;
  Grouping groups;               // described with the tags when there are any
  std::vector<double> kept;      // per item; empty without features
  double mean_kept = -1.0;       // neighbour recall at compare_k; -1 without features
};

// features: N x F (F may be 0: then only the map space is used); map: N x dims; tags: N values
// or null. When the suspect space needs features that are missing, the map alone is used.
// Throws std::invalid_argument on mismatched sizes or invalid options.
MapFindings find_structure(const Points& features, const Points& map, const std::vector<std::string>* tags,
                           const FindingsOptions& options = {});

}  // namespace kith
