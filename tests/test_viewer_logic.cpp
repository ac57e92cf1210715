// The map window's logic without GL: camera, picking, selection, interaction, scene building,
// input scripts. Drives MapView over MockRenderer and a StillFeed.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <random>
#include <set>
#include <tuple>

#include "viewer/cli/synthetic_collection.h"
#include "viewer/scene/camera.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/map_interaction.h"
#include "viewer/scene/map_view.h"
#include "viewer/scene/picking.h"
#include "viewer/window/input_script.h"

namespace kith {
namespace {

constexpr float kPixelTol = 0.05f;  // pixels, float round trips through the projection
constexpr float kWorldTol = 1e-3f;  // relative to the map's size

// A camera on a W x H viewport turned to YAW.
Camera camera_at(int w, int h, float yaw) {
  Camera cam;
  cam.set_viewport(w, h);
  CameraPose p;
  p.yaw = yaw;
  cam.set_pose(p);
  return cam;
}

std::vector<glm::vec3> random_points(size_t n, uint64_t seed, float spread = 10.f) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<float> u(-spread, spread);
  std::vector<glm::vec3> p(n);
  for (auto& x : p) x = glm::vec3(u(rng), u(rng), u(rng));
  return p;
}

Points to_points(const std::vector<glm::vec3>& p) {
  Points y(Eigen::Index(p.size()), 3);
  for (size_t i = 0; i < p.size(); ++i) y.row(Eigen::Index(i)) << p[i].x, p[i].y, p[i].z;
  return y;
}

TEST_CASE("viewer camera: the target projects to the centre, the facing plane inverts the projection") {
  Camera cam;
  cam.set_viewport(800, 600);
  CameraPose pose;
  pose.target = glm::vec3(1, 2, 3);
  pose.yaw = 0.7f;
  pose.pitch = -0.4f;
  pose.distance = 15.f;
  cam.set_pose(pose);
  const Projected c = cam.project(pose.target);
  REQUIRE(c.visible);
  CHECK(c.screen.x == doctest::Approx(400).epsilon(1e-5));
  CHECK(c.screen.y == doctest::Approx(300).epsilon(1e-5));
  CHECK(c.depth == doctest::Approx(15.f).epsilon(1e-5));
  // Any point: project it, then cast back through its pixel onto the plane through it.
  for (const glm::vec3& p : random_points(50, 3, 4.f)) {
    const Projected pp = cam.project(p);
    REQUIRE(pp.visible);
    const glm::vec3 back = cam.on_facing_plane(pp.screen, p);
    CHECK(glm::length(back - p) < kWorldTol * 10.f);
  }
  // A point behind the eye is not visible.
  CHECK_FALSE(cam.project(cam.eye() - cam.forward() * 2.f).visible);
}

TEST_CASE("viewer camera: up on screen is +y, orbit keeps the target, zoom and pan move as expected") {
  Camera cam;
  cam.set_viewport(640, 480);
  cam.set_pose(CameraPose{});
  const glm::vec3 t = cam.pose().target;
  CHECK(cam.project(t + glm::vec3(0, 1, 0)).screen.y < cam.project(t).screen.y);
  cam.orbit(120, 40);
  CHECK(glm::length(cam.pose().target - t) < 1e-6f);
  const Projected mid = cam.project(t);
  CHECK(mid.screen.x == doctest::Approx(320).epsilon(1e-4));
  const float d = cam.goal().distance;
  cam.zoom(1.f);
  CHECK(cam.goal().distance == doctest::Approx(d * 0.88f));
  cam.update(10.f);  // long past the ease time: the pose has arrived
  CHECK(cam.pose().distance == doctest::Approx(d * 0.88f));
  // Pan by (dx, dy) pixels: the point that was under the centre moves by (dx, dy) on screen.
  cam.pan(30, -20);
  const Projected moved = cam.project(t);
  CHECK(moved.screen.x == doctest::Approx(320 + 30).epsilon(1e-3));
  CHECK(moved.screen.y == doctest::Approx(240 - 20).epsilon(1e-3));
}

TEST_CASE("viewer camera: fit puts every point on screen, transitions converge smoothly") {
  const auto pts = random_points(500, 11, 7.f);
  glm::vec3 lo(1e9f), hi(-1e9f);
  for (const auto& p : pts) lo = glm::min(lo, p), hi = glm::max(hi, p);
  for (float yaw : {0.f, 1.f, 2.5f}) {
    Camera cam = camera_at(1000, 500, yaw);
    cam.fit(lo, hi, true);
    float last_gap = 1e9f;
    for (int k = 0; k < 120; ++k) {  // two seconds at 60 fps
      cam.update(1.f / 60.f);
      const float gap = std::abs(std::log(cam.pose().distance / cam.goal().distance));
      CHECK(gap <= last_gap + 1e-6f);  // monotone approach, no overshoot
      last_gap = gap;
    }
    CHECK_FALSE(cam.moving());
    for (const auto& q : pts) {
      const Projected s = cam.project(q);
      REQUIRE(s.visible);
      CHECK(s.screen.x >= 0.f);
      CHECK(s.screen.x <= 1000.f);
      CHECK(s.screen.y >= 0.f);
      CHECK(s.screen.y <= 500.f);
    }
  }
}

TEST_CASE("viewer camera: --camera text round-trips and bad text is explained") {
  Camera cam;
  CameraPose p;
  p.yaw = 1.25f;
  p.pitch = 0.5f;
  p.distance = 33.f;
  p.target = glm::vec3(1, -2, 3);
  cam.set_pose(p);
  std::string error;
  auto q = Camera::parse(cam.str(), &error);
  REQUIRE(q);
  CHECK(q->yaw == doctest::Approx(1.25f));
  CHECK(q->distance == doctest::Approx(33.f));
  CHECK(q->target.y == doctest::Approx(-2.f));
  CHECK_FALSE(Camera::parse("1,2", &error));
  CHECK(error.find("3 or 6") != std::string::npos);
  CHECK_FALSE(Camera::parse("1,x,3", &error));
  CHECK(error.find("'x'") != std::string::npos);
  CHECK_FALSE(Camera::parse("1,0,-3", &error));
}

TEST_CASE("viewer picking: the nearest item on screen, checked against brute force") {
  const auto pts = random_points(2000, 5);
  Camera cam;
  cam.set_viewport(900, 700);
  cam.fit(glm::vec3(-10), glm::vec3(10), false);
  std::mt19937 rng(9);
  std::uniform_real_distribution<float> ux(0, 900), uy(0, 700);
  for (int trial = 0; trial < 200; ++trial) {
    const glm::vec2 px(ux(rng), uy(rng));
    const float radius = 8.f;
    const int got = pick_item(cam, pts, px, radius);
    // Slow obvious reference: project each point with Camera::project.
    int want = -1;
    float best = radius * radius;
    for (size_t i = 0; i < pts.size(); ++i) {
      const Projected p = cam.project(pts[i]);
      if (!p.visible) continue;
      const float d2 = glm::dot(p.screen - px, p.screen - px);
      if (d2 <= best) best = d2, want = int(i);
    }
    if (want < 0) {
      CHECK(got == -1);
    } else {
      REQUIRE(got >= 0);
      const Projected g = cam.project(pts[got]);
      // Same item, or one within a pixel of the same screen distance (then the nearer to the eye).
      CHECK(glm::distance(g.screen, px) <= std::sqrt(best) + 1.f);
    }
  }
}

TEST_CASE("viewer picking: box selection matches brute force, search by id and by tag") {
  const auto pts = random_points(1500, 8);
  Camera cam;
  cam.set_viewport(800, 800);
  cam.fit(glm::vec3(-10), glm::vec3(10), false);
  const glm::vec2 a(500, 120), b(180, 460);  // corners in any order
  const auto hits = pick_box(cam, pts, a, b);
  std::vector<int> want;
  for (size_t i = 0; i < pts.size(); ++i) {
    const Projected p = cam.project(pts[i]);
    if (p.visible && p.screen.x >= 180 && p.screen.x <= 500 && p.screen.y >= 120 && p.screen.y <= 460)
      want.push_back(int(i));
  }
  CHECK(hits == want);
  CHECK(!hits.empty());

  const Collection c = synthetic_collection(60, 3);
  CHECK(search_items(c, "s0001").size() == 10);  // s00010..s00019
  const auto oak = search_items(c, "material=OAK");
  CHECK(oak.size() == 20);
  for (int i : oak) CHECK(c.tags[0].values[i] == "oak");
  CHECK(items_with_tag(c, 0, "linen").size() == 20);
  CHECK(search_items(c, "no such thing").empty());
  CHECK(search_items(c, "").empty());
}

struct Rig {
  Collection collection = synthetic_collection(300, 4);
  MockRenderer renderer;
  StillFeed feed{collection.ids, rough_positions(collection)};
  MapView view{collection, renderer};
  MapInteraction interaction{view, feed};
  Rig() {
    view.camera().set_viewport(1000, 700);
    view.set_snapshot(feed.latest());
    view.frame(0.f, 1000, 700);
  }
  glm::vec2 screen_of(int item) const { return view.camera().project(view.positions()[item]).screen; }
};

TEST_CASE("viewer interaction: click selects, shift-click adds, click on empty space clears") {
  Rig r;
  const int a = r.view.item_at(r.screen_of(17)), b = r.view.item_at(r.screen_of(123));
  REQUIRE(a >= 0);
  REQUIRE(b >= 0);
  r.interaction.pointer_move(r.screen_of(a));
  r.interaction.button_down(0, false);
  r.interaction.button_up(0);
  CHECK(r.view.selection().items() == std::vector<int>{a});
  r.interaction.pointer_move(r.screen_of(b));
  r.interaction.button_down(0, true);
  r.interaction.button_up(0);
  CHECK(r.view.selection().size() == 2);
  CHECK(r.view.selection().contains(b));
  // The renderer got selection flags for exactly those two.
  r.view.frame(0.f, 1000, 700);
  int flagged = 0;
  for (const auto& v : r.renderer.points) flagged += (v.flags & kPointSelected) ? 1 : 0;
  CHECK(flagged == 2);
  CHECK(r.renderer.highlights.size() >= 2);
  r.interaction.pointer_move(glm::vec2(2, 2));  // a corner: nothing there after a fit
  REQUIRE(r.view.item_at(glm::vec2(2, 2)) < 0);
  r.interaction.button_down(0, false);
  r.interaction.button_up(0);
  CHECK(r.view.selection().empty());
}

TEST_CASE("viewer interaction: shift-drag on empty space selects by box, plain drag orbits") {
  Rig r;
  const float yaw = r.view.camera().pose().yaw;
  r.interaction.pointer_move(glm::vec2(1, 1));
  r.interaction.button_down(0, true);
  r.interaction.pointer_move(glm::vec2(999, 699));
  CHECK(r.interaction.state() == MapInteraction::State::kBoxing);
  r.interaction.button_up(0);
  CHECK(r.view.selection().size() == r.collection.size());  // the fit shows every item
  r.interaction.pointer_move(glm::vec2(3, 3));
  r.interaction.button_down(0, false);
  r.interaction.pointer_move(glm::vec2(60, 3));
  r.interaction.button_up(0);
  CHECK(r.view.camera().pose().yaw != doctest::Approx(yaw));
}

TEST_CASE("viewer interaction: ctrl-drag draws a lasso, which selects what it encloses, notches left out") {
  Rig r;
  // The lasso as an L: the box (100,100)-(900,600) without its top-right quarter (500,100)-(900,350).
  const std::vector<glm::vec2> corners = {{100, 100}, {500, 100}, {500, 350}, {900, 350}, {900, 600}, {100, 600}};
  r.interaction.pointer_move(corners[0]);
  r.interaction.button_down(0, false, true);
  for (size_t k = 1; k < corners.size(); ++k) {
    // Along each side in small steps, as a hand would draw it.
    for (int step = 1; step <= 20; ++step)
      r.interaction.pointer_move(corners[k - 1] + (corners[k] - corners[k - 1]) * (float(step) / 20.f));
  }
  CHECK(r.interaction.state() == MapInteraction::State::kLasso);
  r.interaction.button_up(0);
  std::vector<int> lassoed = r.view.selection().items();
  std::sort(lassoed.begin(), lassoed.end());
  // The same items as the whole box less the notch, by the box picker (a different rule).
  const auto box = pick_box(r.view.camera(), r.view.positions(), {100, 100}, {900, 600});
  const auto notch = pick_box(r.view.camera(), r.view.positions(), {500, 99}, {901, 350});
  std::vector<int> expected;
  for (int i : box)
    if (std::find(notch.begin(), notch.end(), i) == notch.end()) expected.push_back(i);
  std::sort(expected.begin(), expected.end());
  REQUIRE(!notch.empty());
  REQUIRE(expected.size() > 10);
  CAPTURE(lassoed.size());
  CAPTURE(expected.size());
  CAPTURE(box.size());
  CAPTURE(notch.size());
  CHECK(lassoed == expected);
  // Without shift the lasso replaces the selection: a corner after a fit holds nothing.
  r.interaction.pointer_move({1, 1});
  r.interaction.button_down(0, false, true);
  for (const glm::vec2 p : {glm::vec2(40, 1), glm::vec2(40, 40), glm::vec2(1, 40)}) r.interaction.pointer_move(p);
  r.interaction.button_up(0);
  CHECK(r.view.selection().empty());
}

TEST_CASE("viewer interaction: dragging posts drag targets in the facing plane, pin lands at the drop") {
  Rig r;
  const int item = r.view.item_at(r.screen_of(42));
  REQUIRE(item >= 0);
  const glm::vec3 start = r.view.positions()[item];
  const glm::vec2 from = r.screen_of(item);
  r.interaction.pointer_move(from);
  r.interaction.button_down(0, false);
  for (int step = 1; step <= 10; ++step) {
    r.interaction.pointer_move(from + glm::vec2(8.f * step, -5.f * step));
    r.interaction.per_frame();
  }
  CHECK(r.interaction.state() == MapInteraction::State::kDragging);
  r.interaction.button_up(0);
  REQUIRE(r.interaction.choosing());
  const glm::vec3 drop = r.interaction.choice_position();
  // The drop lies under the mouse, at the item's original depth.
  const Projected p = r.view.camera().project(drop);
  CHECK(glm::distance(p.screen, from + glm::vec2(80, -50)) < 0.05f);
  CHECK(glm::dot(drop - start, r.view.camera().forward()) == doctest::Approx(0.f).epsilon(1e-3).scale(1.f));
  r.interaction.choose_pin();
  const auto log = r.feed.command_log();
  int drags = 0, pins = 0, clears = 0;
  for (const auto& c : log) {
    drags += std::holds_alternative<cmd::DragTarget>(c.body) && std::get<cmd::DragTarget>(c.body).item == item;
    pins += std::holds_alternative<cmd::Pin>(c.body);
    clears += std::holds_alternative<cmd::ClearDrag>(c.body);
  }
  CHECK(drags == 10);
  CHECK(pins == 1);
  CHECK(clears == 1);
  auto snap = r.feed.latest();
  r.view.set_snapshot(snap);
  CHECK(r.view.pinned(item));
  CHECK(glm::distance(r.view.positions()[item], drop) < kWorldTol);
  // Unpin through the selection.
  r.interaction.unpin_selection();
  r.view.set_snapshot(r.feed.latest());
  CHECK_FALSE(r.view.pinned(item));
}

TEST_CASE("viewer interaction: release lets go, teach posts the hook's judgments") {
  Rig r;
  const int item = r.view.item_at(r.screen_of(7));
  REQUIRE(item >= 0);
  r.interaction.teach = [&](const Snapshot&, int it, const glm::vec3&, const glm::vec3&) {
    Judgment j;
    j.anchor = it;
    j.nearer = 1;
    j.farther = 2;
    return std::vector<Judgment>{j, j};
  };
  auto drag = [&] {
    const glm::vec2 from = r.screen_of(item);
    r.interaction.pointer_move(from);
    r.interaction.button_down(0, false);
    r.interaction.pointer_move(from + glm::vec2(30, 0));
    r.interaction.per_frame();
    r.interaction.button_up(0);
    REQUIRE(r.interaction.choosing());
  };
  drag();
  r.interaction.choose_release();
  CHECK_FALSE(r.interaction.choosing());
  CHECK(r.view.dragged() == -1);
  drag();
  r.interaction.choose_teach();
  int judgments = 0;
  for (const auto& c : r.feed.command_log())
    if (auto* a = std::get_if<cmd::AddJudgment>(&c.body)) {
      ++judgments;
      CHECK(a->judgment.kind == JudgmentKind::kDrag);
    }
  CHECK(judgments == 2);
  CHECK_FALSE(r.view.pinned(item));
}

TEST_CASE("viewer scene: legend counts tags, measures ramp, cards respect the limit") {
  Rig r;
  REQUIRE(r.view.legend().size() == 4);
  size_t total = 0;
  for (const auto& e : r.view.legend()) total += e.count;
  CHECK(total == r.collection.size());
  // Same tag, same colour; different tags, different colours.
  const auto a = r.view.colour_of(0), b = r.view.colour_of(4), c = r.view.colour_of(1);
  CHECK(a.r == b.r);
  CHECK((a.r != c.r || a.g != c.g || a.b != c.b));
  ViewOptions o = r.view.options();
  o.colour_by.kind = ColourKind::kJudgments;
  r.view.set_options(o);
  Judgment j;
  j.anchor = 3;
  j.nearer = 4;
  j.farther = 5;
  r.feed.post(cmd::AddJudgment{j});  // the view shows the judgments the snapshot carries
  r.feed.post(cmd::AddJudgment{j});
  r.view.set_snapshot(r.feed.latest());
  r.view.frame(0.f, 1000, 700);
  CHECK(r.view.colour_of(3).r == doctest::Approx(r.view.palette().ramp(1.f).r));
  CHECK(r.view.colour_of(9).r == doctest::Approx(r.view.palette().ramp(0.f).r));
  // Judgment lines appear only for the selection's judgments: 2 judgments x 2 segments x 2 ends.
  CHECK(r.renderer.lines.empty());
  r.view.selection().add(4);
  r.view.selection_changed();
  r.view.frame(0.f, 1000, 700);
  CHECK(r.renderer.lines.size() == 8);
  // No pictures in this collection: no atlas, every item a disc, whatever the selection.
  CHECK(r.view.atlas() == nullptr);
  CHECK(r.renderer.picture_slots == 0);
  for (const PointVertex& v : r.renderer.points) CHECK(v.slot == -1);
  CHECK_FALSE(r.renderer.last_frame.pictures);
  CHECK(o.IsValid().empty());
  o.picture_size = 1000;
  CHECK_FALSE(o.IsValid().empty());
}

TEST_CASE("viewer scene: nearest lists agree with brute force in both spaces") {
  Rig r;
  const int item = 5;
  const auto f = r.view.nearest_in_features(item, 6);
  const auto m = r.view.nearest_in_map(item, 6);
  REQUIRE(f.size() == 6);
  REQUIRE(m.size() == 6);
  double worst_listed = 0, best_unlisted = 1e300;
  const auto& F = r.collection.features;
  for (Eigen::Index i = 0; i < F.rows(); ++i) {
    if (i == item) continue;
    const double d = (F.row(i) - F.row(item)).squaredNorm();
    if (std::count(f.begin(), f.end(), int(i)))
      worst_listed = std::max(worst_listed, d);
    else
      best_unlisted = std::min(best_unlisted, d);
  }
  CHECK(worst_listed <= best_unlisted);
  CHECK(std::count(m.begin(), m.end(), item) == 0);
}

TEST_CASE("viewer input script: parses events and reports the line of a mistake") {
  const auto ev = parse_input_script(
      "# a comment\n5 move 10 20\n5 move @s00003\n6 move +5 -3\n7 press left\n"
      "8 key shift+R\n9 scroll -2\n10 shot a.png\n11 wait-settle 50\n12 quit\n",
      "t.txt");
  REQUIRE(ev.size() == 9);
  CHECK(ev[0].kind == InputEvent::kMove);
  CHECK(ev[1].kind == InputEvent::kMoveToItem);
  CHECK(ev[1].text == "s00003");
  CHECK(ev[2].kind == InputEvent::kMoveBy);
  CHECK(ev[2].pos.y == doctest::Approx(-3));
  CHECK(ev[4].mods != 0);
  CHECK(ev[5].amount == doctest::Approx(-2));
  CHECK_THROWS_WITH_AS(parse_input_script("1 move 1 1\n2 jump\n", "bad.txt"), doctest::Contains("bad.txt:2"),
                       std::runtime_error);
  CHECK_THROWS_WITH_AS(parse_input_script("x move 1 1\n", "bad.txt"), doctest::Contains("frame number"),
                       std::runtime_error);
  CHECK_THROWS_WITH_AS(parse_input_script("1 key NOPE\n", "bad.txt"), doctest::Contains("unknown key"),
                       std::runtime_error);
}

}  // namespace
}  // namespace kith

