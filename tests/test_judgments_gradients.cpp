// Finite-difference checks of the judgment term (t-STE, alpha 1 and 2), the drag springs and the
// blended objective; validation of judgments.
#include <doctest/doctest.h>

#include <cmath>
#include <random>

#include "solver/objective/blended_objective.h"
#include "solver/objective/judgment_term.h"
#include "solver/objective/spring_term.h"
#include "tests/approx.h"

namespace {

using kith::Judgment;
using kith::Points;

constexpr double kStep = 1e-6;        // central difference step
constexpr double kGradAbsTol = 1e-6;  // absolute tolerance on each gradient element
constexpr double kGradRelTol = 1e-5;  // relative tolerance on each gradient element

Points random_map(int n, int d, uint64_t seed, double scale = 1.5) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0.0, scale);
  Points y(n, d);
  for (int i = 0; i < n; ++i)
    for (int c = 0; c < d; ++c) y(i, c) = g(rng);
  return y;
}

std::vector<Judgment> random_judgments(int n, int m, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_int_distribution<int> item(0, n - 1);
  std::uniform_real_distribution<double> w(0.5, 2.0);
  std::vector<Judgment> js;
  while (int(js.size()) < m) {
    Judgment j;
    j.anchor = item(rng);
    j.nearer = item(rng);
    j.farther = item(rng);
    if (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther) continue;
    j.id = int64_t(js.size());
    j.weight = w(rng);
    js.push_back(j);
  }
  return js;
}

}  // namespace

TEST_CASE("judgment term: t-STE gradient matches finite differences for alpha 1, 2 and 0.5") {
  for (double alpha : {1.0, 2.0, 0.5}) {
    CAPTURE(alpha);
    for (int d : {2, 3}) {
      kith::JudgmentTerm term(12, {alpha, 1});
      auto js = random_judgments(12, 40, 7 + uint64_t(d));
      js[3].retracted = true;
      term.set_judgments(js);
      const Points y = random_map(12, d, 11);
      Points g;
      const double cost = term.evaluate(y, &g);
      CHECK(cost == doctest::Approx(term.evaluate(y, nullptr)).epsilon(1e-14));
      kith::test::assert_near(g, kith::test::central_differences(term, y, kStep), kGradAbsTol, kGradRelTol,
                              "t-STE gradient");
    }
  }
}

TEST_CASE("judgment term: cost is -w log p with the Student-t kernel written out") {
  // One judgment, positions chosen by hand; K from the published t-STE formula.
  Points y(3, 3);
  y << 0, 0, 0, 1, 0, 0, 0, 2, 1;
  for (double alpha : {1.0, 2.0, 3.5}) {
    auto K = [alpha](double d2) { return std::pow(1 + d2 / alpha, -(alpha + 1) / 2); };
    const double p = K(1.0) / (K(1.0) + K(5.0));
    kith::JudgmentTerm term(3, {alpha, 1});
    Judgment j;
    j.anchor = 0, j.nearer = 1, j.farther = 2, j.weight = 1.7;
    term.set_judgments({j});
    CHECK(term.evaluate(y, nullptr) == doctest::Approx(-1.7 * std::log(p)).epsilon(1e-12));
    CHECK(kith::tste_probability(y, 0, 1, 2, alpha) == doctest::Approx(p).epsilon(1e-12));
  }
}

TEST_CASE("judgment term: retracted judgments are ignored, the threaded sum equals the serial one") {
  const int n = 400;
  auto js = random_judgments(n, 20000, 3);
  for (size_t t = 0; t < js.size(); t += 7) js[t].retracted = true;
  const Points y = random_map(n, 3, 5);
  kith::JudgmentTerm serial(n, {1.0, 1}), threaded(n, {1.0, 4});
  serial.set_judgments(js);
  threaded.set_judgments(js);
  Points gs, gt;
  const double cs = serial.evaluate(y, &gs), ct = threaded.evaluate(y, &gt);
  CHECK(ct == doctest::Approx(cs).epsilon(1e-12));
  kith::test::assert_near(gt, gs, 1e-10, 1e-10, "threaded gradient");

  std::vector<Judgment> active;
  for (const auto& j : js)
    if (!j.retracted) active.push_back(j);
  kith::JudgmentTerm only_active(n, {1.0, 1});
  only_active.set_judgments(active);
  CHECK(only_active.evaluate(y, nullptr) == doctest::Approx(cs).epsilon(1e-12));
  CHECK(serial.active_count() == active.size());
}

TEST_CASE("judgment term: contradictory and repeated judgments are allowed") {
  kith::JudgmentTerm term(3);
  Judgment a;
  a.anchor = 0, a.nearer = 1, a.farther = 2;
  Judgment b = a;
  std::swap(b.nearer, b.farther);
  term.set_judgments({a, a, b});
  CHECK(term.active_count() == 3);
  CHECK(term.touched_items() == 3);
}

