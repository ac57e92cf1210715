// The flat 2-D layout (solver/fit/flat_map.h) and `kith export --flat`, plus the --judgments paths of
// kith new / kith judge --import / kith export: what goes in comes back out.
#include <doctest/doctest.h>
#include <sys/wait.h>

#include <cstdio>
#include <map>
#include <random>
#include <sstream>

#include "solver/io/collection.h"
#include "solver/fit/fit.h"
#include "solver/fit/flat_map.h"
#include "solver/measures/health.h"
#include "solver/measures/judgment_health.h"
#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "viewer/scene/map_feed.h"
#include "viewer/session/session_link.h"
#include "viewer/window/session_menu.h"

namespace {

// Four clumps of 40 in 12-D features; the 3-D map is a t-SNE fit of them.
kith::Collection clumps(std::vector<int>* label) {
  std::mt19937 rng(5);
  std::normal_distribution<double> noise(0.0, 1.0);
  kith::Collection c;
  c.source = "clumps.csv";
  const int n = 160, f = 12;
  c.features.resize(n, f);
  for (int i = 0; i < n; ++i) {
    c.ids.push_back("tile-" + std::to_string(i));
    label->push_back(i % 4);
    for (int d = 0; d < f; ++d) c.features(i, d) = (d % 4 == i % 4 ? 9.0 : 0.0) + noise(rng);
  }
  return c;
}

// Share of items whose 5 nearest map neighbours mostly share their clump.
double clump_purity(const kith::Points& y, const std::vector<int>& label) {
  const Eigen::Index n = y.rows();
  int good = 0;
  for (Eigen::Index i = 0; i < n; ++i) {
    std::vector<std::pair<double, int>> d;
    for (Eigen::Index j = 0; j < n; ++j)
      if (j != i) d.push_back({(y.row(i) - y.row(j)).squaredNorm(), label[size_t(j)]});
    std::partial_sort(d.begin(), d.begin() + 5, d.end());
    int same = 0;
    for (int k = 0; k < 5; ++k) same += d[size_t(k)].second == label[size_t(i)];
    good += same >= 3;
  }
  return double(good) / double(n);
}

using Run = kith::test::KithRun;
Run kith_run(const std::string& arguments) { return kith::test::run_kith(arguments); }

}  // namespace

TEST_CASE("sessions: the flat layout keeps the 3-D map's neighbourhoods, its judgments and its pins") {
  std::vector<int> label;
  const kith::Collection c = clumps(&label);
  kith::FitOptions fo;
  fo.perplexity = 15;
  fo.iterations = 600;
  fo.seed = 3;
  const kith::Points map3 = kith::fit_map(c.features, fo).map;

  // Judgments the 3-D map satisfies (nearer = a clump mate, farther = another clump).
  std::vector<kith::Judgment> judgments;
  std::mt19937 rng(9);
  std::uniform_int_distribution<int> item(0, 159);
  while (judgments.size() < 60) {
    kith::Judgment j;
    j.anchor = item(rng);
    j.nearer = item(rng);
    j.farther = item(rng);
    if (j.anchor == j.nearer || label[size_t(j.anchor)] != label[size_t(j.nearer)] ||
        label[size_t(j.anchor)] == label[size_t(j.farther)])
      continue;
    j.id = int64_t(judgments.size() + 1);
    judgments.push_back(j);
  }
  const std::vector<int32_t> pinned = {3, 77};
  kith::FlatMapOptions o;
  o.perplexity = 15;
  o.iterations = 300;
  const kith::Points flat = kith::flatten_map(c, map3, judgments, pinned, o);
  REQUIRE(flat.rows() == 160);
  REQUIRE(flat.cols() == 2);
  CHECK(flat.allFinite());

  // Named tolerances, chosen as common practice for a 160-item, 4-clump check (not from a source).
  const double kMinTrust = 0.90;    // trustworthiness (k = 10) of the flat map against the 3-D map
  const double kMinPurity = 0.95;   // clumps stay clumps
  const double kMinAgreement = 0.95;
  CHECK(kith::trustworthiness(map3, flat, 10) >= kMinTrust);
  CHECK(clump_purity(flat, label) >= kMinPurity);
  CHECK(kith::judgment_agreement(flat, judgments) >= kMinAgreement);

  // Pins hold: the pinned items end where the start (the map's own principal plane) put them.
  kith::FlatMapOptions zero = o;
  zero.iterations = 0;
  const kith::Points start = kith::flatten_map(c, map3, judgments, pinned, zero);
  for (int32_t p : pinned) CHECK((flat.row(p) - start.row(p)).norm() == 0.0);
  // ...while the others moved (the objective did run), and the run kept neighbourhoods better than
  // the plain projection it started from.
  CHECK((flat.row(4) - start.row(4)).norm() > 0.0);
  CHECK(kith::trustworthiness(map3, flat, 10) > kith::trustworthiness(map3, start, 10));

  CHECK_THROWS(kith::flatten_map(c, map3.topRows(10), judgments, pinned, o));
}

