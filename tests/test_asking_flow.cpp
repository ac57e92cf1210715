// The question flow as plain logic: answers, can't-tell, undo, turns, re-asks, grid expansion.
#include <doctest/doctest.h>

#include <set>
#include <stdexcept>
#include <tuple>

#include "solver/asking/question_flow.h"

using namespace kith;

namespace {
// A deterministic question source: anchors 0, 10, 20, ... with candidates after them.
QuestionFlow::QuestionSource counting_source(int* asked) {
  return [asked](QuestionKind kind, int n, int k) {
    Question q;
    q.kind = kind;
    q.anchor = 10 * (*asked)++;
    const int count = (kind == QuestionKind::kPair) ? 2 : n;
    for (int c = 1; c <= count; ++c) q.candidates.push_back(q.anchor + c);
    q.choose = (kind == QuestionKind::kPair) ? 1 : k;
    return q;
  };
}
QuestionFlowOptions no_reask(QuestionKind kind = QuestionKind::kPair) {
  QuestionFlowOptions o;
  o.kind = kind;
  o.reask_rate = 0.0;
  return o;
}
}  // namespace

TEST_CASE("pair answers become one judgment each, with the person whose turn it was") {
  int asked = 0;
  QuestionFlow flow(no_reask(), counting_source(&asked));
  flow.add_person("Ada", 0xE69F00);
  flow.add_person("Bo", 0x56B4E9);
  REQUIRE(flow.current().anchor == 0);
  auto j1 = flow.answer_pair(true, 100.0);
  REQUIRE(j1.size() == 1);
  CHECK(std::tie(j1[0].anchor, j1[0].nearer, j1[0].farther) == std::make_tuple(0, 1, 2));
  CHECK(j1[0].person == "Ada");
  CHECK(j1[0].kind == JudgmentKind::kPair);
  CHECK(j1[0].time == 100.0);
  CHECK(flow.turn() == 1);
  REQUIRE(flow.current().anchor == 10);
  auto j2 = flow.answer_pair(false, 101.0);
  CHECK(std::tie(j2[0].anchor, j2[0].nearer, j2[0].farther) == std::make_tuple(10, 12, 11));
  CHECK(j2[0].person == "Bo");
  CHECK(flow.turn() == 0);
}

TEST_CASE("can't tell is recorded but gives no judgment, and undo puts the question back") {
  int asked = 0;
  QuestionFlow flow(no_reask(), counting_source(&asked));
  flow.add_person("Ada", 1);
  flow.add_person("Bo", 2);
  flow.current();
  CHECK(flow.answer_cant_tell(5.0).empty());
  REQUIRE(flow.answers().size() == 1);
  CHECK(flow.answers()[0].cant_tell);
  CHECK(flow.turn() == 1);

  const int anchor = flow.current().anchor;
  auto given = flow.answer_pair(true, 6.0);
  flow.set_judgment_ids({41});
  auto undone = flow.undo();
  REQUIRE(undone.size() == 1);
  CHECK(undone[0].id == 41);
  CHECK(undone[0].anchor == given[0].anchor);
  CHECK(flow.answers().back().undone);
  CHECK(flow.turn() == 1);               // back to who answered
  CHECK(flow.current().anchor == anchor);  // the same question again
  CHECK(asked == 2);                     // and the source was not asked anew
  // A second undo reaches the can't-tell answer; a third finds nothing.
  CHECK(flow.undo().empty());
  CHECK(flow.answers()[0].undone);
  CHECK(flow.undo().empty());
}

TEST_CASE("grid answers expand into K x (N-K) judgments") {
  int asked = 0;
  auto o = no_reask(QuestionKind::kGrid);
  o.grid_size = 8;
  o.grid_choose = 2;
  QuestionFlow flow(o, counting_source(&asked));
  flow.add_person("Cy", 3);
  const Question q = flow.current();
  REQUIRE(q.candidates.size() == 8);
  auto js = flow.answer_grid({2, 5}, 9.0);
  CHECK(js.size() == 2 * 6);
  std::set<std::tuple<int, int, int>> got;
  for (const auto& j : js) {
    CHECK(j.kind == JudgmentKind::kGrid);
    CHECK(j.person == "Cy");
    got.insert({j.anchor, j.nearer, j.farther});
  }
  CHECK(got.size() == 12);
  for (int picked : {2, 5})
    for (int u = 0; u < 8; ++u) {
      if (u == 2 || u == 5) continue;
      CHECK(got.count({q.anchor, q.candidates[size_t(picked)], q.candidates[size_t(u)]}) == 1);
    }
  // Wrong numbers of picks, repeats and places off the grid are refused and record nothing.
  flow.current();
  CHECK_THROWS_AS(flow.answer_grid({1}, 1.0), std::invalid_argument);
  CHECK_THROWS_AS(flow.answer_grid({1, 1}, 1.0), std::invalid_argument);
  CHECK_THROWS_AS(flow.answer_grid({1, 8}, 1.0), std::invalid_argument);
  CHECK(flow.answers().size() == 1);
}

