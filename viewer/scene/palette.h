// Palette: kith's colours, the one table for the window, its pictures, the HTML report and the
// people list, so a tag value has the same colour everywhere. A light, paper-like ground by
// default (a dark one as an option); categorical colours from the published Okabe-Ito
// colour-blind-safe set plus three quieter ones of our own, ordered so the first ones read well
// on paper (yellow comes last; black is the ink, not a category). Pure data; any thread.
#pragma once
#include <array>
#include <cstddef>
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

  // Okabe-Ito blue, orange, bluish green, vermillion, reddish purple, sky blue; then umber, slate
  // and sage of our own; Okabe-Ito yellow last.
  static constexpr std::array<uint32_t, 10> kCategorical = {0x0072B2, 0xE69F00, 0x009E73, 0xD55E00, 0xCC79A7,
                                                            0x56B4E9, 0x8C6D46, 0x6F7F9E, 0x9CB86A, 0xF0E442};
  static constexpr uint32_t kOther = 0xB4B0A8;  // values past the table, in pictures and the report
  Rgb category(int k) const {
    if (k < 0) return muted;
    return rgb_hex(kCategorical[size_t(k) % kCategorical.size()]);
  }
  // People's colours, in the order they are added: the categorical table with vermillion second,
  // so the first two people differ most.
  static uint32_t person_colour(size_t k) {
    static constexpr std::array<int, 10> order = {0, 3, 2, 4, 1, 5, 6, 7, 8, 9};
    return kCategorical[size_t(order[k % order.size()])];
  }
  // A sequential ramp for measures (0..1): from the paper's pale blue-grey to deep blue, then
  // vermillion at the top end, so high values stand out on either ground.
  Rgb ramp(float t) const;

  static Palette paper();
  static Palette night();
};

}  // namespace kith
