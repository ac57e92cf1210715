// The contract between the window and the map: commands in, snapshots out, and no copies kept in
// the window. MapFeed::prepare checks a setting before anything is recorded and assigns judgment
// ids; StillFeed publishes the judgment set, the parameters and the refusals like the engine; the
// setting controls (MapSettings) stay inside what MapParameters accepts and turn refusals into the
// window's notice. Then the real window under Xvfb: the state dump lists every command, a slider
// drag is posted once (when let go), and a 60-item session with every slider moved to its ends
// still opens, while the refused settings wrote nothing.
#include <doctest/doctest.h>

#include <fstream>
#include <nlohmann/json.hpp>
#include <set>
#include <string>

#include "solver/base/map_parameters.h"
#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"
#include "viewer/cli/synthetic_collection.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/map_settings.h"
#include "viewer/session/session_link.h"

using namespace kith;

namespace {

Judgment triplet(int32_t a, int32_t n, int32_t f, int64_t id = -1) {
  Judgment j;
  j.id = id, j.anchor = a, j.nearer = n, j.farther = f;
  return j;
}

// The window's path for a command, as App::post_checked does it: prepare, then post.
std::string window_post(MapFeed& feed, CommandBody& body, uint64_t* seq = nullptr) {
  if (std::string refused = feed.prepare(body); !refused.empty()) return refused;
  const uint64_t s = feed.post(body);
  if (seq) *seq = s;
  return "";
}

nlohmann::json load_json(const std::string& path) {
  std::ifstream in(path);
  REQUIRE_MESSAGE(in.good(), "no " << path);
  return nlohmann::json::parse(in);
}

int count_kind(const nlohmann::json& state, const std::string& kind) {
  int n = 0;
  for (const auto& c : state["log"]) n += c["kind"] == kind;
  return n;
}

}  // namespace

TEST_CASE("viewer contract: prepare refuses an impossible setting before posting and numbers new judgments") {
  const Collection c = synthetic_collection(10, 3);
  StillFeed feed(c.ids, rough_positions(c), {triplet(0, 1, 2, 4)});
  // Settings: MapParameters' own messages, and nothing reaches the map.
  for (CommandBody bad : {CommandBody(cmd::SetPerplexity{10.0}), CommandBody(cmd::SetTheta{2.0}),
                          CommandBody(cmd::SetBlend{-1.0}), CommandBody(cmd::SetExaggeration{0.0})}) {
    CHECK(feed.prepare(bad) == setting_problem(bad, 10));
    CHECK_FALSE(feed.prepare(bad).empty());
  }
  CommandBody fine = cmd::SetPerplexity{9.0};  // below the 10 items
  CHECK(feed.prepare(fine).empty());
  CHECK(feed.command_log().empty());
  // Judgments: one counter, above every id the map holds, distinct even before the map has them.
  CommandBody a = cmd::AddJudgment{triplet(1, 2, 3)}, b = cmd::AddJudgment{triplet(2, 3, 4)};
  REQUIRE(feed.prepare(a).empty());
  REQUIRE(feed.prepare(b).empty());
  CHECK(std::get<cmd::AddJudgment>(a).judgment.id == 5);
  CHECK(std::get<cmd::AddJudgment>(b).judgment.id == 6);
  feed.post(a);
  feed.post(b);
  const auto s = feed.latest();
  REQUIRE(s->judgments->size() == 3);
  CHECK(s->judgments->all()[1].id == 5);
  CHECK(s->judgments->all()[2].id == 6);
  CommandBody given = cmd::AddJudgment{triplet(3, 4, 5, 40)};  // an id already given is kept
  REQUIRE(feed.prepare(given).empty());
  CHECK(std::get<cmd::AddJudgment>(given).judgment.id == 40);
}

