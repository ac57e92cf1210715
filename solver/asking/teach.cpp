#include "solver/asking/teach.h"

#include <algorithm>
#include <stdexcept>

namespace kith {

bool TeachOptions::IsValid(std::string* error) const {
  std::string e;
  if (neighbours < 1) e = "teach: neighbours must be at least 1, got " + std::to_string(neighbours);
  else if (max_judgments < 1) e = "teach: max_judgments must be at least 1, got " + std::to_string(max_judgments);
  else if (!(weight > 0.0)) e = "teach: weight must be positive, got " + std::to_string(weight);
  if (error) *error = e;
  return e.empty();
}

namespace {
// The k items nearest to point p (excluding `skip`), nearest first, as (squared distance, item).
std::vector<std::pair<double, int32_t>> nearest(const Points& map, const double* p, int32_t skip, int k) {
  std::vector<std::pair<double, int32_t>> all;
  all.reserve(size_t(map.rows()));
  for (Eigen::Index i = 0; i < map.rows(); ++i) {
    if (i == skip) continue;
    double d2 = 0.0;
    for (Eigen::Index c = 0; c < map.cols(); ++c) d2 += (map(i, c) - p[c]) * (map(i, c) - p[c]);
    all.emplace_back(d2, int32_t(i));
  }
  const size_t kk = std::min(all.size(), size_t(k));
  std::partial_sort(all.begin(), all.begin() + std::ptrdiff_t(kk), all.end());
  all.resize(kk);
  return all;
}
}  // namespace

std::vector<Judgment> teach_from_drag(const Points& map, int32_t item, const double* from, const double* to,
                                      const std::string& person, double time, const TeachOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  if (item < 0 || item >= map.rows())
    throw std::invalid_argument("teach: item " + std::to_string(item) + " is unknown (the map has " +
                                std::to_string(map.rows()) + " items)");
  const auto fresh = nearest(map, to, item, options.neighbours);
  // Look a little further around the old place so that k old neighbours remain after removing new ones.
  auto old = nearest(map, from, item, 2 * options.neighbours);
  old.erase(std::remove_if(old.begin(), old.end(),
                           [&](const auto& o) {
                             return std::any_of(fresh.begin(), fresh.end(),
                                                [&](const auto& f) { return f.second == o.second; });
                           }),
            old.end());
  if (old.size() > size_t(options.neighbours)) old.resize(size_t(options.neighbours));

  // Pairs ordered so the clearest statements come first: new neighbours nearest to `to` and old
  // ones nearest to `from`.
  std::vector<std::pair<size_t, std::pair<size_t, size_t>>> pairs;
  for (size_t a = 0; a < fresh.size(); ++a)
    for (size_t b = 0; b < old.size(); ++b) pairs.push_back({a + b, {a, b}});
  std::stable_sort(pairs.begin(), pairs.end(), [](const auto& x, const auto& y) { return x.first < y.first; });
  std::vector<Judgment> out;
  for (const auto& pr : pairs) {
    if (out.size() >= size_t(options.max_judgments)) break;
    const auto& f = fresh[pr.second.first];
    const auto& o = old[pr.second.second];
    // Only where the move made the statement true: the new neighbour is nearer to the new place
    // than the old neighbour is.
    double d2_old_to_new = 0.0;
    for (Eigen::Index c = 0; c < map.cols(); ++c) d2_old_to_new += (map(o.second, c) - to[c]) * (map(o.second, c) - to[c]);
    if (!(f.first < d2_old_to_new)) continue;
    Judgment j;
    j.anchor = item;
    j.nearer = f.second;
    j.farther = o.second;
    j.person = person;
    j.time = time;
    j.kind = JudgmentKind::kDrag;
    j.weight = options.weight;
    out.push_back(j);
  }
  return out;
}

}  // namespace kith
