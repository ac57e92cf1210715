// PNG pictures: encoded in memory (stb_image_write's stbi_write_png_to_func) and written through
// the one safe file writer (safe_file.h), so a picture is never left half written. Every PNG kith
// writes carries a text chunk `Software` = `kith` (PNG specification, 11.3.4 "tEXt", predefined
// keyword "Software"), which is how `kith describe` knows a map picture of kith's own and never
// reads it back as one of the collection's pictures. Any thread.
#pragma once
#include <cstdint>
#include <string>

#include "solver/io/safe_file.h"

namespace kith {

// The PNG bytes of WIDTH x HEIGHT 8-bit pixels with CHANNELS (1 grey .. 4 RGBA) per pixel, rows
// top first, marked as kith's. Empty when the sizes are not positive or the encoder fails.
std::string png_bytes(const uint8_t* pixels, int width, int height, int channels);

// png_bytes, then write_file_safely. Returns "" or a message naming the path and the cause.
std::string write_png_file(const std::string& path, const uint8_t* pixels, int width, int height, int channels,
                           const SafeWriteOptions& options = {});

// PNG bytes with the `Software` = `kith` text chunk put in before the first IDAT chunk (the
// mark png_bytes adds; for PNGs another encoder made, such as cairo's). Bytes that are not a
// PNG come back unchanged.
std::string mark_png_as_kiths(const std::string& png);

// True when the bytes (the start of a file is enough: the mark sits before the pixel data) are a
// PNG that kith wrote.
bool is_kiths_png(const std::string& bytes);

// is_kiths_png on the first 64 KiB of the file at PATH; false when it cannot be read.
bool is_kiths_png_file(const std::string& path);

}  // namespace kith
