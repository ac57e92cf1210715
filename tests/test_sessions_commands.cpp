// The session subcommands as a user runs them: kith new, kith judge, kith export (exit codes,
// messages, files left alone).
#include <doctest/doctest.h>
#include <sys/wait.h>

#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <nlohmann/json.hpp>
#include <sstream>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"

namespace fs = std::filesystem;

namespace {

using Run = kith::test::KithRun;
Run kith_run(const std::string& arguments) { return kith::test::run_kith(arguments); }

}  // namespace

TEST_CASE("sessions: kith new makes a session and never overwrites one") {
  const std::string dir = kith::test::temp_dir("sessions-cmd-new");
  const std::string items = kith::test::write_swatches_csv(dir, 40);
  const std::string session = dir + "/box.kith";
  Run r = kith_run("new " + items + " -o " + session + " --perplexity 12 --dims 3");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  {
    auto store = kith::SessionStore::open(session);
    CHECK(store->item_count() == 40);
    CHECK(store->settings().perplexity == 12);
    CHECK(store->collection().tags.at(0).name == "weave");
    store->add_judgment(kith::Judgment{-1, 0, 3, 1});
  }
  const std::string before = kith::test::file_bytes(session);
  r = kith_run("new " + items + " -o " + session);
  CHECK(r.code == 2);
  CHECK(r.output.find("--force") != std::string::npos);
  CHECK(kith::test::file_bytes(session) == before);
  r = kith_run("new " + items + " -o " + session + " --force");
  CHECK(r.code == 0);
  CHECK(kith::SessionStore::open(session)->judgment_count() == 0);
  // A broken collection: message with file and line, exit 3, no session made.
  kith::test::write_bytes(dir + "/broken.csv", "id,warmth\na,1\nb,oops\nc,3\n");
  r = kith_run("new " + dir + "/broken.csv -o " + dir + "/broken.kith");
  CHECK(r.code == 3);
  CHECK(r.output.find("broken.csv:3") != std::string::npos);
  CHECK_FALSE(fs::exists(dir + "/broken.kith"));
  CHECK(kith_run("new " + items).code == 2);  // no -o
  CHECK(kith_run("new " + items + " -o " + dir + "/x.kith --dims 4").code == 2);
  CHECK(kith_run("new --help").code == 0);
}

TEST_CASE("sessions: kith judge adds judgments by id, all or none") {
  const std::string dir = kith::test::temp_dir("sessions-cmd-judge");
  const std::string session = dir + "/box.kith";
  REQUIRE(kith_run("new " + kith::test::write_swatches_csv(dir, 30) + " -o " + session).code == 0);
  Run r = kith_run("judge " + session + " --add sw1,sw4,sw2 --add sw5,sw8,sw9 --person 'guest 3'");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  CHECK(r.output.find("added judgment 2: sw5,sw8,sw9") != std::string::npos);
  // One unknown id: none of the --add judgments is added.
  r = kith_run("judge " + session + " --add sw1,sw4,sw2 --add sw1,sw4,lamp-9");
  CHECK(r.code == 3);
  CHECK(r.output.find("farther 'lamp-9' is not an item") != std::string::npos);
  CHECK(kith_run("judge " + session + " --add sw1,sw1,sw2").code == 3);
  CHECK(kith_run("judge " + session + " --add sw1,sw2").code == 2);
  CHECK(kith_run("judge " + session + " --retract 1").code == 0);
  CHECK(kith_run("judge " + session + " --retract 77").code == 3);
  {
    auto store = kith::SessionStore::open(session);
    const auto js = store->judgments();
    REQUIRE(js.size() == 2);
    CHECK(js[0].retracted);
    CHECK(js[1].person == "guest 3");
    CHECK(js[1].anchor == 5);
    CHECK(js[1].nearer == 8);
    CHECK(js[1].farther == 9);
    // While this process has it open, kith judge is refused and says so.
    r = kith_run("judge " + session + " --add sw1,sw4,sw2");
    CHECK(r.code == 3);
    CHECK(r.output.find("open in another kith process") != std::string::npos);
    CHECK(store->judgment_count() == 2);
  }
  // Not a session: refused, file unchanged.
  kith::test::write_bytes(dir + "/notes.kith", "shopping list");
  r = kith_run("judge " + dir + "/notes.kith --add sw1,sw4,sw2");
  CHECK(r.code == 3);
  CHECK(r.output.find("not a SQLite database") != std::string::npos);
  CHECK(kith::test::file_bytes(dir + "/notes.kith") == "shopping list");
}

