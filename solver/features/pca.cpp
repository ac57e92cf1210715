// PCA (see feature_prep.h), in its own translation unit because Eigen's eigensolver is slow to
// compile. Covariance C = (X - mean)^T (X - mean) / N, eigenvectors by SelfAdjointEigenSolver.
#include <Eigen/Eigenvalues>
#include <cmath>
#include <cstdio>
#include <random>
#include <stdexcept>

#include "solver/base/portable_random.h"
#include "solver/features/feature_prep.h"
#include "solver/features/neighbours.h"

namespace kith {
namespace {

// Eigen's matrix product cuts its work into blocks sized by the CPU's caches, read at run time,
// and how a block's edge rows are summed differs from its inner ones: the covariance of the same
// features came out different in the last bits on a CPU with another cache size, and the map
// then differed. Fixed sizes, set once before main (so before any thread multiplies), give every
// machine the same blocks. The values are common ones (32 KB L1, 1 MB L2, 8 MB L3).
[[maybe_unused]] const bool kFixedEigenBlocking = [] {
  Eigen::setCpuCacheSizes(32 * 1024, 1024 * 1024, 8 * 1024 * 1024);
  return true;
}();

}  // namespace

Points Pca::project(const Points& x) const { return (x.rowwise() - mean) * axes; }

Pca fit_pca(const Points& x, int m) {
  const Eigen::Index n = x.rows(), f = x.cols();
  if (n < 1 || f < 1) throw std::invalid_argument("PCA needs at least one row and one column");
  if (m < 1 || m > f) throw std::invalid_argument("PCA: number of axes must be in 1 .. F");
  Pca p;
  p.mean = x.colwise().mean();
  const Eigen::MatrixXd centred = x.rowwise() - p.mean;
  p.axes.resize(f, m);
  p.variances.resize(m);
  // Sign convention: each axis has its largest component positive (so a seed gives one map).
  auto set_axis = [&p](int c, Eigen::VectorXd v, double variance) {
    Eigen::Index big;
    v.cwiseAbs().maxCoeff(&big);
    if (v(big) < 0) v = -v;
    p.axes.col(c) = v;
    p.variances(c) = std::max(0.0, variance);
  };
  if (f <= n) {
    // Covariance C = Xc^T Xc / N (F x F): O(N F^2) to form, O(F^3) to decompose.
    const Eigen::MatrixXd cov = (centred.transpose() * centred) / double(n);
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(cov);
    if (es.info() != Eigen::Success) throw std::runtime_error("PCA: eigen decomposition failed");
    for (int c = 0; c < m; ++c)  // eigenvalues come in increasing order
      set_axis(c, es.eigenvectors().col(f - 1 - c), es.eigenvalues()(f - 1 - c));
  } else {
    // Wide data: the Gram matrix G = Xc Xc^T / N (N x N) has the same nonzero eigenvalues; an
    // eigenvector u of G with eigenvalue l gives the axis Xc^T u / sqrt(N l). O(N^2 F + N^3), so
    // 300 x 6,000 costs a 300 x 300 decomposition instead of a 6,000 x 6,000 one.
    const Eigen::MatrixXd gram = (centred * centred.transpose()) / double(n);
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(gram);
    if (es.info() != Eigen::Success) throw std::runtime_error("PCA: eigen decomposition failed");
    for (int c = 0; c < m; ++c) {
      const Eigen::Index k = n - 1 - c;
      const double variance = c < n ? es.eigenvalues()(std::max<Eigen::Index>(k, 0)) : 0.0;
      Eigen::VectorXd v = Eigen::VectorXd::Zero(f);
      if (k >= 0 && variance > 1e-300) v = centred.transpose() * es.eigenvectors().col(k) / std::sqrt(double(n) * variance);
      if (!(v.squaredNorm() > 0.5)) {
        // No variance left along this axis (m > rank): any unit vector orthogonal to the others.
        for (Eigen::Index e = 0; e < f && !(v.squaredNorm() > 0.5); ++e) {
          Eigen::VectorXd t = Eigen::VectorXd::Unit(f, e);
          for (int q = 0; q < c; ++q) t -= p.axes.col(q).dot(t) * p.axes.col(q);
          if (t.norm() > 1e-6) v = t / t.norm();
        }
        set_axis(c, v, 0.0);
        continue;
      }
      set_axis(c, v.normalized(), variance);
    }
  }
  return p;
}

Points prepare_features(const Points& x, const FeaturePrepOptions& options, std::string* note) {
  Points out = x;
  std::string what;
  if (options.standardize) {
    const Eigen::RowVectorXd mean = out.colwise().mean();
    out.rowwise() -= mean;
    for (Eigen::Index c = 0; c < out.cols(); ++c) {
      const double sd = std::sqrt(out.col(c).squaredNorm() / double(out.rows()));
      if (sd > 0) out.col(c) /= sd;
    }
    what = "standardized";
  }
  if (options.metric == Metric::kCosine) {
    out = unit_rows(out);
    what += what.empty() ? "rows scaled to length 1 (cosine)" : ", rows scaled to length 1 (cosine)";
  }
  if (options.max_dims > 0 && out.cols() > options.max_dims) {
    const Pca p = fit_pca(out, options.max_dims);
    const double kept = p.variances.sum();
    const Eigen::MatrixXd centred = out.rowwise() - out.colwise().mean();
    const double total = centred.squaredNorm() / double(out.rows());
    char buf[160];
    std::snprintf(buf, sizeof buf, "%sPCA %ld -> %d dims (%.1f%% of the variance)", what.empty() ? "" : ", ",
                  long(out.cols()), options.max_dims, total > 0 ? 100.0 * kept / total : 100.0);
    what += buf;
    out = p.project(out);
  }
  if (note) *note = what.empty() ? "features used as given" : what;
  return out;
}

Points pca_start(const Points& x, int dims, double first_std, uint64_t seed) {
  const int m = std::min<int>(dims, int(x.cols()));
  Points y = Points::Zero(x.rows(), dims);
  y.leftCols(m) = fit_pca(x, m).project(x);
  const Eigen::VectorXd c0 = y.col(0);
  const double sd = std::sqrt((c0.array() - c0.mean()).square().mean());
  if (sd > 0) y *= first_std / sd;
  std::mt19937_64 rng(seed);
  for (Eigen::Index i = 0; i < y.rows(); ++i)
    for (int c = m; c < dims; ++c) y(i, c) = normal(rng, 0.0, first_std);
  return y;
}

Points classical_scaling(const Eigen::MatrixXd& d2, int dims) {
  const Eigen::Index n = d2.rows();
  if (n < 2 || d2.cols() != n) throw std::invalid_argument("classical scaling needs a square matrix of at least 2 items");
  if (dims < 1 || dims > n) throw std::invalid_argument("classical scaling: dims must be in 1 .. n");
  const Eigen::VectorXd row_mean = d2.rowwise().mean();
  const double mean = row_mean.mean();
  Eigen::MatrixXd b(n, n);
  for (Eigen::Index i = 0; i < n; ++i)
    for (Eigen::Index j = 0; j < n; ++j) b(i, j) = -0.5 * (d2(i, j) - row_mean(i) - row_mean(j) + mean);
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(b);
  if (es.info() != Eigen::Success) throw std::runtime_error("classical scaling: eigen decomposition failed");
  Points y(n, dims);
  for (int c = 0; c < dims; ++c) {
    Eigen::VectorXd v = es.eigenvectors().col(n - 1 - c);
    Eigen::Index big;
    v.cwiseAbs().maxCoeff(&big);
    if (v(big) < 0) v = -v;
    y.col(c) = v * std::sqrt(std::max(0.0, es.eigenvalues()(n - 1 - c)));
  }
  return y;
}

}  // namespace kith
