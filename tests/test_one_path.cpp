// One path for every collection (README, "Reading a collection"): the same collection given as a
// CSV table, as a .npy array with --tags and as a session gives every command the same map for
// the same seed; reading options go with ITEMS and are refused with a SESSION; `kith fit` and
// `kith export` write one layout format; opening a collection again continues its session.
#include <doctest/doctest.h>

#include <cstdio>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/io/npy_file.h"
#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"

namespace {

using kith::test::file_bytes;
using kith::test::KithRun;
using kith::test::run_kith;
using kith::test::write_bytes;

// 90 items in three tagged clumps of 6 features: items.csv (id,kind,f0..f5), the same numbers as
// items.npy with tags.csv (id,kind), and session.kith made from items.csv.
struct Forms {
  std::string dir, csv, npy, tags, session;
};

Forms write_forms(const std::string& name, size_t n = 90) {
  Forms f;
  f.dir = kith::test::temp_dir(name);
  f.csv = f.dir + "/items.csv";
  f.npy = f.dir + "/items.npy";
  f.tags = f.dir + "/tags.csv";
  f.session = f.dir + "/session.kith";
  std::mt19937 rng(11);
  std::normal_distribution<double> noise(0.0, 1.0);
  const char* kinds[] = {"moss", "slate", "rust"};
  kith::Points x(Eigen::Index(n), 6);
  std::string csv = "id,kind,f0,f1,f2,f3,f4,f5\n", tags = "id,kind\n";
  for (size_t i = 0; i < n; ++i) {
    const std::string id = "c" + std::to_string(i);
    csv += id + "," + kinds[i % 3];
    tags += id + "," + kinds[i % 3] + "\n";
    for (Eigen::Index j = 0; j < 6; ++j) {
      x(Eigen::Index(i), j) = (j == Eigen::Index(i % 3) ? 6.0 : 0.0) + noise(rng);
      char buf[40];
      std::snprintf(buf, sizeof buf, ",%.17g", x(Eigen::Index(i), j));
      csv += buf;
    }
    csv += "\n";
  }
  write_bytes(f.csv, csv);
  write_bytes(f.tags, tags);
  write_bytes(f.npy, kith::npy_bytes(x));
  return f;
}

const char* const kSettings = " --perplexity 12 --seed 5";

}  // namespace

TEST_CASE("one path: a collection as CSV, as .npy with --tags and as a session gives the same fit") {
  const Forms f = write_forms("one-path-fit");
  REQUIRE(run_kith("new " + f.csv + " -o " + f.session + kSettings).code == 0);
  const KithRun a = run_kith("fit " + f.csv + " -o " + f.dir + "/a.csv --quiet --iterations 300" + kSettings);
  const KithRun b =
      run_kith("fit " + f.npy + " --tags " + f.tags + " -o " + f.dir + "/b.csv --quiet --iterations 300" + kSettings);
  // The session's own settings: no map flags but the step count.
  const KithRun c = run_kith("fit " + f.session + " -o " + f.dir + "/c.csv --quiet --iterations 300");
  CAPTURE(a.output + b.output + c.output);
  REQUIRE(a.code == 0);
  REQUIRE(b.code == 0);
  REQUIRE(c.code == 0);
  const std::string layout = file_bytes(f.dir + "/a.csv");
  CHECK(layout.rfind("id,x,y,z,kind\n", 0) == 0);
  CHECK(file_bytes(f.dir + "/b.csv") == layout);  // bit for bit: the same map, ids and tags
  CHECK(file_bytes(f.dir + "/c.csv") == layout);
  // kith check reads all three alike.
  for (const std::string& in : {f.csv, f.npy + " --tags " + f.tags, f.session}) {
    const KithRun r = run_kith("check " + in);
    CAPTURE(r.output);
    CHECK(r.code == 0);
    CHECK(r.output.find("items:           90") != std::string::npos);
    CHECK(r.output.find("ok: 90 items x 6 features") != std::string::npos);
  }
}

