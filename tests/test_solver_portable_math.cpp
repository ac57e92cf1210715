// solver/base/portable_math.h and portable_random.h: the portable functions against the C
// library (std::) over many random arguments, against numpy (tests/reference/
// portable_math_reference.py, Debian's python3-numpy), at their special values; the random draws
// by their moments.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "solver/base/portable_math.h"
#include "solver/base/portable_random.h"
#include "tests/approx.h"

namespace {

namespace pm = kith::pm;

// Distance of a from the reference r in units in the last place of r.
double ulps(double a, long double r) {
  if (std::isnan(a) && std::isnan(double(r))) return 0.0;
  if ((long double)a == r) return 0.0;
  const double rd = std::fabs(double(r));
  const double ulp = std::nextafter(rd, std::numeric_limits<double>::infinity()) - rd;
  return double(std::fabs((long double)a - r) / (long double)ulp);
}

// Each of the C library and kith's function is within about an ulp of the true value, so they may
// be two apart.
constexpr double kAgainstLibrary = 2.0 * kith::pm::kPortableUlps;
constexpr int kSamples = 200000;

struct Case {
  const char* name;
  double (*ours)(double);
  double (*theirs)(double);
  double lo, hi;
  bool log_scale;  // arguments 10^u, u uniform in [lo, hi], either sign
};

}  // namespace

TEST_CASE("portable maths: within a few ulps of the C library over random arguments") {
  const Case cases[] = {
      {"exp", pm::exp, [](double x) { return std::exp(x); }, -745, 709, false},
      {"exp near 0", pm::exp, [](double x) { return std::exp(x); }, -2, 2, false},
      {"log", pm::log, [](double x) { return std::log(x); }, -320, 308, true},
      {"log near 1", pm::log, [](double x) { return std::log(x); }, 0.5, 2, false},
      {"log1p", pm::log1p, [](double x) { return std::log1p(x); }, -0.999, 10, false},
      {"log1p tiny", pm::log1p, [](double x) { return std::log1p(x); }, -1e-8, 1e-8, false},
      {"sin", pm::sin, [](double x) { return std::sin(x); }, -100, 100, false},
      {"sin wide", pm::sin, [](double x) { return std::sin(x); }, -4e5, 4e5, false},
      {"cos", pm::cos, [](double x) { return std::cos(x); }, -100, 100, false},
      {"atan", pm::atan, [](double x) { return std::atan(x); }, -30, 30, false},
      {"atan wide", pm::atan, [](double x) { return std::atan(x); }, -300, 300, true},
  };
  std::mt19937_64 rng(11);
  for (const Case& c : cases) {
    double worst = 0.0, at = 0.0;
    for (int i = 0; i < kSamples; ++i) {
      const double u = c.lo + (c.hi - c.lo) * kith::uniform01(rng);
      double x = c.log_scale ? std::pow(10.0, u) : u;
      if (c.log_scale && c.ours != pm::log && (rng() & 1)) x = -x;
      const double e = ulps(c.ours(x), c.theirs(x));
      if (e > worst) worst = e, at = x;
    }
    INFO(c.name << ": worst " << worst << " ulps at " << at);
    CHECK(worst <= kAgainstLibrary);
  }
  double worst2 = 0.0, worst_hypot = 0.0;
  for (int i = 0; i < kSamples; ++i) {
    const double y = -100 + 200 * kith::uniform01(rng), x = -100 + 200 * kith::uniform01(rng);
    worst2 = std::max(worst2, ulps(pm::atan2(y, x), std::atan2(y, x)));
    worst_hypot = std::max(worst_hypot, ulps(pm::hypot(y, x), std::hypot(y, x)));
  }
  CHECK(worst2 <= kAgainstLibrary);
  CHECK(worst_hypot <= kAgainstLibrary);
  // pow is exp(y log x): its error grows with |y log x| (see the header: 2 + 3 |y log x| ulps).
  double worst_pow = 0.0;
  for (int i = 0; i < kSamples; ++i) {
    const double x = kith::uniform01(rng), y = -8 + 16 * kith::uniform01(rng);
    worst_pow = std::max(worst_pow, ulps(pm::pow(x, y), std::pow(x, y)) / (kAgainstLibrary + 3.0 * std::abs(y * std::log(x))));
  }
  CHECK(worst_pow <= 1.0);
}