namespace kith {
namespace {
TEST_CASE("viewer camera: a centre offset frames the map in the free part and picking agrees with drawing") {
  std::mt19937_64 rng(5);
  std::normal_distribution<float> g(0.f, 2.f);
  std::vector<glm::vec3> pts(500);
  for (auto& p : pts) p = glm::vec3(g(rng) * 2.f, g(rng), g(rng));
  Camera cam;
  cam.set_viewport(1280, 800);
  cam.set_centre_offset(-0.25f);  // right-hand panels take the right eighth of the width and a margin
  cam.fit_points(pts, false, 0.05f);
  float right = 0.f, left = 1280.f;
  for (const auto& q : pts) {
    const Projected s = cam.project(q);
    REQUIRE(s.visible);
    right = std::max(right, s.screen.x);
    left = std::min(left, s.screen.x);
    // The facing-plane inverse (dragging, picking) goes through the same projection.
    const glm::vec3 back = cam.on_facing_plane(s.screen, q);
    CHECK(glm::length(back - q) < 1e-3f * (1.f + glm::length(q)));
  }
  CHECK(right <= 0.75f * 1280.f + 1.f);  // nothing under the panels
  CHECK(left >= 0.f);
  CHECK(right - left > 0.6f * 0.75f * 1280.f);  // and the free part is used
  // The target (the map's centre) is drawn at the centre of the free part.
  CHECK(cam.project(cam.goal().target).screen.x == doctest::Approx(0.375f * 1280.f).epsilon(1e-3));
}

TEST_CASE("viewer camera: a growing map stays framed until someone pans or zooms, F resumes following") {
  Rig r;
  auto grown = [&](float scale) {
    auto s = std::make_shared<Snapshot>(*r.feed.latest());
    s->positions *= double(scale);
    s->generation += 1;
    return s;
  };
  auto all_on_screen = [&] {
    for (const auto& p : r.view.positions()) {
      const Projected q = r.view.camera().project(p);
      if (!q.visible || q.screen.x < 0.f || q.screen.y < 0.f || q.screen.x > 1000.f || q.screen.y > 700.f) return false;
    }
    return true;
  };
  auto settle = [&] {
    for (int k = 0; k < 200; ++k) r.view.frame(0.05f, 1000, 700);
  };
  REQUIRE(all_on_screen());
  // t-SNE maps grow many times over from their start: five snapshots, each 1.6 times wider.
  float scale = 1.f;
  for (int k = 0; k < 5; ++k) {
    scale *= 1.6f;
    r.view.set_snapshot(grown(scale));
    settle();
    CHECK(all_on_screen());
  }
  // A person zooms in: from then on the camera stays where they put it.
  r.view.camera().zoom(4.f);
  settle();
  const CameraPose chosen = r.view.camera().goal();
  r.view.set_snapshot(grown(scale * 3.f));
  settle();
  CHECK(r.view.camera().goal().distance == doctest::Approx(chosen.distance));
  CHECK_FALSE(all_on_screen());
  // F (fit_all) frames it again and follows again.
  r.view.fit_all(true);
  settle();
  CHECK(all_on_screen());
  r.view.set_snapshot(grown(scale * 6.f));
  settle();
  CHECK(all_on_screen());
}

TEST_CASE("viewer camera: fit_points frames every point, and tightly (some point near the edge)") {
  std::mt19937_64 rng(21);
  std::normal_distribution<float> g(0.f, 3.f);
  std::vector<glm::vec3> pts(800);
  for (auto& p : pts) p = glm::vec3(g(rng) * 2.f, g(rng), g(rng) + 5.f);
  for (float yaw : {0.f, 0.9f, 2.2f}) {
    Camera cam = camera_at(1200, 700, yaw);
    cam.fit_points(pts, false, 0.05f);
    float edge = 0.f;  // the largest |offset from the centre| as a fraction of the half-size
    for (const auto& q : pts) {
      const Projected s = cam.project(q);
      REQUIRE(s.visible);
      edge = std::max({edge, std::abs(s.screen.x - 600.f) / 600.f, std::abs(s.screen.y - 350.f) / 350.f});
    }
    CHECK(edge <= 1.f);
    CHECK(edge >= 0.85f);  // tight: the farthest point is near the 5 % margin
  }
}
}  // namespace
}  // namespace kith

