// Pictures are read with a bound on memory (solver/features/picture_file.h): the header is read
// first, oversized pictures are refused with the estimate, and pictures for the screen are
// shrunk by an area mean in linear light.
#include <doctest/doctest.h>
#include <sys/stat.h>

#include <cmath>
#include <fstream>
#include <random>
#include <string>

#include "solver/base/memory.h"
#include "solver/features/picture_file.h"
#include "solver/io/png_file.h"
#include "tests/approx.h"

using kith::Rgba8Picture;

namespace {

// The sRGB transfer function of IEC 61966-2-1, written out here again from the standard so the
// test does not lean on the code it checks.
double srgb_to_linear(double v) {
  const double c = v / 255.0;
  return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}
double linear_to_srgb(double c) { return 255.0 * (c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1 / 2.4) - 0.055); }

// A PNG's signature and IHDR chunk (RFC 2083, sections 3.1 and 4.1.1) claiming WIDTH x HEIGHT
// 8-bit RGBA pixels, with no image data: enough for a header reader, never decodable.
std::string png_header_only(uint32_t width, uint32_t height) {
  std::string s("\x89PNG\r\n\x1a\n", 8);
  auto be32 = [&](uint32_t v) {
    for (int k = 3; k >= 0; --k) s.push_back(char((v >> (8 * k)) & 255));
  };
  be32(13);
  s += "IHDR";
  be32(width);
  be32(height);
  s += std::string("\x08\x06\x00\x00\x00", 5);
  be32(0);  // CRC: header readers do not check it
  return s;
}

void write_file(const std::string& path, const std::string& bytes) {
  std::ofstream(path, std::ios::binary) << bytes;
}

constexpr int kLevelTol = 1;  // 8-bit levels: rounding once on the way out

}  // namespace

TEST_CASE("pictures: a shrink is the area mean in linear light, as the sRGB standard defines it") {
  // Random 64 x 48 opaque pixels shrunk by 4 against the slow obvious block mean.
  std::mt19937 rng(5);
  std::uniform_int_distribution<int> level(0, 255);
  const int w = 64, h = 48;
  std::vector<uint8_t> px(size_t(w) * h * 4);
  for (size_t i = 0; i < px.size(); ++i) px[i] = i % 4 == 3 ? 255 : uint8_t(level(rng));
  const Rgba8Picture small = kith::shrink_to_fit(px.data(), w, h, 16);
  REQUIRE(small.width == 16);
  REQUIRE(small.height == 12);
  int worst = 0;
  for (int oy = 0; oy < 12; ++oy)
    for (int ox = 0; ox < 16; ++ox)
      for (int c = 0; c < 3; ++c) {
        double sum = 0;
        for (int y = 4 * oy; y < 4 * oy + 4; ++y)
          for (int x = 4 * ox; x < 4 * ox + 4; ++x) sum += srgb_to_linear(px[(size_t(y) * w + x) * 4 + c]);
        const int want = int(std::lround(linear_to_srgb(sum / 16)));
        worst = std::max(worst, std::abs(want - small.rgba[(size_t(oy) * 16 + ox) * 4 + c]));
      }
  CHECK(worst <= kLevelTol);
  // Black and white halves mean 0.5 in linear light: sRGB level 188, not 128.
  std::vector<uint8_t> checker(size_t(4) * 2 * 4, 255);
  for (int x = 0; x < 4; ++x)
    if (x % 2 == 0)
      for (int y = 0; y < 2; ++y)
        for (int c = 0; c < 3; ++c) checker[(size_t(y) * 4 + x) * 4 + c] = 0;
  const Rgba8Picture grey = kith::shrink_to_fit(checker.data(), 4, 2, 2);
  CHECK(grey.width == 2);
  CHECK(grey.height == 1);
  CHECK(int(grey.rgba[0]) == int(std::lround(linear_to_srgb(0.5))));
  // A transparent pixel adds no colour, only transparency.
  const uint8_t red_and_clear[8] = {255, 0, 0, 255, 0, 0, 255, 0};
  const Rgba8Picture half = kith::shrink_to_fit(red_and_clear, 2, 1, 1);
  CHECK(int(half.rgba[0]) == 255);
  CHECK(int(half.rgba[2]) == 0);
  CHECK(int(half.rgba[3]) == 128);
  // Small enough already: unchanged.
  const Rgba8Picture same = kith::shrink_to_fit(px.data(), w, h, 64);
  CHECK(same.rgba == px);
}

