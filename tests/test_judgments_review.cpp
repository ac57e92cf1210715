// The judgment list and agreement figures as plain logic (solver/measures/judgment_review.h) and the
// Judgments panel's actions without a window (viewer/panels/panel_judgments.h over MockRenderer): filtering,
// same-question consistency and cross-agreement against an obvious pairwise count, the strongly
// violated list against the t-STE formula written out, retract / restore through the post path
// (a refused post leaves the list unchanged), CSV import (all or none) and export round trip.
#include <doctest/doctest.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>

#include "solver/io/judgment_io.h"
#include "solver/measures/judgment_review.h"
#include "tests/approx.h"
#include "viewer/scene/map_feed.h"
#include "viewer/panels/panel_judgments.h"
#include "viewer/scene/renderer.h"
#include "viewer/cli/synthetic_collection.h"

using namespace kith;

namespace {

// Random judgments over n items by a few people, with many questions asked more than once (a
// small pool of questions, each answered either way), some retracted.
std::vector<Judgment> random_judgments(size_t count, int n, uint32_t seed) {
  std::mt19937 rng(seed);
  std::uniform_int_distribution<int> item(0, n - 1);
  std::vector<std::array<int32_t, 3>> pool;
  while (pool.size() < 40) {
    const int a = item(rng), b = item(rng), c = item(rng);
    if (a != b && a != c && b != c) pool.push_back({a, b, c});
  }
  static const char* kPeople[] = {"Ada", "Bram", "Cleo", ""};
  std::vector<Judgment> out;
  for (size_t k = 0; k < count; ++k) {
    const auto& q = pool[rng() % pool.size()];
    Judgment j;
    j.id = int64_t(k + 1);
    j.anchor = q[0];
    const bool flip = rng() % 3 == 0;
    j.nearer = flip ? q[2] : q[1];
    j.farther = flip ? q[1] : q[2];
    j.person = kPeople[rng() % 4];
    j.time = 1.79e9 + double(k);
    j.kind = JudgmentKind::kPair;
    j.retracted = rng() % 10 == 0;
    out.push_back(j);
  }
  return out;
}

std::string lower(std::string s) {
  for (char& c : s) c = char(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

}  // namespace

TEST_CASE("judgment review: filtering by person, by part of an item id, and retracted ones") {
  const Collection c = synthetic_collection(60, 3);
  const auto js = random_judgments(500, 60, 3);
  for (const std::string person : {"Ada", "", "nobody"}) {
    for (const std::string item : {"", "S0001", "s0003", "zzz"}) {
      for (const bool retracted : {true, false}) {
        JudgmentFilter f;
        f.any_person = person == "nobody";
        f.person = person;
        f.item = item;
        f.show_retracted = retracted;
        std::vector<size_t> expected;
        for (size_t k = 0; k < js.size(); ++k) {
          const Judgment& j = js[k];
          bool item_ok = item.empty();
          for (int32_t i : {j.anchor, j.nearer, j.farther})
            item_ok = item_ok || lower(c.ids[size_t(i)]).find(lower(item)) != std::string::npos;
          if ((f.any_person || j.person == person) && item_ok && (retracted || !j.retracted)) expected.push_back(k);
        }
        CAPTURE(person);
        CAPTURE(item);
        CHECK(filter_judgments(js, c.ids, f) == expected);
      }
    }
  }
  // A filter that matches something does not match everything (the test would be empty otherwise).
  JudgmentFilter ada;
  ada.any_person = false;
  ada.person = "Ada";
  const size_t n_ada = filter_judgments(js, c.ids, ada).size();
  CHECK(n_ada > 50);
  CHECK(n_ada < 400);
  CHECK(judgment_people(js) == std::vector<std::string>{"", "Ada", "Bram", "Cleo"});
}

TEST_CASE("judgment review: same question, consistency and cross-agreement by hand") {
  // Anchor 0 with candidates {1, 2}: Ada says 1 twice, Bram says 2 once, Cleo says 1 once.
  auto J = [](int a, int n, int f, const char* who) {
    Judgment j;
    j.anchor = a, j.nearer = n, j.farther = f, j.person = who;
    return j;
  };
  std::vector<Judgment> js = {J(0, 1, 2, "Ada"),  J(0, 1, 2, "Ada"), J(0, 2, 1, "Bram"),
                              J(0, 1, 2, "Cleo"), J(5, 6, 7, "Ada"),  // asked once: no pairs
                              J(1, 0, 2, "Bram")};                    // another anchor: another question
  CHECK(question_key(js[0]) == question_key(js[2]));
  CHECK_FALSE(question_key(js[0]) == question_key(js[5]));
  CHECK(repeated_questions(js) == 1);
  auto r = same_question_agreement(js);
  REQUIRE(r.size() == 3);
  CHECK(r[0].person == "Ada");
  CHECK(r[0].repeat_pairs == 1);
  CHECK(r[0].consistency() == 1.0);
  CHECK(r[0].shared_pairs == 4);     // 2 answers x (Bram + Cleo)
  CHECK(r[0].shared_agreeing == 2);  // with Cleo, twice
  CHECK(r[1].person == "Bram");
  CHECK(r[1].consistency() == -1.0);  // never asked twice
  CHECK(r[1].cross_agreement() == 0.0);
  CHECK(r[2].cross_agreement() == doctest::Approx(2.0 / 3.0));
  // Ada changes her mind once: half of her... one of her three pairs agrees.
  js.push_back(J(0, 2, 1, "Ada"));
  r = same_question_agreement(js);
  CHECK(r[0].repeat_pairs == 3);
  CHECK(r[0].repeat_agreeing == 1);
  // A retracted judgment no longer counts.
  js.back().retracted = true;
  CHECK(same_question_agreement(js)[0].repeat_pairs == 1);
}

TEST_CASE("judgment review: same-question figures equal an obvious count over all pairs") {
  for (uint32_t seed : {1u, 2u, 3u}) {
    const auto js = random_judgments(800, 30, seed);
    std::map<std::string, PersonQuestionAgreement> slow;
    for (size_t a = 0; a < js.size(); ++a) {
      if (js[a].retracted) continue;
      slow[js[a].person].person = js[a].person;
      for (size_t b = 0; b < js.size(); ++b) {
        if (a == b || js[b].retracted || !(question_key(js[a]) == question_key(js[b]))) continue;
        const bool agree = js[a].nearer == js[b].nearer;
        auto& p = slow[js[a].person];
        if (js[a].person == js[b].person) {
          if (b > a) p.repeat_pairs++, p.repeat_agreeing += agree;
        } else {
          p.shared_pairs++, p.shared_agreeing += agree;
        }
      }
    }
    const auto fast = same_question_agreement(js);
    REQUIRE(fast.size() == slow.size());
    for (const auto& f : fast) {
      CAPTURE(f.person);
      const auto& s = slow.at(f.person);
      CHECK(f.repeat_pairs == s.repeat_pairs);
      CHECK(f.repeat_agreeing == s.repeat_agreeing);
      CHECK(f.shared_pairs == s.shared_pairs);
      CHECK(f.shared_agreeing == s.shared_agreeing);
      CHECK(f.repeat_pairs > 0);  // the pool makes repeats: the check is not vacuous
      CHECK(f.repeat_agreeing < f.repeat_pairs);
    }
  }
}

TEST_CASE("judgment review: strongly violated judgments equal the t-STE formula written out") {
  std::mt19937 rng(7);
  std::normal_distribution<double> g(0.0, 1.0);
  const int n = 80;
  Points y(n, 3);
  for (int i = 0; i < n; ++i)
    for (int d = 0; d < 3; ++d) y(i, d) = 3.0 * g(rng);
  const auto js = random_judgments(2000, n, 11);
  for (double alpha : {1.0, 2.5}) {
    ViolationOptions o;
    o.alpha = alpha;
    o.threshold = 0.1;
    // Slow: p = K(a,n) / (K(a,n) + K(a,f)), K = (1 + d^2/alpha)^(-(alpha+1)/2) (van der Maaten &
    // Weinberger 2012, the t-STE model).
    auto K = [&](int i, int j) {
      const double d2 = (y.row(i) - y.row(j)).squaredNorm();
      return std::pow(1.0 + d2 / alpha, -(alpha + 1.0) / 2.0);
    };
    std::vector<std::pair<double, size_t>> slow;
    for (size_t k = 0; k < js.size(); ++k) {
      if (js[k].retracted) continue;
      const double kn = K(js[k].anchor, js[k].nearer), kf = K(js[k].anchor, js[k].farther);
      const double p = kn / (kn + kf);
      if (p < o.threshold) slow.push_back({p, k});
    }
    std::sort(slow.begin(), slow.end());
    const auto fast = strongly_violated(y, js, o);
    REQUIRE(fast.size() == slow.size());
    CHECK(fast.size() > 10);
    CHECK(fast.size() < js.size() / 2);
    constexpr double kTolerance = 1e-12;  // the same formula in double
    for (size_t k = 0; k < fast.size(); ++k) {
      CHECK(fast[k].index == slow[k].second);
      CHECK(std::abs(fast[k].probability - slow[k].first) < kTolerance);
    }
    o.limit = 5;
    CHECK(strongly_violated(y, js, o).size() == 5);
  }
  ViolationOptions bad;
  bad.threshold = 1.5;
  std::string e;
  CHECK_FALSE(bad.IsValid(&e));
  CHECK(e.find("between 0 and 1") != std::string::npos);
  CHECK_THROWS(strongly_violated(y, js, bad));
}

TEST_CASE("judgment review: agreement history keeps each person's series and a cap") {
  AgreementHistory h(4);
  h.add(0.0, {{"Ada", 3, 0.5}, {"Bram", 0, -1.0}});
  h.add(3.0, {{"Ada", 4, 0.75}, {"Bram", 1, 1.0}});
  for (int k = 2; k < 7; ++k) h.add(3.0 * k, {{"Ada", 4, 0.8}});
  CHECK(h.samples() == 7);
  REQUIRE(h.series().count("Ada") == 1);
  CHECK(h.series().at("Ada").size() == 4);             // capped
  CHECK(h.series().at("Ada").front().seconds == 9.0);  // the oldest were dropped
  CHECK(h.series().at("Bram").size() == 1);            // no point while Bram had no judgments
  CHECK(h.first_seconds() == 3.0);                     // Bram's point is the oldest kept
  CHECK(h.last_seconds() == 18.0);
}

// ---- the panel's actions, without a window -------------------------------------------------------

namespace {
std::vector<Judgment> six_judgments() {
  std::vector<Judgment> js;
  for (int k = 0; k < 6; ++k) {
    Judgment j;
    j.id = k + 1;
    j.anchor = k, j.nearer = k + 1, j.farther = k + 20;
    j.person = k % 2 ? "Ada" : "Bram";
    js.push_back(j);
  }
  return js;
}

struct PanelRig {
  Collection collection = synthetic_collection(50, 4);
  MockRenderer renderer;
  StillFeed feed{collection.ids, rough_positions(collection), six_judgments()};
  MapView view{collection, renderer};
  std::vector<CommandBody> posted;
  std::string refuse;     // when set, every post is refused with this message
  int64_t next_id = 100;  // what a session would number the next judgment
  std::vector<std::string> said;
  std::unique_ptr<JudgmentsPanel> panel;
  PanelRig() {
    view.set_snapshot(feed.latest());
    JudgmentsPanelLinks links;
    links.post = [this](CommandBody& body) {
      if (!refuse.empty()) return refuse;
      if (auto* a = std::get_if<cmd::AddJudgment>(&body)) a->judgment.id = next_id++;
      posted.push_back(body);
      feed.post(body);                   // to the map, and the window shows its next snapshot
      view.set_snapshot(feed.latest());
      return std::string();
    };
    links.say = [this](const std::string& s) { said.push_back(s); };
    panel = std::make_unique<JudgmentsPanel>(collection, view, links);
  }
};
}  // namespace

TEST_CASE("judgments panel: retract and restore go through the post path, a refusal changes nothing") {
  PanelRig r;
  REQUIRE(r.panel->rows().size() == 6);
  // Refused (e.g. the session file could not be written): the list stays as it was.
  r.refuse = "could not write to the session s.kith: disk full";
  CHECK(r.panel->set_retracted(2, true) == r.refuse);
  CHECK_FALSE(r.view.judgments()[2].retracted);
  CHECK(r.panel->last_problem() == r.refuse);
  CHECK(r.posted.empty());
  // Accepted: RetractJudgment{id 3, true}, then restore.
  r.refuse.clear();
  CHECK(r.panel->set_retracted(2, true).empty());
  REQUIRE(r.posted.size() == 1);
  const auto* c = std::get_if<cmd::RetractJudgment>(&r.posted[0]);
  REQUIRE(c != nullptr);
  CHECK(c->judgment_id == 3);
  CHECK(c->retracted);
  CHECK(r.view.judgments()[2].retracted);
  CHECK(r.view.judgments().size() == 6);  // kept in the record
  r.panel->filter().show_retracted = false;
  CHECK(r.panel->rows().size() == 5);
  r.panel->filter().show_retracted = true;
  // Keyboard route: choose the third row, toggle (restore).
  r.panel->choose_step(1);
  r.panel->choose_step(1);
  r.panel->choose_step(1);
  CHECK(r.panel->chosen() == 2);
  REQUIRE_FALSE(r.said.empty());  // said too, for stepping through with the panels hidden
  CHECK(r.said.back() == "judgment 3: s00002 is more like s00003 than s00022 (Bram, retracted)");
  CHECK(r.view.selection().items().size() == 3);  // shown in the map: its three items selected
  CHECK(r.view.selection().contains(2));
  CHECK(r.view.selection().contains(3));
  CHECK(r.view.selection().contains(22));
  CHECK(r.panel->toggle_chosen().empty());
  const auto* back = std::get_if<cmd::RetractJudgment>(&r.posted.back());
  REQUIRE(back != nullptr);
  CHECK_FALSE(back->retracted);
  CHECK_FALSE(r.view.judgments()[2].retracted);
  // By item: "s00021" is the farther item of judgment 2 only.
  r.panel->filter().item = "S00021";
  REQUIRE(r.panel->rows().size() == 1);
  CHECK(r.panel->rows()[0] == 1);
}

TEST_CASE("judgments panel: CSV import is all or none, bad rows listed, export reads back the same") {
  PanelRig r;
  const std::string dir = kith::test::temp_dir("judgments-panel-files");
  const std::string bad = dir + "/bad.csv";
  std::ofstream(bad) << "anchor,nearer,farther,person,time,kind\n"
                        "s00001,s00002,s00003,Cleo,2026-12-01T10:00:00Z,pair\n"
                        "s00001,lamp-9,s00003,Cleo,,pair\n"  // line 3: unknown id
                        "s00004,s00004,s00005,Cleo,,pair\n"  // line 4: repeated item
                        "s00006,s00007\n"                    // line 5: too few fields
                        "s00008,s00009,s00010,Dov,,grid\n";
  CHECK(r.panel->import_csv(bad, false) == 0);
  CHECK(r.posted.empty());
  CHECK(r.view.judgments().size() == 6);
  const auto& m = r.panel->file_messages();
  REQUIRE(m.size() == 4);  // three bad rows and the summary
  CHECK(m[0].find("bad.csv:3") != std::string::npos);
  CHECK(m[0].find("lamp-9") != std::string::npos);
  CHECK(m[1].find("bad.csv:4") != std::string::npos);
  CHECK(m[2].find("bad.csv:5") != std::string::npos);
  CHECK(m[3].find("none imported") != std::string::npos);
  // Skipping bad rows: the two good ones, each through the post path, with the ids it gave.
  CHECK(r.panel->import_csv(bad, true) == 2);
  REQUIRE(r.posted.size() == 2);
  REQUIRE(r.view.judgments().size() == 8);
  CHECK(r.view.judgments()[6].id == 100);
  CHECK(r.view.judgments()[7].id == 101);
  CHECK(r.view.judgments()[7].person == "Dov");
  CHECK(r.view.judgments()[7].kind == JudgmentKind::kGrid);
  CHECK(r.view.judgments()[6].time == doctest::Approx(1796119200.0));  // 2026-12-01T10:00:00Z
  CHECK(r.panel->file_messages().back().find("imported 2") != std::string::npos);

  // Export, then import the file into a fresh panel: the same judgments.
  r.panel->set_retracted(0, true);
  const std::string out = dir + "/out.csv";
  std::filesystem::remove(out);
  REQUIRE(r.panel->export_csv(out, true, true, false));
  CHECK_FALSE(r.panel->export_csv(out, true, true, false));  // exists: not replaced unless asked
  CHECK(r.panel->file_messages()[0].find("already there; kith does not write over it: tick") != std::string::npos);
  CHECK_FALSE(r.panel->export_csv(dir + "/box.kith", true, true, true));  // never over a session
  const auto back = read_judgments_csv(out, r.collection.ids);
  REQUIRE(back.ok());
  REQUIRE(back.judgments.size() == r.view.judgments().size());
  for (size_t k = 0; k < back.judgments.size(); ++k) {
    const Judgment &a = back.judgments[k], &b = r.view.judgments()[k];
    CHECK(a.anchor == b.anchor);
    CHECK(a.nearer == b.nearer);
    CHECK(a.farther == b.farther);
    CHECK(a.person == b.person);
    CHECK(a.kind == b.kind);
    CHECK(std::abs(a.time - b.time) < 1e-3);  // written to the millisecond
  }
  // Without retracted ones and without names.
  REQUIRE(r.panel->export_csv(out, false, false, true));
  const auto plain = read_judgments_csv(out, r.collection.ids);
  CHECK(plain.judgments.size() == r.view.judgments().size() - 1);
  for (const auto& j : plain.judgments) CHECK(j.person.empty());
}

TEST_CASE("judgments panel: agreement figures per person from the map shown") {
  PanelRig r;
  r.panel->compute_figures();
  const auto& people = r.panel->people_rows();
  REQUIRE(people.size() == 2);
  CHECK(people[0].person == "Ada");
  CHECK(people[0].judgments == 3);
  const auto expected = per_person_agreement(r.view.snapshot()->positions, r.view.judgments());
  CHECK(people[0].with_map == expected[0].agreement);
  CHECK(people[1].with_map == expected[1].agreement);
  r.panel->tick(0.0);
  r.panel->tick(1.0);  // too soon for another sample
  r.panel->tick(3.5);
  CHECK(r.panel->history().samples() == 2);
}

#include "solver/session/session_store.h"
#include "viewer/session/session_link.h"

TEST_CASE(
    "judgments panel: through a real session, imports and retractions are in the file; a refusal changes nothing") {
  const std::string dir = kith::test::temp_dir("judgments-panel-session");
  const std::string path = dir + "/s.kith";
  const Collection c = synthetic_collection(40, 4);
  {
    auto store = SessionStore::create(path, c);
    Judgment j;
    j.anchor = 0, j.nearer = 1, j.farther = 2, j.person = "Ada";
    store->add_judgment(j);
  }
  {
    SessionLink link(path);
    MockRenderer renderer;
    StillFeed still{link.collection().ids, rough_positions(link.collection()), link.judgments()};
    auto feed = link.recording(still);
    MapView view{link.collection(), renderer};
    view.set_snapshot(still.latest());
    JudgmentsPanelLinks links;
    links.post = [&](CommandBody& body) {  // the window's path: prepare (the session write), then post
      if (std::string refused = feed->prepare(body); !refused.empty()) return refused;
      feed->post(body);
      view.set_snapshot(still.latest());  // the window shows the next snapshot
      return std::string();
    };
    JudgmentsPanel panel(link.collection(), view, links);
    const std::string csv = dir + "/more.csv";
    std::ofstream(csv) << "anchor,nearer,farther,person\ns00003,s00004,s00005,Bram\ns00006,s00007,s00008,Cleo\n";
    REQUIRE(panel.import_csv(csv, false) == 2);
    REQUIRE(view.judgments().size() == 3);
    CHECK(view.judgments()[1].id == 2);  // the ids the session gave
    CHECK(view.judgments()[2].id == 3);
    CHECK(panel.set_retracted(1, true).empty());
    // A judgment the session does not know (as if made elsewhere): the session refuses to retract
    // it, so the list stays as it was and says why.
    Judgment stranger;
    stranger.id = 99, stranger.anchor = 9, stranger.nearer = 10, stranger.farther = 11;
    still.post(cmd::AddJudgment{stranger});  // straight to the map, past the session
    view.set_snapshot(still.latest());
    const std::string refused = panel.set_retracted(3, true);
    CHECK_FALSE(refused.empty());
    CHECK(refused.find("could not write to the session") != std::string::npos);
    CHECK_FALSE(view.judgments()[3].retracted);
  }
  // What the file holds, read again after the window's link closed it.
  const auto stored = SessionStore::open(path)->judgments();
  REQUIRE(stored.size() == 3);
  CHECK_FALSE(stored[0].retracted);
  CHECK(stored[1].retracted);
  CHECK(stored[1].person == "Bram");
  CHECK(stored[2].person == "Cleo");
  CHECK(stored[2].anchor == 6);
}
