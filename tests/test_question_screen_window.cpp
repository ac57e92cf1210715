// The question screens in the real window under Xvfb, at 1024x640 and at 1280x800 with big type,
// on paper and on night: the state dump's record of the screen as drawn (viewer/panels/panel_asking.h)
// must show no two map labels overlapping, no label over the banner, the people panel or the
// band, those three apart, every text inside its card or panel and inside the window, every
// shortened text ending in an ellipsis, the caption column on the cards, and big type enlarging
// the heading and the body text. Screenshots are left beside the dumps for a look.
// Skipped with a message when xvfb-run is missing.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>
#include <string>

#include "solver/io/collection.h"
#include "solver/io/png_file.h"
#include "tests/approx.h"
#include "tests/window_support.h"
#include "viewer/scene/label_placement.h"
#include "viewer/scene/text_fit.h"

namespace {

using nlohmann::json;
constexpr float kSlack = 1.f;  // pixels: text boxes are measured in floats, drawn on whole pixels

json asking_of(const std::string& path) {
  std::ifstream in(path);
  REQUIRE_MESSAGE(in.good(), "no " << path);
  return json::parse(in)["asking"];
}
kith::ScreenRect rect_of(const json& r) { return {r[0], r[1], r[2], r[3]}; }
bool within(const kith::ScreenRect& a, const kith::ScreenRect& b) {
  return a.x0 >= b.x0 - kSlack && a.y0 >= b.y0 - kSlack && a.x1 <= b.x1 + kSlack && a.y1 <= b.y1 + kSlack;
}
bool ends_with_ellipsis(const std::string& s) {
  const std::string e = kith::kEllipsis;
  return s.size() >= e.size() && s.compare(s.size() - e.size(), e.size(), e) == 0;
}

// The checks every screen must pass; `width`, `height` the window's size.
void check_screen(const json& a, float width, float height, const std::string& what) {
  INFO(what);
  const json& s = a["screen"];
  const kith::ScreenRect window{0, 0, width, height};
  std::vector<kith::ScreenRect> regions;
  for (const json& r : s["regions"]) regions.push_back(rect_of(r["rect"]));
  REQUIRE(regions.size() == 3);  // banner, people, band
  for (size_t i = 0; i < regions.size(); ++i) {
    CHECK(within(regions[i], window));
    for (size_t j = i + 1; j < regions.size(); ++j) {
      INFO(s["regions"][i]["name"] << " and " << s["regions"][j]["name"]);
      CHECK_FALSE(regions[i].overlaps(regions[j]));
    }
  }
  const json& labels = s["labels"];
  CHECK(labels.size() >= 2);
  for (size_t i = 0; i < labels.size(); ++i) {
    const kith::ScreenRect r = rect_of(labels[i]["rect"]);
    INFO("label " << labels[i]["text"]);
    CHECK(labels[i]["clear"] == true);
    CHECK(within(r, window));
    for (const auto& g : regions) CHECK_FALSE(r.overlaps(g));
    for (size_t j = i + 1; j < labels.size(); ++j) CHECK_FALSE(r.overlaps(rect_of(labels[j]["rect"])));
  }
  size_t shortened = 0, cards = 0;
  for (const json& t : s["texts"]) {
    const std::string text = t["text"], full = t["full"];
    INFO(t["role"] << " '" << text << "'");
    CHECK_FALSE(text.empty());
    CHECK(within(rect_of(t["rect"]), rect_of(t["box"])));
    CHECK(within(rect_of(t["rect"]), window));
    if (text != full) {
      ++shortened;
      CHECK(ends_with_ellipsis(text));
    }
    cards += t["role"] == "title" || t["role"] == "caption" ? 1 : 0;
  }
  CHECK(cards >= 3);
  MESSAGE(what << ": " << s["texts"].size() << " texts, " << shortened << " shortened, " << labels.size()
               << " map labels");
}

// Names of the tea blends (the `name` column of assets/tea_blends.csv, read as kith reads it).
std::set<std::string> blend_names() {
  const kith::Collection c = kith::load_collection(std::string(KITH_SOURCE_DIR) + "/assets/tea_blends.csv");
  for (const kith::TagColumn& t : c.tags)
    if (t.name == "name") return std::set<std::string>(t.values.begin(), t.values.end());
  FAIL("no name column in assets/tea_blends.csv");
  return {};
}

// An invented collection with pictures: N solid-colour squares of a paint chart, each named.
std::string write_paint_chart(const std::string& dir, int n) {
  std::filesystem::create_directories(dir + "/chips");
  std::ostringstream csv;
  csv << "id,name,warmth,depth,picture\n";
  for (int i = 0; i < n; ++i) {
    const uint8_t r = uint8_t(40 + (i * 37) % 200), g = uint8_t(60 + (i * 53) % 180), b = uint8_t(30 + (i * 71) % 210);
    std::vector<uint8_t> pixels(size_t(48 * 48 * 3));
    for (size_t k = 0; k < pixels.size(); k += 3) pixels[k] = r, pixels[k + 1] = g, pixels[k + 2] = b;
    const std::string png = "chips/chip-" + std::to_string(i) + ".png";
    REQUIRE(kith::write_png_file(dir + "/" + png, pixels.data(), 48, 48, 3).empty());
    csv << "chip-" << i << ",Harbour evening chip number " << i << "," << r / 255.0 << "," << (g + b) / 510.0 << ","
        << png << "\n";
  }
  const std::string path = dir + "/paint.csv";
  std::ofstream(path) << csv.str();
  return path;
}

// Runs pair then grid questions on ITEMS (a copy of the tea blends when empty); dumps and shots
// named PREFIX-*.
void run_screens(const std::string& dir, const std::string& prefix, const std::string& args, bool big,
                 std::string items = "") {
  if (items.empty()) {
    items = dir + "/" + prefix + ".csv";
    std::filesystem::copy_file(std::string(KITH_SOURCE_DIR) + "/assets/tea_blends.csv", items,
                               std::filesystem::copy_options::overwrite_existing);
  }
  std::ostringstream script;
  const std::string p = dir + "/" + prefix;
  script << "3 wait-settle 60\n10 key A\n";
  if (big) script << "11 key B\n";
  script << "30 dump " << p << "-pair.json\n30 shot " << p << "-pair.png\n"
         << "31 key A\n50 key 2\n60 dump " << p << "-grid.json\n60 shot " << p << "-grid.png\n62 quit\n";
  REQUIRE_MESSAGE(kith::test::open_with_script(items + " --fresh --caption name --frames 120 " + args, dir, prefix,
                                               script.str()) == 0,
                  "kith open failed: see " << p << ".log");
}

}  // namespace

