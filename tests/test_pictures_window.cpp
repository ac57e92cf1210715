// Every item as its picture, counted on screen: a collection of 300 pictures, each one solid
// colour of its own (tests/colour_chips.h), its map the colours themselves, drawn in the window
// under Xvfb, by `kith render` (windowless EGL) and by `kith export --picture`; nearly every
// picture is seen, counted by the colours in the image. And with --no-pictures none is.
// Skipped with a message when xvfb-run is missing (the windowless two run anyway).
#include <doctest/doctest.h>

#include <fstream>
#include <nlohmann/json.hpp>

#include "tests/approx.h"
#include "tests/colour_chips.h"
#include "tests/window_support.h"
#include "viewer/scene/picture_atlas.h"

namespace {

using kith::test::Colour;
using kith::test::run_kith;
using kith::test::visible_chips_in_png;

// Visible of 300 at 1280x800, measured 2026-12-04 (Mesa llvmpipe): kith render with kCamera
// 288; the whole map framed from the three-quarter view (kith export --picture, the window) 273.
// The bars are 90 % of 300 (the "nearly every picture") with kCamera, and 260 (about 4 %
// under the measure) for the framed view.
constexpr size_t kMinVisible = 270;
constexpr size_t kMinVisibleFramed = 260;
// Yaw 0.3, pitch -0.3 (a low view from the front), distance 18: the colour cube fills the height.
const char* const kCamera = "0.3,-0.3,18";
// Discs are drawn in the tag's colour, faded toward the ground and darker at the rim: a few of
// those shades may fall within a chip's tolerance, never a picture's worth of chips.
constexpr size_t kMostByChance = 10;

struct Chips {
  std::string dir, session;
  std::vector<Colour> colours;
  explicit Chips(const std::string& name) : dir(kith::test::temp_dir(name)) {
    colours = kith::test::make_colour_chips(dir);
    session = kith::test::make_chip_session(dir, colours);
  }
};

}  // namespace

TEST_CASE("pictures: kith render draws nearly every one of 300 pictures, none with --no-pictures") {
  Chips chips("pictures-render");
  auto r = run_kith("render " + chips.session + " -o " + chips.dir + "/map.png --no-legend --camera " + kCamera);
  INFO(r.output);
  REQUIRE(r.code == 0);
  const size_t seen = visible_chips_in_png(chips.dir + "/map.png", chips.colours);
  MESSAGE("kith render: " << seen << " of 300 pictures visible");
  CHECK(seen >= kMinVisible);
  r = run_kith("render " + chips.session + " -o " + chips.dir + "/discs.png --no-legend --no-pictures --camera " +
               kCamera);
  REQUIRE(r.code == 0);
  CHECK(visible_chips_in_png(chips.dir + "/discs.png", chips.colours) <= kMostByChance);
  // Selected pictures are framed in ink: two selected add at least two frames' worth of ink pixels
  // (a frame is 3 px wide around a picture of at least 10 px).
  r = run_kith("render " + chips.session + " -o " + chips.dir +
               "/selected.png --no-legend --select chip-3,chip-40 --camera " + kCamera);
  REQUIRE(r.code == 0);
  const Colour ink = kith::test::chip_from_rgb(kith::Palette::paper().ink);
  auto ink_pixels = [&](const std::string& png) {
    const kith::test::Image im = kith::test::load_png(png);
    size_t n = 0;
    for (int y = 0; y < im.h; ++y)
      for (int x = 0; x < im.w; ++x) {
        const unsigned char* p = im.at(x, y);
        n += kith::test::chip_distance({p[0], p[1], p[2]}, ink) <= kith::test::kChipTolerance;
      }
    return n;
  };
  const size_t plain_ink = ink_pixels(chips.dir + "/map.png"), framed_ink = ink_pixels(chips.dir + "/selected.png");
  MESSAGE("ink pixels: " << plain_ink << " without a selection, " << framed_ink << " with two selected");
  CHECK(framed_ink >= plain_ink + 2 * 4 * 3 * 10);
  // The old flag is gone, with a clear refusal.
  r = run_kith("render " + chips.session + " -o " + chips.dir + "/old.png --no-cards");
  CHECK(r.code != 0);
  CHECK(r.output.find("--no-cards") != std::string::npos);
}

TEST_CASE("pictures: kith export --picture draws nearly every one of 300 pictures") {
  Chips chips("pictures-export");
  // export draws the whole map from its three-quarter view (it has no camera option).
  const auto r = run_kith("export " + chips.session + " --picture " + chips.dir + "/export.png");
  INFO(r.output);
  REQUIRE(r.code == 0);
  const size_t seen = visible_chips_in_png(chips.dir + "/export.png", chips.colours);
  MESSAGE("kith export --picture: " << seen << " of 300 pictures visible");
  CHECK(seen >= kMinVisibleFramed);
  REQUIRE(run_kith("export " + chips.session + " --picture " + chips.dir + "/discs.png --no-pictures").code == 0);
  CHECK(visible_chips_in_png(chips.dir + "/discs.png", chips.colours) <= kMostByChance);
}

TEST_CASE("pictures: the window under Xvfb draws nearly every one of 300 pictures, and discs after I") {
  KITH_SKIP_WITHOUT_XVFB();
  Chips chips("pictures-window");
  const std::string& d = chips.dir;
  const std::string script = "30 dump " + d + "/state.json\n30 shot " + d + "/window.png\n31 key I\n34 shot " + d +
                             "/discs.png\n34 dump " + d + "/discs.json\n36 quit\n";
  REQUIRE_MESSAGE(kith::test::open_with_script(chips.session + " --read-only --paused --no-panels --frames 40", d,
                                               "run", script) == 0,
                  "kith open failed: see " << d << "/run.log");
  std::ifstream in(d + "/state.json");
  const auto state = nlohmann::json::parse(in);
  CHECK(state["pictures"]["shown"].get<bool>());
  CHECK(state["pictures"]["ready"].get<int>() == 300);
  const size_t seen = visible_chips_in_png(d + "/window.png", chips.colours);
  MESSAGE("window: " << seen << " of 300 pictures visible");
  CHECK(seen >= kMinVisibleFramed);
  std::ifstream in2(d + "/discs.json");
  CHECK_FALSE(nlohmann::json::parse(in2)["pictures"]["shown"].get<bool>());
  CHECK(visible_chips_in_png(d + "/discs.png", chips.colours) <= kMostByChance);
}
