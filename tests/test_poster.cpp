// `kith export SESSION --poster`: a collection of 300 pictures, each one solid colour of its own
// (invented here, fixed seed), gives PNG, PDF and SVG posters on which nearly every picture can be
// seen, counted by the colours in the raster (the PDF rasterized by poppler's pdftoppm, the SVG by
// librsvg's rsvg-convert); and bad input is refused with nothing written.
#include <doctest/doctest.h>

#include "tests/approx.h"
#include "tests/colour_chips.h"
#include "viewer/session/poster.h"

namespace {

using kith::test::run_kith;
using kith::test::run_shell;
using kith::test::Colour;
using kith::test::make_chip_session;
using kith::test::make_colour_chips;
using kith::test::visible_chips_in_png;

}  // namespace

TEST_CASE("poster: 300 pictures of one colour each are nearly all visible on the PNG, PDF and SVG posters") {
  const std::string dir = kith::test::temp_dir("poster-colours");
  const std::vector<Colour> colours = make_colour_chips(dir);
  const std::string session = make_chip_session(dir, colours);
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
    return visible_chips_in_png(dir + "/" + png, colours);
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
    on_sheets += visible_chips_in_png(name + ".png", colours);
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
