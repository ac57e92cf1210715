// GradientDescent (see optimizer.h). The update is the one of scikit-learn's _gradient_descent:
// gains grow by 0.2 where the gradient and the previous update have opposite signs, shrink x0.8
// otherwise, are clipped below at min_gain; update = momentum * update - rate * gain * g.
#include "solver/fit/optimizer.h"

#include <algorithm>
#include <cmath>

namespace kith {

StepResult GradientDescent::step(ObjectiveTerm& objective, Points& y, const StepOptions& options) {
  const Eigen::Index n = y.rows(), d = y.cols();
  if (update_.rows() != n || update_.cols() != d) resize(n, d);
  StepResult result;
  result.cost = objective.evaluate(y, &gradient_);
  double norm2 = 0.0;
  bool finite = std::isfinite(result.cost);
  const double rate = options.learning_rate, momentum = options.momentum, min_gain = options.min_gain;
  double* u = update_.data();
  double* gain = gains_.data();
  const double* g = gradient_.data();
  double* p = y.data();
  const Eigen::Index total = n * d;
  for (Eigen::Index k = 0; k < total; ++k) {
    const double gk = g[k];
    norm2 += gk * gk;
    if (gk == 0.0) {  // hard pins: a zero gradient means "do not move", whatever the momentum
      u[k] = 0.0;
      continue;
    }
    // Same test as scikit-learn: "inc = update * grad < 0".
    double gk_gain = gain[k];
    gk_gain = (u[k] * gk < 0.0) ? gk_gain + 0.2 : gk_gain * 0.8;
    if (gk_gain < min_gain) gk_gain = min_gain;
    gain[k] = gk_gain;
    const double uk = momentum * u[k] - rate * gk_gain * gk;
    u[k] = uk;
    p[k] += uk;
    finite = finite && std::isfinite(p[k]);
  }
  result.gradient_norm = std::sqrt(norm2);
  result.finite = finite && std::isfinite(norm2);
  return result;
}

void GradientDescent::reset() {
  update_.setZero();
  gains_.setOnes();
}

void GradientDescent::resize(Eigen::Index n, Eigen::Index dims) {
  Points u = Points::Zero(n, dims), g = Points::Ones(n, dims);
  const Eigen::Index rows = std::min(n, update_.rows());
  if (update_.cols() == dims && rows > 0) {
    u.topRows(rows) = update_.topRows(rows);
    g.topRows(rows) = gains_.topRows(rows);
  }
  update_.swap(u);
  gains_.swap(g);
  gradient_.resize(n, dims);
}

void GradientDescent::remove_rows(const std::vector<int32_t>& sorted_rows) {
  if (sorted_rows.empty() || update_.rows() == 0) return;
  const Eigen::Index n = update_.rows(), d = update_.cols();
  Points u(n - Eigen::Index(sorted_rows.size()), d), g(u.rows(), d);
  size_t r = 0;
  Eigen::Index out = 0;
  for (Eigen::Index i = 0; i < n; ++i) {
    if (r < sorted_rows.size() && sorted_rows[r] == i) {
      ++r;
      continue;
    }
    u.row(out) = update_.row(i);
    g.row(out) = gains_.row(i);
    ++out;
  }
  update_.swap(u);
  gains_.swap(g);
  gradient_.resize(update_.rows(), d);
}

}  // namespace kith
