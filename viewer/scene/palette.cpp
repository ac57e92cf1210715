#include "viewer/scene/palette.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <vector>

#include "solver/features/colour.h"

namespace kith {

namespace {

// The ramp's path in CIELAB: from pale sand (L* 88) towards copper (62) and on to slate blue (32),
// every point inside the sRGB gamut. Lightness falls along it, so order reads without hue; it is sampled at equal
// CIEDE2000 steps so that equal differences of value look equally different.
constexpr double kRampPath[3][3] = {{88, 0, 14}, {62, 24, 34}, {32, -6, -26}};
constexpr int kRampSteps = 256;

struct RampTable {
  std::array<Rgb, kRampSteps> colour;
};

RampTable make_ramp() {
  // Dense samples along the path, their cumulative CIEDE2000, then equal steps of it.
  constexpr int kDense = 2048;
  std::vector<Lab> dense(kDense + 1);
  for (int k = 0; k <= kDense; ++k) {
    // A quadratic Bézier curve with copper as its control point: it bends evenly, so steps
    // measured straight across (as eyes compare two colours) stay equal near the bend as well.
    const double u = double(k) / kDense;
    const double w[3] = {(1 - u) * (1 - u), 2 * u * (1 - u), u * u};
    double v[3];
    for (int c = 0; c < 3; ++c) v[c] = w[0] * kRampPath[0][c] + w[1] * kRampPath[1][c] + w[2] * kRampPath[2][c];
    dense[size_t(k)] = {v[0], v[1], v[2]};
  }
  std::vector<double> along(kDense + 1, 0.0);
  for (int k = 1; k <= kDense; ++k) along[size_t(k)] = along[size_t(k) - 1] + ciede2000(dense[size_t(k) - 1], dense[size_t(k)]);
  RampTable t;
  size_t k = 0;
  for (int i = 0; i < kRampSteps; ++i) {
    const double want = along.back() * i / (kRampSteps - 1);
    while (k + 1 < along.size() && along[k + 1] < want) ++k;
    const size_t k1 = std::min(k + 1, along.size() - 1);
    const double span = along[k1] - along[k];
    const double u = span > 0 ? std::clamp((want - along[k]) / span, 0.0, 1.0) : 0.0;
    const Lab& a = dense[k];
    const Lab& b = dense[k1];
    double r, g, bl;
    lab_to_srgb({a.L + (b.L - a.L) * u, a.a + (b.a - a.a) * u, a.b + (b.b - a.b) * u}, &r, &g, &bl);
    t.colour[size_t(i)] = {float(r), float(g), float(bl)};
  }
  return t;
}

}  // namespace

Rgb Palette::ramp(float t) const {
  static const RampTable table = make_ramp();
  t = std::clamp(std::isfinite(t) ? t : 0.f, 0.f, 1.f);
  // Low values lie nearest the ground: light on paper, dark at night.
  if (dark) t = 1.f - t;
  const float at = t * (kRampSteps - 1);
  const size_t i = std::min(size_t(at), size_t(kRampSteps - 2));
  const float u = at - float(i);
  const Rgb& a = table.colour[i];
  const Rgb& b = table.colour[i + 1];
  return {a.r + (b.r - a.r) * u, a.g + (b.g - a.g) * u, a.b + (b.b - a.b) * u};
}

// Each ground's colours in the order of the struct: ground, ink, faint, muted, nearer, farther,
// card frame. kith's two accents are nearer and farther: a sea green and a copper (also the
// window's controls and timelines, viewer/panels/ui_style.cpp).
Palette Palette::paper() {
  return {rgb_hex(0xF3EFE6), rgb_hex(0x2B2A28), rgb_hex(0xD9D3C5), rgb_hex(0xA8A49B),
          rgb_hex(kSeaGreen), rgb_hex(kCopper), rgb_hex(0xFFFDF8), false};
}

Palette Palette::night() {
  return {rgb_hex(0x1F2226), rgb_hex(0xECE8DF), rgb_hex(0x343A40), rgb_hex(0x6B6F75),
          rgb_hex(kSeaGreenNight), rgb_hex(kCopperNight), rgb_hex(0x2E3238), true};
}

}  // namespace kith
