// Checks of solver/features/picture_descriptors.h: reading (8/16-bit, grey, alpha, broken files), invariances
// of the blocks, the orientation histogram under rotation, and the block weighting.
#include <doctest/doctest.h>
#include <stb_image_write.h>

#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <cstdint>
#include <fstream>
#include <string>
#include <vector>

#include "solver/features/colour.h"
#include "solver/features/picture_descriptors.h"
#include "tests/approx.h"

namespace {

using kith::descriptor_blocks;

constexpr int kSize = 96;  // equal to the default working size, so no resampling happens

struct Rgb8 {
  int w = kSize, h = kSize;
  std::vector<uint8_t> px = std::vector<uint8_t>(size_t(kSize) * kSize * 3);
  void set(int x, int y, const kith::Lab& lab) {
    double r, g, b;
    kith::lab_to_srgb(lab, &r, &g, &b);
    uint8_t* p = &px[(size_t(y) * w + x) * 3];
    p[0] = uint8_t(std::lround(r * 255)), p[1] = uint8_t(std::lround(g * 255)), p[2] = uint8_t(std::lround(b * 255));
  }
};

// Stripes whose lightness varies along direction (cos t, sin t), period in pixels.
Rgb8 stripes(double angle_deg, double period, double a, double b, double L0 = 40, double L1 = 70) {
  Rgb8 im;
  const double t = angle_deg * 3.14159265358979323846 / 180.0;
  for (int y = 0; y < im.h; ++y)
    for (int x = 0; x < im.w; ++x) {
      const double s = 0.5 + 0.5 * std::sin(2 * 3.14159265358979323846 * (x * std::cos(t) + y * std::sin(t)) / period);
      im.set(x, y, {L0 + (L1 - L0) * s, a, b});
    }
  return im;
}

std::vector<double> describe(const Rgb8& im) {
  return kith::describe_image(kith::image_from_srgb8(im.px.data(), im.w, im.h, 3));
}

std::vector<double> block(const std::vector<double>& f, const char* name) {
  for (const auto& b : descriptor_blocks())
    if (b.name == name) return std::vector<double>(f.begin() + b.begin, f.begin() + b.begin + b.size);
  FAIL("no block " << name);
  return {};
}

double distance(const std::vector<double>& x, const std::vector<double>& y) {
  double s = 0;
  for (size_t i = 0; i < x.size(); ++i) s += (x[i] - y[i]) * (x[i] - y[i]);
  return std::sqrt(s);
}

// ---- a minimal 16-bit PNG writer (stb_image_write writes 8-bit only): stored deflate blocks ----
uint32_t crc32(const uint8_t* d, size_t n, uint32_t c = 0xffffffffu) {
  for (size_t i = 0; i < n; ++i) {
    c ^= d[i];
    for (int k = 0; k < 8; ++k) c = (c >> 1) ^ (0xedb88320u & (0u - (c & 1u)));
  }
  return c;
}
void put32(std::vector<uint8_t>& v, uint32_t x) {
  for (int s = 24; s >= 0; s -= 8) v.push_back(uint8_t(x >> s));
}
void chunk(std::vector<uint8_t>& out, const char* type, const std::vector<uint8_t>& data) {
  put32(out, uint32_t(data.size()));
  std::vector<uint8_t> body(type, type + 4);
  body.insert(body.end(), data.begin(), data.end());
  out.insert(out.end(), body.begin(), body.end());
  put32(out, crc32(body.data(), body.size()) ^ 0xffffffffu);
}
void write_png16(const std::string& path, int w, int h, int channels, const std::vector<uint16_t>& samples) {
  std::vector<uint8_t> raw;
  for (int y = 0; y < h; ++y) {
    raw.push_back(0);  // filter: none
    for (int i = 0; i < w * channels; ++i) {
      const uint16_t s = samples[size_t(y) * w * channels + i];
      raw.push_back(uint8_t(s >> 8)), raw.push_back(uint8_t(s & 0xff));
    }
  }
  std::vector<uint8_t> z = {0x78, 0x01};
  for (size_t pos = 0; pos < raw.size(); pos += 65535) {
    const size_t len = std::min<size_t>(65535, raw.size() - pos);
    z.push_back(pos + len == raw.size() ? 1 : 0);
    z.push_back(uint8_t(len & 0xff)), z.push_back(uint8_t(len >> 8));
    z.push_back(uint8_t(~len & 0xff)), z.push_back(uint8_t((~len >> 8) & 0xff));
    z.insert(z.end(), raw.begin() + long(pos), raw.begin() + long(pos + len));
  }
  uint32_t a = 1, b = 0;
  for (uint8_t c : raw) a = (a + c) % 65521, b = (b + a) % 65521;
  put32(z, (b << 16) | a);
  std::vector<uint8_t> png = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
  std::vector<uint8_t> ihdr;
  put32(ihdr, uint32_t(w)), put32(ihdr, uint32_t(h));
  ihdr.insert(ihdr.end(), {16, uint8_t(channels == 1 ? 0 : channels == 3 ? 2 : 6), 0, 0, 0});
  chunk(png, "IHDR", ihdr);
  chunk(png, "IDAT", z);
  chunk(png, "IEND", {});
  std::ofstream(path, std::ios::binary).write(reinterpret_cast<const char*>(png.data()), long(png.size()));
}

}  // namespace