TEST_CASE("sessions: kith export writes the layout as CSV and JSON") {
  const std::string dir = kith::test::temp_dir("sessions-cmd-export");
  const std::string session = dir + "/box.kith";
  const size_t n = 60;
  REQUIRE(kith_run("new " + kith::test::write_swatches_csv(dir, n) + " -o " + session).code == 0);
  Run r = kith_run("export " + session + " --layout " + dir + "/none.csv");
  CHECK(r.code == 3);
  CHECK(r.output.find("no map yet") != std::string::npos);
  kith::Points map(Eigen::Index(n), 3);
  for (size_t i = 0; i < n; ++i)  // three clear clumps by weave
    for (int d = 0; d < 3; ++d) map(Eigen::Index(i), d) = 40.0 * double(i % 3 == size_t(d)) + 0.01 * double(i) * (d + 1);
  // Item 0 (twill) placed among the satins: it should come out as the most suspect.
  map.row(0) = map.row(1);
  map(0, 0) += 0.001;
  kith::SessionStore::open(session)->write_checkpoint(map, 321);

  r = kith_run("export " + session + " --layout " + dir + "/layout.csv");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  std::istringstream csv(kith::test::file_bytes(dir + "/layout.csv"));
  std::string line;
  std::getline(csv, line);
  CHECK(line == "id,x,y,z,weave,group,suspect_score");
  size_t rows = 0;
  std::vector<double> suspect;
  while (std::getline(csv, line)) {
    std::vector<std::string> f;
    std::stringstream ls(line);
    std::string cell;
    while (std::getline(ls, cell, ',')) f.push_back(cell);
    if (f.size() == 6) f.push_back("");  // trailing empty field
    REQUIRE(f.size() == 7);
    CHECK(f[0] == "sw" + std::to_string(rows));
    for (int d = 0; d < 3; ++d) CHECK(std::stod(f[size_t(1 + d)]) == doctest::Approx(map(Eigen::Index(rows), d)).epsilon(1e-8));
    CHECK(std::stoi(f[5]) >= 1);  // every item is in one of the three clumps (0 = no group)
    suspect.push_back(std::stod(f[6]));
    ++rows;
  }
  CHECK(rows == n);
  REQUIRE(suspect.size() == n);
  CHECK(std::max_element(suspect.begin(), suspect.end()) - suspect.begin() == 0);

  r = kith_run("export " + session + " --layout " + dir + "/layout.json");
  REQUIRE(r.code == 0);
  const auto doc = nlohmann::json::parse(kith::test::file_bytes(dir + "/layout.json"));
  CHECK(doc["iteration"] == 321);
  REQUIRE(doc["items"].size() == n);
  CHECK(doc["items"][7]["id"] == "sw7");
  CHECK(doc["items"][7]["tags"]["weave"] == "satin");
  CHECK(doc["items"][7]["z"].get<double>() == doctest::Approx(map(7, 2)).epsilon(1e-8));
  CHECK(doc["items"][7]["group"].is_number_integer());

  // A picture of the same map: a PNG of the asked size (width and height are IHDR bytes 16..23).
  kith::SessionStore::open(session)->set_pin(4, {0, 0, 0});
  r = kith_run("export " + session + " --picture " + dir + "/map.png --size 320x200");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  const std::string png = kith::test::file_bytes(dir + "/map.png");
  REQUIRE(png.size() > 24);
  CHECK(png.substr(1, 3) == "PNG");
  auto be32 = [&](size_t at) {
    return (uint32_t(uint8_t(png[at])) << 24) | (uint32_t(uint8_t(png[at + 1])) << 16) |
           (uint32_t(uint8_t(png[at + 2])) << 8) | uint32_t(uint8_t(png[at + 3]));
  };
  CHECK(be32(16) == 320);
  CHECK(be32(20) == 200);
  CHECK(kith_run("export " + session + " --picture " + dir + "/m.png --size 3x3").code == 2);

  // Exports never overwrite a session, and the session is only read (it may be open elsewhere).
  auto open_elsewhere = kith::SessionStore::open(session);
  const std::string other = dir + "/other.kith";
  fs::copy_file(session, other);
  const std::string other_bytes = kith::test::file_bytes(other);
  r = kith_run("export " + session + " --layout " + other);
  CHECK(r.code == 2);  // a refused output is a usage error
  CHECK(r.output.find("will not overwrite") != std::string::npos);
  CHECK(kith::test::file_bytes(other) == other_bytes);
  CHECK(kith_run("export " + session + " --layout " + dir + "/again.csv").code == 0);
  CHECK(kith_run("export " + session).code == 2);
  CHECK(kith_run("export " + session + " --layout x.csv --people everyone").code == 2);
}