TEST_CASE("portable maths: cbrt within an ulp of a long-double reference (glibc's cbrt is off by up to 4)") {
  std::mt19937_64 rng(12);
  double worst = 0.0;
  for (int i = 0; i < kSamples; ++i) {
    const double x = std::pow(10.0, -300 + 600 * kith::uniform01(rng)) * ((rng() & 1) ? -1.0 : 1.0);
    worst = std::max(worst, ulps(pm::cbrt(x), cbrtl((long double)x)));
  }
  CHECK(worst <= 1.0);
  // subnormal arguments are scaled first
  const double tiny = 4e-320;  // the double nearest (few bits: subnormal), not the decimal
  CHECK(ulps(pm::cbrt(tiny), cbrtl((long double)tiny)) <= 1.0);
}

TEST_CASE("portable maths: special values") {
  const double inf = std::numeric_limits<double>::infinity(), nan = std::numeric_limits<double>::quiet_NaN();
  CHECK(pm::exp(0.0) == 1.0);
  CHECK(pm::exp(710.0) == inf);
  CHECK(pm::exp(-746.0) == 0.0);
  CHECK(pm::exp(-inf) == 0.0);
  CHECK(pm::exp(-744.0) > 0.0);  // subnormal result
  CHECK(std::isnan(pm::exp(nan)));
  CHECK(pm::log(1.0) == 0.0);
  CHECK(pm::log(0.0) == -inf);
  CHECK(pm::log(inf) == inf);
  CHECK(std::isnan(pm::log(-1.0)));
  CHECK(ulps(pm::log(4.9406564584124654e-324), std::log(4.9406564584124654e-324)) <= 1.0);
  CHECK(pm::log1p(-1.0) == -inf);
  CHECK(pm::log1p(1e-300) == 1e-300);
  CHECK(pm::pow(0.0, 2.0) == 0.0);
  CHECK(pm::pow(2.0, 0.0) == 1.0);
  CHECK(std::isnan(pm::pow(-2.0, 0.5)));
  CHECK(pm::sin(0.0) == 0.0);
  CHECK(pm::cos(0.0) == 1.0);
  CHECK(std::isnan(pm::sin(inf)));
  CHECK(pm::atan2(0.0, 1.0) == 0.0);
  CHECK(std::signbit(pm::atan2(-0.0, 1.0)));
  CHECK(pm::atan2(0.0, -1.0) == doctest::Approx(3.141592653589793).epsilon(1e-16));
  CHECK(pm::atan2(1.0, 0.0) == doctest::Approx(1.5707963267948966).epsilon(1e-16));
  CHECK(pm::atan2(-1.0, -0.0) == doctest::Approx(-1.5707963267948966).epsilon(1e-16));
  CHECK(pm::atan(inf) == doctest::Approx(1.5707963267948966).epsilon(1e-16));
  CHECK(pm::cbrt(-27.0) == -3.0);
  CHECK(pm::cbrt(0.0) == 0.0);
  CHECK(pm::hypot(3.0, 4.0) == 5.0);
  CHECK(pm::hypot(3e200, 4e200) == doctest::Approx(5e200).epsilon(1e-15));
  CHECK(pm::hypot(3e-200, 4e-200) == doctest::Approx(5e-200).epsilon(1e-15));
  CHECK(pm::hypot(-inf, nan) == inf);
}

