// Judgment review (see judgment_review.h).
#include "solver/judgment_review.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <set>

#include "solver/judgment_term.h"

namespace kith {

namespace {
std::string lower(const std::string& s) {
  std::string out = s;
  for (char& c : out) c = char(std::tolower(static_cast<unsigned char>(c)));
  return out;
}
size_t pairs_of(size_t n) { return n < 2 ? 0 : n * (n - 1) / 2; }
}  // namespace

std::vector<size_t> filter_judgments(const std::vector<Judgment>& judgments, const std::vector<std::string>& ids,
                                     const JudgmentFilter& filter) {
  std::vector<size_t> out;
  out.reserve(judgments.size());
  const std::string needle = lower(filter.item);
  // Which items match the text: decided once per item, not once per judgment.
  std::vector<uint8_t> item_matches;
  if (!needle.empty()) {
    item_matches.resize(ids.size());
    for (size_t i = 0; i < ids.size(); ++i) item_matches[i] = lower(ids[i]).find(needle) != std::string::npos;
  }
  auto matches = [&](int32_t item) { return item >= 0 && size_t(item) < item_matches.size() && item_matches[size_t(item)]; };
  for (size_t k = 0; k < judgments.size(); ++k) {
    const Judgment& j = judgments[k];
    if (!filter.show_retracted && j.retracted) continue;
    if (!filter.any_person && j.person != filter.person) continue;
    if (!needle.empty() && !matches(j.anchor) && !matches(j.nearer) && !matches(j.farther)) continue;
    out.push_back(k);
  }
  return out;
}

std::vector<std::string> judgment_people(const std::vector<Judgment>& judgments) {
  std::set<std::string> people;
  for (const Judgment& j : judgments) people.insert(j.person);
  return {people.begin(), people.end()};
}

QuestionKey question_key(const Judgment& j) {
  return {j.anchor, std::min(j.nearer, j.farther), std::max(j.nearer, j.farther)};
}

std::vector<PersonQuestionAgreement> same_question_agreement(const std::vector<Judgment>& judgments) {
  // Per question, per person: how often each candidate was the nearer one.
  struct Counts {
    size_t low = 0, high = 0;
  };
  std::map<QuestionKey, std::map<std::string, Counts>> questions;
  std::map<std::string, PersonQuestionAgreement> people;
  for (const Judgment& j : judgments) {
    if (j.retracted) continue;
    const QuestionKey key = question_key(j);
    Counts& c = questions[key][j.person];
    (j.nearer == key.low ? c.low : c.high) += 1;
    people[j.person].person = j.person;
  }
  for (const auto& [key, by_person] : questions) {
    Counts all;
    for (const auto& [person, c] : by_person) all.low += c.low, all.high += c.high;
    for (const auto& [person, c] : by_person) {
      PersonQuestionAgreement& p = people[person];
      p.repeat_pairs += pairs_of(c.low + c.high);
      p.repeat_agreeing += pairs_of(c.low) + pairs_of(c.high);
      const size_t other_low = all.low - c.low, other_high = all.high - c.high;
      p.shared_pairs += (c.low + c.high) * (other_low + other_high);
      p.shared_agreeing += c.low * other_low + c.high * other_high;
    }
  }
  std::vector<PersonQuestionAgreement> out;
  for (auto& [name, p] : people) out.push_back(p);
  return out;
}

size_t repeated_questions(const std::vector<Judgment>& judgments) {
  std::map<QuestionKey, size_t> count;
  for (const Judgment& j : judgments)
    if (!j.retracted) ++count[question_key(j)];
  size_t repeated = 0;
  for (const auto& [key, n] : count) repeated += n > 1;
  return repeated;
}

bool ViolationOptions::IsValid(std::string* error) const {
  if (!(threshold > 0.0 && threshold < 1.0)) {
    if (error) *error = "the violation threshold is a probability between 0 and 1, got " + std::to_string(threshold);
    return false;
  }
  if (!(alpha > 0.0) || !std::isfinite(alpha)) {
    if (error) *error = "alpha must be > 0, got " + std::to_string(alpha);
    return false;
  }
  return true;
}

std::vector<ViolatedJudgment> strongly_violated(const Points& y, const std::vector<Judgment>& judgments,
                                                const ViolationOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  std::vector<ViolatedJudgment> out;
  const int32_t n = int32_t(y.rows());
  for (size_t k = 0; k < judgments.size(); ++k) {
    const Judgment& j = judgments[k];
    if (j.retracted) continue;
    if (j.anchor < 0 || j.nearer < 0 || j.farther < 0 || j.anchor >= n || j.nearer >= n || j.farther >= n) continue;
    const double p = tste_probability(y, j.anchor, j.nearer, j.farther, options.alpha);
    if (p < options.threshold) out.push_back({k, p});
  }
  std::sort(out.begin(), out.end(), [](const ViolatedJudgment& a, const ViolatedJudgment& b) {
    return a.probability != b.probability ? a.probability < b.probability : a.index < b.index;
  });
  if (options.limit > 0 && out.size() > options.limit) out.resize(options.limit);
  return out;
}

void AgreementHistory::add(double seconds, const std::vector<PersonJudgmentAgreement>& figures) {
  if (samples_ == 0) first_ = seconds;
  last_ = seconds;
  ++samples_;
  for (const PersonJudgmentAgreement& f : figures) {
    if (f.judgments == 0 || f.agreement < 0) continue;
    auto& s = series_[f.person];
    s.push_back({seconds, float(f.agreement)});
    if (s.size() > capacity_) s.erase(s.begin());
  }
  // The chart starts at the oldest point still kept.
  double oldest = last_;
  for (const auto& [person, s] : series_)
    if (!s.empty()) oldest = std::min(oldest, s.front().seconds);
  first_ = oldest;
}

}  // namespace kith
