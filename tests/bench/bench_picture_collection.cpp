// Writes an invented collection of N pictures for the pictures frame-rate benchmark
// (tests/bench/pictures_fps.sh): DIR/items.csv (id, a tag, three features) and DIR/p-K.png, each
// 64 x 64 (one size in four 64 x 40, one in four 40 x 64), a colour of its own with a diagonal
// stripe, so the texture is not flat.
//   bench_picture_collection DIR N
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <random>
#include <string>
#include <vector>

#include "solver/io/png_file.h"
#include "solver/io/safe_file.h"

int main(int argc, char** argv) {
  if (argc != 3) {
    std::fprintf(stderr, "usage: bench_picture_collection DIR N\n");
    return 2;
  }
  const std::string dir = argv[1];
  const int n = std::atoi(argv[2]);
  std::mt19937 rng(7);
  std::uniform_real_distribution<float> u(0.f, 1.f);
  std::normal_distribution<float> g(0.f, 1.f);
  std::string csv = "id,kind,a,b,c,photo\n";
  kith::SafeWriteOptions file;
  file.replace = true;
  for (int i = 0; i < n; ++i) {
    const int w = i % 4 == 1 ? 40 : 64, h = i % 4 == 2 ? 40 : 64;
    // Eight clusters, so the map has structure.
    const int k = i % 8;
    const float r = 0.2f + 0.1f * k + 0.05f * u(rng), gg = u(rng), b = 1.f - 0.1f * k;
    std::vector<uint8_t> px(size_t(w) * h * 3);
    for (int y = 0; y < h; ++y)
      for (int x = 0; x < w; ++x) {
        const float stripe = ((x + y) / 8) % 2 ? 1.f : 0.6f;
        uint8_t* p = &px[(size_t(y) * w + x) * 3];
        p[0] = uint8_t(255 * std::fmin(1.f, r * stripe));
        p[1] = uint8_t(255 * std::fmin(1.f, gg * stripe));
        p[2] = uint8_t(255 * std::fmin(1.f, b * stripe));
      }
    const std::string name = "p-" + std::to_string(i) + ".png";
    if (const std::string e = kith::write_png_file(dir + "/" + name, px.data(), w, h, 3, file); !e.empty()) {
      std::fprintf(stderr, "%s\n", e.c_str());
      return 1;
    }
    char line[160];
    std::snprintf(line, sizeof line, "p%d,k%d,%.4f,%.4f,%.4f,%s\n", i, k, k * 3.0 + g(rng),
                  std::fmod(k * 5.0, 7.0) + g(rng), g(rng), name.c_str());
    csv += line;
  }
  if (const std::string e = kith::write_file_safely(dir + "/items.csv", csv, file); !e.empty()) {
    std::fprintf(stderr, "%s\n", e.c_str());
    return 1;
  }
  std::printf("%s: %d pictures\n", dir.c_str(), n);
  return 0;
}