TEST_CASE("pictures: read shrunk to the side asked for, oversized and non-files refused with the reason") {
  const std::string dir = kith::test::temp_dir("picture-file");
  // 1000 x 600 in one colour, shrunk to 256 a side: 256 x 154, the colour kept.
  std::vector<uint8_t> px(size_t(1000) * 600 * 3);
  for (size_t i = 0; i < px.size(); i += 3) px[i] = 200, px[i + 1] = 120, px[i + 2] = 40;
  REQUIRE(kith::write_png_file(dir + "/wide.png", px.data(), 1000, 600, 3) == "");
  Rgba8Picture pic;
  REQUIRE(kith::decode_picture_rgba8(dir + "/wide.png", 256, &pic) == "");
  CHECK(pic.width == 256);
  CHECK(pic.height == 154);
  CHECK(std::abs(int(pic.rgba[4 * 500]) - 200) <= kLevelTol);
  CHECK(std::abs(int(pic.rgba[4 * 500 + 1]) - 120) <= kLevelTol);
  CHECK(int(pic.rgba[4 * 500 + 3]) == 255);

  // A header claiming 10,000 x 8,000 (320 MB decoded, 1.3 GB as linear floats) is refused before
  // anything is decoded. (stb_image itself refuses PNGs above 2^30 decoded bytes, with an
  // unhelpful message.)
  const std::string huge = dir + "/huge.png";
  write_file(huge, png_header_only(10000, 8000));
  kith::PictureHeader h;
  CHECK(kith::read_picture_header(huge, 4, &h) ==
        "a picture of 10000 x 8000 pixels is larger than kith reads (64 megapixels at most)");
  CHECK(kith::decode_picture_rgba8(huge, 256, &pic).rfind(huge + ": a picture of 10000 x 8000", 0) == 0);
  // Within the pixel bound, the header still reads; an empty size is refused.
  write_file(dir + "/ok.png", png_header_only(4000, 3000));
  REQUIRE(kith::read_picture_header(dir + "/ok.png", 4, &h) == "");
  CHECK(h.width == 4000);
  CHECK(h.height == 3000);
  CHECK(kith::decode_picture_rgba8(dir + "/ok.png", 256, &pic).find("could not decode") != std::string::npos);
  CHECK(kith::decode_picture_rgba8(dir + "/none.png", 256, &pic) == dir + "/none.png: no such file");
  CHECK(kith::decode_picture_rgba8(dir, 256, &pic) == dir + ": is a folder, not a picture");
  const std::string fifo = dir + "/pipe.png";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  CHECK(kith::decode_picture_rgba8(fifo, 256, &pic) == fifo + ": expected a regular file");
  CHECK(kith::decode_picture_rgba8("/dev/zero", 256, &pic) == "/dev/zero: expected a regular file");
}

TEST_CASE("memory budget: an estimate beyond half the machine's memory is refused, with the figures") {
  CHECK(kith::memory_problem("a small thing", 1e3) == "");
  const std::string m = kith::memory_problem("decoding it", 1e15);
  CHECK(m.rfind("decoding it needs about 1000000.0 GB, more than half of this machine's ", 0) == 0);
  CHECK(m.find(" GB of memory") != std::string::npos);
  CHECK(kith::gigabytes(3.24e9) == "3.2 GB");
}
