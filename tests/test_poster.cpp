// `kith export SESSION --poster`: a collection of 300 pictures, each one solid colour of its own
// (invented here, fixed seed), gives PNG, PDF and SVG posters on which nearly every picture can be
// seen, counted by the colours in the raster (the PDF rasterized by poppler's pdftoppm, the SVG by
// librsvg's rsvg-convert); and bad input is refused with nothing written.
#include <doctest/doctest.h>
#include <stb_image.h>
#include <stb_image_write.h>

#include <array>
#include <map>
#include <random>
#include <sstream>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "viewer/scene/palette.h"
#include "viewer/session/poster.h"

namespace {

using kith::test::run_kith;
using kith::test::run_shell;
using Colour = std::array<int, 3>;

int colour_distance(const Colour& a, const Colour& b) {
  return std::max({std::abs(a[0] - b[0]), std::abs(a[1] - b[1]), std::abs(a[2] - b[2])});
}
Colour from_rgb(const kith::Rgb& c) { return {int(c.r * 255 + 0.5f), int(c.g * 255 + 0.5f), int(c.b * 255 + 0.5f)}; }

// Colours differ by at least this much on some channel (of 255), from each other and from the
// poster's own colours, so a pixel names at most one picture.
constexpr int kApart = 18;
// A raster pixel is a picture's colour when each channel is within this of it (rasterizers round).
constexpr int kTolerance = 3;
// A picture counts as visible with at least this many pixels of its colour (a 4 x 4 patch).
constexpr size_t kMinPixels = 16;

// 300 invented colours and their pictures (some wide, some tall, most square); DIR/items.csv with
// id, a tag, the colour as three features and the picture's path.
std::vector<Colour> make_colour_collection(const std::string& dir) {
  const kith::Palette pal = kith::Palette::paper();
  std::vector<Colour> avoid = {
      from_rgb(pal.ground), from_rgb(pal.ink), from_rgb(pal.card_frame), from_rgb(pal.muted), {0xE4, 0xE0, 0xD8},
      {255, 255, 255},      {0, 0, 0}};
  for (size_t k = 0; k < kith::Palette::kCategorical.size(); ++k) avoid.push_back(from_rgb(pal.category(int(k))));
  std::mt19937 rng(20261203);
  std::uniform_int_distribution<int> channel(10, 245);
  std::vector<Colour> colours;
  while (colours.size() < 300) {
    const Colour c = {channel(rng), channel(rng), channel(rng)};
    bool ok = true;
    for (const Colour& o : colours) ok = ok && colour_distance(c, o) >= kApart;
    for (const Colour& o : avoid) ok = ok && colour_distance(c, o) >= kApart;
    if (ok) colours.push_back(c);
  }
  std::ostringstream csv;
  csv << "id,tone,red,green,blue,photo\n";
  for (size_t i = 0; i < colours.size(); ++i) {
    const int w = i % 5 == 0 ? 48 : 32, h = i % 7 == 0 ? 48 : 32;
    std::vector<unsigned char> px(size_t(w * h * 3));
    for (size_t p = 0; p < px.size(); ++p) px[p] = (unsigned char)colours[i][p % 3];
    const std::string name = "chip-" + std::to_string(i) + ".png";
    REQUIRE(stbi_write_png((dir + "/" + name).c_str(), w, h, 3, px.data(), w * 3));
    const Colour& c = colours[i];
    csv << "chip-" << i << "," << (c[0] > c[2] ? "warm" : "cool") << "," << c[0] << "," << c[1] << "," << c[2] << ","
        << name << "\n";
  }
  kith::test::write_bytes(dir + "/items.csv", csv.str());
  return colours;
}

// A session of the collection, its map the colours themselves (a 3-D map is what a session keeps).
std::string make_session(const std::string& dir, const std::vector<Colour>& colours) {
  const std::string session = dir + "/chips.kith";
  const auto r = run_kith("new " + dir + "/items.csv -o " + session);
  INFO(r.output);
  REQUIRE(r.code == 0);
  kith::Points map(Eigen::Index(colours.size()), 3);
  for (size_t i = 0; i < colours.size(); ++i)
    for (int d = 0; d < 3; ++d) map(Eigen::Index(i), d) = colours[i][size_t(d)] / 25.5;
  kith::SessionStore::open(session)->write_checkpoint(map, 100);
  return session;
}

// How many of COLOURS cover at least kMinPixels pixels of the PNG at PATH.
size_t visible_colours(const std::string& path, const std::vector<Colour>& colours) {
  int w = 0, h = 0, ch = 0;
  unsigned char* d = stbi_load(path.c_str(), &w, &h, &ch, 3);
  REQUIRE(d != nullptr);
  std::map<int, size_t> seen;  // exact colour -> pixels
  for (size_t p = 0; p < size_t(w) * size_t(h); ++p) ++seen[(d[3 * p] << 16) | (d[3 * p + 1] << 8) | d[3 * p + 2]];
  stbi_image_free(d);
  size_t visible = 0;
  for (const Colour& c : colours) {
    size_t pixels = 0;
    for (const auto& [key, count] : seen)
      if (colour_distance(c, {key >> 16, (key >> 8) & 255, key & 255}) <= kTolerance) pixels += count;
    visible += pixels >= kMinPixels;
  }
  return visible;
}

}  // namespace