TEST_CASE("viewer contract: a still map publishes the judgment set, the parameters and its refusals") {
  const Collection c = synthetic_collection(12, 3);
  MapParameters p;
  p.blend = 2.0;
  StillFeed feed(c.ids, rough_positions(c), {triplet(0, 1, 2, 1)}, p);
  auto s = feed.latest();
  CHECK(s->parameters.blend == 2.0);
  const auto first = s->judgments;
  feed.post(cmd::Pin{3, {}});  // judgments unchanged: the same set in the next snapshot
  CHECK(feed.latest()->judgments.get() == first.get());
  feed.post(cmd::AddJudgment{triplet(4, 5, 6)});  // straight to the map, no id: the next free one
  feed.post(cmd::RetractJudgment{1, true});
  feed.post(cmd::SetTheta{0.25});
  feed.post(cmd::SetPerplexity{11.0});
  s = feed.latest();
  REQUIRE(s->judgments->size() == 2);
  CHECK(s->judgments->all()[1].id == 2);
  CHECK(s->judgments->find(1)->retracted);
  CHECK(s->judgments->version() > first->version());
  CHECK(s->parameters.theta == 0.25);
  CHECK(s->parameters.perplexity == 11.0);
  CHECK(s->refusals.empty());
  const uint64_t bad = feed.post(cmd::SetPerplexity{12.0});
  const uint64_t unknown = feed.post(cmd::RetractJudgment{77, true});
  s = feed.latest();
  REQUIRE(s->refusals.size() == 2);
  CHECK(s->refusals[0].seq == bad);
  CHECK(s->refusals[0].command == "set-perplexity");
  CHECK(s->refusals[0].reason == MapParameters::check_perplexity(12.0, 12));
  CHECK(s->refusals[1].seq == unknown);
  CHECK(s->refusals[1].command == "retract-judgment");
  CHECK(s->parameters.perplexity == 11.0);
  CHECK(s->last_command == unknown);
}

TEST_CASE("viewer contract: the setting controls stay inside what MapParameters accepts") {
  for (size_t n : {size_t(3), size_t(12), size_t(60), size_t(5000)}) {
    MapSettings settings(true, nullptr);
    for (const SettingControl& c : settings.controls(n)) {
      INFO(c.name << " with " << n << " items");
      if (!c.enabled) continue;
      for (double v : {c.lo, c.hi}) CHECK(setting_problem(MapSettings::command(c.setting, v), n).empty());
      CHECK(c.lo < c.hi);
    }
  }
  MapSettings settings(true, nullptr);
  const auto sixty = settings.controls(60);
  CHECK(sixty[size_t(Setting::kPerplexity)].hi == 59.0);  // below the item count
  CHECK(settings.controls(5000)[size_t(Setting::kPerplexity)].hi == 100.0);
  CHECK_FALSE(settings.controls(2)[size_t(Setting::kPerplexity)].enabled);
  MapSettings no_features(false, nullptr);
  const auto c = no_features.controls(60)[size_t(Setting::kPerplexity)];
  CHECK_FALSE(c.enabled);
  CHECK(c.why_disabled.find("no features") != std::string::npos);
  for (const char* name : {"blend", "perplexity", "theta"}) {
    Setting s;
    REQUIRE(MapSettings::from_name(name, &s));
    CHECK(std::string(MapSettings::name(s)) == name);
  }
  Setting s;
  CHECK_FALSE(MapSettings::from_name("speed", &s));
}

