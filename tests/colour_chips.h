// A collection of pictures that can be counted on a screen: N solid colour chips, each a colour
// of its own (invented here, fixed seed), at least kApart from each other and from kith's own
// colours on some channel, so a pixel names at most one chip; and the count of chips that cover
// at least kMinPixels pixels of an image. Used by the poster, map picture and window tests.
#pragma once
#include <doctest/doctest.h>
#include <stb_image.h>
#include <stb_image_write.h>

#include <algorithm>
#include <array>
#include <cstdlib>
#include <random>
#include <sstream>
#include <string>
#include <unordered_map>
#include <vector>

#include "solver/session/session_store.h"
#include "tests/sessions_support.h"
#include "viewer/scene/palette.h"

namespace kith::test {

using Colour = std::array<int, 3>;

inline int chip_distance(const Colour& a, const Colour& b) {
  return std::max({std::abs(a[0] - b[0]), std::abs(a[1] - b[1]), std::abs(a[2] - b[2])});
}
inline Colour chip_from_rgb(const Rgb& c) {
  return {int(c.r * 255 + 0.5f), int(c.g * 255 + 0.5f), int(c.b * 255 + 0.5f)};
}

// Colours differ by at least this much on some channel (of 255), from each other and from
// kith's own colours (both grounds), so a pixel names at most one chip.
constexpr int kChipApart = 18;
// A pixel is a chip's colour when each channel is within this of it (rasterizers round).
constexpr int kChipTolerance = 3;
// A chip counts as visible with at least this many pixels of its colour (a 4 x 4 patch).
constexpr size_t kChipMinPixels = 16;

// COUNT invented colours; DIR/chip-K.png for each (some wide, some tall, most square) and
// DIR/items.csv with id, a tag (warm or cool), the colour as three features and the picture.
inline std::vector<Colour> make_colour_chips(const std::string& dir, size_t count = 300) {
  std::vector<Colour> avoid = {{0xE4, 0xE0, 0xD8}, {255, 255, 255}, {0, 0, 0}};
  for (const Palette& pal : {Palette::paper(), Palette::night()}) {
    for (const Rgb& c : {pal.ground, pal.ink, pal.card_frame, pal.muted, pal.faint}) avoid.push_back(chip_from_rgb(c));
    for (size_t k = 0; k < Palette::kCategorical.size(); ++k) avoid.push_back(chip_from_rgb(pal.category(int(k))));
  }
  std::mt19937 rng(20261203);
  std::uniform_int_distribution<int> channel(10, 245);
  std::vector<Colour> colours;
  while (colours.size() < count) {
    const Colour c = {channel(rng), channel(rng), channel(rng)};
    bool ok = true;
    for (const Colour& o : colours) ok = ok && chip_distance(c, o) >= kChipApart;
    for (const Colour& o : avoid) ok = ok && chip_distance(c, o) >= kChipApart;
    if (ok) colours.push_back(c);
  }
  std::ostringstream csv;
  csv << "id,tone,red,green,blue,photo\n";
  for (size_t i = 0; i < colours.size(); ++i) {
    const int w = i % 5 == 0 ? 48 : 32, h = i % 7 == 0 ? 48 : 32;
    std::vector<unsigned char> px(size_t(w * h * 3));
    for (size_t p = 0; p < px.size(); ++p) px[p] = (unsigned char)colours[i][p % 3];
    const std::string name = "chip-" + std::to_string(i) + ".png";
    REQUIRE(stbi_write_png((dir + "/" + name).c_str(), w, h, 3, px.data(), w * 3));
    const Colour& c = colours[i];
    csv << "chip-" << i << "," << (c[0] > c[2] ? "warm" : "cool") << "," << c[0] << "," << c[1] << "," << c[2] << ","
        << name << "\n";
  }
  write_bytes(dir + "/items.csv", csv.str());
  return colours;
}

// DIR/chips.kith: a session of DIR/items.csv whose map is the colours themselves (red, green,
// blue / 25.5, a 3-D map as a session keeps).
inline std::string make_chip_session(const std::string& dir, const std::vector<Colour>& colours) {
  const std::string session = dir + "/chips.kith";
  const auto r = run_kith("new " + dir + "/items.csv -o " + session);
  INFO(r.output);
  REQUIRE(r.code == 0);
  Points map(Eigen::Index(colours.size()), 3);
  for (size_t i = 0; i < colours.size(); ++i)
    for (int d = 0; d < 3; ++d) map(Eigen::Index(i), d) = colours[i][size_t(d)] / 25.5;
  SessionStore::open(session)->write_checkpoint(map, 100);
  return session;
}

// How many of COLOURS cover at least kChipMinPixels pixels of W x H pixels of CHANNELS (3 or 4;
// alpha is ignored) each.
inline size_t visible_chips(const unsigned char* px, int w, int h, int channels, const std::vector<Colour>& colours) {
  std::unordered_map<int, size_t> seen;  // exact colour -> pixels
  for (size_t p = 0; p < size_t(w) * size_t(h); ++p) {
    const unsigned char* c = px + p * size_t(channels);
    ++seen[(c[0] << 16) | (c[1] << 8) | c[2]];
  }
  size_t visible = 0;
  for (const Colour& c : colours) {
    size_t pixels = 0;
    for (const auto& [key, n] : seen)
      if (chip_distance(c, {key >> 16, (key >> 8) & 255, key & 255}) <= kChipTolerance) pixels += n;
    visible += pixels >= kChipMinPixels;
  }
  return visible;
}

// visible_chips of the PNG at PATH.
inline size_t visible_chips_in_png(const std::string& path, const std::vector<Colour>& colours) {
  int w = 0, h = 0, ch = 0;
  unsigned char* d = stbi_load(path.c_str(), &w, &h, &ch, 3);
  REQUIRE_MESSAGE(d != nullptr, "cannot read " << path);
  const size_t visible = visible_chips(d, w, h, 3, colours);
  stbi_image_free(d);
  return visible;
}

}  // namespace kith::test
