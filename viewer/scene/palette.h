// Palette: kith's colours. A light, paper-like ground by default (a dark one as an option) and the
// published Okabe-Ito colour-blind-safe categorical colours, reordered so the first ones read well
// on paper (yellow and black come last). Pure data; any thread.
#pragma once
#include <array>
#include <cstdint>

namespace kith {

struct Rgb {
  float r = 0, g = 0, b = 0;
};

inline Rgb rgb_hex(uint32_t hex) {
  return {float((hex >> 16) & 0xff) / 255.f, float((hex >> 8) & 0xff) / 255.f, float(hex & 0xff) / 255.f};
}

struct Palette {
  Rgb ground;      // background
  Rgb ink;         // text, rings around selected items, pin marks
  Rgb faint;       // floor grid
  Rgb muted;       // items with no tag value / filtered out
  Rgb nearer;      // judgment line anchor -> nearer
  Rgb farther;     // judgment line anchor -> farther
  Rgb card_frame;  // frame around picture cards
  bool dark = false;

  // Okabe-Ito: blue, orange, bluish green, vermillion, reddish purple, sky blue, yellow, black.
  static constexpr std::array<uint32_t, 8> kCategorical = {0x0072B2, 0xE69F00, 0x009E73, 0xD55E00,
                                                           0xCC79A7, 0x56B4E9, 0xF0E442, 0x000000};
  Rgb category(int k) const {
    if (k < 0) return muted;
    const int n = int(kCategorical.size());
    Rgb c = rgb_hex(kCategorical[k % n]);
    if (dark && k % n == n - 1) c = {0.85f, 0.85f, 0.85f};  // black on a dark ground: light grey
    return c;
  }
  // A sequential ramp for measures (0..1): from the paper's pale blue-grey to deep blue, then
  // vermillion at the top end, so high values stand out on either ground.
  Rgb ramp(float t) const;

  static Palette paper();
  static Palette night();
};

}  // namespace kith
