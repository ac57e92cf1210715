// Checks of the simulated panel (solver/simulated_panel.h).
#include <doctest/doctest.h>

#include <cmath>

#include "solver/simulated_panel.h"

namespace {

kith::SimulatedPanel library_panel(kith::SimulatedPanelOptions options = {}) {
  return kith::SimulatedPanel(kith::perceptual_items(kith::make_swatches()), std::move(options));
}

// Fraction of the truth triplets a member reproduces.
double member_agreement(kith::SimulatedPanel& panel, int member, const std::vector<kith::Judgment>& truth) {
  int same = 0;
  for (const auto& t : truth) same += panel.answer(t.anchor, t.nearer, t.farther, member).nearer == t.nearer;
  return double(same) / truth.size();
}

}  // namespace

TEST_CASE("demo panel: the hidden distance is CIEDE2000 plus pattern terms") {
  std::vector<kith::PerceptualItem> items = {
      {{50, 10, 10}, 0, 1.0}, {{55, -5, 20}, 0, 1.0}, {{50, 10, 10}, 1, 6.0}, {{50, 10, 10}, 1, 24.0}};
  kith::SimulatedPanel panel(items);
  CHECK(panel.distance(0, 0) == 0.0);
  CHECK(panel.distance(0, 1) == doctest::Approx(kith::ciede2000(items[0].colour, items[1].colour)));
  CHECK(panel.distance(0, 1) == doctest::Approx(panel.distance(1, 0)));
  CHECK(panel.distance(0, 2) == doctest::Approx(20.0));            // pattern differs, same colour
  CHECK(panel.distance(2, 3) == doctest::Approx(8.0 * 2.0));       // two doublings of the repeat
  CHECK(panel.distance(0, 3) == doctest::Approx(20.0));            // plain vs patterned: no scale term
  kith::SimulatedPanelOptions bad;
  bad.members[0].noise = -1;
  CHECK_THROWS(kith::SimulatedPanel(items, bad));
}

TEST_CASE("demo panel: members' answers follow their noise, the contrarian disagrees systematically") {
  auto panel = library_panel();
  const auto truth = panel.truth_triplets(3000, 0, 0.0, 5);
  REQUIRE(truth.size() == 3000);
  for (const auto& t : truth) REQUIRE(panel.distance(t.anchor, t.nearer) < panel.distance(t.anchor, t.farther));
  const double ines = member_agreement(panel, 0, truth), tomas = member_agreement(panel, 1, truth),
               wren = member_agreement(panel, 2, truth), odile = member_agreement(panel, 3, truth);
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
  kith::SimulatedPanel hue_panel(hue_only);
  const auto hue_truth = hue_panel.truth_triplets(2000, 0, 5.0, 9);
  const double hue_wren = member_agreement(hue_panel, 2, hue_truth);
  const double hue_odile = member_agreement(hue_panel, 3, hue_truth);
  MESSAGE("hue-only triplets: Wren " << hue_wren << ", Odile " << hue_odile);
  CHECK(hue_wren > 0.75);
  CHECK(std::abs(hue_odile - 0.5) < 0.1);

  // Turn-taking names each member in order.
  CHECK(panel.answer(0, 1, 2).person == "Ines");
  CHECK(panel.answer(0, 1, 2).person == "Tomas");
}

TEST_CASE("demo panel: truth triplets from a neighbourhood are local and clear") {
  auto panel = library_panel();
  const auto local = panel.truth_triplets(200, 30, 3.0, 3);
  REQUIRE(local.size() == 200);
  for (const auto& t : local) {
    CHECK(panel.distance(t.anchor, t.farther) - panel.distance(t.anchor, t.nearer) >= 3.0);
    int closer = 0;  // the farther item is still within the anchor's 30 nearest
    for (int32_t i = 0; i < int32_t(panel.size()); ++i)
      closer += i != t.anchor && panel.distance(t.anchor, i) < panel.distance(t.anchor, t.farther);
    CHECK(closer < 30);
  }
}