TEST_CASE("poster: 300 pictures of one colour each are nearly all visible on the PNG, PDF and SVG posters") {
  const std::string dir = kith::test::temp_dir("poster-colours");
  const std::vector<Colour> colours = make_colour_collection(dir);
  const std::string session = make_session(dir, colours);
  // Measured 2026-12-03 (A3): 300 of 300 in all three; 95% is the bar the issue asks for.
  const size_t kMinVisible = 285;

  // Makes the poster FILE with OPTIONS, turns it into a PNG with RASTER (none for a PNG poster)
  // and counts the colours visible there.
  auto visible_on = [&](const std::string& file, const std::string& options, const std::string& raster,
                        const std::string& png) {
    auto r = run_kith("export " + session + " --poster " + dir + "/" + file + " " + options);
    INFO(r.output);
    REQUIRE(r.code == 0);
    CHECK(r.output.find("nearest neighbours") != std::string::npos);
    if (!raster.empty()) REQUIRE(run_shell(raster).code == 0);
    return visible_colours(dir + "/" + png, colours);
  };
  const size_t png = visible_on("poster.png", "--caption tone", "", "poster.png");
  CHECK(kith::test::file_bytes(dir + "/poster.png").find("kith") != std::string::npos);  // the Software mark
  const size_t pdf = visible_on("poster.pdf", "--contact-sheets",
                                "pdftoppm -png -r 72 -f 1 -l 1 -singlefile " + dir + "/poster.pdf " + dir + "/pdf-page",
                                "pdf-page.png");
  const size_t svg = visible_on("poster.svg", "--size 1600x1200",
                                "rsvg-convert -o " + dir + "/svg.png " + dir + "/poster.svg", "svg.png");
  // The contact sheets are the PDF's pages after the poster: every picture is on one of them.
  const auto info = run_shell("pdfinfo " + dir + "/poster.pdf");
  int pages = 0;
  if (const size_t at = info.output.find("Pages:"); at != std::string::npos)
    pages = std::atoi(info.output.c_str() + at + 6);
  CHECK(pages >= 2);
  size_t on_sheets = 0;
  for (int page = 2; page <= pages; ++page) {
    const std::string name = dir + "/sheet-" + std::to_string(page);
    REQUIRE(run_shell("pdftoppm -png -r 72 -f " + std::to_string(page) + " -l " + std::to_string(page) +
                      " -singlefile " + dir + "/poster.pdf " + name)
                .code == 0);
    on_sheets += visible_colours(name + ".png", colours);
  }
  MESSAGE("visible on the contact sheets (" << pages - 1 << " pages): " << on_sheets);
  CHECK(on_sheets >= kMinVisible);
  CHECK(on_sheets <= 300);  // each picture on one sheet only
  MESSAGE("visible of 300: PNG " << png << ", PDF " << pdf << ", SVG " << svg);
  CHECK(png >= kMinVisible);
  CHECK(pdf >= kMinVisible);
  CHECK(svg >= kMinVisible);
}