TEST_CASE("viewer contract: a released control shows the value asked for until the map has it, and refusals are noticed") {
  const Collection c = synthetic_collection(60, 3);
  StillFeed still(c.ids, rough_positions(c));
  std::vector<CommandBody> posted;
  MapSettings settings(true, [&](CommandBody& body, uint64_t* seq) {
    const std::string refused = window_post(still, body, seq);
    if (refused.empty()) posted.push_back(body);
    return refused;
  });
  auto shown = [&](Setting s) { return settings.shown(s, still.latest().get()); };
  CHECK(shown(Setting::kBlend) == 1.0);  // the parameters in force
  CHECK(settings.release(Setting::kBlend, 4.0, 0.0).empty());
  CHECK(settings.pending(Setting::kBlend));
  CHECK(shown(Setting::kBlend) == 4.0);
  settings.update(*still.latest(), 0.1);  // the map has taken it
  CHECK_FALSE(settings.pending(Setting::kBlend));
  CHECK(shown(Setting::kBlend) == 4.0);  // now from the snapshot
  CHECK(still.latest()->parameters.blend == 4.0);
  CHECK(settings.notice().empty());

  // Refused by the window's check: not posted, and the notice says which command and why.
  CHECK_FALSE(settings.release(Setting::kPerplexity, 75.0, 1.0).empty());
  CHECK(posted.size() == 1);
  CHECK(settings.notice() == "set-perplexity refused: " + MapParameters::check_perplexity(75.0, 60));
  CHECK(settings.notice_showing(1.0 + MapSettings::kNoticeSeconds - 0.5));
  CHECK_FALSE(settings.notice_showing(1.0 + MapSettings::kNoticeSeconds + 0.5));
  CHECK(shown(Setting::kPerplexity) == still.latest()->parameters.perplexity);
  settings.dismiss();
  CHECK(settings.notice().empty());

  // Refused by the map (here posted past the window's check): read from the snapshot's refusals.
  still.post(cmd::SetTheta{9.99});
  settings.update(*still.latest(), 2.0);
  CHECK(settings.notice() == "set-theta refused: " + MapParameters::check_theta(9.99));
  CHECK(settings.notice_showing(2.5));
  settings.dismiss();
  settings.update(*still.latest(), 3.0);  // an old refusal is not noticed again
  CHECK(settings.notice().empty());
}

TEST_CASE("viewer contract: through a session, a refused setting writes nothing and judgments get their stored ids") {
  const std::string dir = kith::test::temp_dir("contract-session");
  const std::string path = dir + "/s.kith";
  const Collection c = synthetic_collection(60, 4);
  SessionStore::create(path, c);
  const MapParameters before = SessionStore::open(path)->settings();
  int64_t given = -1;
  {
    SessionLink link(path);
    StillFeed still(link.collection().ids, rough_positions(link.collection()), link.judgments(), link.settings());
    auto feed = link.recording(still);
    for (CommandBody bad : {CommandBody(cmd::SetPerplexity{60.0}), CommandBody(cmd::SetTheta{9.99}),
                            CommandBody(cmd::SetBlend{5000.0})}) {
      CHECK_FALSE(window_post(*feed, bad).empty());
    }
    CHECK(link.writes() == 0);
    CHECK(still.command_log().empty());
    CommandBody ok = cmd::SetPerplexity{59.0};
    REQUIRE(window_post(*feed, ok).empty());
    CHECK(link.writes() == 1);
    CommandBody j = cmd::AddJudgment{triplet(1, 2, 3)};
    REQUIRE(window_post(*feed, j).empty());
    given = std::get<cmd::AddJudgment>(j).judgment.id;
    CHECK(still.latest()->judgments->size() == 1);
    CHECK(still.latest()->judgments->all()[0].id == given);
  }
  const auto store = SessionStore::open(path);
  REQUIRE(store->judgments().size() == 1);
  CHECK(store->judgments()[0].id == given);  // the map knows it by the id the session stored it under
  MapParameters want = before;
  want.perplexity = 59.0;
  CHECK(store->settings() == want);
}

// ---- the real window ------------------------------------------------------------------------

namespace {
using kith::test::kXvfb;
using kith::test::open_with_script;
int run(const std::string& command) { return kith::test::run_command(command); }
}  // namespace

