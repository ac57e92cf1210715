// The real kith executable: the window under Xvfb (screenshot vs camera projection, scripted
// drag and pin reaching the engine) and the windowless `kith render` with DISPLAY unset.
// Skipped with a message when xvfb-run is missing.
#include <doctest/doctest.h>
#include <stb_image.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <iterator>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <string>

#include "tests/approx.h"
#include "tests/window_support.h"

namespace {

using kith::test::Image;
using kith::test::kXvfb;
using kith::test::load_png;
int run(const std::string& command) { return kith::test::run_command(command); }

nlohmann::json load_json(const std::string& path) {
  std::ifstream in(path);
  REQUIRE_MESSAGE(in.good(), "no " << path);
  return nlohmann::json::parse(in);
}

int colour_distance(const unsigned char* a, const unsigned char* b) {
  return std::abs(a[0] - b[0]) + std::abs(a[1] - b[1]) + std::abs(a[2] - b[2]);
}

void write(const std::string& path, const std::string& text) { std::ofstream(path) << text; }

TEST_CASE("viewer window: the screenshot shows items where the camera projection puts them") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("viewer-shot");
  write(dir + "/script.txt", "20 dump " + dir + "/state.json\n20 shot " + dir + "/shot.png\n22 quit\n");
  const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open --generate 400 --paused --no-panels --frames 60 --script " +
                          dir + "/script.txt > " + dir + "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
  const Image im = load_png(dir + "/shot.png");
  const auto state = load_json(dir + "/state.json");
  CHECK(im.w == state["width"].get<int>());
  CHECK(im.h == state["height"].get<int>());
  // The ground is the most common colour: the corner pixel after a fit.
  const unsigned char* ground = im.at(2, im.h - 3);
  size_t not_ground = 0;
  for (int y = 0; y < im.h; y += 2)
    for (int x = 0; x < im.w; x += 2) not_ground += colour_distance(im.at(x, y), ground) > 30;
  // Not blank: > 0.3 % of the picture (400 items early in the run sit in tight clumps, so the
  // whole map framed covers only about 1 %).
  CHECK(not_ground > size_t(im.w / 2) * (im.h / 2) * 3 / 1000);
  // Every item's projected centre is covered by a disc (its own or one in front of it).
  size_t inside = 0, covered = 0;
  std::vector<std::pair<float, float>> centres;
  for (const auto& item : state["items"]) {
    if (!item["visible"].get<bool>()) continue;
    const float x = item["x"].get<float>(), y = item["y"].get<float>();
    centres.push_back({x, y});
    if (x < 1 || y < 1 || x >= im.w - 1 || y >= im.h - 1) continue;
    ++inside;
    covered += colour_distance(im.at(int(x), int(y)), ground) > 30;
  }
  REQUIRE(inside > 300);
  CHECK(double(covered) / double(inside) > 0.97);
  // And places far from every item are ground (or the faint floor grid).
  std::mt19937 rng(4);
  size_t empty_spots = 0, empty_ground = 0;
  for (int k = 0; k < 4000; ++k) {
    const int x = int(rng() % unsigned(im.w)), y = int(rng() % unsigned(im.h));
    bool far = true;
    for (const auto& c : centres) far = far && std::hypot(c.first - x, c.second - y) > 25.f;
    if (!far) continue;
    ++empty_spots;
    empty_ground += colour_distance(im.at(x, y), ground) < 40;
  }
  REQUIRE(empty_spots > 100);
  CHECK(double(empty_ground) / double(empty_spots) > 0.95);
}

