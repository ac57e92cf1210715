// The asking screens in the real window under Xvfb: a scripted round of three people answering
// pair questions (one can't tell, one undo) and a grid question, on a session file. What the
// screen showed before each key (state dumps) and the key pressed decide the judgments the
// session must then hold: exactly those, with the right people, kinds and retractions.
// Skipped with a message when xvfb-run is missing.
#include <doctest/doctest.h>
#include <stb_image.h>

#include <cstdlib>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <tuple>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/window_support.h"
#include "tests/sessions_support.h"

namespace {

using kith::test::kXvfb;
int run(const std::string& command) { return kith::test::run_command(command); }

nlohmann::json load_json(const std::string& path) {
  std::ifstream in(path);
  REQUIRE_MESSAGE(in.good(), "no " << path);
  return nlohmann::json::parse(in)["asking"];
}

// Share of pixels in rows [y0, y1) that differ from the colour at (x, y) given.
double share_unlike(const std::string& png, double from, double to) {
  int w = 0, h = 0, ch = 0;
  unsigned char* d = stbi_load(png.c_str(), &w, &h, &ch, 3);
  REQUIRE_MESSAGE(d != nullptr, "cannot read " << png);
  const int y0 = int(from * h), y1 = int(to * h);
  const unsigned char* ref = d + (size_t(y0 + 2) * w + 2) * 3;
  size_t unlike = 0, all = 0;
  for (int y = y0; y < y1; y += 2)
    for (int x = 0; x < w; x += 2, ++all) {
      const unsigned char* p = d + (size_t(y) * w + x) * 3;
      unlike += std::abs(p[0] - ref[0]) + std::abs(p[1] - ref[1]) + std::abs(p[2] - ref[2]) > 40;
    }
  stbi_image_free(d);
  return all ? double(unlike) / double(all) : 0.0;
}

using Triplet = std::tuple<std::string, std::string, std::string, std::string, std::string, bool>;  // a n f person kind retracted

}  // namespace

TEST_CASE("asking window: three people, can't tell, undo and a grid answer give exactly the expected judgments") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("asking-window");
  const std::string session = dir + "/round.kith";
  std::filesystem::remove(session);
  const kith::Collection c = kith::test::swatch_collection(120, 6, 11);
  kith::SessionStore::create(session, c);
  // Each dump shows the question on screen; the key on the next frame answers it.
  std::ofstream(dir + "/script.txt") << "3 wait-settle 60\n"
                                        "10 key A\n"
                                        "20 dump " << dir << "/d1.json\n"
                                        "20 shot " << dir << "/pair.png\n"
                                        "21 key LEFT\n"
                                        "30 dump " << dir << "/d2.json\n"
                                        "31 key DOWN\n"
                                        "40 dump " << dir << "/d3.json\n"
                                        "41 key RIGHT\n"
                                        "50 dump " << dir << "/d4.json\n"
                                        "51 key 1\n"
                                        "52 key BACKSPACE\n"
                                        "60 dump " << dir << "/d5.json\n"
                                        "61 key 2\n"
                                        "70 key A\n"
                                        "80 dump " << dir << "/d6.json\n"
                                        "80 shot " << dir << "/grid.png\n"
                                        "81 key 2\n"
                                        "82 key 5\n"
                                        "90 dump " << dir << "/d7.json\n"
                                        "92 quit\n";
  const std::string cmd = std::string(kXvfb) + KITH_BINARY + " open " + session +
                          " --people Ana,Ben,Caro --frames 200 --script " + dir + "/script.txt > " + dir +
                          "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");

  const auto d1 = load_json(dir + "/d1.json"), d2 = load_json(dir + "/d2.json"), d3 = load_json(dir + "/d3.json"),
             d4 = load_json(dir + "/d4.json"), d5 = load_json(dir + "/d5.json"), d6 = load_json(dir + "/d6.json"),
             d7 = load_json(dir + "/d7.json");
  CHECK(d1["mode"] == "pair");
  CHECK(d1["people"].size() == 3);
  // Turns rotate after each answer; undo gives the turn back to who answered.
  CHECK(d1["turn"] == "Ana");
  CHECK(d2["turn"] == "Ben");
  CHECK(d3["turn"] == "Caro");
  CHECK(d4["turn"] == "Ana");
  CHECK(d5["turn"] == "Ana");
  CHECK(d5["question"] == d4["question"]);  // undo put the same question back
  CHECK(d6["mode"] == "grid");
  CHECK(d6["turn"] == "Ben");
  REQUIRE(d6["question"]["candidates"].size() == 8);
  CHECK(d7["turn"] == "Caro");
  REQUIRE(d7["answers"].size() == 6);
  CHECK(d7["answers"][1]["cant_tell"] == true);
  CHECK(d7["answers"][3]["undone"] == true);

  // What the session must hold, from what was shown and the key pressed.
  auto pair = [](const nlohmann::json& d, bool left, const std::string& who, bool retracted) {
    const auto& q = d["question"];
    const std::string l = q["candidates"][0], r = q["candidates"][1];
    return Triplet{q["anchor"], left ? l : r, left ? r : l, who, "pair", retracted};
  };
  std::multiset<Triplet> want = {pair(d1, true, "Ana", false), pair(d3, false, "Caro", false),
                                 pair(d4, true, "Ana", true), pair(d5, false, "Ana", false)};
  const auto& g = d6["question"];
  for (int p : {1, 4})
    for (int u = 0; u < 8; ++u)
      if (u != 1 && u != 4) want.insert(Triplet{g["anchor"], g["candidates"][p], g["candidates"][u], "Ben", "grid", false});
  REQUIRE(want.size() == 16);

  auto store = kith::SessionStore::open(session);
  const std::vector<std::string> ids = store->item_ids();
  std::multiset<Triplet> got;
  for (const kith::Judgment& j : store->judgments())
    got.insert(Triplet{ids[size_t(j.anchor)], ids[size_t(j.nearer)], ids[size_t(j.farther)], j.person,
                       kith::to_string(j.kind), j.retracted});
  CHECK(got == want);

  // Both screens drew their band over the map: the bottom part is mostly not the ground.
  CHECK(share_unlike(dir + "/pair.png", 0.6, 0.95) > 0.05);
  CHECK(share_unlike(dir + "/grid.png", 0.6, 0.95) > 0.05);
}
