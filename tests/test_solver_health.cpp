// Health measures, feature preparation and the schedule.
#include <doctest/doctest.h>

#include <random>

#include "solver/features/feature_prep.h"
#include "solver/fit/schedule.h"
#include "solver/measures/health.h"
#include "tests/approx.h"

namespace {
kith::Points blobs(int n, int d, uint64_t seed) {
  return kith::test::normal_points(n, d, seed, [](int i, int c) { return 5.0 * (i % 4 == c % 4); });
}
}  // namespace

TEST_CASE("solver: a map equal to its features is fully trustworthy and recalls every neighbour") {
  const kith::Points x = blobs(300, 3, 1);
  CHECK(kith::trustworthiness(x, x, 5) == doctest::Approx(1.0).epsilon(1e-15));
  CHECK(kith::neighbour_recall(x, x, 10) == doctest::Approx(1.0).epsilon(1e-15));
  // A map that throws the features away does much worse.
  std::mt19937_64 rng(2);
  std::normal_distribution<double> g;
  kith::Points noise(300, 3);
  for (Eigen::Index i = 0; i < noise.size(); ++i) noise.data()[i] = g(rng);
  CHECK(kith::trustworthiness(x, noise, 5) < 0.8);
  CHECK(kith::neighbour_recall(x, noise, 10) < 0.2);
  CHECK_THROWS_AS(kith::trustworthiness(x, x, 150), std::invalid_argument);
}

TEST_CASE("solver: health is subsampled above the threshold with a fixed seed") {
  const kith::Points x = blobs(1200, 6, 3);
  kith::HealthOptions o;
  o.sample_above = 500;
  const auto a = kith::measure_health(x, x.leftCols(3), o), b = kith::measure_health(x, x.leftCols(3), o);
  CHECK(a.sample == 500);
  CHECK(a.trustworthiness == b.trustworthiness);
  CHECK(a.neighbour_recall == b.neighbour_recall);
}

TEST_CASE("solver: PCA start has first-column std 1e-4 and follows the largest variance") {
  kith::Points x = blobs(400, 8, 4);
  x.col(5) *= 10.0;  // the dominant direction
  const kith::Points y = kith::pca_start(x, 3);
  const Eigen::VectorXd c0 = y.col(0);
  CHECK(std::sqrt((c0.array() - c0.mean()).square().mean()) == doctest::Approx(1e-4).epsilon(1e-12));
  Eigen::VectorXd xc = x.col(5).array() - x.col(5).mean();
  const double corr = std::abs(xc.dot(c0 - Eigen::VectorXd::Constant(400, c0.mean()))) /
                      (xc.norm() * (c0.array() - c0.mean()).matrix().norm());
  CHECK(corr > 0.99);
  // Reduction keeps distances when the data already lie in fewer dims than the cap.
  kith::FeaturePrepOptions prep;
  prep.max_dims = 8;
  const kith::Points same = kith::prepare_features(x, prep);
  CHECK((same.row(0) - same.row(1)).norm() == doctest::Approx((x.row(0) - x.row(1)).norm()).epsilon(1e-12));
  prep.max_dims = 4;
  CHECK(kith::prepare_features(x, prep).cols() == 4);
}

TEST_CASE("solver: schedule matches scikit-learn 1.2's TSNE schedule") {
  // sklearn/manifold/_t_sne.py (1.2): learning_rate_ = max(N / early_exaggeration / 4, 50);
  // _EXPLORATION_N_ITER = 250 with momentum 0.5, then momentum 0.8; early_exaggeration = 12.
  kith::Schedule s;
  CHECK(s.learning_rate_for(10000) == doctest::Approx(10000.0 / 12.0 / 4.0));
  CHECK(s.learning_rate_for(1000) == 50.0);
  CHECK(s.exaggeration_at(249) == 12.0);
  CHECK(s.exaggeration_at(250) == 1.0);
  CHECK(s.step_at(249, 100).momentum == 0.5);
  CHECK(s.step_at(250, 100).momentum == 0.8);
}