TEST_CASE("poster: unknown sizes and caption columns and existing files are refused, nothing written") {
  const std::string dir = kith::test::temp_dir("poster-refusals");
  std::vector<Colour> colours;
  {
    std::ostringstream csv;
    csv << "id,tone,a,b,c\n";
    for (int i = 0; i < 40; ++i)
      csv << "bead-" << i << "," << (i % 2 ? "matt" : "glossy") << "," << i % 4 << "," << (i * 3) % 5 << "," << 0.1 * i
          << "\n";
    kith::test::write_bytes(dir + "/items.csv", csv.str());
  }
  const std::string session = dir + "/beads.kith";
  REQUIRE(run_kith("new " + dir + "/items.csv -o " + session).code == 0);
  auto r = run_kith("export " + session + " --poster " + dir + "/p.png");
  CHECK(r.code == 3);  // no map yet
  CHECK(r.output.find("no map yet") != std::string::npos);
  kith::SessionStore::open(session)->write_checkpoint(kith::Points::Random(40, 3), 10);

  r = run_kith("export " + session + " --poster " + dir + "/p.png --size A9");
  CHECK(r.code == 2);
  CHECK(r.output.find("A3") != std::string::npos);
  CHECK(r.output.find("'A9'") != std::string::npos);
  r = run_kith("export " + session + " --poster " + dir + "/p.png --caption colourway");
  CHECK(r.code == 2);
  CHECK(r.output.find("colourway") != std::string::npos);
  CHECK(r.output.find("tone") != std::string::npos);  // the columns there are
  r = run_kith("export " + session + " --poster " + dir + "/p.gif");
  CHECK(r.code == 2);
  r = run_kith("export " + session + " --caption tone --layout " + dir + "/l.csv");
  CHECK(r.code == 2);
  r = run_kith("export " + session + " --picture " + dir + "/m.png --size A3");
  CHECK(r.code == 2);
  CHECK(kith::test::folder_listing(dir) == std::vector<std::string>{"beads.kith", "items.csv"});

  // Items without pictures: neutral cards; the poster is made.
  r = run_kith("export " + session + " --poster " + dir + "/p.png --caption tone --contact-sheets");
  INFO(r.output);
  REQUIRE(r.code == 0);
  CHECK(r.output.find("0 as pictures") != std::string::npos);
  const std::string before = kith::test::file_bytes(dir + "/p.png");
  // An existing poster (or contact sheet) is kept without --force.
  r = run_kith("export " + session + " --poster " + dir + "/p.png");
  CHECK(r.code == 2);
  CHECK(r.output.find("--force") != std::string::npos);
  CHECK(kith::test::file_bytes(dir + "/p.png") == before);
  // A contact sheet's file counts as much: with one there, nothing is written.
  kith::test::write_bytes(dir + "/s-group-1.png", "mine");
  kith::test::write_bytes(dir + "/s-no-group.png", "mine");
  r = run_kith("export " + session + " --poster " + dir + "/s.png --contact-sheets");
  CHECK(r.code == 2);
  CHECK(r.output.find("--force") != std::string::npos);
  CHECK(!std::filesystem::exists(dir + "/s.png"));
  CHECK(kith::test::file_bytes(dir + "/s-group-1.png") == "mine");
  CHECK(kith::test::file_bytes(dir + "/s-no-group.png") == "mine");
  r = run_kith("export " + session + " --poster " + dir + "/p.png --force --size A2");
  CHECK(r.code == 0);
  CHECK(kith::test::file_bytes(dir + "/p.png") != before);
}
