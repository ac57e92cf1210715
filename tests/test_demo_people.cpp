// Checks of the simulated people (solver/demo/simulated_people.h).
#include <doctest/doctest.h>

#include <cmath>

#include "solver/demo/simulated_people.h"

namespace {

kith::SimulatedPeople library_people(kith::SimulatedPeopleOptions options = {}) {
  return kith::SimulatedPeople(kith::perceptual_items(kith::make_swatches()), std::move(options));
}

// Fraction of the truth triplets a member reproduces.
double member_agreement(kith::SimulatedPeople& people, int member, const std::vector<kith::Judgment>& truth) {
  int same = 0;
  for (const auto& t : truth) same += people.answer(t.anchor, t.nearer, t.farther, member).nearer == t.nearer;
  return double(same) / truth.size();
}

}  // namespace

TEST_CASE("demo people: the hidden distance is CIEDE2000 plus pattern terms") {
  std::vector<kith::PerceptualItem> items = {
      {{50, 10, 10}, 0, 1.0}, {{55, -5, 20}, 0, 1.0}, {{50, 10, 10}, 1, 6.0}, {{50, 10, 10}, 1, 24.0}};
  kith::SimulatedPeople people(items);
  CHECK(people.distance(0, 0) == 0.0);
  CHECK(people.distance(0, 1) == doctest::Approx(kith::ciede2000(items[0].colour, items[1].colour)));
  CHECK(people.distance(0, 1) == doctest::Approx(people.distance(1, 0)));
  CHECK(people.distance(0, 2) == doctest::Approx(20.0));            // pattern differs, same colour
  CHECK(people.distance(2, 3) == doctest::Approx(8.0 * 2.0));       // two doublings of the repeat
  CHECK(people.distance(0, 3) == doctest::Approx(20.0));            // plain vs patterned: no scale term
  kith::SimulatedPeopleOptions bad;
  bad.members[0].noise = -1;
  CHECK_THROWS(kith::SimulatedPeople(items, bad));
}

TEST_CASE("demo people: members' answers follow their noise, the contrarian disagrees systematically") {
  auto people = library_people();
  const auto truth = people.truth_triplets(3000, 0, 0.0, 5);
  REQUIRE(truth.size() == 3000);
  for (const auto& t : truth) REQUIRE(people.distance(t.anchor, t.nearer) < people.distance(t.anchor, t.farther));
  const double ines = member_agreement(people, 0, truth), tomas = member_agreement(people, 1, truth),
               wren = member_agreement(people, 2, truth), odile = member_agreement(people, 3, truth);
  MESSAGE("agreement with the hidden distance: Ines " << ines << ", Tomas " << tomas << ", Wren " << wren
                                                       << ", Odile (contrarian) " << odile);
  CHECK(ines > 0.9);
  CHECK(ines > tomas + 0.01);
  CHECK(tomas > wren + 0.01);
  CHECK(odile < wren);

  // Systematic, not random: on triplets that differ only in hue (same pattern, equal lightness
  // within 2 units), the contrarian is near chance while a noisy member stays well above it.
  std::vector<kith::PerceptualItem> hue_only;
  for (int i = 0; i < 36; ++i) {
    const double h = i * 10.0 * 3.14159265358979323846 / 180.0;
    hue_only.push_back({{60.0 + (i % 3) * 0.5, 30 * std::cos(h), 30 * std::sin(h)}, 0, 1.0});
  }
  kith::SimulatedPeople hue_people(hue_only);
  const auto hue_truth = hue_people.truth_triplets(2000, 0, 5.0, 9);
  const double hue_wren = member_agreement(hue_people, 2, hue_truth);
  const double hue_odile = member_agreement(hue_people, 3, hue_truth);
  MESSAGE("hue-only triplets: Wren " << hue_wren << ", Odile " << hue_odile);
  CHECK(hue_wren > 0.75);
  CHECK(std::abs(hue_odile - 0.5) < 0.1);

  // Turn-taking names each member in order.
  CHECK(people.answer(0, 1, 2).person == "Ines");
  CHECK(people.answer(0, 1, 2).person == "Tomas");
}

TEST_CASE("demo people: truth triplets from a neighbourhood are local and clear") {
  auto people = library_people();
  const auto local = people.truth_triplets(200, 30, 3.0, 3);
  REQUIRE(local.size() == 200);
  for (const auto& t : local) {
    CHECK(people.distance(t.anchor, t.farther) - people.distance(t.anchor, t.nearer) >= 3.0);
    int closer = 0;  // the farther item is still within the anchor's 30 nearest
    for (int32_t i = 0; i < int32_t(people.size()); ++i)
      closer += i != t.anchor && people.distance(t.anchor, i) < people.distance(t.anchor, t.farther);
    CHECK(closer < 30);
  }
}
