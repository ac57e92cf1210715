// The docks (viewer/scene/dock_layout.h): panels along the window's edges never overlap each other
// or the free map area, at any window size down to 1024x640 and past it; hidden panels take no
// room; a column's height is shared by water filling; and the camera's free area
// (Camera::set_free_area) puts a framed map and a framed item inside that area.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <glm/glm.hpp>
#include <numeric>
#include <random>
#include <stdexcept>

#include "viewer/scene/camera.h"
#include "viewer/scene/dock_layout.h"

namespace kith {
namespace {

// The window's own set: three panels on the left, four on the right, two of them lists.
std::vector<DockPanel> window_panels() {
  return {{"Colours", DockSide::kLeft, true, 200.f}, {"Selected items", DockSide::kLeft, true, 320.f},
          {"Structure", DockSide::kLeft, true, 0.f}, {"Map", DockSide::kRight, true, 260.f},
          {"People", DockSide::kRight, true, 180.f}, {"Judgments", DockSide::kRight, true, 0.f},
          {"Agreement", DockSide::kRight, true, 0.f}};
}

DockOptions window_options() {
  DockOptions o;
  o.top = 22.f;
  o.bottom_strip = 54.f;
  o.left_width = 320.f;
  o.right_width = 320.f;
  return o;
}

// Every shown panel lies inside the window and inside its column, meets no other panel and not
// the map area; the strip meets nothing either.
void check_apart(const DockLayout& d, const std::vector<DockPanel>& panels) {
  for (size_t a = 0; a < d.panels.size(); ++a) {
    const DockRect& r = d.panels[a];
    if (r.empty()) continue;
    CAPTURE(panels[a].name);
    CHECK(r.inside(d.window));
    CHECK(r.inside(panels[a].side == DockSide::kLeft ? d.left : d.right));
    CHECK_FALSE(r.overlaps(d.map_area));
    CHECK_FALSE(r.overlaps(d.strip));
    for (size_t b = 0; b < a; ++b) CHECK_FALSE(r.overlaps(d.panels[b]));
  }
  CHECK_FALSE(d.map_area.overlaps(d.strip));
  CHECK(d.map_area.inside(d.window));
}

}  // namespace

TEST_CASE("dock layout: at 1280x800 and 1024x640 no panel overlaps another, the strip or the map area") {
  const auto panels = window_panels();
  for (const auto [w, h] : {std::pair{1280.f, 800.f}, std::pair{1024.f, 640.f}}) {
    CAPTURE(w);
    const DockLayout d = layout_docks(w, h, panels, window_options());
    check_apart(d, panels);
    for (size_t k = 0; k < panels.size(); ++k) {
      CAPTURE(panels[k].name);
      CHECK_FALSE(d.panels[k].empty());  // all seven fit
      CHECK_FALSE(d.squeezed[k]);
    }
    // The map keeps the middle: at least the least map width, between the columns, under the
    // menu, over the strip.
    CHECK(d.map_area.width() >= window_options().min_map_width);
    CHECK(d.map_area.x0 >= d.left.x1);
    CHECK(d.map_area.x1 <= d.right.x0);
    CHECK(d.map_area.y0 == doctest::Approx(22.f));
    CHECK(d.map_area.y1 == doctest::Approx(h - 54.f));
    CHECK(d.strip.y0 == doctest::Approx(h - 54.f));
  }
}

TEST_CASE("dock layout: narrower windows shrink the columns before the map, down to their least width") {
  const auto panels = window_panels();
  const DockOptions o = window_options();
  // Room for both at full width plus the map: the asked widths.
  DockLayout d = layout_docks(1280.f, 800.f, panels, o);
  CHECK(d.left.width() == doctest::Approx(320.f));
  CHECK(d.right.width() == doctest::Approx(320.f));
  // 1000 wide: 1000 - 4 gaps - 380 = 596 for both columns, shared in proportion.
  d = layout_docks(1000.f, 640.f, panels, o);
  CHECK(d.left.width() == doctest::Approx(298.f));
  CHECK(d.map_area.width() >= o.min_map_width - 1.f);
  check_apart(d, panels);
  // Far too narrow: the columns stop at their least width and the map takes what is left,
  // still never under a panel.
  d = layout_docks(600.f, 500.f, panels, o);
  CHECK(d.left.width() == doctest::Approx(o.min_column_width));
  CHECK(d.right.width() == doctest::Approx(o.min_column_width));
  check_apart(d, panels);
  // Random sizes, random panels hidden and random wishes: never an overlap.
  std::mt19937 rng(11);
  std::uniform_real_distribution<float> size(300.f, 2600.f), want(-50.f, 700.f);
  for (int trial = 0; trial < 500; ++trial) {
    auto p = window_panels();
    for (auto& x : p) x.shown = rng() % 4 != 0, x.wanted_height = want(rng);
    const DockLayout r = layout_docks(size(rng), size(rng) * 0.6f, p, o);
    check_apart(r, p);
    for (size_t k = 0; k < p.size(); ++k) {
      if (!p[k].shown) CHECK(r.panels[k].empty());
      if (p[k].shown && !r.squeezed[k]) CHECK(r.panels[k].height() >= o.min_panel_height - 1.f);
    }
  }
}

TEST_CASE("dock layout: a hidden panel takes no room, and a column with none shown takes no width") {
  auto panels = window_panels();
  const DockOptions o = window_options();
  const DockLayout all = layout_docks(1280.f, 800.f, panels, o);
  panels[0].shown = false;  // Colours hidden: Selected items moves up to the top
  DockLayout d = layout_docks(1280.f, 800.f, panels, o);
  CHECK(d.panels[0].empty());
  CHECK(d.panels[1].y0 == doctest::Approx(all.panels[0].y0));
  // The whole left column hidden: the map reaches the window's left edge.
  panels[1].shown = panels[2].shown = false;
  d = layout_docks(1280.f, 800.f, panels, o);
  CHECK(d.left.empty());
  CHECK(d.map_area.x0 == doctest::Approx(0.f));
  CHECK(d.map_area.width() > all.map_area.width() + 300.f);
  check_apart(d, panels);
}

TEST_CASE(
    "dock layout: a column shares its height by water filling, lists take the rest, a panel that cannot fit is left "
    "out") {
  // 600 px, gaps of 6: small wishes are met, a large one gets the even share of what is left.
  std::vector<float> h = share_column(600.f, {100.f, 150.f, 900.f}, 64.f, 6.f, 180.f);
  CHECK(h[0] == doctest::Approx(100.f));
  CHECK(h[1] == doctest::Approx(150.f));
  CHECK(h[2] == doctest::Approx(600.f - 12.f - 250.f));
  // A stretching panel (a list) takes what the sized ones leave ...
  h = share_column(600.f, {100.f, 0.f}, 64.f, 6.f, 180.f);
  CHECK(h[0] == doctest::Approx(100.f));
  CHECK(h[1] == doctest::Approx(494.f));
  // ... and keeps its 180 even when a sized panel asks for everything.
  h = share_column(600.f, {1000.f, 0.f}, 64.f, 6.f, 180.f);
  CHECK(h[1] == doctest::Approx(180.f));
  CHECK(h[0] == doctest::Approx(600.f - 6.f - 180.f));
  // Room for two at their least: the third is left out, never drawn over the others.
  h = share_column(140.f, {100.f, 100.f, 100.f}, 64.f, 6.f, 180.f);
  CHECK(h[0] == doctest::Approx(67.f));
  CHECK(h[2] == 0.f);
  const float used = std::accumulate(h.begin(), h.end(), 0.f);
  CHECK(used + 6.f <= 140.f + 1.f);
  CHECK_THROWS_AS(layout_docks(800.f, 600.f, window_panels(),
                               [] {
                                 DockOptions o;
                                 o.gap = -1.f;
                                 return o;
                               }()),
                  std::invalid_argument);
}

TEST_CASE("dock layout: the camera frames the free area: the whole map and a chosen item land inside it, centred") {
  std::mt19937_64 rng(5);
  std::normal_distribution<float> g(0.f, 2.f);
  std::vector<glm::vec3> pts(400);
  for (auto& p : pts) p = glm::vec3(g(rng) * 2.f, g(rng), g(rng));
  // Only a left column: the free area is off centre sideways and vertically (menu, strip).
  std::vector<DockPanel> panels = {{"Colours", DockSide::kLeft, true, 200.f},
                                   {"Structure", DockSide::kLeft, true, 0.f}};
  DockOptions o = window_options();
  o.left_width = 420.f;
  for (const auto [w, h] : {std::pair{1280, 800}, std::pair{1024, 640}}) {
    CAPTURE(w);
    const DockLayout d = layout_docks(float(w), float(h), panels, o);
    Camera cam;
    cam.set_viewport(w, h);
    cam.set_free_area(d.map_area.x0, d.map_area.y0, d.map_area.x1, d.map_area.y1);
    cam.fit_points(pts, false, 0.05f);
    for (const auto& q : pts) {
      const Projected s = cam.project(q);
      REQUIRE(s.visible);
      CHECK(d.map_area.contains(s.screen.x, s.screen.y));
      // Picking and dragging invert the same off-centre projection.
      CHECK(glm::length(cam.on_facing_plane(s.screen, q) - q) < 1e-3f * (1.f + glm::length(q)));
    }
    const Projected t = cam.project(cam.goal().target);
    CHECK(t.screen.x == doctest::Approx((d.map_area.x0 + d.map_area.x1) * 0.5f).epsilon(1e-3));
    CHECK(t.screen.y == doctest::Approx((d.map_area.y0 + d.map_area.y1) * 0.5f).epsilon(1e-3));
    // Framing one item far out on the left (where the panels would have hidden it on a centred
    // camera) puts it at the free area's centre.
    const glm::vec3 far_left = *std::min_element(pts.begin(), pts.end(), [](auto& a, auto& b) { return a.x < b.x; });
    cam.fit_points({far_left - glm::vec3(0.3f), far_left + glm::vec3(0.3f)}, false, 0.05f);
    const Projected f = cam.project(far_left);
    CHECK(d.map_area.contains(f.screen.x, f.screen.y));
    CHECK(std::abs(f.screen.x - (d.map_area.x0 + d.map_area.x1) * 0.5f) < 2.f);
  }
  // An empty area means the whole viewport.
  Camera cam;
  cam.set_viewport(800, 600);
  cam.set_free_area(10.f, 10.f, 10.f, 10.f);
  CHECK(cam.free_share().x == doctest::Approx(1.f));
  CHECK(cam.free_centre_ndc().x == doctest::Approx(0.f));
}

}  // namespace kith
