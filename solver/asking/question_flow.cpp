#include "solver/asking/question_flow.h"

#include <algorithm>
#include <iterator>
#include <map>
#include <stdexcept>

#include "solver/base/portable_random.h"

namespace kith {

bool QuestionFlowOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (grid_size < 2) return fail("grid size must be at least 2 (got " + std::to_string(grid_size) + ")");
  if (grid_choose < 1 || grid_choose >= grid_size)
    return fail("a grid must ask to pick between 1 and " + std::to_string(grid_size - 1) + " items (got " +
                std::to_string(grid_choose) + ")");
  if (!(reask_rate >= 0.0 && reask_rate <= 1.0)) return fail("re-ask rate must be between 0 and 1");
  if (turn_every < 1) return fail("turns must rotate after at least 1 answer");
  return true;
}

QuestionFlow::QuestionFlow(QuestionFlowOptions options, QuestionSource source)
    : options_(options), source_(std::move(source)), rng_(options.seed) {
  std::string error;
  if (!options_.IsValid(&error)) throw std::invalid_argument(error);
}

// ---- people and turns ---------------------------------------------------------

int QuestionFlow::add_person(const std::string& name, uint32_t colour) {
  people_.push_back({name, colour});
  if (turn_ < 0) turn_ = 0;
  return int(people_.size()) - 1;
}

void QuestionFlow::rename_person(int person, const std::string& name) { people_.at(size_t(person)).name = name; }
void QuestionFlow::set_colour(int person, uint32_t colour) { people_.at(size_t(person)).colour = colour; }

void QuestionFlow::set_turn(int person) {
  if (person < 0 || size_t(person) >= people_.size()) throw std::out_of_range("no such person");
  turn_ = person;
  answers_this_turn_ = 0;
}

void QuestionFlow::advance_turn() {
  if (people_.empty()) return;
  ++answers_this_turn_;
  const bool rotate = (options_.turn_rule == TurnRule::kEachAnswer) ||
                      (options_.turn_rule == TurnRule::kEveryN && answers_this_turn_ >= options_.turn_every);
  if (rotate) {
    turn_ = (turn_ + 1) % int(people_.size());
    answers_this_turn_ = 0;
  }
}

void QuestionFlow::set_options(const QuestionFlowOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  const bool kind_changed = options.kind != options_.kind || options.grid_size != options_.grid_size ||
                            options.grid_choose != options_.grid_choose;
  options_ = options;
  if (kind_changed) has_current_ = false;
}

// ---- questions ------------------------------------------------------------------

Question QuestionFlow::next_question() {
  // Re-ask: repeat an earlier, not undone, answered question of the current kind.
  std::vector<size_t> earlier;
  for (size_t i = 0; i < answers_.size(); ++i)
    if (!answers_[i].undone && !answers_[i].question.reask && answers_[i].question.kind == options_.kind)
      earlier.push_back(i);
  if (!earlier.empty() && uniform01(rng_) < options_.reask_rate) {
    const size_t pick = earlier[below(rng_, earlier.size())];
    Question q = answers_[pick].question;
    q.reask = true;
    q.repeat_of = int64_t(pick);
    // Shuffle the candidates so a repeat does not show the same sides or grid places.
    shuffle(q.candidates.begin(), q.candidates.end(), rng_);
    return q;
  }
  Question q = source_(options_.kind, options_.grid_size, options_.grid_choose);
  q.kind = options_.kind;
  q.reask = false;
  q.repeat_of = -1;
  return q;
}

const Question& QuestionFlow::current() {
  if (!has_current_) {
    current_ = next_question();
    has_current_ = current_.anchor >= 0;
  }
  return current_;
}

void QuestionFlow::skip() { has_current_ = false; }

// ---- answers --------------------------------------------------------------------

std::vector<Judgment> QuestionFlow::record(Answer answer) {
  answer.person = turn_;
  answer.question = current_;
  const std::string who = (turn_ >= 0) ? people_[size_t(turn_)].name : std::string();
  for (auto& j : answer.judgments) {
    j.person = who;
    j.time = answer.time;
  }
  answers_.push_back(answer);
  has_current_ = false;
  advance_turn();
  return answers_.back().judgments;
}

std::vector<Judgment> QuestionFlow::answer_pair(bool left_is_closer, double time) {
  const Question& q = current();
  if (q.anchor < 0 || q.kind != QuestionKind::kPair || q.candidates.size() != 2)
    throw std::logic_error("no pair question is on screen");
  Answer a;
  a.time = time;
  const int32_t closer = left_is_closer ? q.candidates[0] : q.candidates[1];
  const int32_t other = left_is_closer ? q.candidates[1] : q.candidates[0];
  a.chosen = {closer};
  Judgment j;
  j.anchor = q.anchor;
  j.nearer = closer;
  j.farther = other;
  j.kind = JudgmentKind::kPair;
  a.judgments.push_back(j);
  return record(std::move(a));
}

std::vector<Judgment> QuestionFlow::answer_cant_tell(double time) {
  if (current().anchor < 0) throw std::logic_error("no question is on screen");
  Answer a;
  a.time = time;
  a.cant_tell = true;
  return record(std::move(a));
}

