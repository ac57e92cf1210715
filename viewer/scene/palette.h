// Palette: kith's colours, the one table for the window, its pictures, the HTML report and the
// people list, so a tag value has the same colour everywhere. A light, paper-like ground by
// default (a dark one as an option); twelve categorical colours of kith's own (see kCategorical).
// Pure data; any thread.
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

  // kith's own categorical colours, picked one at a time from an sRGB grid (CIELAB lightness 32..72,
  // chroma > 28, so each reads on either ground) as the colour farthest, by the smaller CIEDE2000
  // under normal vision and under a deuteranopia simulation, from those already picked; so every
  // prefix of the table is as spread as the greedy pick allows. The smallest pairwise difference
  // is checked in tests/test_palette_categorical.cpp.
  static constexpr std::array<uint32_t, 12> kCategorical = {0x0078A5, 0xB4B400, 0x005A0F, 0xFF87C3,
                                                            0x4B9669, 0x78A5FF, 0x96005A, 0xA55A00,
                                                            0xE10096, 0x0000FF, 0xF09696, 0x004B96};
  static constexpr uint32_t kOther = 0xB4B0A8;
  // kith's accents (judgment lines, the window's controls and timelines): a sea green and a
  // copper, each a little lighter on the night ground.
  static constexpr uint32_t kSeaGreen = 0x2A7F6F, kCopper = 0xB0602C;
  static constexpr uint32_t kSeaGreenNight = 0x4DB39E, kCopperNight = 0xD98A52;  // values past the table, in pictures and the report
  Rgb category(int k) const {
    if (k < 0) return muted;
    return rgb_hex(kCategorical[size_t(k) % kCategorical.size()]);
  }
  // People's colours, in the order they are added: the categorical table's own order, which already
  // puts the most different colours first.
  static uint32_t person_colour(size_t k) { return kCategorical[k % kCategorical.size()]; }
  // A sequential ramp for measures (0..1, low to high): a path in CIELAB from pale sand through
  // copper to slate blue at equal CIEDE2000 steps (palette.cpp), run from light to dark on paper
  // and from dark to light at night, so low values lie nearest the ground on either.
  Rgb ramp(float t) const;

  static Palette paper();
  static Palette night();
};

}  // namespace kith
