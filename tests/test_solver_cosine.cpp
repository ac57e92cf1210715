// The cosine metric: the neighbour search (exact and HNSW) against a slow, obvious scan of
// 1 - cos, the unit rows of the feature preparation, and the metric in MapParameters.
#include <doctest/doctest.h>

#include <algorithm>
#include <random>
#include <stdexcept>
#include <string>

#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/features/neighbours.h"
#include "tests/approx.h"

namespace {

// Clustered rows, each multiplied by its own positive factor exp(U(-3, 3)), so that their lengths
// differ by up to e^6 while their directions keep the clusters.
kith::Points scaled_rows(int n, int d, uint64_t seed) {
  kith::Points x = kith::test::normal_points(n, d, seed, [](int i, int c) { return c == i % 5 ? 4.0 : 0.0; });
  std::mt19937_64 rng(seed + 1);
  std::uniform_real_distribution<double> u(-3.0, 3.0);
  for (int i = 0; i < n; ++i) x.row(i) *= std::exp(u(rng));
  return x;
}

// The slow, obvious reference: every other row by 1 - x.y / (|x| |y|), ties by index.
std::vector<std::pair<double, int>> cosine_scan(const kith::Points& x, Eigen::Index i) {
  std::vector<std::pair<double, int>> all;
  for (Eigen::Index j = 0; j < x.rows(); ++j) {
    if (j == i) continue;
    double dot = 0, a = 0, b = 0;
    for (Eigen::Index c = 0; c < x.cols(); ++c) {
      dot += x(i, c) * x(j, c);
      a += x(i, c) * x(i, c);
      b += x(j, c) * x(j, c);
    }
    all.emplace_back(1.0 - dot / std::sqrt(a * b), int(j));
  }
  std::sort(all.begin(), all.end());
  return all;
}

}  // namespace

TEST_CASE("cosine: exact neighbours equal a scan of 1 - cos, with squared distance 2 (1 - cos)") {
  const kith::Points x = scaled_rows(400, 9, 3);
  const size_t k = 15;
  kith::NeighbourOptions o;
  o.metric = kith::Metric::kCosine;
  const kith::NeighbourGraph g = kith::find_neighbours(x, k, o);
  // 2 (1 - cos) from the scan against |u - v|^2 of the unit rows: both are sums of ~10 products of
  // numbers below 1, so they agree to a few units of rounding (kTolerance is 1e4 of them).
  constexpr double kTolerance = 1e-12;
  for (Eigen::Index i = 0; i < x.rows(); ++i) {
    const auto all = cosine_scan(x, i);
    for (size_t c = 0; c < k; ++c) {
      REQUIRE(g.index[size_t(i) * k + c] == all[c].second);
      REQUIRE(std::abs(g.distance2[size_t(i) * k + c] - 2.0 * all[c].first) < kTolerance);
    }
  }
}

TEST_CASE("cosine: HNSW neighbours are nearly those of the scan, deterministic, and ignore each row's length") {
  const kith::Points x = scaled_rows(3000, 12, 5);
  const size_t k = 20;
  kith::NeighbourOptions o;
  o.metric = kith::Metric::kCosine;
  o.exact_below = 0;
  const kith::NeighbourGraph a = kith::find_neighbours(x, k, o), b = kith::find_neighbours(x, k, o);
  CHECK(a.index == b.index);
  size_t hits = 0;
  for (Eigen::Index i = 0; i < x.rows(); ++i) {
    const auto all = cosine_scan(x, i);
    for (size_t c = 0; c < k; ++c)
      for (size_t d = 0; d < k; ++d) hits += a.index[size_t(i) * k + c] == all[d].second;
  }
  // HNSW with ef >= 100 finds nearly all 20 nearest (common practice: recall above 0.95); the
  // Euclidean test of the same index (test_solver_affinities.cpp) asks the same.
  CHECK(double(hits) / double(x.rows() * k) > 0.95);
  // The same rows scaled to length 1 under the Euclidean metric: the same graph.
  kith::NeighbourOptions e = o;
  e.metric = kith::Metric::kEuclidean;
  const kith::NeighbourGraph unit = kith::find_neighbours(kith::unit_rows(x), k, e);
  CHECK(unit.index == a.index);
}

TEST_CASE("cosine: affinities of rows scaled by positive factors equal those of the unit rows") {
  const kith::Points x = scaled_rows(300, 7, 9);
  kith::AffinitySearch cosine;
  cosine.metric = kith::Metric::kCosine;
  const kith::SparseAffinities p = kith::joint_affinities_for(x, 20.0, cosine);
  const kith::SparseAffinities q = kith::joint_affinities_for(kith::unit_rows(x), 20.0);
  REQUIRE(p.col == q.col);
  // Normalizing x and reading unit rows differ by rounding only (1e-16 of each value); the
  // calibration's bisection stops at a perplexity within 1e-5, so P agrees far closer than that.
  for (size_t e = 0; e < p.val.size(); ++e) REQUIRE(std::abs(p.val[e] - q.val[e]) <= 1e-9 * q.val[e]);
  // And the Euclidean metric on the scaled rows is a different graph (the test can fail).
  const kith::SparseAffinities r = kith::joint_affinities_for(x, 20.0);
  CHECK(r.col != p.col);
}

TEST_CASE("cosine: the prepared features are the unit rows, and a zero row is named") {
  kith::Points x = scaled_rows(60, 4, 11);
  const kith::Points prepared = kith::prepare_features(x, kith::map_prep(kith::Metric::kCosine));
  for (Eigen::Index i = 0; i < x.rows(); ++i) CHECK(prepared.row(i).norm() == doctest::Approx(1.0).epsilon(1e-15));
  CHECK(kith::first_zero_row(x) == -1);
  x.row(6).setZero();
  CHECK(kith::first_zero_row(x) == 6);
  try {
    kith::prepare_features(x, kith::map_prep(kith::Metric::kCosine));
    FAIL("a zero row was taken");
  } catch (const std::invalid_argument& e) {
    CHECK(std::string(e.what()).find("row 7 ") != std::string::npos);
  }
  // Euclidean takes it.
  CHECK(kith::prepare_features(x, kith::map_prep(kith::Metric::kEuclidean)).rows() == 60);
}

TEST_CASE("cosine: the metric is a map setting") {
  kith::MapParameters a, b;
  CHECK(a.metric == kith::Metric::kEuclidean);
  b.metric = kith::Metric::kCosine;
  CHECK(a != b);
  kith::Metric m = kith::Metric::kEuclidean;
  CHECK(kith::parse_metric("cosine", &m));
  CHECK(m == kith::Metric::kCosine);
  CHECK_FALSE(kith::parse_metric("angular", &m));
  CHECK(m == kith::Metric::kCosine);
  CHECK(std::string(kith::metric_name(m)) == "cosine");
}