TEST_CASE("portable maths: within a few ulps of numpy") {
  if (!kith::test::reference_python_available()) return;
  const std::string out = kith::test::run_reference("portable_math_reference.py", "20000 5");
  std::istringstream in(out);
  std::string name;
  size_t lines = 0;
  double worst = 0.0, worst_pow = 0.0;
  std::string worst_name;
  while (in >> name) {
    double x, y = 0.0, r;
    const bool two = name == "atan2" || name == "hypot" || name == "pow";
    in >> x;
    if (two) in >> y;
    in >> r;
    REQUIRE(in);
    ++lines;
    double ours;
    if (name == "exp") ours = pm::exp(x);
    else if (name == "log") ours = pm::log(x);
    else if (name == "log1p") ours = pm::log1p(x);
    else if (name == "sin") ours = pm::sin(x);
    else if (name == "cos") ours = pm::cos(x);
    else if (name == "atan") ours = pm::atan(x);
    else if (name == "cbrt") ours = pm::cbrt(x);
    else if (name == "atan2") ours = pm::atan2(x, y);
    else if (name == "hypot") ours = pm::hypot(x, y);
    else if (name == "pow") ours = pm::pow(x, y);
    else FAIL("unknown function " << name);
    const double e = ulps(ours, r);
    if (name == "pow") {
      worst_pow = std::max(worst_pow, e / (kAgainstLibrary + 3.0 * std::abs(y * std::log(x))));
    } else if (e > worst) {
      worst = e;
      worst_name = name;
    }
  }
  CHECK(lines == 10 * 20000);
  INFO("worst: " << worst << " ulps (" << worst_name << ")");
  CHECK(worst <= kAgainstLibrary);
  CHECK(worst_pow <= 1.0);
}

TEST_CASE("portable random: uniform, below, normal and shuffle by their moments") {
  std::mt19937_64 rng(21);
  constexpr int kDraws = 200000;
  double s = 0, s2 = 0;
  for (int i = 0; i < kDraws; ++i) {
    const double u = kith::uniform01(rng);
    REQUIRE(u >= 0.0);
    REQUIRE(u < 1.0);
    s += u, s2 += u * u;
  }
  // mean 1/2 and variance 1/12; 5 standard errors
  CHECK(std::abs(s / kDraws - 0.5) < 5 * std::sqrt(1.0 / 12 / kDraws));
  CHECK(std::abs(s2 / kDraws - (s / kDraws) * (s / kDraws) - 1.0 / 12) < 1e-3);
  std::vector<int> counts(7, 0);
  for (int i = 0; i < kDraws; ++i) ++counts[size_t(kith::below(rng, 7))];
  double chi2 = 0;
  for (int c : counts) chi2 += (c - kDraws / 7.0) * (c - kDraws / 7.0) / (kDraws / 7.0);
  CHECK(chi2 < 22.5);  // chi-square, 6 degrees of freedom, p = 0.001
  CHECK(kith::below(rng, 1) == 0);
  s = s2 = 0;
  double s4 = 0;
  for (int i = 0; i < kDraws; ++i) {
    const double z = kith::normal(rng, 3.0, 2.0);
    s += z, s2 += (z - 3) * (z - 3), s4 += (z - 3) * (z - 3) * (z - 3) * (z - 3);
  }
  CHECK(std::abs(s / kDraws - 3.0) < 5 * 2.0 / std::sqrt(kDraws));
  CHECK(std::abs(s2 / kDraws - 4.0) < 0.05);
  CHECK(std::abs(s4 / kDraws / 16.0 - 3.0) < 0.1);  // kurtosis of a normal
  std::vector<int> v(10);
  for (int i = 0; i < 10; ++i) v[size_t(i)] = i;
  std::vector<int> first_place(10, 0);
  for (int t = 0; t < 20000; ++t) {
    std::vector<int> w = v;
    kith::shuffle(w.begin(), w.end(), rng);
    std::vector<int> sorted = w;
    std::sort(sorted.begin(), sorted.end());
    REQUIRE(sorted == v);
    ++first_place[size_t(w[0])];
  }
  for (int c : first_place) CHECK(std::abs(c - 2000) < 5 * std::sqrt(2000.0));
}
