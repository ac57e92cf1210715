// find_structure (shared graphs) against the separate pieces run on brute-force graphs.
#include <doctest/doctest.h>

#include <random>

#include "solver/measures/map_findings.h"
#include "solver/measures/neighbour_compare.h"
#include "tests/analysis_support.h"

using namespace kith;

TEST_CASE("find_structure matches suspects, groups and kept computed one by one") {
  std::mt19937 rng(3);
  std::normal_distribution<double> noise(0.0, 1.0);
  const size_t n = 300;
  Points x(n, 6), y(n, 3);
  std::vector<std::string> tags(n);
  for (size_t i = 0; i < n; ++i) {
    const int c = int(i % 4);
    for (int f = 0; f < 6; ++f) x(Eigen::Index(i), f) = noise(rng) + (f == c ? 6.0 : 0.0);
    for (int d = 0; d < 3; ++d) y(Eigen::Index(i), d) = 0.4 * noise(rng) + (d == c % 3 ? 10.0 * (1 + c / 3) : 0.0);
    tags[i] = i % 17 == 0 ? "" : "c" + std::to_string((c + (i % 29 == 0)) % 4);
  }
  const MapFindings f = find_structure(x, y, &tags);
  REQUIRE(f.have_suspects);
  const NeighbourGraph bx = test::brute_neighbours(x, 10), by = test::brute_neighbours(y, 10);
  const SuspectScores s = score_suspects(tags, &bx, &by);
  for (size_t i = 0; i < n; ++i)
    if (!tags[i].empty()) CHECK(f.suspects.score[i] == doctest::Approx(s.score[i]).epsilon(1e-9));
  CHECK(f.suspects.ranking == s.ranking);
  const Grouping g = find_groups(y, by);
  CHECK(f.groups.label == g.label);
  CHECK(f.groups.groups.size() == 4);
  CHECK(f.kept == neighbourhood_kept(bx, by));
  // Without features: map-space suspects, no kept.
  const MapFindings m = find_structure(Points(), y, &tags);
  CHECK(m.kept.empty());
  CHECK(m.mean_kept == -1.0);
  CHECK(m.have_suspects);
  CHECK_THROWS_AS(find_structure(x.topRows(10), y, &tags), std::invalid_argument);
}
