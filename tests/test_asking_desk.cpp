// The asking screens' logic without a window (viewer/scene/asking_desk.h): key mapping, the own
// judgment's click sequence and typed line, answers going out through the post path with their
// stored ids, refusals leaving the question on screen, undo as retraction, turns and people events.
#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>
#include <doctest/doctest.h>

#include <map>
#include <nlohmann/json.hpp>
#include <random>
#include <set>
#include <tuple>

#include "tests/sessions_support.h"
#include "viewer/scene/asking_desk.h"

using namespace kith;

namespace {

// Stands in for the window: stores every posted command (giving judgments ids 101, 102, ...),
// can refuse the n-th judgment, and keeps events.
struct FakeWindow {
  std::vector<CommandBody> posted;
  std::vector<std::pair<std::string, std::string>> events;
  int64_t next_id = 101;
  int refuse_judgment = -1;  // refuse the judgment with this 0-based count (-1: never)
  int judgments_seen = 0;
  bool refuse_events = false;
  std::shared_ptr<Snapshot> snapshot = std::make_shared<Snapshot>();

  DeskLinks links() {
    DeskLinks l;
    l.post = [this](CommandBody& body) -> std::string {
      if (auto* a = std::get_if<cmd::AddJudgment>(&body)) {
        if (judgments_seen++ == refuse_judgment) return "disk full";
        a->judgment.id = next_id++;
      }
      posted.push_back(body);
      return "";
    };
    l.record_event = [this](const SessionEvent& event) -> std::string {
      if (refuse_events) return "disk full";
      const EventRecord record = to_record(event);  // the stored form, as a session keeps it
      events.emplace_back(record.kind, record.detail);
      return "";
    };
    l.snapshot = [this] { return std::shared_ptr<const Snapshot>(snapshot); };
    l.judgments = [this] {
      std::vector<Judgment> js;
      for (const auto& b : posted)
        if (auto* a = std::get_if<cmd::AddJudgment>(&b)) js.push_back(a->judgment);
      return js;
    };
    l.selection = [] { return std::vector<int>{}; };
    l.now = [] { return 1000.0; };
    return l;
  }
  std::vector<Judgment> added() const {
    std::vector<Judgment> js;
    for (const auto& b : posted)
      if (auto* a = std::get_if<cmd::AddJudgment>(&b)) js.push_back(a->judgment);
    return js;
  }
  std::vector<int64_t> retracted() const {
    std::vector<int64_t> ids;
    for (const auto& b : posted)
      if (auto* r = std::get_if<cmd::RetractJudgment>(&b)) ids.push_back(r->judgment_id);
    return ids;
  }
};

Collection small_collection() { return kith::test::swatch_collection(40, 4, 3); }

void random_map(Snapshot* s, size_t n, uint32_t seed) {
  std::mt19937 rng(seed);
  std::normal_distribution<double> g(0.0, 1.0);
  s->positions.resize(Eigen::Index(n), 3);
  for (Eigen::Index i = 0; i < s->positions.rows(); ++i)
    for (int d = 0; d < 3; ++d) s->positions(i, d) = g(rng);
}

// Lists NAMES at the desk, coloured 1, 2, 3...: each must be accepted.
void add_people(AskingDesk& desk, std::initializer_list<const char*> names) {
  uint32_t colour = 0;
  for (const char* name : names) REQUIRE(desk.add_person(name, ++colour) == "");
}

QuestionFlowOptions no_reask() {
  QuestionFlowOptions o;
  o.reask_rate = 0.0;
  return o;
}

}  // namespace

