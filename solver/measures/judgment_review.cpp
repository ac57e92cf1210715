// Judgment review (see judgment_review.h).
#include "solver/measures/judgment_review.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <set>

#include "solver/objective/judgment_term.h"

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
  auto matches = [&](int32_t item) {
    return item >= 0 && size_t(item) < item_matches.size() && item_matches[size_t(item)];
  };
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
  // People as small numbers (in name order), then one row per active judgment sorted by question
  // and person, so each question's answers, and each person's within it, are contiguous.
  std::map<std::string, int> person_of;
  for (const Judgment& j : judgments)
    if (!j.retracted) person_of.emplace(j.person, 0);
  std::vector<PersonQuestionAgreement> out;
  for (auto& [name, index] : person_of) {
    index = int(out.size());
    out.push_back({});
    out.back().person = name;
  }
  struct Row {
    QuestionKey key;
    int person;
    bool low;  // the nearer item is the pair's smaller index
  };
  std::vector<Row> rows;
  rows.reserve(judgments.size());
  for (const Judgment& j : judgments) {
    if (j.retracted) continue;
    const QuestionKey key = question_key(j);
    rows.push_back({key, person_of[j.person], j.nearer == key.low});
  }
  std::sort(rows.begin(), rows.end(),
            [](const Row& a, const Row& b) { return a.key == b.key ? a.person < b.person : a.key < b.key; });
  struct Counts {
    int person;
    size_t low = 0, high = 0;
  };
  std::vector<Counts> group;
  for (size_t begin = 0; begin < rows.size();) {
    size_t end = begin;
    while (end < rows.size() && rows[end].key == rows[begin].key) ++end;
    if (end - begin > 1) {  // a question asked once makes no pairs
      group.clear();
      size_t all_low = 0, all_high = 0;
      for (size_t k = begin; k < end; ++k) {
        if (group.empty() || group.back().person != rows[k].person) group.push_back({rows[k].person});
        (rows[k].low ? group.back().low : group.back().high) += 1;
        (rows[k].low ? all_low : all_high) += 1;
      }
      for (const Counts& c : group) {
        PersonQuestionAgreement& p = out[size_t(c.person)];
        p.repeat_pairs += pairs_of(c.low + c.high);
        p.repeat_agreeing += pairs_of(c.low) + pairs_of(c.high);
        const size_t other_low = all_low - c.low, other_high = all_high - c.high;
        p.shared_pairs += (c.low + c.high) * (other_low + other_high);
        p.shared_agreeing += c.low * other_low + c.high * other_high;
      }
    }
    begin = end;
  }
  return out;
}

size_t repeated_questions(const std::vector<Judgment>& judgments) {
  std::vector<QuestionKey> keys;
  keys.reserve(judgments.size());
  for (const Judgment& j : judgments)
    if (!j.retracted) keys.push_back(question_key(j));
  std::sort(keys.begin(), keys.end());
  size_t repeated = 0;
  for (size_t k = 1; k < keys.size(); ++k)
    repeated += keys[k] == keys[k - 1] && (k < 2 || !(keys[k - 1] == keys[k - 2]));
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
