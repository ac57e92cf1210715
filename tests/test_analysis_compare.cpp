// Neighbour comparison, map alignment, displacement and judgment attribution on tiny hand-built
// cases whose answers are known, plus a brute-force check of the Procrustes optimum.
#include <doctest/doctest.h>

#include <cmath>

#include "solver/measures/displacement.h"
#include "solver/objective/judgment_term.h"
#include "solver/measures/neighbour_compare.h"
#include "tests/analysis_support.h"
#include "tests/approx.h"

using namespace kith;

namespace {
constexpr double kTol = 1e-9;
constexpr double kPi = 3.14159265358979323846;

Points rows(std::initializer_list<std::initializer_list<double>> r) {
  Points p(Eigen::Index(r.size()), Eigen::Index(r.begin()->size()));
  Eigen::Index i = 0;
  for (const auto& row : r) {
    Eigen::Index j = 0;
    for (double v : row) p(i, j++) = v;
    ++i;
  }
  return p;
}
}  // namespace

TEST_CASE("neighbour comparison: ranks, gained and lost on a hand-built line") {
  // Features on a line 0..5; the map swaps items 1 and 4.
  const Points x = rows({{0}, {1}, {2}, {3}, {4}, {5}});
  const Points y = rows({{0}, {4}, {2}, {3}, {1}, {5}});
  const NeighbourGraph gf = test::brute_neighbours(x, 2), gm = test::brute_neighbours(y, 2);
  const NeighbourComparison c = compare_neighbours(0, gf, gm);
  // Item 0: feature neighbours 1, 2; map neighbours 4 (at 1), 2 (at 2).
  REQUIRE(c.features.size() == 2);
  CHECK(c.features[0].item == 1);
  CHECK(c.features[0].map_rank == 0);
  CHECK(c.features[1].item == 2);
  CHECK(c.features[1].map_rank == 2);
  CHECK(c.map[0].item == 4);
  CHECK(c.map[0].feature_rank == 0);
  CHECK(c.map[1].item == 2);
  CHECK(c.map[1].feature_rank == 2);
  CHECK(c.gained == std::vector<int32_t>{4});
  CHECK(c.lost == std::vector<int32_t>{1});
  CHECK(c.kept == 0.5);
  // Worked by hand (ties break by lower index): feature lists 0:{1,2} 1:{0,2} 2:{1,3} 3:{2,4} 4:{3,5}
  // 5:{4,3}; map lists 0:{4,2} 1:{3,5} 2:{3,4} 3:{1,2} 4:{0,2} 5:{1,3}.
  const std::vector<double> kept = neighbourhood_kept(gf, gm);
  const std::vector<double> expected{0.5, 0.0, 0.5, 0.5, 0.0, 0.5};
  CHECK(kept == expected);
  CHECK(worst_kept(kept, 2) == std::vector<int32_t>{1, 4});
  CHECK_THROWS_AS(compare_neighbours(6, gf, gm), std::invalid_argument);
  CHECK_THROWS_AS(compare_neighbours(0, gf, gm, 3), std::invalid_argument);
}

TEST_CASE("map alignment recovers a known similarity transform, mirror included") {
  const Points r = rows({{0, 0}, {1, 0}, {0, 2}, {3, 1}, {-1, 4}});
  for (bool mirror : {false, true}) {
    const double a = 0.7, s = 2.5;
    Eigen::Matrix2d rot;
    rot << std::cos(a), std::sin(a), -std::sin(a), std::cos(a);
    if (mirror) rot.col(0) *= -1.0;
    Eigen::RowVector2d t(3, -1);
    Points c = s * (r * rot);
    c.rowwise() += t;
    const MapAlignment al = align_maps(r, c);
    test::assert_near(al.rotation, Eigen::MatrixXd(rot), kTol, 0.0, "rotation");
    CHECK(al.scale == doctest::Approx(s).epsilon(kTol));
    test::assert_near(al.translation, Eigen::RowVectorXd(t), kTol, 0.0, "translation");
    CHECK(al.rms < kTol);
    const Displacement d = measure_displacement(r, c);
    for (double v : d.distance) CHECK(v < kTol);
  }
}