TEST_CASE("viewer window: a scripted drag and pin reaches the engine and the item stays at the drop") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("viewer-drag");
  write(dir + "/script.txt",
        "30 move @s00005\n30 press left\n"
        "32 move +6 +0\n34 move +12 -4\n36 move +20 -10\n38 move +20 -10\n40 move +20 -10\n"
        "42 release left\n"
        "44 key P\n"
        "46 wait-settle 5\n"
        "60 dump " + dir + "/state.json\n"
        "60 shot " + dir + "/shot.png\n"
        "61 quit\n");
  const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open --generate 300 --frames 200 --script " + dir +
                          "/script.txt > " + dir + "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
  const auto state = load_json(dir + "/state.json");
  REQUIRE_MESSAGE(state.contains("drop"), "no drop recorded: " << state.dump().substr(0, 400));
  const auto& drop = state["drop"];
  const std::string id = drop["item"];
  // The item dragged is the one the script pointed at, or one drawn over it (nearer the eye).
  int index = -1;
  for (size_t i = 0; i < state["items"].size(); ++i)
    if (state["items"][i]["id"] == id) index = int(i);
  REQUIRE(index >= 0);
  int drag_targets = 0, pins = 0, clears = 0;
  for (const auto& c : state["log"]) {
    if (c["item"].get<int>() != index) continue;
    drag_targets += c["kind"] == "drag-target";
    pins += c["kind"] == "pin";
    clears += c["kind"] == "clear-drag";
  }
  CHECK(drag_targets >= 3);  // the engine received the drag, frame by frame
  CHECK(pins == 1);
  CHECK(clears == 1);
  CHECK(drop["snapshot_applied"].get<bool>());
  bool pinned = false;
  for (const auto& p : state["pinned"]) pinned = pinned || p == id;
  CHECK(pinned);
  // The next snapshot has the pinned item at the drop position.
  const auto& want = drop["position"];
  const auto& got = drop["snapshot_position"];
  const auto& lo = state["bounds"][0];
  const auto& hi = state["bounds"][1];
  const double size = std::hypot(hi[0].get<double>() - lo[0].get<double>(), hi[1].get<double>() - lo[1].get<double>(),
                                 hi[2].get<double>() - lo[2].get<double>());
  constexpr double kPinTolerance = 1e-3;  // of the map's size: a hard pin holds exactly (float round trip)
  double d2 = 0;
  for (int k = 0; k < 3; ++k) d2 += std::pow(want[k].get<double>() - got[k].get<double>(), 2);
  CHECK(std::sqrt(d2) <= kPinTolerance * size);
  // The drop was away from where the item started (the drag moved it).
  CHECK(drop["drag_targets"].get<int>() >= 3);
}

TEST_CASE("viewer render: kith render with DISPLAY unset writes a PNG of the asked size with items") {
  const std::string dir = kith::test::temp_dir("viewer-render");
  const std::string png = dir + "/map.png";
  const std::string cmd = std::string("env -u DISPLAY -u WAYLAND_DISPLAY ") + KITH_BINARY +
                          " render --generate 500 --iterations 100 --size 320x240 -o " + png + " > " + dir +
                          "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith render failed: see " << dir << "/log.txt");
  const Image im = load_png(png);
  CHECK(im.w == 320);
  CHECK(im.h == 240);
  const unsigned char* ground = im.at(im.w - 2, im.h - 2);
  size_t coloured = 0;
  for (int y = 0; y < im.h; ++y)
    for (int x = 0; x < im.w; ++x) {
      const unsigned char* p = im.at(x, y);
      // Saturated pixels: item discs in the categorical palette (the ground and text are grey-ish).
      const int mx = std::max({p[0], p[1], p[2]}), mn = std::min({p[0], p[1], p[2]});
      coloured += (mx - mn > 60) && colour_distance(p, ground) > 60;
    }
  CHECK(coloured > size_t(im.w) * im.h / 200);
  // Bad input: a clear message and the usage exit code.
  CHECK(run(std::string("env -u DISPLAY ") + KITH_BINARY + " render --generate 50 --size 10 -o " + dir +
            "/x.png > /dev/null 2>&1") == 2);
  CHECK(run(std::string(KITH_BINARY) + " render " + dir + "/missing.csv -o " + dir + "/x.png > /dev/null 2>&1") == 3);
}

}  // namespace

#include "solver/session/session_store.h"
#include "viewer/cli/synthetic_collection.h"
#include "tests/sessions_support.h"

