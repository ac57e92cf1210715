// Groups: clusters found in the map by DBSCAN (Ester, Kriegel, Sander & Xu 1996) with its radius
// eps chosen automatically from the sorted k-distance graph.
//
//   k-distance of i  = distance from i to its (min_points - 1)-th nearest other item
//   core item        : k-distance <= eps (at least min_points items, itself included, within eps)
//   a group          = core items connected through chains of core items closer than eps, plus the
//                      non-core items within eps of one of them (each joins its nearest core item's group)
//   no group (-1)    : everything else, and groups smaller than min_group_size
// Automatic eps: the knee of the ascending k-distance curve (the suggestion of Ester et al.), found
// as the point farthest below the chord from its first to its last point after scaling both axes
// to [0, 1] (the "Kneedle" rule, Satopaa et al. 2011), times eps_scale (1.5 by default: our own
// rule of thumb; at the bare knee Gaussian tails fall out of their groups and uniform noise breaks
// into pieces, see tests/test_analysis_groups.cpp). Automatic min_points = max(10, 2 * dims)
// (2 * dims is the rule of thumb of Sander et al. 1998; the floor of 10 steadies the k-distance).
// Region queries use a uniform grid of cell size eps (the map has 2 or 3 dimensions).
//
// describe_groups adds what each group holds: size, the most common tags with their share (purity
// = share of the most common one among members that have a tag), and representatives (members
// closest to the group's mean position). Pure functions; any thread.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "solver/features/neighbours.h"
#include "solver/base/points.h"

namespace kith {

struct GroupOptions {
  size_t min_points = 0;        // DBSCAN's minPts; 0 = auto, max(10, 2 * dims) (default: auto)
  double eps = 0.0;             // DBSCAN's radius; <= 0 = auto from the k-distance knee (default: auto)
  double eps_scale = 1.5;       // automatic eps = eps_scale * k-distance at the knee (default: 1.5)
  size_t min_group_size = 0;    // smaller groups dissolve into "no group"; 0 = auto,
                                // max(min_points, 0.5% of the items) (default: auto)
  size_t representatives = 5;   // members listed per group (default: 5)
  size_t top_tags = 3;          // tags listed per group (default: 3)
  bool IsValid(std::string* error) const;
};

struct TagShare {
  std::string tag;
  size_t count = 0;
  double share = 0.0;  // count / members with a tag
};

struct Group {
  size_t size = 0;
  std::vector<double> centre;            // mean position
  std::vector<int32_t> members;          // item indices, ascending
  std::vector<int32_t> representatives;  // closest to the centre first
  std::vector<TagShare> tags;            // most common first (filled by describe_groups)
  double purity = 0.0;                   // share of the most common tag; 0 when no member has a tag
};

struct Grouping {
  std::vector<int32_t> label;  // N; group index, or -1 for no group
  std::vector<Group> groups;   // largest first; groups[g] holds the items labelled g
  double eps = 0.0;            // the radius used
  size_t min_points = 0;       // the minPts used
  size_t min_group_size = 0;
  size_t ungrouped = 0;
  // "7 groups (DBSCAN, eps 1.23 auto, minPts 10); 12 items in no group"
  std::string summary() const;
  bool eps_auto = false;
};

// Knee of an ascending curve as described above; returns its index (0 for fewer than 3 values).
size_t knee_index(const std::vector<double>& ascending);

// DBSCAN on the map with a graph of at least (min_points - 1) neighbours per item (from
// find_neighbours on the map). Throws std::invalid_argument on bad options or sizes.
Grouping find_groups(const Points& map, const NeighbourGraph& graph, const GroupOptions& options = {});
// Same, searching the graph with find_neighbours.
Grouping find_groups(const Points& map, const GroupOptions& options = {});

// Fills each group's tags and purity from one tag column (N values, "" = no tag).
void describe_groups(Grouping* grouping, const std::vector<std::string>& tags, size_t top_tags = 3);

// min_points as used for a map of `dims` dimensions.
size_t group_min_points(const GroupOptions& options, int dims);

}  // namespace kith