std::vector<Judgment> QuestionFlow::answer_grid(const std::vector<int>& picked, double time) {
  const Question& q = current();
  if (q.anchor < 0 || q.kind != QuestionKind::kGrid) throw std::logic_error("no grid question is on screen");
  const int n = int(q.candidates.size());
  std::vector<char> is_picked(size_t(n), 0);
  for (int p : picked) {
    if (p < 0 || p >= n) throw std::invalid_argument("grid place " + std::to_string(p + 1) + " is not on screen");
    if (is_picked[size_t(p)]) throw std::invalid_argument("grid place " + std::to_string(p + 1) + " picked twice");
    is_picked[size_t(p)] = 1;
  }
  if (int(picked.size()) != q.choose)
    throw std::invalid_argument("pick exactly " + std::to_string(q.choose) + " items (got " +
                                std::to_string(picked.size()) + ")");
  Answer a;
  a.time = time;
  for (int p : picked) a.chosen.push_back(q.candidates[size_t(p)]);
  for (int p : picked)
    for (int u = 0; u < n; ++u) {
      if (is_picked[size_t(u)]) continue;
      Judgment j;
      j.anchor = q.anchor;
      j.nearer = q.candidates[size_t(p)];
      j.farther = q.candidates[size_t(u)];
      j.kind = JudgmentKind::kGrid;
      a.judgments.push_back(j);
    }
  return record(std::move(a));
}

void QuestionFlow::set_judgment_ids(const std::vector<int64_t>& ids) {
  if (answers_.empty()) throw std::logic_error("no answer to give ids to");
  auto& js = answers_.back().judgments;
  if (ids.size() != js.size()) throw std::invalid_argument("one id per judgment of the last answer is needed");
  for (size_t i = 0; i < ids.size(); ++i) js[i].id = ids[i];
}

std::vector<Judgment> QuestionFlow::undo() {
  for (auto it = answers_.rbegin(); it != answers_.rend(); ++it) {
    if (it->undone) continue;
    it->undone = true;
    current_ = it->question;
    has_current_ = true;
    if (it->person >= 0 && size_t(it->person) < people_.size()) {
      turn_ = it->person;
      answers_this_turn_ = 0;
    }
    return it->judgments;
  }
  return {};
}

// ---- agreement ------------------------------------------------------------------

namespace {

// Questions are the same when they have the same anchor and the same set of candidates.
std::vector<int32_t> question_key(const Question& q) {
  std::vector<int32_t> key = q.candidates;
  std::sort(key.begin(), key.end());
  key.insert(key.begin(), q.anchor);
  key.insert(key.begin(), int32_t(q.kind));
  return key;
}

// 1 when two answers chose the same items; for a grid, the share of the K picks they share.
double same_answer(const Answer& a, const Answer& b) {
  std::vector<int32_t> x = a.chosen, y = b.chosen;
  std::sort(x.begin(), x.end());
  std::sort(y.begin(), y.end());
  std::vector<int32_t> both;
  std::set_intersection(x.begin(), x.end(), y.begin(), y.end(), std::back_inserter(both));
  return x.empty() ? 0.0 : double(both.size()) / double(x.size());
}

}  // namespace

std::vector<PersonAgreement> person_agreement(const std::vector<Answer>& answers, int people) {
  std::vector<PersonAgreement> out(size_t(std::max(people, 0)));
  std::vector<double> self_sum(out.size(), 0.0), other_sum(out.size(), 0.0);
  for (size_t p = 0; p < out.size(); ++p) out[p].person = int(p);
  std::map<std::vector<int32_t>, std::vector<size_t>> by_question;
  for (size_t i = 0; i < answers.size(); ++i) {
    const Answer& a = answers[i];
    if (a.undone || a.person < 0 || a.person >= people) continue;
    auto& pa = out[size_t(a.person)];
    ++pa.answered;
    if (a.cant_tell) {
      ++pa.cant_tell;
      continue;
    }
    by_question[question_key(a.question)].push_back(i);
  }
  for (const auto& entry : by_question) {
    const auto& idx = entry.second;
    for (size_t u = 0; u < idx.size(); ++u)
      for (size_t v = u + 1; v < idx.size(); ++v) {
        const Answer& a = answers[idx[u]];
        const Answer& b = answers[idx[v]];
        const double s = same_answer(a, b);
        if (a.person == b.person) {
          self_sum[size_t(a.person)] += s;
          ++out[size_t(a.person)].self_pairs;
        } else {
          for (int who : {a.person, b.person}) {
            other_sum[size_t(who)] += s;
            ++out[size_t(who)].other_pairs;
          }
        }
      }
  }
  for (size_t p = 0; p < out.size(); ++p) {
    if (out[p].self_pairs > 0) out[p].self_consistency = self_sum[p] / out[p].self_pairs;
    if (out[p].other_pairs > 0) out[p].with_others = other_sum[p] / out[p].other_pairs;
  }
  return out;
}

}  // namespace kith