namespace kith {
namespace {
TEST_CASE("viewer scene: level of detail draws a sample while the view moves, everything at rest") {
  const Collection c = synthetic_collection(5000, 5);
  MockRenderer renderer;
  StillFeed feed(c.ids, rough_positions(c));
  MapView view(c, renderer);
  ViewOptions o;
  o.moving_budget = 1000;
  view.set_options(o);
  view.set_snapshot(feed.latest());
  view.frame(1.f / 60, 800, 600);
  view.camera().orbit(40, 0);
  view.frame(1.f / 60, 800, 600);
  CHECK(view.reduced_detail());
  CHECK(renderer.last_frame.point_budget == 1000);
  REQUIRE(renderer.points.size() == 5000);
  // The sample drawn (the buffer's first 1000) spreads over every group in about the right shares.
  std::map<uint32_t, int> per_colour;
  for (size_t k = 0; k < 1000; ++k) ++per_colour[renderer.points[k].rgba];
  CHECK(per_colour.size() == 5);
  for (const auto& [colour, count] : per_colour) CHECK(std::abs(count - 200) < 60);  // binomial sd ~13
  for (int k = 0; k < 30; ++k) view.frame(1.f / 60, 800, 600);                       // half a second at rest
  CHECK_FALSE(view.reduced_detail());
  CHECK(renderer.last_frame.point_budget == 0);
  // Every item is in the buffer exactly once.
  std::set<std::tuple<float, float, float>> seen;
  for (const auto& v : renderer.points) seen.insert({v.position.x, v.position.y, v.position.z});
  CHECK(seen.size() == 5000);
}
}  // namespace
}  // namespace kith