TEST_CASE("sessions: judgments go in with kith new and kith judge --import and come back out of kith export") {
  const std::string dir = kith::test::temp_dir("sessions-judgments-paths");
  {
    std::ostringstream items;
    items << "id,line,a,b,c\n";
    for (int i = 0; i < 40; ++i) items << "yarn-" << i << "," << (i % 2 ? "moss" : "flint") << "," << i % 5 << ","
                                       << (i * 3) % 7 << "," << 0.5 * i << "\n";
    kith::test::write_bytes(dir + "/yarns.csv", items.str());
  }
  kith::test::write_bytes(dir + "/first.csv",
                          "anchor,nearer,farther,person,time,kind\n"
                          "yarn-1,yarn-3,yarn-2,Ines,2026-11-30T10:00:00Z,pair\n"
                          "yarn-4,yarn-6,yarn-5,Tomasz,2026-11-30T10:00:05Z,grid\n");
  const std::string session = dir + "/yarns.kith";
  Run r = kith_run("new " + dir + "/yarns.csv -o " + session + " --judgments " + dir + "/first.csv");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);

  // A bad file adds nothing, and the session is left byte for byte as it was.
  kith::test::write_bytes(dir + "/bad.csv",
                          "anchor,nearer,farther,person\n"
                          "yarn-7,yarn-8,yarn-9,Ines\n"
                          "yarn-7,yarn-7,yarn-9,Ines\n"
                          "yarn-7,yarn-99,yarn-9,Ines\n"
                          "yarn-7,yarn-8\n");
  const std::string before = kith::test::file_bytes(session);
  r = kith_run("judge " + session + " --import " + dir + "/bad.csv");
  CHECK(r.code == 3);
  CHECK(r.output.find(":3") != std::string::npos);   // the repeated item, by line
  CHECK(r.output.find("yarn-99") != std::string::npos);  // the unknown id
  CHECK(r.output.find(":5") != std::string::npos);   // the short row
  CHECK(kith::test::file_bytes(session) == before);
  r = kith_run("judge " + session + " --import " + dir + "/bad.csv --skip-bad-rows --person Ada");
  CAPTURE(r.output);
  CHECK(r.code == 0);
  r = kith_run("judge " + session + " --add yarn-10,yarn-12,yarn-11 --person Ada");
  CHECK(r.code == 0);
  {
    auto store = kith::SessionStore::open(session);
    const auto all = store->judgments();
    REQUIRE(all.size() == 4);
    store->set_retracted(all[1].id, true);
  }

  r = kith_run("export " + session + " --judgments " + dir + "/out.csv");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  const std::string out = kith::test::file_bytes(dir + "/out.csv");
  CHECK(out.find("yarn-1,yarn-3,yarn-2,Ines,2026-11-30T10:00:00Z,pair") != std::string::npos);
  CHECK(out.find("yarn-4,yarn-6,yarn-5") == std::string::npos);  // retracted: left out
  CHECK(out.find("yarn-7,yarn-8,yarn-9,Ines") != std::string::npos);
  CHECK(out.find("yarn-10,yarn-12,yarn-11,Ada") != std::string::npos);
  r = kith_run("export " + session + " --judgments " + dir + "/all.csv --include-retracted --people codes");
  REQUIRE(r.code == 0);
  const std::string all = kith::test::file_bytes(dir + "/all.csv");
  CHECK(all.find("yarn-4,yarn-6,yarn-5,P2") != std::string::npos);
  CHECK(all.find("Ines") == std::string::npos);

  // The exported file goes into a new session as it came out.
  r = kith_run("new " + dir + "/yarns.csv -o " + dir + "/again.kith --judgments " + dir + "/out.csv");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  CHECK(kith::SessionStore::open(dir + "/again.kith")->judgment_count() == 3);

  // --flat needs a map first, then writes 2-D rows.
  r = kith_run("export " + session + " --flat " + dir + "/flat.csv");
  CHECK(r.code == 3);
  CHECK(r.output.find("no map yet") != std::string::npos);
  kith::Points map = kith::Points::Random(40, 3);
  kith::SessionStore::open(session)->write_checkpoint(map, 50);
  r = kith_run("export " + session + " --flat " + dir + "/flat.csv");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  std::istringstream flat(kith::test::file_bytes(dir + "/flat.csv"));
  std::string line;
  std::getline(flat, line);
  CHECK(line == "id,x,y,line,group,suspect_score");
  size_t rows = 0;
  while (std::getline(flat, line)) ++rows;
  CHECK(rows == 40);
}