TEST_CASE("asking keys: each screen has its own keys, ctrl chords stay the window's") {
  using A = AskingAction;
  CHECK(asking_key_action(AskingMode::kOff, GLFW_KEY_A, 0, 8).action == A::kStartPair);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_A, 0, 8).action == A::kStartGrid);
  CHECK(asking_key_action(AskingMode::kGrid, GLFW_KEY_A, 0, 8).action == A::kStartPair);
  CHECK(asking_key_action(AskingMode::kOff, GLFW_KEY_A, GLFW_MOD_CONTROL, 8).action == A::kNone);  // select all
  CHECK(asking_key_action(AskingMode::kOff, GLFW_KEY_LEFT, 0, 8).action == A::kNone);  // arrows turn the map
  CHECK(asking_key_action(AskingMode::kOff, GLFW_KEY_ESCAPE, 0, 8).action == A::kNone);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_LEFT, 0, 8).action == A::kLeft);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_1, 0, 8).action == A::kLeft);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_RIGHT, 0, 8).action == A::kRight);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_2, 0, 8).action == A::kRight);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_DOWN, 0, 8).action == A::kCantTell);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_0, 0, 8).action == A::kCantTell);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_3, 0, 8).action == A::kNone);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_BACKSPACE, 0, 8).action == A::kUndo);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_ESCAPE, 0, 8).action == A::kLeave);
  const KeyAction five = asking_key_action(AskingMode::kGrid, GLFW_KEY_5, 0, 8);
  CHECK(five.action == A::kPick);
  CHECK(five.place == 4);
  CHECK(asking_key_action(AskingMode::kGrid, GLFW_KEY_KP_3, 0, 8).place == 2);
  CHECK(asking_key_action(AskingMode::kGrid, GLFW_KEY_9, 0, 8).action == A::kNone);  // only 8 on screen
  CHECK(asking_key_action(AskingMode::kGrid, GLFW_KEY_0, 0, 8).action == A::kCantTell);
  CHECK(asking_key_action(AskingMode::kOwn, GLFW_KEY_ENTER, 0, 8).action == A::kCommit);
  CHECK(asking_key_action(AskingMode::kOwn, GLFW_KEY_BACKSPACE, 0, 8).action == A::kUndo);
  CHECK(asking_key_action(AskingMode::kOff, GLFW_KEY_O, 0, 8).action == A::kStartOwn);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_W, 0, 8).action == A::kNextPerson);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_W, GLFW_MOD_SHIFT, 8).action == A::kPrevPerson);
  CHECK(asking_key_action(AskingMode::kOff, GLFW_KEY_B, 0, 8).action == A::kLargeType);
  CHECK(asking_key_action(AskingMode::kPair, GLFW_KEY_L, 0, 8).action == A::kNone);  // the judgments panel's key
}

TEST_CASE("own judgment: three clicks in order, no item twice, back clears the last") {
  OwnDraft d;
  CHECK(d.filled() == 0);
  CHECK(d.add(7) == "");
  CHECK(d.add(7) != "");  // the same item cannot be both anchor and nearer
  CHECK(d.add(3) == "");
  CHECK_FALSE(d.complete());
  d.back();
  CHECK(d.filled() == 1);
  CHECK(d.add(4) == "");
  CHECK(d.add(9) == "");
  CHECK(d.complete());
  CHECK(d.add(11) != "");  // full
  CHECK(d.slots() == std::array<int, 3>{7, 4, 9});
}

TEST_CASE("own judgment typed: ids with completion, bad words are named") {
  const std::vector<std::string> ids = {"oak-1", "oak-12", "Olive", "pine"};
  std::unordered_map<std::string, int> index;
  for (size_t i = 0; i < ids.size(); ++i) index[ids[i]] = int(i);
  std::array<int, 3> items{};
  CHECK(parse_own_line("oak-1, pine olive", index, &items) == "no item 'olive'");
  CHECK(parse_own_line("oak-1 pine", index, &items).find("three ids") == 0);
  CHECK(parse_own_line("oak-1 pine oak-1", index, &items) == "an item appears twice");
  REQUIRE(parse_own_line("  oak-12,pine  Olive ", index, &items) == "");
  CHECK(items == std::array<int, 3>{1, 3, 2});
  CHECK(complete_id(ids, "pine oa", 5) == std::vector<std::string>{"oak-1", "oak-12"});
  CHECK(complete_id(ids, "pine o", 5) == std::vector<std::string>{"oak-1", "oak-12", "Olive"});
  CHECK(complete_id(ids, "pine O", 1) == std::vector<std::string>{"oak-1"});
  CHECK(complete_id(ids, "pine ", 5).empty());
  CHECK(apply_completion("pine ol", "Olive") == "pine Olive ");
}