TEST_CASE("demo descriptors: identical pictures give identical features, formats agree") {
  const std::string dir = kith::test::temp_dir("descriptors-same");
  const Rgb8 im = stripes(30, 9, 15, -20);
  REQUIRE(stbi_write_png((dir + "/a.png").c_str(), im.w, im.h, 3, im.px.data(), im.w * 3));
  REQUIRE(stbi_write_png((dir + "/b.png").c_str(), im.w, im.h, 3, im.px.data(), im.w * 3));
  REQUIRE(stbi_write_jpg((dir + "/c.jpg").c_str(), im.w, im.h, 3, im.px.data(), 95));
  const auto a = kith::describe_picture(dir + "/a.png");
  const auto b = kith::describe_picture(dir + "/b.png");
  REQUIRE(a.size() == size_t(kith::descriptor_size()));
  CHECK(a == b);  // bit for bit
  CHECK(a == describe(im));
  // A JPEG of the same picture is close but not equal (lossy): colour means within 1 L* unit.
  const auto c = kith::describe_picture(dir + "/c.jpg");
  CHECK(a != c);
  for (int k = 0; k < 3; ++k) CHECK(std::abs(a[k] - c[k]) < 1.0);

  // 16-bit PNG holding the same 8-bit values scaled by 257 (exactly the same intensities).
  std::vector<uint16_t> s16(im.px.begin(), im.px.end());
  for (auto& s : s16) s = uint16_t(s * 257);
  write_png16(dir + "/d16.png", im.w, im.h, 3, s16);
  const auto d = kith::describe_picture(dir + "/d16.png");
  kith::test::assert_near(Eigen::Map<const Eigen::RowVectorXd>(d.data(), long(d.size())),
                          Eigen::Map<const Eigen::RowVectorXd>(a.data(), long(a.size())), 1e-9, 0.0, "16-bit");

  // Grey picture stored as 1 channel and as RGB with equal channels.
  std::vector<uint8_t> grey(size_t(im.w) * im.h), grey3;
  for (size_t p = 0; p < grey.size(); ++p) grey[p] = uint8_t((p * 7) % 256), grey3.insert(grey3.end(), 3, grey[p]);
  REQUIRE(stbi_write_png((dir + "/g1.png").c_str(), im.w, im.h, 1, grey.data(), im.w));
  REQUIRE(stbi_write_png((dir + "/g3.png").c_str(), im.w, im.h, 3, grey3.data(), im.w * 3));
  CHECK(kith::describe_picture(dir + "/g1.png") == kith::describe_picture(dir + "/g3.png"));

  // RGBA: fully transparent shows the background; half-transparent black over white is the
  // linear-light mix, L* of 50 % linear grey = 116 * 0.5^(1/3) - 16 = 76.07.
  std::vector<uint8_t> rgba(size_t(im.w) * im.h * 4, 0);
  REQUIRE(stbi_write_png((dir + "/clear.png").c_str(), im.w, im.h, 4, rgba.data(), im.w * 4));
  const auto clear = kith::describe_picture(dir + "/clear.png");
  CHECK(std::abs(clear[0] - 100.0) < 1e-6);
  kith::DescriptorOptions dark;
  dark.background = {0, 0, 0};
  CHECK(std::abs(kith::describe_picture(dir + "/clear.png", dark)[0]) < 1e-6);
  for (size_t p = 0; p < rgba.size(); p += 4) rgba[p + 3] = 255;  // opaque black: alpha is used
  REQUIRE(stbi_write_png((dir + "/black.png").c_str(), im.w, im.h, 4, rgba.data(), im.w * 4));
  CHECK(std::abs(kith::describe_picture(dir + "/black.png")[0]) < 1e-6);
  std::vector<uint16_t> half(size_t(im.w) * im.h * 4, 0);
  for (size_t p = 0; p < half.size(); p += 4) half[p + 3] = 32768;
  write_png16(dir + "/half16.png", im.w, im.h, 4, half);
  CHECK(std::abs(kith::describe_picture(dir + "/half16.png")[0] - (116 * std::cbrt(32767.0 / 65535) - 16)) < 1e-4);
}

