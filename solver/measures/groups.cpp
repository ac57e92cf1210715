// DBSCAN groups with an automatic radius (see groups.h).
#include "solver/measures/groups.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <sstream>
#include <stdexcept>
#include <unordered_map>

namespace kith {

bool GroupOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = "groups: " + m;
    return false;
  };
  if (min_points == 1) return fail("min_points must be at least 2 (or 0 for automatic)");
  if (!std::isfinite(eps)) return fail("eps must be a finite number (or 0 for automatic)");
  if (!(eps_scale > 0.0) || !std::isfinite(eps_scale)) return fail("eps_scale must be a positive number");
  return true;
}

size_t group_min_points(const GroupOptions& options, int dims) {
  if (options.min_points > 0) return options.min_points;
  return std::max<size_t>(10, size_t(2 * std::max(dims, 1)));
}

size_t knee_index(const std::vector<double>& y) {
  const size_t n = y.size();
  if (n < 3) return 0;
  const double lo = y.front(), hi = y.back();
  if (!(hi > lo)) return n / 2;  // flat: every item alike
  size_t best = 0;
  double best_gap = -std::numeric_limits<double>::infinity();
  for (size_t i = 0; i < n; ++i) {
    const double x = double(i) / double(n - 1);
    const double gap = x - (y[i] - lo) / (hi - lo);
    if (gap > best_gap) {
      best_gap = gap;
      best = i;
    }
  }
  return best;
}

namespace {

// Uniform grid over the map for radius queries (cell size = eps); brute force above 3 dimensions.
class Grid {
 public:
  Grid(const Points& y, double eps) : y_(y), eps_(eps), dims_(int(y.cols())) {
    if (dims_ > 3) return;
    for (Eigen::Index i = 0; i < y.rows(); ++i) cells_[key(cell_of(i))].push_back(int32_t(i));
  }
  // Calls f(j, squared distance) for every j != i within eps of i.
  template <typename F>
  void around(int32_t i, F&& f) const {
    const double eps2 = eps_ * eps_;
    auto visit = [&](int32_t j) {
      if (j == i) return;
      const double d2 = (y_.row(i) - y_.row(j)).squaredNorm();
      if (d2 <= eps2) f(j, d2);
    };
    if (dims_ > 3) {
      for (Eigen::Index j = 0; j < y_.rows(); ++j) visit(int32_t(j));
      return;
    }
    const auto c = cell_of(i);
    const int r1 = dims_ > 1 ? 1 : 0, r2 = dims_ > 2 ? 1 : 0;
    for (int a = -1; a <= 1; ++a)
      for (int b = -r1; b <= r1; ++b)
        for (int d = -r2; d <= r2; ++d) {
          auto it = cells_.find(key({c[0] + a, c[1] + b, c[2] + d}));
          if (it == cells_.end()) continue;
          for (int32_t j : it->second) visit(j);
        }
  }

 private:
  std::array<int64_t, 3> cell_of(Eigen::Index i) const {
    std::array<int64_t, 3> c{0, 0, 0};
    for (int d = 0; d < dims_; ++d) c[size_t(d)] = int64_t(std::floor(y_(i, d) / eps_));
    return c;
  }
  static int64_t key(const std::array<int64_t, 3>& c) {
    // 21 bits per axis; wrap-around collisions only cost extra distance checks.
    const int64_t m = (int64_t(1) << 21) - 1;
    return ((c[0] & m) << 42) | ((c[1] & m) << 21) | (c[2] & m);
  }
  const Points& y_;
  double eps_;
  int dims_;
  std::unordered_map<int64_t, std::vector<int32_t>> cells_;
};

}  // namespace

