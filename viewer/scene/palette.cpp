#include "viewer/scene/palette.h"

#include <algorithm>

namespace kith {

namespace {
Rgb mix(Rgb a, Rgb b, float t) { return {a.r + (b.r - a.r) * t, a.g + (b.g - a.g) * t, a.b + (b.b - a.b) * t}; }
}  // namespace

Rgb Palette::ramp(float t) const {
  t = std::clamp(t, 0.f, 1.f);
  const Rgb low = dark ? rgb_hex(0x4A5A6A) : rgb_hex(0xB9C6D3);
  const Rgb mid = rgb_hex(0x0072B2);
  const Rgb high = rgb_hex(0xD55E00);
  return t < 0.6f ? mix(low, mid, t / 0.6f) : mix(mid, high, (t - 0.6f) / 0.4f);
}

// Each ground's colours in the order of the struct: ground, ink, faint, muted, nearer, farther,
// card frame.
Palette Palette::paper() {
  return {rgb_hex(0xF3EFE6), rgb_hex(0x2B2A28), rgb_hex(0xD9D3C5), rgb_hex(0xA8A49B),
          rgb_hex(0x009E73), rgb_hex(0xD55E00), rgb_hex(0xFFFDF8), false};
}

Palette Palette::night() {
  return {rgb_hex(0x1F2226), rgb_hex(0xECE8DF), rgb_hex(0x343A40), rgb_hex(0x6B6F75),
          rgb_hex(0x2BC59A), rgb_hex(0xF07B3F), rgb_hex(0x2E3238), true};
}

}  // namespace kith
