// The multiscale start (solver/fit/multiscale.h) and the live engine's use of it: a sample fitted,
// every other item placed by its sampled neighbours, a better first map than the PCA start after
// the same number of full steps. Data: four Gaussian clusters in 10-D (invented, fixed seed).
// Trustworthiness is kith's own (solver/measures/health.h), which tests/test_health.cpp checks
// against scikit-learn's sklearn.manifold.trustworthiness.
#include <doctest/doctest.h>

#include <cstdio>
#include <random>

#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/multiscale.h"
#include "solver/live/engine.h"
#include "solver/measures/health.h"

namespace kith {
namespace {

constexpr int kClusters = 4;

Collection four_clusters(int per_cluster, uint64_t seed = 3) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> gauss;
  Collection c;
  c.features.resize(per_cluster * kClusters, 10);
  for (int k = 0; k < kClusters; ++k)
    for (int i = 0; i < per_cluster; ++i) {
      const int row = i * kClusters + k;  // clusters interleaved, as tables often are
      for (int f = 0; f < 10; ++f) c.features(row, f) = gauss(rng) + (f == k ? 7.0 : 0.0);
      c.ids.push_back("m" + std::to_string(row));
    }
  return c;
}

// Fraction of items nearer their own cluster's mean map position than any other cluster's.
double cluster_purity(const Points& y) {
  Points means = Points::Zero(kClusters, y.cols());
  for (Eigen::Index i = 0; i < y.rows(); ++i) means.row(i % kClusters) += y.row(i);
  means /= double(y.rows() / kClusters);
  int right = 0;
  for (Eigen::Index i = 0; i < y.rows(); ++i) {
    Eigen::Index best = 0;
    (means.rowwise() - y.row(i)).rowwise().squaredNorm().minCoeff(&best);
    right += best == i % kClusters;
  }
  return double(right) / double(y.rows());
}

double trust(const Points& x, const Points& y) {
  HealthOptions h;
  h.sample_above = 2000;
  return measure_health(x, y, h).trustworthiness;
}

}  // namespace

TEST_CASE("multiscale: the sample's map places every other item by its neighbours") {
  constexpr double kMinPurity = 0.99;     // measured 1.000
  // Before any refinement the placed items carry their sampled neighbours' structure only, about
  // as trustworthy at k = 5 as the PCA start (measured 0.923 against 0.932); refining is the next
  // case's job.
  constexpr double kMinStartTrust = 0.90;
  const Collection c = four_clusters(1500);  // 6,000 items
  const Points x = prepare_features(c.features, {});
  const SparseAffinities p = joint_affinities_for(x, 30.0);
  MultiscaleOptions o;
  o.sample = 600;
  o.sample_iterations = 300;
  o.threads = 2;
  const Points y = multiscale_start(x, p, o);
  REQUIRE(y.rows() == x.rows());
  REQUIRE(y.allFinite());
  const double purity = cluster_purity(y);
  const double t_start = trust(x, y), t_pca = trust(x, pca_start(x, 3));
  MESSAGE("purity " << purity << ", trustworthiness " << t_start << " (PCA start " << t_pca << ")");
  CHECK(purity >= kMinPurity);
  CHECK(t_start >= kMinStartTrust);
  // The same bits for another thread count and a second call.
  o.threads = 1;
  CHECK(multiscale_start(x, p, o) == y);
  // A sample too small for the perplexity is refused with the numbers.
  o.sample = 20;
  CHECK_THROWS_WITH_AS(multiscale_start(x, p, o), doctest::Contains("20 items is too small for perplexity 30"),
                       std::invalid_argument);
}

TEST_CASE("multiscale: the live engine starts large maps this way and is ahead after the same steps") {
  constexpr int kSteps = 60;
  constexpr double kTrustLead = 0.05;  // measured 0.976 against 0.877
  const Collection c = four_clusters(1500);
  EngineOptions o;
  o.threads = 2;
  o.multiscale_above = 5000;
  Engine multi(c, o);
  multi.replay({}, kSteps);
  o.multiscale_above = 0;
  Engine pca(c, o);
  pca.replay({}, kSteps);
  const Points x = prepare_features(c.features, {});
  const auto a = multi.latest(), b = pca.latest();
  REQUIRE(a->iteration == kSteps);
  const double ta = trust(x, a->positions), tb = trust(x, b->positions);
  MESSAGE("after " << kSteps << " steps: trustworthiness " << ta << " multiscale, " << tb << " PCA start; KL "
                   << a->health.kl << " vs " << b->health.kl);
  CHECK(ta > tb + kTrustLead);
  CHECK(a->health.kl > 0);          // past early exaggeration: the KL is shown at once
  CHECK(b->health.kl == -1.0);      // still exaggerating
  CHECK(cluster_purity(a->positions) >= 0.99);
}

}  // namespace kith
