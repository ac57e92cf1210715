// See png_file.h.
#include "solver/io/png_file.h"

#include <stb_image_write.h>

namespace kith {

std::string png_bytes(const uint8_t* pixels, int width, int height, int channels) {
  std::string out;
  if (width <= 0 || height <= 0 || channels < 1 || channels > 4 || !pixels) return out;
  const int ok = stbi_write_png_to_func(
      [](void* context, void* data, int size) {
        static_cast<std::string*>(context)->append(static_cast<const char*>(data), size_t(size));
      },
      &out, width, height, channels, pixels, width * channels);
  if (!ok) out.clear();
  return out;
}

std::string write_png_file(const std::string& path, const uint8_t* pixels, int width, int height, int channels,
                           const SafeWriteOptions& options) {
  const std::string png = png_bytes(pixels, width, height, channels);
  if (png.empty()) return path + ": the picture could not be encoded as PNG";
  return write_file_safely(path, png, options);
}

}  // namespace kith
