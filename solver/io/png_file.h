// PNG pictures: encoded in memory (stb_image_write's stbi_write_png_to_func) and written through
// the one safe file writer (safe_file.h), so a picture is never left half written. Any thread.
#pragma once
#include <cstdint>
#include <string>

#include "solver/io/safe_file.h"

namespace kith {

// The PNG bytes of WIDTH x HEIGHT 8-bit pixels with CHANNELS (1 grey .. 4 RGBA) per pixel, rows
// top first. Empty when the sizes are not positive or the encoder fails.
std::string png_bytes(const uint8_t* pixels, int width, int height, int channels);

// png_bytes, then write_file_safely. Returns "" or a message naming the path and the cause.
std::string write_png_file(const std::string& path, const uint8_t* pixels, int width, int height, int channels,
                           const SafeWriteOptions& options = {});

}  // namespace kith
