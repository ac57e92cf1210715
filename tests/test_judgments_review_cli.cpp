// Judgments from outside and in the window, as a user meets them: `kith judge --import` with a bad
// file (each bad row reported with line and cause, nothing imported, the session file unchanged
// byte for byte, then --skip-bad-rows), and the window's Judgments panel under Xvfb (a session's
// judgments listed; a scripted retract written to the session file).
#include <doctest/doctest.h>
#include <sys/wait.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"
#include "viewer/cli/synthetic_collection.h"

namespace {

using Run = kith::test::KithRun;
Run kith_run(const std::string& arguments) { return kith::test::run_kith(arguments); }

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

}  // namespace

TEST_CASE("judgments import: kith judge --import reports every bad row and leaves the session unchanged") {
  const std::string dir = kith::test::temp_dir("judgments-import-cli");
  const std::string session = dir + "/box.kith";
  {
    std::ostringstream items;
    items << "id,warmth,gloss,weight\n";
    for (int i = 0; i < 20; ++i) items << "sw" << i << "," << i % 4 << "," << (i * 7) % 5 << "," << 0.1 * i << "\n";
    kith::test::write_bytes(dir + "/swatches.csv", items.str());
  }
  Run r = kith_run("new " + dir + "/swatches.csv -o " + session);
  REQUIRE_MESSAGE(r.code == 0, r.output);
  REQUIRE(kith_run("judge " + session + " --add sw1,sw2,sw3 --person Ada").code == 0);
  const std::string bad = dir + "/more.csv";
  kith::test::write_bytes(bad,
                          "anchor,nearer,farther,person,time,kind\n"
                          "sw4,sw5,sw6,Bram,2026-12-01T10:00:00Z,pair\n"  // line 2: good
                          "sw4,lamp-9,sw6,Bram,,pair\n"                   // line 3: unknown id
                          "sw7,sw8,sw7,Bram,,pair\n"                      // line 4: an item twice
                          "sw9,sw10\n"                                    // line 5: too few fields
                          "sw11,sw12,sw13,Bram,yesterday,pair\n"          // line 6: not a time
                          "sw14,sw15,sw16,Cleo,,grid\n");                 // line 7: good
  const std::string before = kith::test::file_bytes(session);
  const auto listing = kith::test::folder_listing(dir);
  r = kith_run("judge " + session + " --import " + bad);
  CAPTURE(r.output);
  CHECK(r.code == 3);
  CHECK(contains(r.output, "more.csv:3"));
  CHECK(contains(r.output, "lamp-9"));
  CHECK(contains(r.output, "more.csv:4"));
  CHECK(contains(r.output, "more.csv:5"));
  CHECK(contains(r.output, "more.csv:6"));
  CHECK_FALSE(contains(r.output, "more.csv:2:"));
  CHECK_FALSE(contains(r.output, "more.csv:7:"));
  CHECK(contains(r.output, "4 bad rows"));
  CHECK(contains(r.output, "none imported"));
  CHECK(kith::test::file_bytes(session) == before);   // byte for byte
  CHECK(kith::test::folder_listing(dir) == listing);  // no -wal or -journal left beside it
  CHECK(kith::SessionStore::open(session)->judgment_count() == 1);

  r = kith_run("judge " + session + " --import " + bad + " --skip-bad-rows");
  CHECK(r.code == 0);
  CHECK(contains(r.output, "imported 2 judgments"));
  CHECK(contains(r.output, "skipped 4 bad rows"));
  auto store = kith::SessionStore::open(session);
  const auto js = store->judgments();
  REQUIRE(js.size() == 3);
  CHECK(js[1].person == "Bram");
  CHECK(js[1].anchor == 4);
  CHECK(js[1].kind == kith::JudgmentKind::kPair);
  CHECK(js[2].person == "Cleo");
  CHECK(js[2].kind == kith::JudgmentKind::kGrid);
}

namespace {
int run(const std::string& command) { return kith::test::run_command(command); }
}  // namespace

TEST_CASE("judgments window: a session's judgments are listed and a scripted retract is written to it") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("judgments-window");
  const std::string path = dir + "/s.kith";
  {
    const kith::Collection c = kith::synthetic_collection(200, 4);
    auto store = kith::SessionStore::create(path, c);
    std::vector<kith::Judgment> js;
    for (int k = 0; k < 40; ++k) {
      kith::Judgment j;
      j.anchor = k, j.nearer = k + 50, j.farther = k + 100;
      j.person = k % 3 == 0 ? "Ada" : k % 3 == 1 ? "Bram" : "Cleo";
      j.time = 1796119200.0 + k;
      j.kind = kith::JudgmentKind::kPair;
      js.push_back(j);
    }
    store->add_judgments(js);
  }
  // Open the list (L), choose the second judgment (ctrl + down twice) and retract it (Delete).
  // Frame numbers only order the events; the dump waits for the engine to take the command.
  std::ofstream(dir + "/script.txt") << "10 key L\n12 key ctrl+DOWN\n14 key ctrl+DOWN\n16 key DELETE\n"
                                        "18 wait-settle 3\n30 dump "
                                     << dir << "/state.json\n30 shot " << dir << "/shot.png\n31 quit\n";
  const std::string cmd = std::string(kith::test::kXvfb) + std::string(KITH_BINARY) + " open " + path +
                          " --frames 200 --script " + dir + "/script.txt > " + dir + "/log.txt 2>&1";
  REQUIRE_MESSAGE(run(cmd) == 0, "kith open failed: see " << dir << "/log.txt");
  std::ifstream in(dir + "/state.json");
  REQUIRE(in.good());
  const auto state = nlohmann::json::parse(in);
  const auto& panel = state["judgments_panel"];
  CHECK(panel["open"] == true);
  CHECK(panel["judgments"] == 40);
  CHECK(panel["rows"] == 40);
  CHECK(panel["chosen"] == 2);
  CHECK(panel["problem"] == "");
  // Its three items are selected (shown in the map).
  CHECK(state["selection"].size() == 3);
  auto store = kith::SessionStore::open(path);
  const auto js = store->judgments();
  REQUIRE(js.size() == 40);
  for (const auto& j : js) {
    CAPTURE(j.id);
    CHECK(j.retracted == (j.id == 2));
  }
}