TEST_CASE("turns rotate after each answer, after every N, or only when the facilitator says") {
  int asked = 0;
  auto o = no_reask();
  o.turn_rule = TurnRule::kEveryN;
  o.turn_every = 2;
  QuestionFlow flow(o, counting_source(&asked));
  for (const char* n : {"A", "B", "C"}) flow.add_person(n, 0);
  std::vector<int> turns;
  for (int i = 0; i < 6; ++i) {
    turns.push_back(flow.turn());
    flow.current();
    flow.answer_pair(true, i);
  }
  CHECK(turns == std::vector<int>{0, 0, 1, 1, 2, 2});

  o.turn_rule = TurnRule::kFacilitator;
  flow.set_options(o);
  flow.set_turn(1);
  for (int i = 0; i < 3; ++i) {
    flow.current();
    flow.answer_pair(true, i);
    CHECK(flow.turn() == 1);
  }
  CHECK_THROWS(flow.set_turn(3));
}

TEST_CASE("re-asks repeat earlier questions at about the set rate") {
  int asked = 0;
  QuestionFlowOptions o;
  o.reask_rate = 0.2;
  o.seed = 11;
  QuestionFlow flow(o, counting_source(&asked));
  flow.add_person("A", 0);
  flow.add_person("B", 0);
  const int total = 2000;
  int reasks = 0;
  for (int i = 0; i < total; ++i) {
    const Question q = flow.current();
    if (q.reask) {
      ++reasks;
      REQUIRE(q.repeat_of >= 0);
      const Question& original = flow.answers()[size_t(q.repeat_of)].question;
      CHECK(original.anchor == q.anchor);
      CHECK(std::set<int>(original.candidates.begin(), original.candidates.end()) ==
            std::set<int>(q.candidates.begin(), q.candidates.end()));
    }
    flow.answer_pair(true, i);
  }
  // Binomial(2000, 0.2): mean 400, sd ~18; 5 sd either side.
  CHECK(reasks > 400 - 90);
  CHECK(reasks < 400 + 90);
  CHECK(asked == total - reasks);
}

TEST_CASE("agreement: self-consistency on re-asks and agreement between people") {
  // Hand-built record: question X answered by A twice (same), by B once (different);
  // question Y answered by A and B the same way; a can't-tell and an undone answer are ignored.
  auto answer = [](int person, int anchor, int chosen, bool cant_tell = false, bool undone = false) {
    Answer a;
    a.person = person;
    a.question.anchor = anchor;
    a.question.candidates = {anchor + 1, anchor + 2};
    if (!cant_tell) a.chosen = {chosen};
    a.cant_tell = cant_tell;
    a.undone = undone;
    return a;
  };
  std::vector<Answer> record = {answer(0, 0, 1), answer(0, 0, 1), answer(1, 0, 2), answer(0, 10, 11),
                                answer(1, 10, 11), answer(1, 20, 0, true), answer(1, 10, 12, false, true)};
  auto pa = person_agreement(record, 2);
  REQUIRE(pa.size() == 2);
  CHECK(pa[0].answered == 3);
  CHECK(pa[1].answered == 3);
  CHECK(pa[1].cant_tell == 1);
  CHECK(pa[0].self_pairs == 1);
  CHECK(pa[0].self_consistency == doctest::Approx(1.0));
  CHECK(pa[1].self_pairs == 0);
  CHECK(pa[1].self_consistency == -1);
  // A vs B on X: two pairs (A's two answers vs B's), both disagree; on Y: one pair, agree.
  CHECK(pa[0].other_pairs == 3);
  CHECK(pa[0].with_others == doctest::Approx(1.0 / 3.0));
  CHECK(pa[1].with_others == doctest::Approx(1.0 / 3.0));
}

TEST_CASE("question flow options are checked") {
  QuestionFlowOptions o;
  std::string error;
  o.grid_size = 4;
  o.grid_choose = 4;
  CHECK_FALSE(o.IsValid(&error));
  CHECK(error.find("between 1 and 3") != std::string::npos);
  o.grid_choose = 2;
  o.reask_rate = 1.5;
  CHECK_FALSE(o.IsValid(&error));
}
