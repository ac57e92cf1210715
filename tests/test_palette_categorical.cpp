// kith's categorical colours stay apart: every pair differs by CIEDE2000 (Sharma, Wu & Dalal 2005,
// solver/features/colour.h) under normal vision and under a deuteranopia simulation (Machado,
// Oliveira & Fernandes 2009, severity 1.0).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

#include "solver/features/colour.h"
#include "viewer/scene/palette.h"

namespace {

// Machado, Oliveira & Fernandes (2009), deuteranopia at severity 1.0, applied to linear sRGB;
// coefficients from memory of the published table.
constexpr double kDeutan[3][3] = {
    {0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}};

double decode(double c) { return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4); }
double encode(double c) {
  c = std::clamp(c, 0.0, 1.0);
  return c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1 / 2.4) - 0.055;
}

kith::Lab lab_of(const kith::Rgb& c, bool deutan) {
  double v[3] = {c.r, c.g, c.b};
  if (deutan) {
    const double lin[3] = {decode(v[0]), decode(v[1]), decode(v[2])};
    for (int i = 0; i < 3; ++i) v[i] = encode(kDeutan[i][0] * lin[0] + kDeutan[i][1] * lin[1] + kDeutan[i][2] * lin[2]);
  }
  return kith::srgb_to_lab(v[0], v[1], v[2]);
}

double smallest_pair_difference(bool deutan) {
  const auto& t = kith::Palette::kCategorical;
  double smallest = 1e9;
  for (size_t i = 0; i < t.size(); ++i)
    for (size_t j = 0; j < i; ++j)
      smallest =
          std::min(smallest, kith::ciede2000(lab_of(kith::rgb_hex(t[i]), deutan), lab_of(kith::rgb_hex(t[j]), deutan)));
  return smallest;
}

// Measured 12.67 (greedy pick, scikit-image's deltaE_ciede2000); 10 is the floor we hold. A
// difference around 10 reads as a clearly different colour for small marks (common practice).
constexpr double kSmallestDifference = 10.0;

}  // namespace

TEST_CASE("palette: twelve categorical colours differ by CIEDE2000 under normal vision") {
  REQUIRE(kith::Palette::kCategorical.size() >= 12);
  CHECK(smallest_pair_difference(false) > kSmallestDifference);
}

TEST_CASE("palette: twelve categorical colours differ by CIEDE2000 under a deuteranopia simulation") {
  CHECK(smallest_pair_difference(true) > kSmallestDifference);
}

TEST_CASE("palette: the deuteranopia simulation keeps greys and merges red with green") {
  // A check that the simulation does something: a grey stays grey, and pure red and green come
  // much closer than they are under normal vision.
  const kith::Lab grey = lab_of({0.5f, 0.5f, 0.5f}, true);
  CHECK(std::abs(grey.a) < 1.0);
  CHECK(std::abs(grey.b) < 1.0);
  const kith::Rgb red{1, 0, 0}, green{0, 0.5f, 0};
  CHECK(kith::ciede2000(lab_of(red, true), lab_of(green, true)) <
        0.5 * kith::ciede2000(lab_of(red, false), lab_of(green, false)));
}

TEST_CASE("palette: kith's two accents (sea green, copper) stay apart under a deuteranopia simulation on both grounds") {
  for (const kith::Palette& p : {kith::Palette::paper(), kith::Palette::night()}) {
    CAPTURE(p.dark);
    for (bool deutan : {false, true}) {
      CAPTURE(deutan);
      // The accents mark nearer and farther on the same map: they must not merge for a deuteranope.
      CHECK(kith::ciede2000(lab_of(p.nearer, deutan), lab_of(p.farther, deutan)) > kSmallestDifference);
      // ... and each reads against its ground.
      CHECK(kith::ciede2000(lab_of(p.nearer, deutan), lab_of(p.ground, deutan)) > kSmallestDifference);
      CHECK(kith::ciede2000(lab_of(p.farther, deutan), lab_of(p.ground, deutan)) > kSmallestDifference);
    }
  }
  // Neither accent is one of the common plotting defaults' blue or orange.
  for (uint32_t hex : {kith::Palette::kSeaGreen, kith::Palette::kCopper, kith::Palette::kSeaGreenNight,
                       kith::Palette::kCopperNight})
    for (uint32_t common : {0x1F77B4u, 0xFF7F0Eu, 0x0072B2u, 0xE69F00u, 0xD55E00u, 0x009E73u}) CHECK(hex != common);
}