TEST_CASE("one path: kith render and kith report take the same three forms and give the same map") {
  const Forms f = write_forms("one-path-render", 60);
  REQUIRE(run_kith("new " + f.csv + " -o " + f.session + kSettings).code == 0);
  // Rendered until the engine settles (a fixed point of its schedule), with no title.
  const std::string draw = " --size 320x200 --no-legend --iterations 100000";
  const KithRun a = run_kith("render " + f.csv + " -o " + f.dir + "/a.png" + draw + kSettings);
  const KithRun b = run_kith("render " + f.npy + " --tags " + f.tags + " -o " + f.dir + "/b.png" + draw + kSettings);
  const KithRun c = run_kith("render " + f.session + " -o " + f.dir + "/c.png" + draw);
  CAPTURE(a.output + b.output + c.output);
  REQUIRE(a.code == 0);
  REQUIRE(b.code == 0);
  REQUIRE(c.code == 0);
  const std::string png = file_bytes(f.dir + "/a.png");
  CHECK(png.size() > 1000);
  CHECK(file_bytes(f.dir + "/b.png") == png);
  CHECK(file_bytes(f.dir + "/c.png") == png);

  // The report of each: the same figures once the input's name is taken out.
  auto page = [&](const std::string& input, const std::string& out) {
    const KithRun r =
        run_kith("report " + input + " -o " + f.dir + "/" + out + " --iterations 300 --perplexity 12 --seed 5");
    CAPTURE(r.output);
    REQUIRE(r.code == 0);
    std::string html = file_bytes(f.dir + "/" + out);
    for (const std::string& name : {f.csv, f.npy, f.session, std::string("items.csv"), std::string("items.npy")})
      for (size_t at; (at = html.find(name)) != std::string::npos;) html.replace(at, name.size(), "INPUT");
    // ... and its fit time, which is the machine's (0.0 s and 0.1 s both happen here).
    const std::string timed = "<th>fit time</th><td class='num'>";
    if (const size_t at = html.find(timed); at != std::string::npos)
      html.erase(at + timed.size(), html.find("</td>", at + timed.size()) - at - timed.size());
    return html;
  };
  const std::string from_csv = page(f.csv, "a.html");
  CHECK(page(f.npy + " --tags " + f.tags, "b.html") == from_csv);
  // A session's page adds what it holds (its saved map, its judgments); the map it draws, fitted
  // from the features with the session's settings, is the same picture.
  auto pictures = [](const std::string& html) {
    std::vector<std::string> images;
    for (size_t at = html.find("<image"); at != std::string::npos; at = html.find("<image", at + 1))
      images.push_back(html.substr(at, html.find(">", at) - at));
    return images;
  };
  const std::string from_session = page(f.session, "c.html");
  CHECK(from_session.find("fitted from the features (the session has no saved map)") != std::string::npos);
  CHECK_FALSE(pictures(from_csv).empty());
  CHECK(pictures(from_session) == pictures(from_csv));
}

