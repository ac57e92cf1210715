// Picture files (PNG, JPEG) read with a bound on memory. A picture is looked at (its header) before
// it is decoded: above kMaxPicturePixels, or when decoding would take more than half of the
// machine's memory, it is refused with the estimate. Pictures for the screen are then shrunk to a
// capped side at once (an area average in linear light), so a large photograph costs its decoded
// size only while it is being read and a few hundred kilobytes after.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

namespace kith {

// 64 megapixels (8192 x 8192): more than any camera picture a card needs. (default)
constexpr double kMaxPicturePixels = 64e6;

struct PictureHeader {
  int width = 0, height = 0, channels = 0;
  bool sixteen_bit = false;
};

// Reads PATH's header. "" or why it cannot be decoded (without the path): not a regular file, not a PNG or JPEG, a
// size of 0 or above kMaxPicturePixels, or BYTES_PER_PIXEL x pixels beyond the memory budget.
std::string read_picture_header(const std::string& path, double bytes_per_pixel, PictureHeader* out);

struct Rgba8Picture {
  int width = 0, height = 0;
  std::vector<uint8_t> rgba;  // width * height * 4, rows top first, straight (not premultiplied) alpha
};

// Decodes PATH to 8-bit RGBA no larger than MAX_SIDE on either side (0: as it is). "" or why not,
// naming the file.
std::string decode_picture_rgba8(const std::string& path, int max_side, Rgba8Picture* out);

// PIXELS (W x H RGBA) shrunk so neither side exceeds MAX_SIDE, keeping the aspect ratio: each output
// pixel is the area-weighted mean of the input pixels it covers, in linear light, weighted by
// alpha. A picture already small enough is returned as it is.
Rgba8Picture shrink_to_fit(const uint8_t* pixels, int width, int height, int max_side);

}  // namespace kith