TEST_CASE("question screen window: labels apart, text inside its cards, at 1024x640 and at 1280x800 in big type") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("question-screen");
  run_screens(dir, "small", "--size 1024x640", false);
  run_screens(dir, "big", "--size 1280x800", true);
  run_screens(dir, "night", "--size 1024x640 --dark", true);
  const json small_pair = asking_of(dir + "/small-pair.json"), small_grid = asking_of(dir + "/small-grid.json");
  const json big_pair = asking_of(dir + "/big-pair.json"), big_grid = asking_of(dir + "/big-grid.json");
  const json night_pair = asking_of(dir + "/night-pair.json"), night_grid = asking_of(dir + "/night-grid.json");
  REQUIRE(small_pair["mode"] == "pair");
  REQUIRE(small_grid["mode"] == "grid");
  check_screen(small_pair, 1024, 640, "1024x640 pair");
  check_screen(small_grid, 1024, 640, "1024x640 grid");
  check_screen(big_pair, 1280, 800, "1280x800 big pair");
  check_screen(big_grid, 1280, 800, "1280x800 big grid");
  check_screen(night_pair, 1024, 640, "1024x640 night big pair");
  check_screen(night_grid, 1024, 640, "1024x640 night big grid");

  // Big type enlarges every text, the heading included.
  CHECK(big_pair["large_type"] == true);
  CHECK(float(big_pair["screen"]["heading_px"]) > float(small_pair["screen"]["heading_px"]) * 1.3f);
  CHECK(float(big_pair["screen"]["body_px"]) > float(small_pair["screen"]["body_px"]) * 1.3f);
  CHECK(small_pair["screen"]["ground"] == "paper");
  CHECK(night_pair["screen"]["ground"] == "night");

  // The cards show the caption column: every title line is (part of) a blend's name, none an id.
  CHECK(small_pair["caption"] == "name");
  const std::set<std::string> names = blend_names();
  for (const json& t : small_grid["screen"]["texts"]) {
    if (t["role"] != "title") continue;
    const std::string full = t["full"];
    bool part_of_a_name = false;
    for (const std::string& n : names) part_of_a_name |= n.find(full) != std::string::npos;
    INFO("title '" << full << "'");
    CHECK(part_of_a_name);
    CHECK(full.rfind("blend-", 0) == std::string::npos);
  }
  // The grid answer's pick shows on its card.
  bool picked = false;
  for (const json& t : small_grid["screen"]["texts"]) picked |= t["role"] == "picked";
  CHECK(picked);
}

TEST_CASE("question screen window: picture cards keep their key and caption inside the card in big type at 1024x640") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("question-pictures");
  run_screens(dir, "pictures", "--size 1024x640", true, write_paint_chart(dir, 40));
  const json pair = asking_of(dir + "/pictures-pair.json"), grid = asking_of(dir + "/pictures-grid.json");
  check_screen(pair, 1024, 640, "pictures 1024x640 big pair");
  check_screen(grid, 1024, 640, "pictures 1024x640 big grid");
  // A caption under each picture (9 cards on the grid), shortened where the card is narrow.
  size_t captions = 0, titles = 0, shortened = 0;
  for (const json& t : grid["screen"]["texts"]) {
    captions += t["role"] == "caption" ? 1 : 0;
    titles += t["role"] == "title" ? 1 : 0;
    shortened += t["role"] == "caption" && t["text"] != t["full"] ? 1 : 0;
  }
  CHECK(captions == 9);
  CHECK(titles == 0);
  CHECK(shortened > 0);  // "Harbour evening chip number 12" does not fit a grid card
}
