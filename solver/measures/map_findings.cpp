// One pass of suspects, groups and neighbourhood comparison over shared graphs (see map_findings.h).
#include "solver/measures/map_findings.h"

#include <algorithm>
#include <numeric>
#include <stdexcept>

#include "solver/measures/neighbour_compare.h"

namespace kith {

bool FindingsOptions::IsValid(std::string* error) const {
  if (!suspects.IsValid(error) || !groups.IsValid(error)) return false;
  if (compare_k < 1) {
    if (error) *error = "findings: compare_k must be at least 1";
    return false;
  }
  return true;
}

MapFindings find_structure(const Points& features, const Points& map, const std::vector<std::string>* tags,
                           const FindingsOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  const size_t n = size_t(map.rows());
  const bool have_features = features.rows() > 0 && features.cols() > 0;
  if (have_features && size_t(features.rows()) != n)
    throw std::invalid_argument("findings: " + std::to_string(features.rows()) + " feature rows for " +
                                std::to_string(n) + " map rows");
  if (tags && tags->size() != n)
    throw std::invalid_argument("findings: " + std::to_string(tags->size()) + " tags for " + std::to_string(n) +
                                " items");
  MapFindings out;
  if (n < 2) {
    out.groups.label.assign(n, -1);
    return out;
  }
  const size_t min_points = group_min_points(options.groups, int(map.cols()));
  const size_t k = std::min(n - 1, std::max({options.suspects.k, options.compare_k, min_points - 1}));
  out.map_graph = find_neighbours(map, k, options.search);
  if (have_features) out.feature_graph = find_neighbours(features, k, options.search);

  if (tags) {
    SuspectOptions so = options.suspects;
    if (!have_features) so.space = SuspectSpace::kMap;
    out.suspects = score_suspects(*tags, have_features ? &out.feature_graph : nullptr, &out.map_graph, so);
    out.have_suspects = true;
  }
  out.groups = find_groups(map, out.map_graph, options.groups);
  if (tags) describe_groups(&out.groups, *tags, options.groups.top_tags);
  if (have_features) {
    const size_t ck = std::min(options.compare_k, k);
    out.kept = neighbourhood_kept(out.feature_graph, out.map_graph, ck);
    out.mean_kept = std::accumulate(out.kept.begin(), out.kept.end(), 0.0) / double(n);
  }
  return out;
}

}  // namespace kith