// Slow, obvious reference: in 2-D try every angle on a fine grid (both mirror images) with the
// closed-form best scale and translation for that rotation; the SVD answer must be at least as good.
TEST_CASE("map alignment is the least-squares optimum (brute-force search over angles)") {
  const Points r = rows({{0, 0}, {1, 0}, {0, 2}, {3, 1}, {-1, 4}, {2, 2}});
  const Points c = rows({{1, 1}, {0.5, 3}, {-2, 0}, {0, 5}, {-4, -1}, {-1, 3.5}});
  const MapAlignment al = align_maps(r, c);
  const Eigen::RowVectorXd mr = r.colwise().mean(), mc = c.colwise().mean();
  const Eigen::MatrixXd a = r.rowwise() - mr, b = c.rowwise() - mc;
  double best = 1e300;
  for (int m = 0; m < 2; ++m)
    for (int step = 0; step < 36000; ++step) {
      const double th = 2 * kPi * step / 36000.0;
      Eigen::Matrix2d rot;
      rot << std::cos(th), std::sin(th), -std::sin(th), std::cos(th);
      if (m) rot.col(0) *= -1.0;
      const Eigen::MatrixXd ar = a * rot;
      const double s = std::max(0.0, (ar.cwiseProduct(b)).sum() / a.squaredNorm());
      best = std::min(best, std::sqrt((s * ar - b).squaredNorm() / double(r.rows())));
    }
  CHECK(al.rms <= best + 1e-12);
  CHECK(al.rms >= best - 1e-6);  // the grid comes within 1e-6 of the optimum
}

TEST_CASE("displacement ranks the moved items, judgment attribution follows the force along the move") {
  // A square plus a centre; in the current map only item 4 moved, by +1 in x. With two items moved
  // symmetrically (4 by +x, 5 by -x, both at the centre) the best alignment stays the identity.
  const Points r = rows({{-2, -2}, {2, -2}, {2, 2}, {-2, 2}, {0, 0}, {0, 0}});
  Points c = r;
  c(4, 0) += 1.0;
  c(5, 0) -= 1.0;
  const Displacement d = measure_displacement(r, c);
  test::assert_near(d.alignment.rotation, Eigen::MatrixXd(Eigen::Matrix2d::Identity()), kTol, 0.0, "rotation");
  CHECK(d.alignment.scale == doctest::Approx(1.0).epsilon(kTol));
  CHECK(d.distance[4] == doctest::Approx(1.0).epsilon(kTol));
  CHECK(d.distance[5] == doctest::Approx(1.0).epsilon(kTol));
  CHECK(d.distance[0] < kTol);
  CHECK(((d.ranking[0] == 4 && d.ranking[1] == 5)));

  // Item 4 went +x. "4 is more like 1 than 0" pulls it towards item 1 (+x and -y) and away from
  // item 0: it points along the move. "4 is more like 0 than 1" pulls it back: negative pull.
  // A judgment not naming 4 is left out; a retracted one too.
  std::vector<Judgment> js(4);
  js[0].id = 10; js[0].anchor = 4; js[0].nearer = 0; js[0].farther = 1;
  js[1].id = 11; js[1].anchor = 4; js[1].nearer = 1; js[1].farther = 0;
  js[2].id = 12; js[2].anchor = 0; js[2].nearer = 2; js[2].farther = 3;
  js[3].id = 13; js[3].anchor = 4; js[3].nearer = 2; js[3].farther = 3; js[3].retracted = true;
  const std::vector<JudgmentPull> pulls = judgments_moving(4, c, d, js);
  REQUIRE(pulls.size() == 2);
  CHECK(pulls[0].id == 11);
  CHECK(pulls[0].pull > 0.0);
  CHECK(pulls[1].id == 10);
  CHECK(pulls[1].pull < 0.0);
  // The pull is the judgment's own gradient row projected on the travel direction (+x here).
  JudgmentTerm term(6);
  term.set_judgments({js[1]});
  Points g;
  term.evaluate(c, &g);
  CHECK(pulls[0].pull == doctest::Approx(-g(4, 0)).epsilon(kTol));
  CHECK(pulls[0].force == doctest::Approx(g.row(4).norm()).epsilon(kTol));
}
