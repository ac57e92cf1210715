// QuestionFlow: the logic of asking people, with no GUI. It holds the list of people and whose
// turn it is, the current question, and the record of every answer; it turns answers into
// judgments and undo into retractions. The caller (the viewer) shows the question, sends the
// resulting judgments to the session store and the engine, and only then moves on.
//
//   pair question: anchor + 2 candidates; "left is closer" gives (anchor, left, right),
//                  "right is closer" gives (anchor, right, left), "can't tell" gives no judgment
//                  but is recorded.
//   grid question: anchor + N candidates; the person picks K; every picked c and unpicked u give
//                  (anchor, c, u): K x (N-K) judgments.
//   re-ask:        with probability reask_rate the next question repeats an earlier answered one
//                  (to whoever's turn it is), so consistency can be measured.
//
// Single-threaded: the viewer's frame loop owns one. Questions come from a caller-supplied
// source (a picker), so this file knows nothing of maps or models.
#pragma once
#include <cstdint>
#include <functional>
#include <random>
#include <string>
#include <vector>

#include "solver/base/judgment.h"

namespace kith {

struct Person {
  std::string name;
  uint32_t colour = 0x2A7F6F;  // 0xRRGGBB (default: kith's sea green, the window's first accent)
};

enum class QuestionKind : int { kPair = 0, kGrid = 1 };

struct Question {
  QuestionKind kind = QuestionKind::kPair;
  int32_t anchor = -1;
  std::vector<int32_t> candidates;  // 2 for a pair, N for a grid
  int choose = 1;                   // K for a grid, 1 for a pair
  bool reask = false;               // a repeat of question `repeat_of`
  int64_t repeat_of = -1;           // index into answers() of the earlier answer
};

enum class TurnRule : int {
  kEachAnswer = 0,   // the next person after every answer
  kEveryN = 1,       // after every `turn_every` answers
  kFacilitator = 2,  // only when set_turn() is called
};

struct QuestionFlowOptions {
  QuestionKind kind = QuestionKind::kPair;  // (default: pair questions)
  int grid_size = 8;                        // N candidates in a grid (default: 8)
  int grid_choose = 2;                      // K to pick in a grid (default: 2)
  double reask_rate = 0.05;                 // share of questions that repeat an earlier one (default: 0.05)
  TurnRule turn_rule = TurnRule::kEachAnswer;  // (default: rotate after each answer)
  int turn_every = 1;                       // with kEveryN (default: 1)
  uint64_t seed = 7;                        // re-ask draws (default: 7)
  bool IsValid(std::string* error) const;
};

// One answer as given; `chosen` holds the candidates picked (pair: the closer one; empty for
// "can't tell"). `judgments` are the triplets it produced, with the ids the store gave them.
struct Answer {
  Question question;
  int person = -1;  // index into people()
  double time = 0.0;
  bool cant_tell = false;
  std::vector<int32_t> chosen;
  std::vector<Judgment> judgments;
  bool undone = false;
};

class QuestionFlow {
 public:
  // Asks `source` for a new question of the given kind; the source may return a question with
  // anchor -1 when it has none to offer.
  using QuestionSource = std::function<Question(QuestionKind kind, int grid_size, int grid_choose)>;

  QuestionFlow(QuestionFlowOptions options, QuestionSource source);

  // ---- people and turns
  int add_person(const std::string& name, uint32_t colour);
  void rename_person(int person, const std::string& name);
  void set_colour(int person, uint32_t colour);
  const std::vector<Person>& people() const { return people_; }
  int turn() const { return turn_; }  // -1 when nobody is listed
  void set_turn(int person);          // the facilitator picks

  // ---- questions
  const QuestionFlowOptions& options() const { return options_; }
  void set_options(const QuestionFlowOptions& options);  // takes effect from the next question
  // The question on screen, asking the source (or re-asking) when there is none.
  const Question& current();
  void skip();  // drop the current question without answering

  // ---- answers: each returns the judgments to store and post (empty for can't-tell). The
  // caller fills in Judgment::id after storing, through set_judgment_ids.
  std::vector<Judgment> answer_pair(bool left_is_closer, double time);
  std::vector<Judgment> answer_cant_tell(double time);
  // `picked` are positions 0..N-1 in the grid; exactly `choose` distinct ones.
  std::vector<Judgment> answer_grid(const std::vector<int>& picked, double time);
  void set_judgment_ids(const std::vector<int64_t>& ids);  // for the last answer, in order
  // Undoes the last answer not yet undone: returns its judgments (to be retracted) and puts its
  // question back on screen. Turn goes back to who gave it.
  std::vector<Judgment> undo();

  const std::vector<Answer>& answers() const { return answers_; }

 private:
  Question next_question();
  std::vector<Judgment> record(Answer answer);
  void advance_turn();

  QuestionFlowOptions options_;
  QuestionSource source_;
  std::vector<Person> people_;
  int turn_ = -1;
  int answers_this_turn_ = 0;
  bool has_current_ = false;
  Question current_;
  std::vector<Answer> answers_;
  std::mt19937_64 rng_;
};

// ---- agreement ----------------------------------------------------------------
// Consistency: over re-asked questions answered by the same person twice, the share answered
// the same way. Cross-agreement: over questions answered by two different people, the share
// answered the same way. Can't-tell answers and undone answers are left out. -1 when no pairs.
struct PersonAgreement {
  int person = -1;
  int answered = 0;              // answers that were not undone
  int cant_tell = 0;
  double self_consistency = -1;  // same person, same question
  int self_pairs = 0;
  double with_others = -1;       // different people, same question
  int other_pairs = 0;
};
std::vector<PersonAgreement> person_agreement(const std::vector<Answer>& answers, int people);

}  // namespace kith
