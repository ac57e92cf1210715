// GradientDescent on problems with a known minimum.
#include <doctest/doctest.h>

#include "solver/fit/optimizer.h"
#include "tests/approx.h"

namespace {
// E(Y) = 1/2 sum a_c (y_ic - m_ic)^2, minimum at M.
struct Quadratic : kith::ObjectiveTerm {
  kith::Points m;
  double evaluate(const kith::Points& y, kith::Points* g) override {
    double cost = 0;
    if (g) g->resize(y.rows(), y.cols());
    for (Eigen::Index i = 0; i < y.rows(); ++i)
      for (Eigen::Index c = 0; c < y.cols(); ++c) {
        const double a = 1.0 + double(c), r = y(i, c) - m(i, c);
        cost += 0.5 * a * r * r;
        if (g) (*g)(i, c) = a * r;
      }
    return cost;
  }
};
kith::StepOptions step_options(double learning_rate, double momentum) {
  kith::StepOptions o;
  o.learning_rate = learning_rate;
  o.momentum = momentum;
  return o;
}
}  // namespace

TEST_CASE("solver: gradient descent with momentum and gains finds a quadratic's minimum") {
  Quadratic q;
  q.m = kith::Points::Random(20, 3);
  kith::Points y = kith::Points::Zero(20, 3);
  kith::GradientDescent gd;
  const kith::StepOptions o = step_options(0.1, 0.5);
  kith::StepResult r;
  for (int it = 0; it < 500; ++it) r = gd.step(q, y, o);
  CHECK(r.finite);
  kith::test::assert_near(y, q.m, 1e-8, 0.0, "minimum");
}

TEST_CASE("solver: gradient descent flags divergence") {
  Quadratic q;
  q.m = kith::Points::Ones(4, 2);
  kith::Points y = kith::Points::Zero(4, 2);
  kith::GradientDescent gd;
  kith::StepOptions o;
  o.learning_rate = 1e6;  // far too large: explodes
  bool finite = true;
  for (int it = 0; it < 200 && finite; ++it) finite = gd.step(q, y, o).finite;
  CHECK_FALSE(finite);
}
