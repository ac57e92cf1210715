#include "solver/features/picture_file.h"

#include <stb_image.h>
#include <sys/stat.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <memory>

#include "solver/base/memory.h"

namespace kith {

namespace {

std::string size_text(int w, int h) { return std::to_string(w) + " x " + std::to_string(h); }

// sRGB <-> linear light (IEC 61966-2-1 transfer function).
const std::array<float, 256>& to_linear_table() {
  static const std::array<float, 256> table = [] {
    std::array<float, 256> t{};
    for (int v = 0; v < 256; ++v) {
      const double c = v / 255.0;
      t[size_t(v)] = float(c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4));
    }
    return t;
  }();
  return table;
}
uint8_t to_srgb8(double linear) {
  const double c = std::clamp(linear, 0.0, 1.0);
  const double s = c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1.0 / 2.4) - 0.055;
  return uint8_t(std::lround(s * 255.0));
}

}  // namespace

std::string read_picture_header(const std::string& path, double bytes_per_pixel, PictureHeader* out) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return "no such file";
  if (S_ISDIR(st.st_mode)) return "is a folder, not a picture";
  if (!S_ISREG(st.st_mode)) return "expected a regular file";
  PictureHeader h;
  if (!stbi_info(path.c_str(), &h.width, &h.height, &h.channels)) {
    const char* why = stbi_failure_reason();
    return std::string("not a readable PNG or JPEG picture (") + (why ? why : "unknown") + ")";
  }
  h.sixteen_bit = stbi_is_16_bit(path.c_str()) != 0;
  const double pixels = double(h.width) * double(h.height);
  if (h.width <= 0 || h.height <= 0 || pixels > kMaxPicturePixels)
    return "a picture of " + size_text(h.width, h.height) + " pixels is larger than kith reads (" +
           std::to_string(int(kMaxPicturePixels / 1e6)) + " megapixels at most)";
  if (const std::string m = memory_problem("decoding its " + size_text(h.width, h.height) + " pixels", pixels * bytes_per_pixel);
      !m.empty())
    return m;
  *out = h;
  return "";
}

Rgba8Picture shrink_to_fit(const uint8_t* pixels, int width, int height, int max_side) {
  Rgba8Picture out;
  if (max_side <= 0 || (width <= max_side && height <= max_side)) {
    out.width = width;
    out.height = height;
    out.rgba.assign(pixels, pixels + size_t(width) * size_t(height) * 4);
    return out;
  }
  const double scale = double(max_side) / std::max(width, height);
  out.width = std::max(1, int(std::lround(width * scale)));
  out.height = std::max(1, int(std::lround(height * scale)));
  out.rgba.resize(size_t(out.width) * size_t(out.height) * 4);
  const auto& lin = to_linear_table();
  const double sx = double(width) / out.width, sy = double(height) / out.height;
  for (int oy = 0; oy < out.height; ++oy) {
    const double y0 = oy * sy, y1 = (oy + 1) * sy;
    for (int ox = 0; ox < out.width; ++ox) {
      const double x0 = ox * sx, x1 = (ox + 1) * sx;
      double sum[3] = {0, 0, 0}, alpha = 0, area = 0;
      for (int y = int(y0); y < std::min(height, int(std::ceil(y1))); ++y) {
        const double wy = std::min(y1, y + 1.0) - std::max(y0, double(y));
        for (int x = int(x0); x < std::min(width, int(std::ceil(x1))); ++x) {
          const double w = wy * (std::min(x1, x + 1.0) - std::max(x0, double(x)));
          const uint8_t* p = pixels + (size_t(y) * size_t(width) + size_t(x)) * 4;
          const double a = w * p[3] / 255.0;
          for (int c = 0; c < 3; ++c) sum[c] += a * lin[p[c]];
          alpha += a;
          area += w;
        }
      }
      uint8_t* q = &out.rgba[(size_t(oy) * size_t(out.width) + size_t(ox)) * 4];
      for (int c = 0; c < 3; ++c) q[c] = alpha > 0 ? to_srgb8(sum[c] / alpha) : 0;
      q[3] = uint8_t(std::lround(255.0 * (area > 0 ? alpha / area : 0.0)));
    }
  }
  return out;
}

std::string decode_picture_rgba8(const std::string& path, int max_side, Rgba8Picture* out) {
  PictureHeader h;
  // 4 bytes a decoded pixel; the shrunk copy is small beside it.
  if (std::string problem = read_picture_header(path, 4.0, &h); !problem.empty()) return path + ": " + problem;
  int w = 0, hh = 0, channels = 0;
  std::unique_ptr<stbi_uc, void (*)(void*)> data(stbi_load(path.c_str(), &w, &hh, &channels, 4), stbi_image_free);
  if (!data) {
    const char* why = stbi_failure_reason();
    return path + ": could not decode (" + (why ? why : "unknown") + ")";
  }
  *out = shrink_to_fit(data.get(), w, hh, max_side);
  return "";
}

}  // namespace kith
