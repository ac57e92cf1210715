// PCA on wide data (solver/features/feature_prep.h): the Gram-matrix path taken when there are
// fewer items than features gives the covariance path's axes and variances, and stays fast at
// 300 items x 6,000 features (a covariance path would decompose a 6,000 x 6,000 matrix).
#include <doctest/doctest.h>

#include <chrono>
#include <random>

#include "solver/features/feature_prep.h"

namespace {

// Named tolerances.
constexpr double kAxisTolerance = 1e-8;      // |cos| between the two paths' axes, from 1
constexpr double kVarianceTolerance = 1e-9;  // relative

kith::Points wide(Eigen::Index n, Eigen::Index f, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  kith::Points x(n, f);
  // A few strong directions plus noise, so the leading variances are well apart.
  kith::Points basis(6, f);
  for (Eigen::Index r = 0; r < basis.rows(); ++r)
    for (Eigen::Index c = 0; c < f; ++c) basis(r, c) = u(rng);
  for (Eigen::Index i = 0; i < n; ++i) {
    for (Eigen::Index c = 0; c < f; ++c) x(i, c) = 0.05 * u(rng) + 3.0;
    for (Eigen::Index r = 0; r < basis.rows(); ++r) x.row(i) += (6.0 - double(r)) * u(rng) * basis.row(r);
  }
  return x;
}

}  // namespace

TEST_CASE("solver pca: the Gram path for wide data equals the covariance path") {
  const kith::Points x = wide(40, 300, 7);
  // Every row eight times: the same mean and covariance, but 320 >= 300 rows, so fit_pca takes
  // the covariance path on it.
  kith::Points tall(320, 300);
  for (Eigen::Index i = 0; i < 320; ++i) tall.row(i) = x.row(i % 40);
  const kith::Pca gram = kith::fit_pca(x, 5);
  const kith::Pca cov = kith::fit_pca(tall, 5);
  for (int c = 0; c < 5; ++c) {
    INFO("axis ", c);
    CHECK(std::abs(gram.axes.col(c).dot(cov.axes.col(c))) == doctest::Approx(1.0).epsilon(kAxisTolerance));
    CHECK(gram.axes.col(c).dot(cov.axes.col(c)) > 0);  // the same sign convention
    CHECK(gram.variances(c) == doctest::Approx(cov.variances(c)).epsilon(kVarianceTolerance));
  }
  CHECK((gram.mean - cov.mean).cwiseAbs().maxCoeff() < 1e-12);
  // Projections agree too (up to the same tolerance).
  const kith::Points a = gram.project(x), b = cov.project(x);
  CHECK((a - b).cwiseAbs().maxCoeff() < 1e-6 * a.cwiseAbs().maxCoeff());
}

TEST_CASE("solver pca: 300 items x 6,000 features prepare in seconds") {
  const kith::Points x = wide(300, 6000, 11);
  const auto t0 = std::chrono::steady_clock::now();
  kith::FeaturePrepOptions o;  // PCA to 50 dims, as every fit does
  std::string note;
  const kith::Points y = kith::prepare_features(x, o, &note);
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  MESSAGE("300 x 6,000 -> 50 dims in ", seconds, " s (", note, ")");
  CHECK(y.rows() == 300);
  CHECK(y.cols() == 50);
  CHECK(seconds < 20.0);  // measured about 0.5 s here; the covariance path took minutes
}
