// Planted-metric helpers shared by the block-weight and feature-metric tests: Gaussian features,
// triplets stated by a known weighting of them, and the share of triplets a set of points honours.
#pragma once
#include <cstdint>
#include <random>
#include <utility>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"

namespace kith::test {

// n x cols standard normal features.
inline Points random_features(int n, int cols, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0.0, 1.0);
  Points x(n, cols);
  for (int i = 0; i < n; ++i)
    for (int c = 0; c < cols; ++c) x(i, c) = g(rng);
  return x;
}

// `count` triplets of random distinct items, nearer first by Euclidean distance in `weighted` (the
// features already weighted by the planted truth).
inline std::vector<Judgment> planted_triplets(const Points& weighted, size_t count, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<int32_t> pick(0, int32_t(weighted.rows()) - 1);
  std::vector<Judgment> out;
  while (out.size() < count) {
    Judgment j;
    j.anchor = pick(rng);
    j.nearer = pick(rng);
    j.farther = pick(rng);
    if (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther) continue;
    if ((weighted.row(j.anchor) - weighted.row(j.nearer)).squaredNorm() >
        (weighted.row(j.anchor) - weighted.row(j.farther)).squaredNorm())
      std::swap(j.nearer, j.farther);
    out.push_back(j);
  }
  return out;
}

// Share of the triplets whose nearer item is strictly nearer in x.
inline double planted_agreement(const Points& x, const std::vector<Judgment>& t) {
  double s = 0;
  for (const auto& j : t)
    s += (x.row(j.anchor) - x.row(j.nearer)).squaredNorm() < (x.row(j.anchor) - x.row(j.farther)).squaredNorm();
  return s / double(t.size());
}

}  // namespace kith::test