TEST_CASE("demo descriptors: a colour shift moves the colour blocks and not the texture blocks") {
  // Same lightness pattern, hue turned from a warm to a cool colour at equal L* (both inside the
  // sRGB gamut, so no channel is clipped).
  const auto warm = describe(stripes(0, 12, 25, 20, 45, 70));
  const auto cool = describe(stripes(0, 12, -12, -18, 45, 70));
  const double colour_move = distance(block(warm, "colour_stats"), block(cool, "colour_stats"));
  CHECK(colour_move > 30.0);  // mean a*, b* moved by 37 and 38 units
  CHECK(distance(block(warm, "colour_hist"), block(cool, "colour_hist")) > 0.5);
  CHECK(distance(block(warm, "layout"), block(cool, "layout")) > 30.0);
  // Texture: only the 8-bit rounding of the two pictures differs (a few tenths of an L* unit per
  // pixel), which moves the mean gradient by a few per cent at most.
  constexpr double kRoundingShare = 0.05;
  const auto e1 = block(warm, "texture_energy"), e2 = block(cool, "texture_energy");
  for (size_t s = 0; s < e1.size(); ++s) CHECK(std::abs(e1[s] - e2[s]) <= kRoundingShare * e1[s]);
  CHECK(distance(block(warm, "texture_orientation"), block(cool, "texture_orientation")) < 0.01);

  // And the opposite: a finer pattern of the same colours moves texture energy, not colour means.
  const auto fine = describe(stripes(0, 5, 25, 20, 45, 70));
  CHECK(std::abs(block(fine, "texture_energy")[0] - e1[0]) > 0.5 * e1[0]);
  CHECK(std::abs(block(fine, "colour_stats")[1] - block(warm, "colour_stats")[1]) < 1.0);
}

