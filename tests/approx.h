// Shared test helpers: approximate comparison of Eigen matrices that names the failing element,
// and running the outside reference scripts (tests/reference/*.py) with Debian's /usr/bin/python3.
#pragma once
#include <doctest/doctest.h>

#include <Eigen/Core>
#include <cmath>
#include <cstdio>
#include <random>
#include <sstream>
#include <string>

#include "solver/objective/objective_term.h"

namespace kith::test {

// Checks |a - b| <= abs_tol + rel_tol * |b| element by element; reports the first failure with
// its row, column and both values.
template <typename A, typename B>
void assert_near(const Eigen::MatrixBase<A>& a, const Eigen::MatrixBase<B>& b, double abs_tol, double rel_tol = 0.0,
                 const char* what = "matrix") {
  REQUIRE_MESSAGE(a.rows() == b.rows(), what << ": rows " << a.rows() << " vs " << b.rows());
  REQUIRE_MESSAGE(a.cols() == b.cols(), what << ": cols " << a.cols() << " vs " << b.cols());
  for (Eigen::Index i = 0; i < a.rows(); ++i)
    for (Eigen::Index j = 0; j < a.cols(); ++j) {
      const double x = double(a(i, j)), y = double(b(i, j));
      const bool ok = std::isfinite(x) && std::isfinite(y) && std::abs(x - y) <= abs_tol + rel_tol * std::abs(y);
      if (!ok) {
        std::ostringstream m;
        m.precision(17);
        m << what << "(" << i << ", " << j << "): " << x << " vs " << y << " (diff " << std::abs(x - y) << ", allowed "
          << abs_tol + rel_tol * std::abs(y) << ")";
        FAIL(m.str());
        return;
      }
    }
}

// Central finite differences of term.evaluate(y, nullptr) with step h, element by element:
// g(i, c) = (E(y + h e_ic) - E(y - h e_ic)) / 2h. The slow, obvious reference for every gradient.
kith::Points central_differences(kith::ObjectiveTerm& term, const kith::Points& y, double h);

// Is Debian's python with numpy/scikit-learn/scikit-image there? (The python3 first on PATH may
// lack numpy, so outside checks always use /usr/bin/python3.)
bool reference_python_available();

// Runs `/usr/bin/python3 tests/reference/SCRIPT args...`, returns its stdout; fails the test on a
// non-zero exit.
std::string run_reference(const std::string& script, const std::string& args = "");

// A fresh empty directory under the system temp folder, for one test's files.
std::string temp_dir(const std::string& name);

// N x D points: standard normal noise (seeded) plus SHIFT(i, c) on item i's coordinate c, which
// places the items in clusters.
template <class Shift>
kith::Points normal_points(int n, int d, uint64_t seed, Shift shift) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  kith::Points x(n, d);
  for (int i = 0; i < n; ++i)
    for (int c = 0; c < d; ++c) x(i, c) = g(rng) + shift(i, c);
  return x;
}

}  // namespace kith::test
