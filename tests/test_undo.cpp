// Undo and redo (viewer/scene/undo_feed.h): pins, unpins, judgments and retractions come back and
// go again as steps, over a still map; and through the real window under Xvfb, ctrl+Z and
// ctrl+shift+Z reach the session, so reopening it shows the map as undo left it.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"
#include "viewer/scene/undo_feed.h"

namespace {

using kith::CommandBody;
namespace cmd = kith::cmd;

kith::Judgment judge(int64_t id, int32_t anchor, int32_t nearer, int32_t farther) {
  kith::Judgment j;
  j.id = id;
  j.anchor = anchor;
  j.nearer = nearer;
  j.farther = farther;
  return j;
}

struct Still {
  kith::StillFeed still;
  kith::UndoFeed feed;
  Still()
      : still({"a", "b", "c", "d", "e"}, kith::Points::Zero(5, 3),
              {judge(1, 0, 1, 2), judge(2, 1, 2, 3)}),
        feed(still) {}
  // The window's path: prepare, then post; one frame's commands, then the step closes.
  void send(std::vector<CommandBody> bodies) {
    for (CommandBody& b : bodies) {
      REQUIRE(feed.prepare(b).empty());
      feed.post(b);
    }
    feed.end_step();
  }
  bool pinned(int i) const { return feed.latest()->pinned[size_t(i)] != 0; }
  double x(int i) const { return feed.latest()->positions(i, 0); }
  size_t active() const {
    size_t n = 0;
    for (const kith::Judgment& j : feed.latest()->judgments->all()) n += !j.retracted;
    return n;
  }
};

}  // namespace

TEST_CASE("undo: a pin, a moved pin and an unpin go back and come again") {
  Still s;
  s.send({cmd::Pin{2, {1.0, 2.0, 3.0}}});
  CHECK(s.pinned(2));
  CHECK(s.feed.undo() == "pin of c");
  CHECK_FALSE(s.pinned(2));
  CHECK(s.feed.can_redo());
  CHECK(s.feed.redo() == "pin of c");
  CHECK(s.pinned(2));
  CHECK(s.x(2) == 1.0);
  // A pinned item pinned elsewhere: undo puts its pin back where it was.
  s.send({cmd::Pin{2, {5.0, 0.0, 0.0}}});
  CHECK(s.x(2) == 5.0);
  s.feed.undo();
  CHECK(s.pinned(2));
  CHECK(s.x(2) == 1.0);
  // An unpin: undo pins it again at its place.
  s.send({cmd::Unpin{2}});
  CHECK_FALSE(s.pinned(2));
  CHECK(s.feed.undo() == "unpin of c");
  CHECK(s.pinned(2));
  CHECK(s.x(2) == 1.0);
  // Unpinning what is not pinned changes nothing and is no step.
  const size_t depth = s.feed.undo_depth();
  s.send({cmd::Unpin{4}});
  CHECK(s.feed.undo_depth() == depth);
}

TEST_CASE("undo: one frame's judgments are one step, a retraction is undone by a restore") {
  Still s;
  CHECK(s.active() == 2);
  s.send({cmd::AddJudgment{judge(-1, 0, 3, 4)}, cmd::AddJudgment{judge(-1, 1, 0, 4)},
          cmd::AddJudgment{judge(-1, 2, 1, 4)}});
  CHECK(s.active() == 5);
  CHECK(s.feed.undo() == "3 judgments");
  CHECK(s.active() == 2);
  CHECK(s.feed.latest()->judgments->all().size() == 5);  // kept, retracted: never deleted
  CHECK(s.feed.redo() == "3 judgments");
  CHECK(s.active() == 5);

  const int64_t first = s.feed.latest()->judgments->all().front().id;
  s.send({cmd::RetractJudgment{first, true}});
  CHECK(s.active() == 4);
  CHECK(s.feed.undo() == "retraction");
  CHECK(s.active() == 5);
  // Something new after an undo: redo has nothing left to bring back.
  s.send({cmd::Pin{0, {}}});
  CHECK_FALSE(s.feed.can_redo());
  CHECK(s.feed.redo().empty());
  // Undo past the first step: nothing more.
  while (!s.feed.undo().empty()) {
  }
  CHECK(s.active() == 2);
  CHECK_FALSE(s.pinned(0));
}

TEST_CASE("undo window: ctrl+Z and ctrl+shift+Z reach the session and reopening shows what they left") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("undo-window");
  const std::string items = kith::test::write_swatches_csv(dir, 40);
  const std::string script =
      "20 wait-settle 5\n"
      "30 move @sw7\n30 press left\n31 release left\n33 key P\n"
      "40 move @sw11\n40 press left\n41 release left\n43 key P\n"
      "50 key ctrl+Z\n55 dump " + dir + "/one.json\n"
      "60 key ctrl+Z\n62 key ctrl+shift+Z\n65 dump " + dir + "/two.json\n70 quit\n";
  REQUIRE(kith::test::open_with_script(items + " --frames 300", dir, "first", script) == 0);
  CAPTURE(kith::test::file_bytes(dir + "/first.log"));
  const auto one = nlohmann::json::parse(kith::test::file_bytes(dir + "/one.json"));
  const auto two = nlohmann::json::parse(kith::test::file_bytes(dir + "/two.json"));
  CHECK(one["pinned"].size() == 1);  // sw11's pin undone
  CHECK(one["undo_steps"] == 1);
  CHECK(one["redo_steps"] == 1);
  CHECK(two["pinned"].size() == 1);  // sw7 undone, then redone
  CHECK(two["undo_steps"] == 1);
  CHECK(two["redo_steps"] == 1);  // sw11's pin could still come back

  const std::string session = dir + "/swatches.kith";
  {
    kith::SessionOpenOptions o;
    o.read_only = true;
    const auto store = kith::SessionStore::open(session, o);
    const auto pins = store->pins();
    REQUIRE(pins.size() == 1);
    CHECK(store->collection().ids[size_t(pins[0].item)] == "sw7");
    size_t undos = 0;
    for (const auto& e : store->events()) undos += e.kind == "undo";
    CHECK(undos == 3);
  }
  // Reopened: the map as undo and redo left it.
  const std::string look = "20 wait-settle 5\n30 dump " + dir + "/again.json\n31 quit\n";
  REQUIRE(kith::test::open_with_script(session + " --frames 100", dir, "again", look) == 0);
  const auto again = nlohmann::json::parse(kith::test::file_bytes(dir + "/again.json"));
  CHECK(again["pinned"].size() == 1);
}
