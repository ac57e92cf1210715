// See png_file.h.
#include "solver/io/png_file.h"

#include <stb_image_write.h>

#include <array>
#include <fstream>

namespace kith {
namespace {

const char kSignature[] = "\x89PNG\r\n\x1a\n";
constexpr size_t kSignatureSize = 8;
// keyword, NUL separator, text (PNG specification 11.3.4.3).
const std::string kMarkData = std::string("Software") + '\0' + "kith";

// CRC-32 as the PNG specification's annex D gives it (polynomial 0xedb88320, reflected).
uint32_t png_crc(const std::string& bytes) {
  static const std::array<uint32_t, 256> table = [] {
    std::array<uint32_t, 256> t{};
    for (uint32_t n = 0; n < 256; ++n) {
      uint32_t c = n;
      for (int k = 0; k < 8; ++k) c = (c & 1) ? 0xedb88320u ^ (c >> 1) : c >> 1;
      t[n] = c;
    }
    return t;
  }();
  uint32_t c = 0xffffffffu;
  for (unsigned char b : bytes) c = table[(c ^ b) & 0xff] ^ (c >> 8);
  return c ^ 0xffffffffu;
}

void put_be32(std::string& out, uint32_t v) {
  for (int s = 24; s >= 0; s -= 8) out += char((v >> s) & 0xff);
}

uint32_t be32(const std::string& b, size_t at) {
  return uint32_t(uint8_t(b[at])) << 24 | uint32_t(uint8_t(b[at + 1])) << 16 | uint32_t(uint8_t(b[at + 2])) << 8 |
         uint32_t(uint8_t(b[at + 3]));
}

bool has_signature(const std::string& b) {
  return b.size() >= kSignatureSize && b.compare(0, kSignatureSize, kSignature, kSignatureSize) == 0;
}

}  // namespace

std::string mark_png_as_kiths(const std::string& png) {
  if (!has_signature(png)) return png;
  // Walk the chunks to the first IDAT; the mark goes just before it.
  size_t at = kSignatureSize;
  while (at + 12 <= png.size()) {
    const uint32_t length = be32(png, at);
    if (png.compare(at + 4, 4, "IDAT") == 0) {
      std::string chunk;
      put_be32(chunk, uint32_t(kMarkData.size()));
      const std::string body = "tEXt" + kMarkData;
      chunk += body;
      put_be32(chunk, png_crc(body));
      return png.substr(0, at) + chunk + png.substr(at);
    }
    if (length > png.size() - at - 12) break;
    at += 12 + size_t(length);
  }
  return png;
}

bool is_kiths_png(const std::string& b) {
  if (!has_signature(b)) return false;
  size_t at = kSignatureSize;
  while (at + 12 <= b.size()) {
    const uint32_t length = be32(b, at);
    if (b.compare(at + 4, 4, "IDAT") == 0 || b.compare(at + 4, 4, "IEND") == 0) return false;
    if (length > b.size() - at - 12) return false;
    if (b.compare(at + 4, 4, "tEXt") == 0 && length == kMarkData.size() &&
        b.compare(at + 8, length, kMarkData) == 0)
      return true;
    at += 12 + size_t(length);
  }
  return false;
}

bool is_kiths_png_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return false;
  std::string head(64 * 1024, '\0');
  in.read(&head[0], std::streamsize(head.size()));
  head.resize(size_t(in.gcount()));
  return is_kiths_png(head);
}

std::string png_bytes(const uint8_t* pixels, int width, int height, int channels) {
  std::string out;
  if (width <= 0 || height <= 0 || channels < 1 || channels > 4 || !pixels) return out;
  const int ok = stbi_write_png_to_func(
      [](void* context, void* data, int size) {
        static_cast<std::string*>(context)->append(static_cast<const char*>(data), size_t(size));
      },
      &out, width, height, channels, pixels, width * channels);
  if (!ok) return {};
  return mark_png_as_kiths(out);
}

std::string write_png_file(const std::string& path, const uint8_t* pixels, int width, int height, int channels,
                           const SafeWriteOptions& options) {
  const std::string png = png_bytes(pixels, width, height, channels);
  if (png.empty()) return path + ": the picture could not be encoded as PNG";
  return write_file_safely(path, png, options);
}

}  // namespace kith