namespace {

TEST_CASE("viewer window: a session opens with its pins, and a pin made in the window is written to it") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("viewer-session");
  const std::string path = dir + "/s.kith";
  {
    const kith::Collection c = kith::synthetic_collection(200, 4);
    auto store = kith::SessionStore::create(path, c);
    store->set_pin(3, {1.0, 2.0, 3.0});  // a pin from an earlier sitting
  }
  write(dir + "/script.txt",
        "30 move @s00010\n30 press left\n32 move +10 +0\n34 move +30 -10\n36 move +30 -10\n38 release left\n"
        "40 key P\n42 wait-settle 3\n50 dump " + dir + "/state.json\n51 quit\n");
  const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open " + path + " --frames 200 --script " + dir +
                          "/script.txt > " + dir + "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
  const auto state = load_json(dir + "/state.json");
  bool old_pin = false;
  for (const auto& p : state["pinned"]) old_pin = old_pin || p == "s00003";
  CHECK(old_pin);  // the stored pin reached the map
  REQUIRE(state.contains("drop"));
  const std::string moved = state["drop"]["item"];
  int moved_index = -1;
  for (size_t i = 0; i < state["items"].size(); ++i)
    if (state["items"][i]["id"] == moved) moved_index = int(i);
  auto store = kith::SessionStore::open(path);
  bool found = false;
  for (const auto& p : store->pins()) {
    if (p.item != moved_index) continue;
    found = true;
    REQUIRE(p.position.size() == 3);
    for (int k = 0; k < 3; ++k) CHECK(p.position[k] == doctest::Approx(state["drop"]["position"][k].get<double>()));
  }
  CHECK_MESSAGE(found, "the pin of " << moved << " was not written to the session");
  CHECK(store->checkpoint_count() >= 1);  // the map was saved when the window closed
}


TEST_CASE("viewer window: a pin on a plain collection starts a session beside it, read-only writes nothing") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("viewer-plain-session");
  std::filesystem::copy_file(std::string(KITH_SOURCE_DIR) + "/assets/tea_blends.csv", dir + "/teas.csv");
  const std::string csv_before = kith::test::file_bytes(dir + "/teas.csv");
  write(dir + "/script.txt",
        "30 move @blend-010\n30 press left\n32 move +10 +0\n34 move +30 -10\n36 move +30 -10\n38 release left\n"
        "40 key P\n42 wait-settle 3\n50 quit\n");
  const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open " + dir + "/teas.csv --frames 200 --script " + dir +
                          "/script.txt > " + dir + "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
  REQUIRE(std::filesystem::exists(dir + "/teas.kith"));
  CHECK(kith::test::file_bytes(dir + "/teas.csv") == csv_before);  // the collection is only read
  size_t pins = 0;
  {
    auto store = kith::SessionStore::open(dir + "/teas.kith");
    pins = store->pins().size();
    CHECK(pins == 1);
    CHECK(store->item_count() == 300);
  }
  const std::string first = kith::test::file_bytes(dir + "/teas.kith");

  // A second sitting with --fresh starts teas-2.kith and does not touch teas.kith (without it the
  // session is continued: tests/test_one_path.cpp).
  const std::string fresh = std::string(kXvfb) + KITH_BINARY + " open " + dir +
                            "/teas.csv --fresh --frames 200 --script " + dir + "/script.txt > " + dir +
                            "/log-fresh.txt 2>&1";
  REQUIRE(run(fresh) == 0);
  CHECK(std::filesystem::exists(dir + "/teas-2.kith"));
  CHECK(kith::test::file_bytes(dir + "/teas.kith") == first);

  // Read-only: the same pin is refused, and the file stays byte for byte as it was.
  const std::string ro = std::string(kXvfb) + KITH_BINARY + " open " + dir + "/teas.kith --read-only --frames 200 --script " +
                         dir + "/script.txt > " + dir + "/log-ro.txt 2>&1";
  REQUIRE_MESSAGE(run(ro) == 0, "kith open --read-only failed: see " << dir << "/log-ro.txt");
  CHECK(kith::test::file_bytes(dir + "/teas.kith") == first);
  std::ifstream log(dir + "/log-ro.txt");
  const std::string text((std::istreambuf_iterator<char>(log)), std::istreambuf_iterator<char>());
  CHECK(text.find("read-only") != std::string::npos);
}

}  // namespace