TEST_CASE("asking desk: answers go out through the post path with people, ids and kinds") {
  const Collection c = small_collection();
  FakeWindow w;
  random_map(w.snapshot.get(), c.size(), 5);
  AskingDesk desk(c, w.links(), no_reask());
  REQUIRE(desk.add_person("Ana", 0x0072B2) == "");
  REQUIRE(desk.add_person("Ben", 0xD55E00) == "");
  CHECK(desk.add_person("Ana", 0) != "");  // listed already
  CHECK(desk.add_person("  ", 0) != "");
  REQUIRE(w.events.size() == 2);
  CHECK(w.events[0].first == "person");
  CHECK(nlohmann::json::parse(w.events[1].second)["name"] == "Ben");

  REQUIRE(desk.key(GLFW_KEY_A, 0));
  REQUIRE(desk.mode() == AskingMode::kPair);
  CHECK(desk.turn_name() == "Ana");
  CHECK(desk.next_name() == "Ben");
  const Question q1 = desk.question();
  REQUIRE(q1.anchor >= 0);
  REQUIRE(desk.key(GLFW_KEY_RIGHT, 0));
  REQUIRE(w.added().size() == 1);
  const Judgment j1 = w.added()[0];
  CHECK(std::tie(j1.anchor, j1.nearer, j1.farther) == std::tie(q1.anchor, q1.candidates[1], q1.candidates[0]));
  CHECK(j1.person == "Ana");
  CHECK(j1.kind == JudgmentKind::kPair);
  CHECK(desk.flow().answers().back().judgments[0].id == 101);  // the stored id came back
  CHECK(desk.turn_name() == "Ben");

  // Can't tell: an event, no judgment.
  const Question q2 = desk.question();
  REQUIRE(desk.key(GLFW_KEY_DOWN, 0));
  CHECK(w.added().size() == 1);
  REQUIRE(w.events.back().first == "cant_tell");
  const auto ct = nlohmann::json::parse(w.events.back().second);
  CHECK(ct["person"] == "Ben");
  CHECK(ct["anchor"] == c.ids[size_t(q2.anchor)]);
  CHECK(desk.turn_name() == "Ana");

  // Undo takes back Ben's can't tell (an event), then Ana's judgment (a retraction by id).
  REQUIRE(desk.key(GLFW_KEY_BACKSPACE, 0));
  CHECK(w.events.back().first == "cant_tell_undone");
  CHECK(desk.turn_name() == "Ben");
  CHECK(desk.question().anchor == q2.anchor);
  REQUIRE(desk.key(GLFW_KEY_BACKSPACE, 0));
  CHECK(w.retracted() == std::vector<int64_t>{101});
  CHECK(desk.turn_name() == "Ana");
  CHECK(desk.question().anchor == q1.anchor);
  CHECK(desk.answered() == 0);

  // Grid: 8 candidates, pick 2 -> 2 x 6 judgments of kind grid; a repeated key unpicks.
  REQUIRE(desk.key(GLFW_KEY_A, 0));
  REQUIRE(desk.mode() == AskingMode::kGrid);
  const Question g = desk.question();
  REQUIRE(g.candidates.size() == 8);
  CHECK(g.choose == 2);
  desk.key(GLFW_KEY_3, 0);
  desk.key(GLFW_KEY_3, 0);
  CHECK(desk.grid_picks().empty());
  desk.key(GLFW_KEY_3, 0);
  const size_t before = w.added().size();
  desk.key(GLFW_KEY_7, 0);
  const auto all = w.added();
  REQUIRE(all.size() == before + 12);
  std::set<std::tuple<int, int, int>> got, want;
  for (size_t k = before; k < all.size(); ++k) {
    got.insert({all[k].anchor, all[k].nearer, all[k].farther});
    CHECK(all[k].kind == JudgmentKind::kGrid);
    CHECK(all[k].person == "Ana");
  }
  for (int p : {2, 6})
    for (int u = 0; u < 8; ++u)
      if (u != 2 && u != 6) want.insert({g.anchor, g.candidates[size_t(p)], g.candidates[size_t(u)]});
  CHECK(got == want);
  CHECK(desk.judgments_made() == 12);
}

