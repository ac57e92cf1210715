// The picture atlas without GL (viewer/scene/picture_atlas.h): a slot's pixels (fit, guard, mip
// levels), slot assignment and its capacity, the loader thread feeding the renderer a budget a
// frame, the level-of-detail threshold, and the map view handing slots to its points, all over
// the MockRenderer.
#include <doctest/doctest.h>

#include <chrono>
#include <thread>

#include "tests/approx.h"
#include "tests/colour_chips.h"
#include "viewer/cli/synthetic_collection.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/map_view.h"
#include "viewer/scene/picture_atlas.h"

namespace kith {
namespace {

const uint8_t* texel(const SlotPixels& s, int level, int x, int y) {
  const int side = kSlotTexels >> level;
  return s.rgba.data() + SlotPixels::level_offset(level) + (size_t(y) * side + x) * 4;
}

TEST_CASE("picture atlas: a slot holds the picture fitted inside its guard, the edge repeated, four mip levels") {
  // 3 x 2: the left two columns red, the right one blue.
  Picture p;
  p.width = 3;
  p.height = 2;
  for (int y = 0; y < 2; ++y)
    for (int x = 0; x < 3; ++x) {
      const bool red = x < 2;
      p.rgba.insert(p.rgba.end(), {uint8_t(red ? 250 : 0), 0, uint8_t(red ? 0 : 240), 255});
    }
  float aspect = 0.f;
  const SlotPixels s = make_slot_pixels(p, &aspect);
  CHECK(aspect == doctest::Approx(1.5));
  REQUIRE(s.rgba.size() == size_t(64 * 64 + 32 * 32 + 16 * 16 + 8 * 8) * 4);
  CHECK(SlotPixels::level_offset(1) == 64 * 64 * 4);
  // Level 0: the picture spans 56 texels (64 less 4 each side) across, 37 down, centred: a
  // picture column is 18.7 texels, so texels 4..40 are red and 41..59 blue.
  CHECK(texel(s, 0, 10, 32)[0] == 250);
  CHECK(texel(s, 0, 40, 32)[0] == 250);
  CHECK(texel(s, 0, 41, 32)[2] == 240);
  CHECK(texel(s, 0, 0, 0)[0] == 250);  // the guard and margins repeat the nearest edge
  CHECK(texel(s, 0, 63, 63)[2] == 240);
  for (int level = 0; level < kSlotLevels; ++level) {
    const int side = kSlotTexels >> level;
    CHECK(texel(s, level, 0, side / 2)[0] == 250);
    CHECK(texel(s, level, side - 1, side / 2)[2] == 240);
    CHECK(texel(s, level, side / 2, 0)[3] == 255);
  }
  // A mip texel is the mean of the 2 x 2 above it: level 1's texel 20 over the seam (40 | 41).
  const uint8_t* seam = texel(s, 1, 20, 16);
  CHECK(seam[0] == (2 * 250 + 2) / 4);
  CHECK(seam[2] == (2 * 240 + 2) / 4);
  CHECK(picture_extent_x(2.f) == 1.f);
  CHECK(picture_extent_y(2.f) == doctest::Approx(0.5));
  CHECK(picture_extent_x(0.25f) == doctest::Approx(0.25));
}

TEST_CASE("picture atlas: one slot per item with a picture, in item order, up to the capacity") {
  std::vector<std::string> paths = {"a.png", "", "c.png", "d.png", ""};
  PictureAtlas atlas(paths, 2);
  CHECK(atlas.slots() == 2);
  CHECK(atlas.slot_of(0) == 0);
  CHECK(atlas.slot_of(1) == -1);
  CHECK(atlas.slot_of(2) == 1);
  CHECK(atlas.slot_of(3) == -1);  // past the capacity: a disc
  CHECK(atlas.item_in(1) == 2);
  CHECK(atlas.item_in(2) == -1);
  CHECK_FALSE(atlas.ready(0));
  // The most the renderer holds: 12,288 (768 layers of 16 on Mesa's 2,048-layer limit).
  std::vector<std::string> many(13000, "x.png");
  PictureAtlas big(many);
  CHECK(big.slots() == kMaxPictureSlots);
  CHECK(kMaxPictureSlots / kSlotsPerLayer <= 2048);
  CHECK(big.slot_of(kMaxPictureSlots - 1) == kMaxPictureSlots - 1);
  CHECK(big.slot_of(kMaxPictureSlots) == -1);
  CHECK(PictureAtlas(many, 100000).slots() == kMaxPictureSlots);
}

TEST_CASE("picture atlas: the loader decodes off the render thread, a budget of slots reaches the renderer per pump") {
  const std::string dir = test::temp_dir("atlas-loader");
  const auto colours = test::make_colour_chips(dir, 40);
  std::vector<std::string> paths;
  for (size_t i = 0; i < colours.size(); ++i)
    paths.push_back(i % 10 == 3 ? "" : dir + "/chip-" + std::to_string(i) + ".png");
  paths[5] = dir + "/not-there.png";  // unreadable: stays a disc
  PictureAtlas atlas(paths);
  REQUIRE(atlas.slots() == 36);
  MockRenderer r;
  // Wait for the loader, then pump a few at a time: never more than the budget per call.
  int ready = 0, pumps = 0;
  const auto start = std::chrono::steady_clock::now();
  while (atlas.loading() && std::chrono::steady_clock::now() - start < std::chrono::seconds(30)) {
    const int now = atlas.pump(r, 4);
    CHECK(now <= 4);
    ready += now;
    ++pumps;
    std::this_thread::sleep_for(std::chrono::milliseconds(1));
  }
  CHECK(r.picture_slots == 36);
  CHECK(ready == 35);
  CHECK(atlas.ready_count() == 35);
  CHECK(atlas.failed_count() == 1);
  CHECK_FALSE(atlas.ready(5));
  CHECK(atlas.ready(0));
  CHECK(atlas.aspect(0) == doctest::Approx(48.0 / 48.0));  // chip 0: 48 x 48
  CHECK(atlas.aspect(1) == doctest::Approx(1.0));
  CHECK(atlas.aspect(10) == doctest::Approx(48.0 / 32.0));  // chip 10: 48 wide, 32 high
  CHECK(r.slots_set.size() == 35);
  CHECK(pumps >= 9);
  // Destroyed mid-load: the loader stops and joins.
  {
    PictureAtlas again(paths);
    again.pump(r, 1);
  }
}

TEST_CASE("picture atlas: level of detail is a disc below 8 px, rising toward 64 px while moving and slow") {
  DetailThreshold d;
  CHECK(d.pixels() == DetailThreshold::kMinPixels);
  CHECK_FALSE(d.shows_picture(7.9f));
  CHECK(d.shows_picture(8.f));
  for (int k = 0; k < 60; ++k) d.note(0.1f, true, 1.f / 30);  // 10 fps while turning
  CHECK(d.pixels() == DetailThreshold::kMovingPixels);
  CHECK_FALSE(d.shows_picture(40.f));
  for (int k = 0; k < 60; ++k) d.note(0.01f, true, 1.f / 30);  // fast again: back down
  CHECK(d.pixels() == DetailThreshold::kMinPixels);
  for (int k = 0; k < 60; ++k) d.note(0.1f, true, 1.f / 30);
  d.note(0.1f, false, 1.f / 30);  // at rest: every picture large enough to read
  CHECK(d.pixels() == DetailThreshold::kMinPixels);
}

TEST_CASE("picture atlas: the map view gives each item with a picture its slot and draws them in one buffer") {
  const std::string dir = test::temp_dir("atlas-view");
  const auto colours = test::make_colour_chips(dir, 30);
  Collection c = synthetic_collection(30, 3);
  for (size_t i = 0; i < c.size(); ++i) c.pictures.push_back(i == 7 ? "" : dir + "/chip-" + std::to_string(i) + ".png");
  MockRenderer r;
  StillFeed feed(c.ids, rough_positions(c));
  MapView view(c, r);
  view.set_snapshot(feed.latest());
  view.finish_pictures();
  view.frame(0.f, 800, 600);
  REQUIRE(view.atlas() != nullptr);
  CHECK(view.atlas()->ready_count() == 29);
  REQUIRE(r.points.size() == 30);
  size_t with_slot = 0;
  for (const PointVertex& v : r.points) {
    with_slot += v.slot >= 0;
    CHECK(v.slot < 29);
  }
  CHECK(with_slot == 29);
  CHECK(r.last_frame.pictures);
  CHECK(r.last_frame.picture_size == view.picture_size());
  CHECK(r.last_frame.picture_min_pixels == DetailThreshold::kMinPixels);
  // Pointing at a picture's corner finds it; where two overlap, the one nearer the eye.
  const auto& cam = view.camera();
  for (int item : {0, 12, 29}) {
    const Projected p = cam.project(view.positions()[size_t(item)]);
    const float side = view.picture_size() * std::clamp(cam.pose().distance / p.depth, 0.35f, 3.f);
    const int got =
        view.item_at(p.screen + glm::vec2(0.45f * side * picture_extent_x(view.atlas()->aspect(item)), 0.f));
    REQUIRE(got >= 0);
    CHECK(cam.project(view.positions()[size_t(got)]).depth <= p.depth + 1e-4f);
    if (got != item) MESSAGE("item " << item << ": a nearer picture covers that point");
  }
  // Off (I, --no-pictures): discs; the slots stay loaded for when they come back.
  ViewOptions o = view.options();
  o.pictures = false;
  view.set_options(o);
  view.frame(0.f, 800, 600);
  CHECK_FALSE(r.last_frame.pictures);
  CHECK(view.atlas() == nullptr);
  // A view that starts without pictures never decodes one.
  MockRenderer r2;
  MapView plain(c, r2);
  plain.set_options(o);
  plain.set_snapshot(feed.latest());
  plain.frame(0.f, 800, 600);
  CHECK(r2.picture_slots == 0);
  CHECK(r2.slots_set.empty());
}

}  // namespace
}  // namespace kith