TEST_CASE("demo descriptors: rotating a pattern moves the orientation histogram") {
  // Lightness varying along x: gradients point along x, orientation 0 degrees (bin 0).
  const Rgb8 vertical = stripes(0, 12, 10, 10);
  const auto ov = block(describe(vertical), "texture_orientation");
  for (int s = 0; s < 3; ++s) {
    const double* h = &ov[s * 8];
    CHECK(std::max_element(h, h + 8) - h == 0);
    CHECK(h[0] > 0.8);
  }
  // The same picture turned 90 degrees (new(x, y) = old(y, W-1-x)): the histogram shifts by
  // 90 degrees = 4 bins, exactly, since no resampling happens at the working size.
  Rgb8 turned;
  for (int y = 0; y < kSize; ++y)
    for (int x = 0; x < kSize; ++x)
      for (int k = 0; k < 3; ++k)
        turned.px[(size_t(y) * kSize + x) * 3 + k] = vertical.px[(size_t(kSize - 1 - x) * kSize + y) * 3 + k];
  const auto ot = block(describe(turned), "texture_orientation");
  for (int s = 0; s < 3; ++s)
    for (int b = 0; b < 8; ++b) CHECK(std::abs(ot[s * 8 + (b + 4) % 8] - ov[s * 8 + b]) < 1e-9);
  // Diagonal stripes (lightness varying along (1, 1)): peak at 45 degrees (bin 2) at scale 1.
  const auto od = block(describe(stripes(45, 12, 10, 10)), "texture_orientation");
  CHECK(std::max_element(od.begin(), od.begin() + 8) - od.begin() == 2);
  // A plain picture has no orientation: flat histogram.
  const auto op = block(describe(stripes(0, 12, 10, 10, 50, 50)), "texture_orientation");
  for (double v : op) CHECK(std::abs(v - 1.0 / 8) < 1e-9);
}

TEST_CASE("demo descriptors: broken files are reported and skipped, blocks get equal weight") {
  const std::string dir = kith::test::temp_dir("descriptors-broken");
  std::ofstream(dir + "/broken.png") << "this is not a picture";
  std::ofstream(dir + "/empty.jpg");
  std::vector<std::string> paths = {dir + "/broken.png", dir + "/missing.png", dir + "/empty.jpg", dir};
  const double periods[] = {4, 7, 11, 16, 23};
  for (int i = 0; i < 5; ++i) {
    const Rgb8 im = stripes(i * 30, periods[i], 10 * i - 20, 30 - 12 * i, 30 + 5 * i, 60 + 7 * i);
    const std::string p = dir + "/ok" + std::to_string(i) + ".png";
    REQUIRE(stbi_write_png(p.c_str(), im.w, im.h, 3, im.px.data(), im.w * 3));
    paths.push_back(p);
  }
  CHECK_THROWS_AS(kith::describe_picture(dir + "/broken.png"), kith::PictureError);
  const auto d = kith::describe_pictures(paths, {}, 2);
  REQUIRE(d.skipped.size() == 4);
  CHECK(d.skipped[0].file == dir + "/broken.png");
  CHECK(d.skipped[1].message == "no such file");
  CHECK(d.paths.size() == 5);
  CHECK(d.input_index.front() == 4);
  REQUIRE(d.features.rows() == 5);
  for (const auto& b : descriptor_blocks()) {
    const auto blk = d.features.middleCols(b.begin, b.size);
    const Eigen::RowVectorXd mean = blk.colwise().mean();
    const double total_variance = (blk.rowwise() - mean).squaredNorm() / 5.0;
    INFO(b.name);
    CHECK(std::abs(total_variance - 1.0) < 1e-9);
  }
  CHECK(kith::descriptor_names().size() == size_t(kith::descriptor_size()));
}