TEST_CASE("one path: reading options go with ITEMS, and a session refuses them saying why") {
  const Forms f = write_forms("one-path-refuse", 30);
  REQUIRE(run_kith("new " + f.npy + " --tags " + f.tags + " -o " + f.session + kSettings).code == 0);
  // The session keeps how it was read.
  const KithRun checked = run_kith("check " + f.session);
  CHECK(checked.output.find("with --tags " + f.tags) != std::string::npos);
  for (const std::string& command : {"fit " + f.session + " -o " + f.dir + "/x.csv --tags " + f.tags,
                                     "render " + f.session + " -o " + f.dir + "/x.png --id kind",
                                     "report " + f.session + " -o " + f.dir + "/x.html --exclude f1",
                                     "check " + f.session + " --pictures kind", "open " + f.session + " --id kind"}) {
    const KithRun r = run_kith(command);
    CAPTURE(command);
    CAPTURE(r.output);
    CHECK(r.code == 2);
    CHECK(r.output.find("is a session, which keeps its collection as it was read") != std::string::npos);
  }
  CHECK(kith::test::folder_listing(f.dir) ==
        std::vector<std::string>{"items.csv", "items.npy", "session.kith", "tags.csv"});
  // --tags with a table is a usage error in every command that reads ITEMS.
  for (const std::string& command :
       {"fit " + f.csv + " -o " + f.dir + "/y.csv", "report " + f.csv + " -o " + f.dir + "/y.html", "check " + f.csv,
        "render " + f.csv + " -o " + f.dir + "/y.png"}) {
    const KithRun r = run_kith(command + " --tags " + f.tags);
    CAPTURE(r.output);
    CHECK(r.code == 2);
    CHECK(r.output.find("--tags goes with a .npy file") != std::string::npos);
  }
  // A SQLite file that is not a kith session is refused as one, not read as a table.
  const std::string other = f.dir + "/other.db";
  REQUIRE(kith::test::run_shell("/usr/bin/python3 -c \"import sqlite3; c = sqlite3.connect('" + other +
                                "'); c.execute('create table t(a)'); c.commit()\"")
              .code == 0);
  const KithRun r = run_kith("fit " + other + " -o " + f.dir + "/z.csv");
  CAPTURE(r.output);
  CHECK(r.code == 3);
  CHECK(r.output.find("CSV") == std::string::npos);
  CHECK_FALSE(std::filesystem::exists(f.dir + "/z.csv"));
}

TEST_CASE("one path: kith fit and kith export write one layout format (headers, group numbering, .npy)") {
  const Forms f = write_forms("one-path-layout", 90);
  REQUIRE(run_kith("new " + f.csv + " -o " + f.session + kSettings).code == 0);
  const KithRun fitted =
      run_kith("fit " + f.session + " -o " + f.dir + "/fit.json --quiet --iterations 400 --suspects --groups");
  CAPTURE(fitted.output);
  REQUIRE(fitted.code == 0);
  REQUIRE(
      run_kith("fit " + f.session + " -o " + f.dir + "/fit.csv --quiet --iterations 400 --suspects --groups").code ==
      0);
  // A checkpoint of the fitted map in the session, so export draws the same map.
  const auto doc = nlohmann::json::parse(file_bytes(f.dir + "/fit.json"));
  kith::Points map(90, 3);
  for (Eigen::Index i = 0; i < 90; ++i)
    for (int d = 0; d < 3; ++d) map(i, d) = doc["items"][size_t(i)][std::string(1, "xyz"[d])].get<double>();
  kith::SessionStore::open(f.session)->write_checkpoint(map, 400);
  const KithRun exported = run_kith("export " + f.session + " --layout " + f.dir + "/export.csv");
  CAPTURE(exported.output);
  REQUIRE(exported.code == 0);
  std::istringstream fit_csv(file_bytes(f.dir + "/fit.csv")), export_csv(file_bytes(f.dir + "/export.csv"));
  std::string fit_header, export_header;
  std::getline(fit_csv, fit_header);
  std::getline(export_csv, export_header);
  CHECK(fit_header == "id,x,y,z,kind,group,suspect_score");
  CHECK(export_header == fit_header);
  // Groups numbered alike: 1, 2, ... (0 = none); three clumps give three groups in both.
  const kith::Collection a = kith::load_collection(f.dir + "/fit.csv"),
                         b = kith::load_collection(f.dir + "/export.csv");
  REQUIRE(a.feature_names == b.feature_names);
  const Eigen::Index g =
      Eigen::Index(std::find(a.feature_names.begin(), a.feature_names.end(), "group") - a.feature_names.begin());
  REQUIRE(g < a.features.cols());
  CHECK(a.features.col(g).minCoeff() >= 0);
  CHECK(a.features.col(g).maxCoeff() >= 1);
  CHECK(b.features.col(g).minCoeff() >= 0);
  CHECK(a.features.col(g).maxCoeff() == b.features.col(g).maxCoeff());

  // .npy positions with the ids and the rest in STEM.ids.csv, from both commands.
  REQUIRE(run_kith("fit " + f.csv + " -o " + f.dir + "/pos.npy --quiet --iterations 300" + kSettings).code == 0);
  const kith::Points positions = kith::parse_npy(file_bytes(f.dir + "/pos.npy"), "pos.npy");
  CHECK(positions.rows() == 90);
  CHECK(positions.cols() == 3);
  CHECK(file_bytes(f.dir + "/pos.ids.csv").rfind("id,kind\nc0,moss\n", 0) == 0);
  REQUIRE(run_kith("export " + f.session + " --layout " + f.dir + "/exported.npy").code == 0);
  CHECK(kith::parse_npy(file_bytes(f.dir + "/exported.npy"), "exported.npy") == map);
  // An existing sidecar is an output like any other: refused without --force, nothing written.
  write_bytes(f.dir + "/taken.ids.csv", "mine\n");
  const KithRun refused = run_kith("fit " + f.csv + " -o " + f.dir + "/taken.npy --quiet --iterations 50");
  CHECK(refused.code == 2);
  CHECK(file_bytes(f.dir + "/taken.ids.csv") == "mine\n");
  CHECK_FALSE(std::filesystem::exists(f.dir + "/taken.npy"));
}