TEST_CASE("viewer contract window: the state dump lists every command, a slider drag is posted once, when let go") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("contract-slider");
  const std::string args = "--generate 200 --frames 200";
  // First where the blend slider is drawn (the panels open in the same place every time).
  REQUIRE_MESSAGE(open_with_script(args, dir, "where", "20 dump " + dir + "/where.json\n21 quit\n") == 0,
                  "see " << dir << "/where.log");
  const auto where = load_json(dir + "/where.json");
  std::set<std::string> names;
  for (const auto& n : where["commands"]) names.insert(n.get<std::string>());
  CHECK(names.size() == kCommandNames.size());
  for (const char* name : kCommandNames) CHECK_MESSAGE(names.count(name) == 1, name);
  REQUIRE(where["controls"].size() == kSettingCount);
  const auto& blend = where["controls"][0];
  REQUIRE(blend["name"] == "blend");
  CHECK(where["parameters"]["blend"].get<double>() == 1.0);
  const float x0 = blend["rect"][0], y0 = blend["rect"][1], y1 = blend["rect"][3];
  REQUIRE(y1 > y0);
  // Then a drag along it over ten frames, and let go.
  const int y = int((y0 + y1) / 2);
  std::string script = "30 move " + std::to_string(int(x0) + 20) + " " + std::to_string(y) + "\n31 press left\n";
  for (int k = 0; k < 10; ++k) script += std::to_string(32 + k) + " move +9 +0\n";
  script += "44 release left\n46 wait-settle 3\n60 dump " + dir + "/state.json\n61 quit\n";
  REQUIRE_MESSAGE(open_with_script(args, dir, "drag", script) == 0, "see " << dir << "/drag.log");
  const auto state = load_json(dir + "/state.json");
  CHECK(count_kind(state, "set-blend") == 1);  // ten frames of dragging, one command
  const double now = state["parameters"]["blend"];
  CHECK(now != 1.0);
  CHECK(state["controls"][0]["value"].get<double>() == now);  // the slider shows what is in force
  CHECK(state["refusals"].empty());
}

TEST_CASE("viewer contract window: a 60-item session with every slider at its ends still opens, and refusals write nothing") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("contract-extremes");
  const std::string path = dir + "/s.kith";
  SessionStore::create(path, synthetic_collection(60, 4));
  const std::string script =
        "20 set blend min\n22 set blend max\n24 set theta min\n26 set theta max\n"
        "28 set perplexity min\n30 wait-settle 3\n40 set perplexity max\n42 wait-settle 3\n"
        "50 set perplexity 60\n52 set theta 9.99\n54 set blend -1\n"
        "60 dump " + dir + "/state.json\n61 quit\n";
  REQUIRE_MESSAGE(open_with_script(path + " --frames 300", dir, "extremes", script) == 0,
                  "kith open failed: see " << dir << "/extremes.log");
  const auto state = load_json(dir + "/state.json");
  double hi[3] = {0, 0, 0};
  for (size_t k = 0; k < kSettingCount; ++k) hi[k] = state["controls"][k]["hi"];
  CHECK(hi[size_t(Setting::kPerplexity)] == 59.0);
  // Each slider posted twice (its two ends); the three refused values were never posted.
  CHECK(count_kind(state, "set-blend") == 2);
  CHECK(count_kind(state, "set-theta") == 2);
  CHECK(count_kind(state, "set-perplexity") == 2);
  CHECK(state["refusals"].empty());  // the engine refused nothing: the window did first
  CHECK(state["notice"] == "set-blend refused: " + MapParameters::check_blend(-1.0));
  CHECK(state["parameters"]["perplexity"].get<double>() == 59.0);
  {
    SessionOpenOptions read_only;
    read_only.read_only = true;
    const auto store = SessionStore::open(path, read_only);
    const MapParameters p = store->settings();
    CHECK(p.blend == hi[size_t(Setting::kBlend)]);
    CHECK(p.theta == hi[size_t(Setting::kTheta)]);
    CHECK(p.perplexity == 59.0);  // not the refused 60
  }
  // And the session opens again, with those settings.
  const std::string again = std::string(kXvfb) + KITH_BINARY + " open " + path + " --frames 30 > " + dir +
                            "/log-again.txt 2>&1";
  CHECK_MESSAGE(run(again) == 0, "the session no longer opens: see " << dir << "/log-again.txt");
}