namespace {
int run_kith(const std::string& args) {
  const int status = std::system((std::string(KITH_BINARY) + " " + args + " >/dev/null 2>&1").c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}
std::vector<std::string> read_lines(const std::string& path) {
  std::ifstream in(path);
  std::vector<std::string> lines;
  for (std::string l; std::getline(in, l);) lines.push_back(l);
  return lines;
}
}  // namespace

TEST_CASE("demo descriptors: kith describe on a folder, an items table, and bad input") {
  const std::string dir = kith::test::temp_dir("describe-cli");
  std::filesystem::create_directories(dir + "/pics/sub");
  for (int i = 0; i < 4; ++i) {
    const Rgb8 im = stripes(i * 40, 6 + 3 * i, 10 * i, -10 * i);
    const std::string p = dir + (i < 2 ? "/pics/" : "/pics/sub/") + "p" + std::to_string(i) + ".png";
    REQUIRE(stbi_write_png(p.c_str(), im.w, im.h, 3, im.px.data(), im.w * 3));
  }
  std::ofstream(dir + "/pics/broken.jpg") << "not a jpeg";
  std::ofstream(dir + "/pics/notes.txt") << "ignored";
  CHECK(run_kith("describe " + dir + "/pics -o " + dir + "/f.csv") == 0);
  auto lines = read_lines(dir + "/f.csv");
  REQUIRE(lines.size() == 5);  // header + 4 readable pictures; broken.jpg skipped
  // Two folders, so the subfolder becomes a tag column after the picture.
  CHECK(lines[0].rfind("id,picture,folder,colour_mean_L,", 0) == 0);
  CHECK(lines[1].rfind("p0,pics/p0.png,(top folder),", 0) == 0);
  CHECK(lines[3].rfind("sub/p2,pics/sub/p2.png,sub,", 0) == 0);
  // The output is a collection kith reads, features from the pictures.
  const kith::Collection c = kith::load_collection(dir + "/f.csv");
  CHECK(c.size() == 4);
  // Descriptors with one value for every picture are left out, never more than there are.
  CHECK(c.features.cols() > 0);
  CHECK(c.features.cols() <= kith::descriptor_size());
  CHECK(c.pictures.size() == 4);
  // Does not overwrite without --force.
  CHECK(run_kith("describe " + dir + "/pics -o " + dir + "/f.csv") == 2);
  CHECK(run_kith("describe " + dir + "/pics -o " + dir + "/f.csv --force") == 0);

  // An items table with picture paths and tags, one picture missing.
  std::ofstream(dir + "/items.csv") << "id,kind,picture\na,x,pics/p0.png\nb,y,pics/p1.png\nc,x,pics/sub/p3.png\n"
                                       "d,y,pics/gone.png\n";
  CHECK(run_kith("describe " + dir + "/items.csv -o " + dir + "/g.csv") == 0);
  lines = read_lines(dir + "/g.csv");
  REQUIRE(lines.size() == 4);
  CHECK(lines[0].rfind("id,picture,kind,colour_mean_L", 0) == 0);
  CHECK(lines[3].rfind("c,pics/sub/p3.png,x,", 0) == 0);

  // Bad input: exit 3.
  CHECK(run_kith("describe " + dir + "/nothing-here -o " + dir + "/h.csv") == 3);
  std::filesystem::create_directories(dir + "/empty");
  CHECK(run_kith("describe " + dir + "/empty -o " + dir + "/h.csv") == 3);
  CHECK(run_kith("describe " + dir + "/pics/broken.jpg " + dir + "/pics/p0.png -o " + dir + "/h.csv") == 3);
  std::ofstream(dir + "/bad.csv") << "id,picture\n\"unclosed,x.png\n";
  CHECK(run_kith("describe " + dir + "/bad.csv -o " + dir + "/h.csv") == 3);
  CHECK_FALSE(std::filesystem::exists(dir + "/h.csv"));
  CHECK(run_kith("describe --help") == 0);
  CHECK(run_kith("describe " + dir + "/pics") == 2);

  // describe_collection: a loaded collection with pictures and no features gets them; the item
  // whose picture is missing is left out with a warning.
  kith::LoadOptions load;
  load.allow_no_features = true;
  kith::Collection items = kith::load_collection(dir + "/items.csv", load);
  REQUIRE(items.features.cols() == 0);
  const auto problems = kith::describe_collection(items, {});
  CHECK(problems.size() == 1);
  CHECK(items.size() == 3);
  CHECK(items.features.cols() == kith::descriptor_size());
  CHECK(items.index_of("d") == std::nullopt);
  CHECK(items.index_of("c") == std::optional<size_t>(2));
  CHECK(items.tags[0].values == std::vector<std::string>{"x", "y", "x"});
}
