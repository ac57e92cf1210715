// Shared test helpers: approximate comparison of Eigen matrices that names the failing element,
// and running the outside reference scripts (tests/reference/*.py) with Debian's /usr/bin/python3.
#pragma once
#include <doctest/doctest.h>

#include <Eigen/Core>

#include "solver/objective/objective_term.h"
#include <cmath>
#include <cstdio>
#include <sstream>
#include <string>

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
        m << what << "(" << i << ", " << j << "): " << x << " vs " << y << " (diff " << std::abs(x - y)
          << ", allowed " << abs_tol + rel_tol * std::abs(y) << ")";
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

}  // namespace kith::test