TEST_CASE("sessions: the window's Session menu saves as and exports, and never writes over a file") {
  const std::string dir = kith::test::temp_dir("sessions-menu");
  kith::Collection c = kith::test::swatch_collection(50, 4, 3);
  c.source = dir + "/swatches.csv";
  kith::EngineOptions eo;
  eo.perplexity = 10;
  kith::SessionLink link(c, eo, c.source);
  CHECK(link.path().empty());
  kith::StillFeed still(c.ids, kith::Points::Random(50, 3));
  auto feed = link.recording(still);
  kith::SessionMenu menu(link, *feed);

  // A judgment on a plain collection starts the session beside it and comes back with its id.
  kith::CommandBody body = kith::cmd::AddJudgment{kith::Judgment{-1, 1, 2, 3, "Ines"}};
  REQUIRE(feed->prepare(body) == "");
  feed->post(body);
  CHECK(std::get<kith::cmd::AddJudgment>(body).judgment.id > 0);
  CHECK(link.path() == dir + "/swatches.kith");
  CHECK(link.record_event(kith::event::CantTell{"Ines", 1000.0, {"pair", "sw-1", {"sw-2", "sw-3"}}}) == "");
  // People events keep the session's people table in step with the window's list.
  CHECK(link.record_event(kith::event::PersonAdded{"Tomasz", "#D55E00"}) == "");
  CHECK(link.record_event(kith::event::PersonColoured{"Ines", "#0072B2"}) == "");
  CHECK(link.record_event(kith::event::PersonRenamed{"Tomasz", "Tom"}) == "");
  CHECK(link.record_event(kith::event::PersonRenamed{"Tom", "Ines"}) != "");  // taken
  {
    std::map<std::string, std::string> people;
    for (const auto& p : link.store()->people()) people[p.name] = p.colour;
    CHECK(people.count("Tomasz") == 0);
    CHECK(people["Tom"] == "#D55E00");
    CHECK(people["Ines"] == "#0072B2");
  }

  using D = kith::SessionMenu::Dialog;
  const std::string copy = dir + "/copy.kith";
  REQUIRE(menu.run(D::kSaveAs, copy) == "");
  CHECK(link.path() == copy);  // kith goes on saving in the copy
  body = kith::cmd::AddJudgment{kith::Judgment{-1, 4, 5, 6, "Tomasz"}};
  REQUIRE(feed->prepare(body) == "");
  {
    auto original = kith::SessionStore::open(dir + "/swatches.kith");  // closed by save as, complete
    CHECK(original->judgment_count() == 1);
    CHECK(original->events().size() == 4);  // the refused rename wrote no event
  }
  CHECK(link.store()->judgment_count() == 2);
  CHECK(link.store()->events().size() == 4);
  CHECK(menu.run(D::kSaveAs, copy) != "");  // exists: refused

  const std::string before = kith::test::file_bytes(dir + "/swatches.kith");
  CHECK(menu.run(D::kLayout, dir + "/swatches.kith").find("will not overwrite") != std::string::npos);
  CHECK(kith::test::file_bytes(dir + "/swatches.kith") == before);
  CHECK(menu.run(D::kLayout, dir + "/layout.json") == "");
  CHECK(menu.run(D::kJudgments, dir + "/judgments.csv") == "");
  CHECK(kith::test::file_bytes(dir + "/judgments.csv").find(",Tomasz,") != std::string::npos);
  CHECK(menu.run(D::kFlat, dir + "/flat.csv") == "");
  CHECK(kith::test::file_bytes(dir + "/flat.csv").rfind("id,x,y,", 0) == 0);
}