Grouping find_groups(const Points& y, const NeighbourGraph& graph, const GroupOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  const size_t n = size_t(y.rows());
  if (n == 0) return {};
  if (!y.allFinite()) throw std::invalid_argument("groups: the map has a position that is not a finite number");
  const size_t min_points = group_min_points(options, int(y.cols()));
  const size_t kth = std::min(min_points - 1, n - 1);  // neighbour rank (1-based) giving the k-distance
  if (graph.n != n || graph.k < kth)
    throw std::invalid_argument("groups: the neighbour graph needs " + std::to_string(kth) + " neighbours for each of " +
                                std::to_string(n) + " items");

  Grouping out;
  out.min_points = min_points;
  out.min_group_size = options.min_group_size > 0
                           ? options.min_group_size
                           : std::max(min_points, size_t(std::ceil(0.005 * double(n))));
  std::vector<double> kdist(n, 0.0);
  for (size_t i = 0; i < n; ++i) kdist[i] = kth == 0 ? 0.0 : std::sqrt(std::max(0.0, graph.distance2[i * graph.k + kth - 1]));
  double eps = options.eps;
  out.eps_auto = !(eps > 0.0);
  if (out.eps_auto) {
    std::vector<double> sorted = kdist;
    std::sort(sorted.begin(), sorted.end());
    eps = options.eps_scale * sorted[knee_index(sorted)];
    if (!(eps > 0.0)) {  // many duplicates: the smallest positive k-distance
      auto it = std::upper_bound(sorted.begin(), sorted.end(), 0.0);
      eps = it == sorted.end() ? 1.0 : *it;
    }
  }
  out.eps = eps;

  std::vector<uint8_t> core(n, 0);
  for (size_t i = 0; i < n; ++i) core[i] = kdist[i] <= eps * (1 + 1e-12) ? 1 : 0;

  // Core items connected within eps; non-core items join their nearest core neighbour's group.
  const Grid grid(y, eps);
  std::vector<int32_t> label(n, -1);
  std::vector<double> border_d2(n, std::numeric_limits<double>::infinity());
  int32_t groups = 0;
  std::vector<int32_t> queue;
  for (size_t s = 0; s < n; ++s) {
    if (!core[s] || label[s] >= 0) continue;
    const int32_t g = groups++;
    label[s] = g;
    queue.assign(1, int32_t(s));
    while (!queue.empty()) {
      const int32_t p = queue.back();
      queue.pop_back();
      grid.around(p, [&](int32_t q, double d2) {
        if (core[size_t(q)]) {
          if (label[size_t(q)] < 0) {
            label[size_t(q)] = g;
            queue.push_back(q);
          }
        } else if (d2 < border_d2[size_t(q)]) {
          border_d2[size_t(q)] = d2;
          label[size_t(q)] = g;
        }
      });
    }
  }

  // Sizes; dissolve small groups; renumber largest first (ties: the group whose first member comes first).
  std::vector<size_t> size(size_t(groups), 0), first(size_t(groups), n);
  for (size_t i = 0; i < n; ++i)
    if (label[i] >= 0) {
      ++size[size_t(label[i])];
      first[size_t(label[i])] = std::min(first[size_t(label[i])], i);
    }
  std::vector<int32_t> order;
  for (int32_t g = 0; g < groups; ++g)
    if (size[size_t(g)] >= out.min_group_size) order.push_back(g);
  std::sort(order.begin(), order.end(), [&](int32_t a, int32_t b) {
    if (size[size_t(a)] != size[size_t(b)]) return size[size_t(a)] > size[size_t(b)];
    return first[size_t(a)] < first[size_t(b)];
  });
  std::vector<int32_t> renumber(size_t(groups), -1);
  for (size_t r = 0; r < order.size(); ++r) renumber[size_t(order[r])] = int32_t(r);
  out.label.assign(n, -1);
  out.groups.resize(order.size());
  for (size_t i = 0; i < n; ++i) {
    const int32_t g = label[i] >= 0 ? renumber[size_t(label[i])] : -1;
    out.label[i] = g;
    if (g >= 0) out.groups[size_t(g)].members.push_back(int32_t(i));
    else ++out.ungrouped;
  }
  const Eigen::Index dims = y.cols();
  for (Group& grp : out.groups) {
    grp.size = grp.members.size();
    Eigen::RowVectorXd c = Eigen::RowVectorXd::Zero(dims);
    for (int32_t i : grp.members) c += y.row(i);
    c /= double(grp.size);
    grp.centre.assign(c.data(), c.data() + dims);
    std::vector<std::pair<double, int32_t>> by_distance;
    by_distance.reserve(grp.size);
    for (int32_t i : grp.members) by_distance.emplace_back((y.row(i) - c).squaredNorm(), i);
    const size_t keep = std::min(options.representatives, by_distance.size());
    std::partial_sort(by_distance.begin(), by_distance.begin() + long(keep), by_distance.end());
    for (size_t r = 0; r < keep; ++r) grp.representatives.push_back(by_distance[r].second);
  }
  return out;
}

void describe_groups(Grouping* grouping, const std::vector<std::string>& tags, size_t top_tags) {
  if (tags.size() != grouping->label.size())
    throw std::invalid_argument("groups: " + std::to_string(tags.size()) + " tags for " +
                                std::to_string(grouping->label.size()) + " items");
  for (Group& g : grouping->groups) {
    std::map<std::string, size_t> count;
    size_t tagged = 0;
    for (int32_t i : g.members)
      if (!tags[size_t(i)].empty()) {
        ++count[tags[size_t(i)]];
        ++tagged;
      }
    std::vector<TagShare> all;
    for (const auto& [tag, c] : count) all.push_back({tag, c, double(c) / double(tagged)});
    std::stable_sort(all.begin(), all.end(), [](const TagShare& a, const TagShare& b) { return a.count > b.count; });
    g.purity = all.empty() ? 0.0 : all.front().share;
    if (all.size() > top_tags) all.resize(top_tags);
    g.tags = std::move(all);
  }
}

std::string Grouping::summary() const {
  std::ostringstream s;
  char eps_text[32];
  std::snprintf(eps_text, sizeof eps_text, "%.3g", eps);
  s << groups.size() << (groups.size() == 1 ? " group" : " groups") << " (DBSCAN, eps " << eps_text
    << (eps_auto ? " auto" : "") << ", minPts " << min_points << "); " << ungrouped << " items in no group";
  return s.str();
}

}  // namespace kith