namespace kith {
namespace {
// A still map of `n` items in a MapView over the mock renderer; moving_frame turns the camera,
// draws one frame and reports how long it took.
struct MovingScene {
  explicit MovingScene(size_t n) : c(synthetic_collection(n, 3)), feed(c.ids, rough_positions(c)), view(c, renderer) {
    view.set_snapshot(feed.latest());
  }
  void moving_frame(float seconds) {
    view.camera().orbit(5, 0);
    view.frame(1.f / 60, 800, 600);
    view.note_frame_time(seconds);
  }
  const Collection c;
  MockRenderer renderer;
  StillFeed feed;
  MapView view;
};

TEST_CASE("viewer scene: the level-of-detail budget shrinks when frames are slow and grows back") {
  MovingScene scene(60000);
  MapView& view = scene.view;
  auto moving_frame = [&](float seconds) { scene.moving_frame(seconds); };
  moving_frame(0.02f);
  REQUIRE(view.reduced_detail());
  CHECK(view.detail_budget() == 40000);
  for (int k = 0; k < 40; ++k) moving_frame(0.2f);   // 5 fps: far too slow
  CHECK(view.detail_budget() == 5000);               // down to the floor
  for (int k = 0; k < 80; ++k) moving_frame(0.01f);  // 100 fps: room to spare
  CHECK(view.detail_budget() == 40000);              // back up to the cap, never beyond
  CHECK(scene.renderer.last_frame.point_budget == 40000);
}

TEST_CASE("viewer scene: below the cap, slow frames still thin the moving view, fast frames draw all") {
  MovingScene scene(12000);
  MapView& view = scene.view;
  auto moving_frame = [&](float seconds) { scene.moving_frame(seconds); };
  moving_frame(0.01f);
  CHECK_FALSE(view.reduced_detail());  // 12,000 fit the budget
  for (int k = 0; k < 40; ++k) moving_frame(0.2f);
  CHECK(view.detail_budget() == 5000);
  moving_frame(0.2f);
  CHECK(view.reduced_detail());
  for (int k = 0; k < 80; ++k) moving_frame(0.01f);
  CHECK(view.detail_budget() == 12000);
  CHECK_FALSE(view.reduced_detail());
}
}  // namespace
}  // namespace kith
