// Planted-map helpers shared by the judgment tests and the judgment benchmark: items at known
// 3-D positions, a noisy oracle answering triplet questions, judgments-only fits, Spearman rank
// correlation and trustworthiness (both written out from their textbook definitions).
#pragma once
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numeric>
#include <random>
#include <vector>

#include "solver/fit/blended_fit.h"
#include "solver/objective/blended_objective.h"
#include "solver/base/judgment.h"
#include "solver/measures/judgment_health.h"
#include "solver/base/points.h"

namespace kith::test {

// n items in `clusters` Gaussian blobs (spread `spread`) whose centres are uniform in the unit
// cube; clusters = 0 means uniform in the unit cube.
inline Points planted_positions(int n, uint64_t seed, int clusters = 0, double spread = 0.06,
                                std::vector<int>* label = nullptr) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> g(0.0, spread);
  Points centres(std::max(clusters, 1), 3);
  for (Eigen::Index i = 0; i < centres.size(); ++i) centres.data()[i] = u(rng);
  Points y(n, 3);
  if (label) label->assign(size_t(n), 0);
  for (int i = 0; i < n; ++i) {
    if (clusters <= 0) {
      for (int c = 0; c < 3; ++c) y(i, c) = u(rng);
    } else {
      const int k = i % clusters;
      if (label) (*label)[size_t(i)] = k;
      for (int c = 0; c < 3; ++c) y(i, c) = centres(k, c) + g(rng);
    }
  }
  return y;
}

// Answers "is a more like b or c?" with logistic noise on the distance difference:
// P(b) = 1 / (1 + exp(-(d(a,c) - d(a,b)) / noise)).
struct Oracle {
  const Points* truth;
  double noise;
  std::mt19937_64 rng;
  Oracle(const Points& t, double noise_scale, uint64_t seed) : truth(&t), noise(noise_scale), rng(seed) {}
  Judgment answer(int32_t a, int32_t b, int32_t c) {
    const double db = (truth->row(a) - truth->row(b)).norm(), dc = (truth->row(a) - truth->row(c)).norm();
    const double p = 1.0 / (1.0 + std::exp(-(dc - db) / noise));
    Judgment j;
    j.anchor = a;
    const bool says_b = std::uniform_real_distribution<double>(0.0, 1.0)(rng) < p;
    j.nearer = says_b ? b : c;
    j.farther = says_b ? c : b;
    j.kind = JudgmentKind::kPair;
    j.person = "oracle";
    return j;
  }
  // m answers to uniformly random questions (anchors drawn from `anchors` if not empty).
  std::vector<Judgment> random_answers(int n, size_t m, std::mt19937_64& pick,
                                       const std::vector<int32_t>& anchors = {}) {
    std::uniform_int_distribution<int32_t> item(0, n - 1);
    std::vector<Judgment> out;
    while (out.size() < m) {
      const int32_t a = anchors.empty() ? item(pick) : anchors[size_t(item(pick)) % anchors.size()];
      const int32_t b = item(pick), c = item(pick);
      if (a == b || a == c || b == c) continue;
      out.push_back(answer(a, b, c));
      out.back().id = int64_t(out.size());
    }
    return out;
  }
};

inline Points fit_judgments_only(int n, const std::vector<Judgment>& judgments, uint64_t seed, int iterations = 600, double alpha = 1.0,
                                 const Points* start = nullptr) {
  BlendedObjective objective(size_t(n), 3);
  objective.set_alpha(alpha);
  objective.set_judgments(judgments);
  Points y = start ? *start : random_start(size_t(n), 3, seed, 1e-2);
  BlendedFitOptions options;
  options.iterations = iterations;
  fit_blended(objective, y, options);
  return y;
}

inline std::vector<double> ranks(const std::vector<double>& v) {
  std::vector<size_t> order(v.size());
  std::iota(order.begin(), order.end(), 0);
  std::sort(order.begin(), order.end(), [&](size_t a, size_t b) { return v[a] < v[b]; });
  std::vector<double> r(v.size());
  for (size_t i = 0; i < order.size();) {  // average ranks over ties
    size_t j = i;
    while (j + 1 < order.size() && v[order[j + 1]] == v[order[i]]) ++j;
    for (size_t k = i; k <= j; ++k) r[order[k]] = 0.5 * double(i + j);
    i = j + 1;
  }
  return r;
}

// Spearman's rank correlation: Pearson correlation of the (tie-averaged) ranks.
inline double spearman(const std::vector<double>& a, const std::vector<double>& b) {
  const auto ra = ranks(a), rb = ranks(b);
  const double n = double(ra.size());
  const double ma = std::accumulate(ra.begin(), ra.end(), 0.0) / n, mb = std::accumulate(rb.begin(), rb.end(), 0.0) / n;
  double sab = 0, saa = 0, sbb = 0;
  for (size_t i = 0; i < ra.size(); ++i) {
    sab += (ra[i] - ma) * (rb[i] - mb);
    saa += (ra[i] - ma) * (ra[i] - ma);
    sbb += (rb[i] - mb) * (rb[i] - mb);
  }
  return sab / std::sqrt(saa * sbb);
}

inline std::vector<double> pairwise_distances(const Points& y) {
  std::vector<double> d;
  for (Eigen::Index i = 0; i < y.rows(); ++i)
    for (Eigen::Index j = i + 1; j < y.rows(); ++j) d.push_back((y.row(i) - y.row(j)).norm());
  return d;
}

// Trustworthiness (Venna & Kaski 2001), as scikit-learn's sklearn.manifold.trustworthiness:
// T(k) = 1 - 2 / (n k (2n - 3k - 1)) sum_i sum_{j in map-kNN(i) \ feature-kNN(i)} (r(i,j) - k),
// r(i,j) the rank of j among i's neighbours in feature space.
inline double trustworthiness(const Points& x, const Points& y, int k) {
  const Eigen::Index n = x.rows();
  double penalty = 0.0;
  std::vector<std::pair<double, Eigen::Index>> dx(static_cast<size_t>(n)), dy(static_cast<size_t>(n));
  std::vector<int> rank(static_cast<size_t>(n));
  for (Eigen::Index i = 0; i < n; ++i) {
    for (Eigen::Index j = 0; j < n; ++j) {
      dx[size_t(j)] = {j == i ? -1.0 : (x.row(i) - x.row(j)).squaredNorm(), j};
      dy[size_t(j)] = {j == i ? -1.0 : (y.row(i) - y.row(j)).squaredNorm(), j};
    }
    std::sort(dx.begin(), dx.end());
    std::partial_sort(dy.begin(), dy.begin() + k + 1, dy.end());
    for (Eigen::Index r = 0; r < n; ++r) rank[size_t(dx[size_t(r)].second)] = int(r);  // self has rank 0
    for (int t = 1; t <= k; ++t) {
      const int r = rank[size_t(dy[size_t(t)].second)];
      if (r > k) penalty += r - k;
    }
  }
  return 1.0 - 2.0 / (double(n) * k * (2.0 * n - 3.0 * k - 1.0)) * penalty;
}

}  // namespace kith::test