TEST_CASE("judgment term: a judgment naming the same item twice or an unknown item is rejected") {
  kith::JudgmentTerm term(5);
  Judgment ok;
  ok.anchor = 0, ok.nearer = 1, ok.farther = 2;
  term.set_judgments({ok});

  Judgment same = ok;
  same.farther = 0;
  same.id = 77;
  try {
    term.set_judgments({ok, same});
    FAIL("accepted a judgment naming the same item twice");
  } catch (const kith::JudgmentError& e) {
    const std::string m = e.what();
    CHECK(m.find("judgment 2 (id 77)") != std::string::npos);
    CHECK(m.find("anchor and farther are the same item (0)") != std::string::npos);
  }
  CHECK(term.judgments().size() == 1);  // the old set is kept

  Judgment unknown = ok;
  unknown.nearer = 9;
  CHECK_THROWS_WITH_AS(term.add(unknown), doctest::Contains("nearer item 9 is unknown (the collection has 5 items)"),
                       kith::JudgmentError);
  Judgment negative = ok;
  negative.anchor = -1;
  CHECK(kith::judgment_problem(negative, 5).find("anchor item -1 is unknown") != std::string::npos);
  Judgment bad_weight = ok;
  bad_weight.weight = std::nan("");
  CHECK(kith::judgment_problem(bad_weight, 5).find("weight") != std::string::npos);
  CHECK(term.judgments().size() == 1);
  CHECK_THROWS_AS(kith::JudgmentTerm(5, {0.0, 1}), std::invalid_argument);
}

TEST_CASE("judgment term: removing items drops the judgments that name them and renumbers the rest") {
  kith::JudgmentTerm term(6);
  Judgment a, b;
  a.anchor = 0, a.nearer = 3, a.farther = 5;
  b.anchor = 1, b.nearer = 2, b.farther = 4;
  term.set_judgments({a, b});
  term.remove_items({2});
  REQUIRE(term.judgments().size() == 1);
  CHECK(term.judgments()[0].nearer == 2);
  CHECK(term.judgments()[0].farther == 4);
  CHECK(term.size() == 5);
}

TEST_CASE("spring term: gradient matches finite differences") {
  kith::SpringTerm springs(3);
  const double t1[3] = {1, 2, 3}, t2[3] = {-1, 0.5, 0};
  springs.set_target(1, t1);
  springs.set_target(4, t2);
  springs.set_target(4, t1);  // latest wins
  const Points y = random_map(6, 3, 2);
  Points g;
  const double cost = springs.evaluate(y, &g);
  CHECK(cost == doctest::Approx(0.5 * ((y.row(1) - Eigen::RowVector3d(1, 2, 3)).squaredNorm() +
                                       (y.row(4) - Eigen::RowVector3d(1, 2, 3)).squaredNorm())));
  kith::test::assert_near(g, kith::test::central_differences(springs, y, kStep), kGradAbsTol, kGradRelTol,
                          "spring gradient");
  springs.remove_items({0});
  CHECK(springs.has_target(0));
  CHECK(springs.has_target(3));
  CHECK_FALSE(springs.has_target(4));
}

TEST_CASE("blended objective: gradient matches finite differences, pins zero their rows, blend changes live") {
  const int n = 15;
  kith::BlendedObjective obj(n, 3);
  obj.set_judgments(random_judgments(n, 30, 21));
  const double target[3] = {0.5, -0.5, 1.0};
  obj.set_drag(4, target);
  obj.set_drag_stiffness(3.0);
  const Points y = random_map(n, 3, 8);
  for (double blend : {1.0, 0.25, 6.0}) {
    obj.set_blend(blend);
    Points g;
    obj.evaluate(y, &g);
    kith::test::assert_near(g, kith::test::central_differences(obj, y, kStep), kGradAbsTol, kGradRelTol,
                            "blended gradient");
  }
  // Scaling: E = blend * T/(3 W N) * sum w (-log p) + stiffness/N * springs.
  kith::JudgmentTerm alone(n);
  alone.set_judgments(obj.judgments());
  kith::SpringTerm springs(3);
  springs.set_target(4, target);
  const double expected =
      6.0 * double(alone.touched_items()) / (3.0 * alone.active_weight() * n) * alone.evaluate(y, nullptr) +
      3.0 / n * springs.evaluate(y, nullptr);
  CHECK(obj.evaluate(y, nullptr) == doctest::Approx(expected).epsilon(1e-12));
  CHECK(obj.last_costs().judgment == doctest::Approx(alone.evaluate(y, nullptr) / alone.active_weight()));

  obj.pin(2);
  obj.pin(4);
  Points g;
  obj.evaluate(y, &g);
  CHECK(g.row(2).norm() == 0.0);
  CHECK(g.row(4).norm() == 0.0);
  CHECK(g.row(3).norm() > 0.0);
  obj.unpin(4);
  obj.evaluate(y, &g);
  CHECK(g.row(4).norm() > 0.0);
  CHECK_THROWS_AS(obj.pin(n), std::invalid_argument);
  CHECK_THROWS_AS(obj.set_blend(-1), std::invalid_argument);
}

TEST_CASE("blended objective: the judgment scale does not depend on N or on repeating the judgments") {
  // Same judgments among the first 20 items, collections of 100 and 10,000 items, once and ten times over:
  // the per-item pull of the judgments relative to 1/N (N * gradient) must not change.
  auto js = random_judgments(20, 40, 4);
  std::vector<double> pulls;
  for (int n : {100, 10000})
    for (int repeat : {1, 10}) {
      kith::BlendedObjective obj(size_t(n), 3);
      std::vector<Judgment> all;
      for (int r = 0; r < repeat; ++r) all.insert(all.end(), js.begin(), js.end());
      obj.set_judgments(all);
      Points y = Points::Zero(n, 3);
      y.topRows(20) = random_map(20, 3, 9);
      Points g;
      obj.evaluate(y, &g);
      pulls.push_back(double(n) * g.topRows(20).norm());
    }
  for (double p : pulls) CHECK(p == doctest::Approx(pulls[0]).epsilon(1e-9));
}