TEST_CASE("one path window: opening a collection again continues its session, another file's is left alone") {
  KITH_SKIP_WITHOUT_XVFB();
  const Forms f = write_forms("one-path-reopen", 40);
  const std::string pin =
      "20 wait-settle 5\n30 move @c7\n30 press left\n31 release left\n33 key P\n40 wait-settle 5\n50 quit\n";
  REQUIRE(kith::test::open_with_script(f.csv + " --frames 200", f.dir, "first", pin) == 0);
  const std::string session = f.dir + "/items.kith";
  REQUIRE_MESSAGE(std::filesystem::exists(session), file_bytes(f.dir + "/first.log"));
  size_t pins = 0;
  {
    kith::SessionOpenOptions o;
    o.read_only = true;
    pins = kith::SessionStore::open(session, o)->pins().size();
  }
  REQUIRE(pins == 1);
  // Again: the session is continued (the pin is there, the title says so), no second file.
  const std::string look = "20 wait-settle 5\n30 dump " + f.dir + "/state.json\n31 quit\n";
  REQUIRE(kith::test::open_with_script(f.csv + " --frames 100", f.dir, "second", look) == 0);
  const auto state = nlohmann::json::parse(file_bytes(f.dir + "/state.json"));
  CAPTURE(file_bytes(f.dir + "/second.log"));
  CHECK(state["pinned"].size() == 1);
  CHECK(state["title"].get<std::string>().find("items.kith (continued") != std::string::npos);
  CHECK(file_bytes(f.dir + "/second.log").find("continuing " + session) != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(f.dir + "/items-2.kith"));
  // --fresh opens without it: no pin shown.
  const std::string fresh = "20 wait-settle 5\n30 dump " + f.dir + "/fresh.json\n31 quit\n";
  REQUIRE(kith::test::open_with_script(f.csv + " --fresh --frames 100", f.dir, "fresh", fresh) == 0);
  CHECK(nlohmann::json::parse(file_bytes(f.dir + "/fresh.json"))["pinned"].empty());

  // Other content under the same name: its session is never touched; a pin starts items-2.kith.
  const Forms g = write_forms("one-path-reopen-other", 41);
  std::filesystem::copy_file(session, g.dir + "/items.kith");
  const std::string before = file_bytes(g.dir + "/items.kith");
  REQUIRE(kith::test::open_with_script(g.csv + " --frames 200", g.dir, "other", pin) == 0);
  CHECK(file_bytes(g.dir + "/items.kith") == before);
  CHECK(std::filesystem::exists(g.dir + "/items-2.kith"));
}