TEST_CASE("viewer window: docked panels overlap neither each other nor the map area, and framing an item centres it there") {
  KITH_SKIP_WITHOUT_XVFB();
  for (const auto& [w, h] : {std::pair{1280, 800}, std::pair{1024, 640}}) {
    CAPTURE(w);
    const std::string dir = kith::test::temp_dir("viewer-docks-" + std::to_string(w));
    // All six panels shown (S: Structure, L: Judgments with Agreement), then one item chosen
    // by a click and framed with Z.
    write(dir + "/script.txt", "5 key S\n6 key L\n40 dump " + dir + "/all.json\n50 move @s00017\n50 press left\n51 release left\n"
                               "53 key Z\n90 dump " + dir + "/framed.json\n91 quit\n");
    const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open --generate 300 --paused --size " +
                            std::to_string(w) + "x" + std::to_string(h) + " --frames 120 --script " + dir +
                            "/script.txt > " + dir + "/log.txt 2>&1";
    REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
    for (const char* name : {"all.json", "framed.json"}) {
      CAPTURE(name);
      const auto state = load_json(dir + "/" + name);
      CHECK(state["width"].get<int>() == w);
      const auto area = state["map_area"].get<std::vector<float>>();
      REQUIRE(area.size() == 4);
      auto meet = [](const std::vector<float>& a, const std::vector<float>& b) {
        return a[0] < b[2] && b[0] < a[2] && a[1] < b[3] && b[1] < a[3];
      };
      std::vector<std::vector<float>> shown;
      for (const auto& p : state["panels"]) {
        CAPTURE(p["name"].get<std::string>());
        if (p["name"] == "More") continue;  // only with a hook's panel (the demo's Simulated people)
        CHECK_FALSE(p["squeezed"].get<bool>());  // all six fit, at both sizes
        REQUIRE(p["shown"].get<bool>());
        const auto r = p["rect"].get<std::vector<float>>();
        CHECK(r[0] >= 0.f);
        CHECK(r[2] <= float(w));
        CHECK(r[3] <= float(h));
        CHECK_FALSE(meet(r, area));
        for (const auto& o : shown) CHECK_FALSE(meet(r, o));
        shown.push_back(r);
      }
      CHECK(shown.size() == 6);
      CHECK_FALSE(meet(state["strip"].get<std::vector<float>>(), area));
      CHECK(area[2] - area[0] >= 380.f);  // the map keeps the middle
    }
    // The clicked item is framed at the free area's centre, not the window's (the menu bar and
    // the engine strip make them differ by about 16 px in height).
    const auto state = load_json(dir + "/framed.json");
    REQUIRE(state["selection"].size() == 1);
    const std::string chosen = state["selection"][0].get<std::string>();
    const auto area = state["map_area"].get<std::vector<float>>();
    const float cx = (area[0] + area[2]) * 0.5f, cy = (area[1] + area[3]) * 0.5f;
    REQUIRE(std::abs(cy - h * 0.5f) > 10.f);
    bool found = false;
    for (const auto& item : state["items"]) {
      if (item["id"] != chosen) continue;
      found = true;
      const float x = item["x"].get<float>(), y = item["y"].get<float>();
      CHECK(x > area[0]);
      CHECK(x < area[2]);
      CHECK(y > area[1]);
      CHECK(y < area[3]);
      CHECK(std::abs(x - cx) < 4.f);
      CHECK(std::abs(y - cy) < 4.f);
    }
    CHECK(found);
  }
}

TEST_CASE("viewer window: a panel's hide control takes it out of its column and the next one moves up") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("viewer-hide");
  // Colours is the left column's first panel: its heading's "hide" sits at its top right corner
  // (x 287..314, y 35..52 at 1280x800).
  write(dir + "/script.txt", "10 dump " + dir + "/before.json\n20 move 300 43\n21 press left\n22 release left\n40 dump " +
                                 dir + "/after.json\n41 quit\n");
  const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open --generate 300 --paused --frames 60 --script " + dir +
                          "/script.txt > " + dir + "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
  auto panel = [](const nlohmann::json& state, const std::string& name) {
    for (const auto& p : state["panels"])
      if (p["name"] == name) return p;
    FAIL("no panel " << name);
    return nlohmann::json();
  };
  const auto before = load_json(dir + "/before.json"), after = load_json(dir + "/after.json");
  REQUIRE(panel(before, "Colours")["shown"].get<bool>());
  CHECK_FALSE(panel(after, "Colours")["shown"].get<bool>());
  // Selected items now starts where Colours did.
  CHECK(panel(after, "Selected items")["rect"][1].get<float>() ==
        doctest::Approx(panel(before, "Colours")["rect"][1].get<float>()));
  // The map area keeps its place (the column is still there for Selected items).
  CHECK(after["map_area"] == before["map_area"]);
}
