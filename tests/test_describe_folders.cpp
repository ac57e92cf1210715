// kith describe on a designer's folder: subfolders become the tag 'folder', kith's own PNGs (a map
// rendered into the same folder) are never read back as pictures, and kith check finds nothing to
// warn about in what describe wrote. Also the PNG mark itself (solver/io/png_file.h).
#include <doctest/doctest.h>
#include <stb_image.h>
#include <stb_image_write.h>

#include <filesystem>
#include <random>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/io/png_file.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"

namespace {

using kith::test::file_bytes;
using kith::test::run_kith;
using kith::test::run_shell;
using kith::test::write_bytes;

// A PNG from another encoder than kith's: stb_image_write's, unmarked.
std::string foreign_png(const std::vector<uint8_t>& px, int w, int h) {
  std::string out;
  stbi_write_png_to_func(
      [](void* context, void* data, int size) {
        static_cast<std::string*>(context)->append(static_cast<const char*>(data), size_t(size));
      },
      &out, w, h, 3, px.data(), w * 3);
  return out;
}

// A noisy picture around one colour (fixed seed per picture).
std::vector<uint8_t> noisy(int w, int h, int r, int g, int b, uint32_t seed) {
  std::mt19937 rng(seed);
  std::normal_distribution<double> noise(0.0, 20.0);
  std::vector<uint8_t> px(size_t(w * h * 3));
  const int base[3] = {r, g, b};
  for (size_t i = 0; i < px.size(); ++i) px[i] = uint8_t(std::clamp(base[i % 3] + noise(rng), 0.0, 255.0));
  return px;
}

}  // namespace

TEST_CASE("describe folders: every PNG kith writes is marked, other PNGs are not, and the mark keeps the pixels") {
  const auto px = noisy(17, 9, 120, 80, 40, 3);
  const std::string ours = kith::png_bytes(px.data(), 17, 9, 3);
  const std::string theirs = foreign_png(px, 17, 9);
  CHECK(kith::is_kiths_png(ours));
  CHECK_FALSE(kith::is_kiths_png(theirs));
  CHECK_FALSE(kith::is_kiths_png("not a picture"));
  CHECK(kith::mark_png_as_kiths("not a picture") == "not a picture");
  const std::string marked = kith::mark_png_as_kiths(theirs);
  CHECK(kith::is_kiths_png(marked));
  CHECK(marked.size() == theirs.size() + 12 + 13);  // length, type, CRC + "Software\0kith"
  int w = 0, h = 0, n = 0;
  unsigned char* back = stbi_load_from_memory(reinterpret_cast<const unsigned char*>(marked.data()),
                                              int(marked.size()), &w, &h, &n, 3);
  REQUIRE(back);
  CHECK(std::vector<uint8_t>(back, back + px.size()) == px);
  stbi_image_free(back);

  // An outside reader: Pillow (python3-pil, through Debian's /usr/bin/python3) checks the chunk's
  // CRC as it reads and reports the text as the picture's 'Software'.
  const std::string dir = kith::test::temp_dir("describe-mark");
  write_bytes(dir + "/marked.png", marked);
  const auto pil = run_shell(
      "/usr/bin/python3 -c \"from PIL import Image; im = Image.open('" + dir +
      "/marked.png'); im.load(); print(im.info.get('Software'), im.size[0], im.size[1])\" 2>&1");
  if (pil.output.find("No module named") != std::string::npos || pil.code == 127) {
    MESSAGE("skipped the Pillow check: /usr/bin/python3 with PIL not found");
  } else {
    CHECK(pil.output == "kith 17 9\n");
  }
}

TEST_CASE("describe folders: subfolders become the tag, kith's own map is left out, kith check has no warnings") {
  namespace fs = std::filesystem;
  const std::string dir = kith::test::temp_dir("describe-folders");
  const std::string cards = dir + "/cards";
  const char* const families[] = {"linen", "slate", "moss"};
  const int colours[3][3] = {{200, 190, 170}, {70, 80, 95}, {90, 130, 60}};
  for (int f = 0; f < 3; ++f) {
    fs::create_directories(cards + "/" + families[f]);
    for (int i = 0; i < 5; ++i)
      write_bytes(cards + "/" + families[f] + "/" + families[f] + std::to_string(i) + ".png",
                  foreign_png(noisy(40, 30, colours[f][0], colours[f][1], colours[f][2], uint32_t(10 * f + i)), 40, 30));
  }
  write_bytes(cards + "/loose.png", foreign_png(noisy(30, 30, 128, 128, 128, 99), 30, 30));

  REQUIRE(run_kith("describe " + cards + " -o " + dir + "/first.csv").code == 0);
  // A map of it rendered into the pictures' own folder, as a designer might keep it.
  REQUIRE(run_kith("render " + dir + "/first.csv -o " + cards + "/map.png --iterations 50").code == 0);
  REQUIRE(kith::is_kiths_png_file(cards + "/map.png"));

  const auto again = run_kith("describe " + cards + " -o " + dir + "/features.csv");
  REQUIRE(again.code == 0);
  CHECK(again.output.find("left out " + cards + "/map.png: a picture kith made") != std::string::npos);
  CHECK(again.output.find("16 pictures") != std::string::npos);

  kith::LoadOptions load;
  const kith::Collection c = kith::load_collection(dir + "/features.csv", load);
  REQUIRE(c.size() == 16);
  for (const auto& id : c.ids) CHECK(id.find("map") == std::string::npos);
  REQUIRE(c.tags.size() == 1);
  CHECK(c.tags[0].name == "folder");
  for (size_t i = 0; i < c.size(); ++i) {
    const std::string expected = c.ids[i] == "loose" ? "(top folder)" : c.ids[i].substr(0, c.ids[i].find('/'));
    CHECK(c.tags[0].values[i] == expected);
  }
  CHECK(c.warnings.empty());
  const auto check = run_kith("check " + dir + "/features.csv");
  CHECK(check.code == 0);
  CHECK(check.output.find("warnings:        0") != std::string::npos);
  CHECK(check.output.find("folder: 4 values") != std::string::npos);
}
