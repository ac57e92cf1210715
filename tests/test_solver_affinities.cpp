// Neighbours and perplexity calibration.
#include <doctest/doctest.h>

#include <cmath>
#include <random>

#include "solver/features/affinities.h"
#include "solver/features/neighbours.h"
#include "tests/approx.h"

namespace {
kith::Points gaussian(int n, int d, uint64_t seed) {
  return kith::test::normal_points(n, d, seed, [](int i, int) { return double(i % 4); });
}
}  // namespace

TEST_CASE("solver: exact neighbours equal a brute-force scan") {
  const kith::Points x = gaussian(500, 7, 1);
  const size_t k = 12;
  auto g = kith::find_neighbours(x, k);
  for (Eigen::Index i = 0; i < x.rows(); ++i) {
    std::vector<std::pair<double, int>> all;
    for (Eigen::Index j = 0; j < x.rows(); ++j)
      if (j != i) all.emplace_back((x.row(i) - x.row(j)).squaredNorm(), int(j));
    std::sort(all.begin(), all.end());
    for (size_t c = 0; c < k; ++c) {
      REQUIRE(g.index[size_t(i) * k + c] == all[c].second);
      REQUIRE(g.distance2[size_t(i) * k + c] == doctest::Approx(all[c].first).epsilon(1e-12));
    }
  }
}

TEST_CASE("solver: HNSW neighbours are nearly exact and deterministic") {
  const kith::Points x = gaussian(3000, 20, 2);
  const size_t k = 30;
  kith::NeighbourOptions approx;
  approx.exact_below = 0;
  auto a = kith::find_neighbours(x, k, approx), b = kith::find_neighbours(x, k, approx);
  CHECK(a.index == b.index);
  auto exact = kith::find_neighbours(x, k);
  size_t hits = 0;
  for (size_t i = 0; i < a.n; ++i)
    for (size_t c = 0; c < k; ++c)
      for (size_t e = 0; e < k; ++e) hits += a.index[i * k + c] == exact.index[i * k + e];
  // Common practice: HNSW with M = 16, ef >= 2k recalls well over 95% of true neighbours.
  CHECK(double(hits) / double(a.n * k) > 0.97);
}

TEST_CASE("solver: each conditional distribution has the target perplexity within 1e-5") {
  // Definition (van der Maaten & Hinton 2008): Perp(P_i) = 2^H(P_i), H in bits; equivalently exp of
  // the entropy in nats.
  constexpr double kPerplexityTol = 1e-5;
  const kith::Points x = gaussian(800, 10, 3);
  for (double perplexity : {5.0, 30.0}) {
    const size_t k = size_t(3 * perplexity);
    auto g = kith::find_neighbours(x, k);
    kith::AffinityOptions o;
    o.perplexity = perplexity;
    const auto p = kith::conditional_affinities(g, o);
    for (size_t i = 0; i < g.n; ++i) {
      double h_bits = 0.0, sum = 0.0;
      for (size_t c = 0; c < k; ++c) {
        const double v = p[i * k + c];
        sum += v;
        if (v > 0) h_bits -= v * std::log2(v);
      }
      REQUIRE(sum == doctest::Approx(1.0).epsilon(1e-12));
      REQUIRE(std::abs(std::pow(2.0, h_bits) - perplexity) <= kPerplexityTol);
    }
  }
}

TEST_CASE("solver: joint P is symmetric, sums to 1, equals (P_cond + P_cond^T) / sum") {
  const kith::Points x = gaussian(300, 6, 4);
  auto g = kith::find_neighbours(x, 20);
  kith::AffinityOptions o;
  o.perplexity = 7;
  const auto cond = kith::conditional_affinities(g, o);
  const auto p = kith::joint_affinities(g, o);
  Eigen::MatrixXd dense = Eigen::MatrixXd::Zero(300, 300), ref = Eigen::MatrixXd::Zero(300, 300);
  for (size_t i = 0; i < p.n; ++i)
    for (int64_t e = p.row_ptr[i]; e < p.row_ptr[i + 1]; ++e)
      dense(Eigen::Index(i), p.col[size_t(e)]) = p.val[size_t(e)];
  for (size_t i = 0; i < g.n; ++i)
    for (size_t c = 0; c < g.k; ++c) {
      ref(Eigen::Index(i), g.index[i * g.k + c]) += cond[i * g.k + c];
      ref(g.index[i * g.k + c], Eigen::Index(i)) += cond[i * g.k + c];
    }
  ref /= ref.sum();
  kith::test::assert_near(dense, ref, 1e-15, 1e-12, "P");
  CHECK(dense.sum() == doctest::Approx(1.0).epsilon(1e-12));
}

TEST_CASE("solver: HNSW's measured recall is the share of exact neighbours found on its sample") {
  const kith::Points x = gaussian(3000, 20, 3);
  const size_t k = 15;
  kith::NeighbourOptions o;
  o.exact_below = 0;
  o.recall_sample = 100;
  const auto a = kith::find_neighbours(x, k, o);
  const auto exact = kith::find_neighbours(x, k);
  REQUIRE(a.recall_sample == 100);
  // The sample is the evenly spaced rows i * N / 100 (neighbours.cpp); recount on them.
  size_t hits = 0;
  for (size_t s = 0; s < 100; ++s) {
    const size_t i = s * a.n / 100;
    for (size_t c = 0; c < k; ++c)
      for (size_t e = 0; e < k; ++e) hits += a.index[i * k + c] == exact.index[i * k + e];
  }
  CHECK(a.recall == doctest::Approx(double(hits) / double(100 * k)).epsilon(1e-12));
  CHECK(exact.recall == -1.0);  // exact search: nothing to measure

  // A deliberately poor graph (2 links, 4 build candidates) recalls less; the search is then run
  // again with more candidates, and the recall kept is never lower than the first.
  kith::NeighbourOptions poor = o;
  poor.hnsw_links = 2;
  poor.hnsw_build_candidates = 4;
  poor.hnsw_retries = 0;
  const auto once = kith::find_neighbours(x, k, poor);
  poor.hnsw_retries = 2;
  poor.min_recall = 1.01;  // never reached: both retries run
  const auto retried = kith::find_neighbours(x, k, poor);
  CHECK(once.recall < 0.98);
  CHECK(retried.search_candidates == 4 * once.search_candidates);
  CHECK(retried.recall > once.recall);
}