TEST_CASE("asking desk: a refused write leaves the question and the turn where they were") {
  const Collection c = small_collection();
  FakeWindow w;
  random_map(w.snapshot.get(), c.size(), 6);
  AskingDesk desk(c, w.links(), no_reask());
  add_people(desk, {"Ana", "Ben"});
  desk.set_mode(AskingMode::kGrid);
  const Question g = desk.question();
  w.refuse_judgment = 2;  // the third of the twelve fails
  desk.key(GLFW_KEY_1, 0);
  desk.key(GLFW_KEY_2, 0);
  CHECK(desk.message().find("not saved") == 0);
  CHECK(desk.message().find("disk full") != std::string::npos);
  CHECK(w.added().size() == 2);
  CHECK(w.retracted() == std::vector<int64_t>{101, 102});  // the two that were written are taken back
  CHECK(desk.answered() == 0);
  CHECK(desk.turn_name() == "Ana");
  CHECK(desk.question().anchor == g.anchor);
  CHECK(desk.question().candidates == g.candidates);
  CHECK(desk.grid_picks() == std::vector<int>{0});  // one more key press retries
  w.refuse_judgment = -1;
  desk.key(GLFW_KEY_2, 0);
  CHECK(desk.answered() == 1);
  CHECK(w.added().size() == 2 + 12);
  CHECK(desk.turn_name() == "Ben");

  // A can't tell that cannot be written is not taken either.
  desk.set_mode(AskingMode::kPair);
  const Question q = desk.question();
  w.refuse_events = true;
  desk.key(GLFW_KEY_0, 0);
  CHECK(desk.message().find("not saved") == 0);
  CHECK(desk.answered() == 1);
  CHECK(desk.question().anchor == q.anchor);
  CHECK(desk.turn_name() == "Ben");
  // Nor a new person.
  CHECK(desk.add_person("Caro", 3) == "disk full");
  CHECK(desk.flow().people().size() == 2);
}

TEST_CASE("asking desk: own judgments by clicks carry the person whose turn it is, W moves the turn") {
  const Collection c = small_collection();
  FakeWindow w;
  random_map(w.snapshot.get(), c.size(), 7);
  AskingDesk desk(c, w.links(), no_reask());
  add_people(desk, {"Ana", "Ben", "Caro"});
  desk.key(GLFW_KEY_W, 0);
  CHECK(desk.turn_name() == "Ben");
  desk.key(GLFW_KEY_W, GLFW_MOD_SHIFT);
  desk.key(GLFW_KEY_W, GLFW_MOD_SHIFT);
  CHECK(desk.turn_name() == "Caro");
  CHECK(desk.next_name() == "Ana");
  REQUIRE(desk.key(GLFW_KEY_O, 0));
  REQUIRE(desk.mode() == AskingMode::kOwn);
  desk.key(GLFW_KEY_ENTER, 0);  // nothing chosen yet
  CHECK(w.added().empty());
  desk.own().add(5);
  desk.own().add(6);
  desk.own().add(8);
  desk.key(GLFW_KEY_BACKSPACE, 0);  // change the farther one
  desk.own().add(9);
  desk.key(GLFW_KEY_ENTER, 0);
  REQUIRE(w.added().size() == 1);
  const Judgment j = w.added()[0];
  CHECK(std::tie(j.anchor, j.nearer, j.farther) == std::make_tuple(5, 6, 9));
  CHECK(j.kind == JudgmentKind::kOwn);
  CHECK(j.person == "Caro");
  CHECK(desk.own().filled() == 0);
  CHECK(desk.turn_name() == "Caro");  // own judgments do not move the turn
  desk.key(GLFW_KEY_BACKSPACE, 0);    // empty draft: takes back the stored one
  CHECK(w.retracted() == std::vector<int64_t>{101});
  desk.key(GLFW_KEY_ESCAPE, 0);
  CHECK(desk.mode() == AskingMode::kOff);
}

TEST_CASE("asking desk: no question until the map has enough items, about the selection keeps the anchor in it") {
  const Collection c = small_collection();
  FakeWindow w;
  AskingDesk desk(c, w.links(), no_reask());
  desk.set_mode(AskingMode::kPair);  // nobody listed: a first person is added
  CHECK(desk.turn_name() == "person 1");
  CHECK(desk.question().anchor == -1);  // no snapshot yet
  desk.key(GLFW_KEY_LEFT, 0);
  CHECK(w.added().empty());
  random_map(w.snapshot.get(), c.size(), 8);
  DeskLinks l = w.links();
  const std::vector<int> chosen = {4, 17, 30};
  l.selection = [chosen] { return chosen; };
  AskingDesk sel(c, l, no_reask());
  sel.set_picker_choice(PickerChoice::kSelection);
  sel.set_mode(AskingMode::kPair);
  for (int k = 0; k < 12; ++k) {
    const int32_t a = sel.question().anchor;
    CHECK(std::count(chosen.begin(), chosen.end(), a) == 1);
    sel.key(GLFW_KEY_LEFT, 0);
  }
}
