// Judgment review: the plain logic behind the window's judgment list and agreement figures.
//   filter          the judgments whose person is the one chosen and one of whose three items has
//                   an id containing the given text (case-insensitive);
//   same question   two judgments ask the same question when they share the anchor and the
//                   unordered candidate pair {nearer, farther}; their answer is the nearer item.
//                   Over every pair of non-retracted judgments of one question:
//                     consistency(p)     = agreeing pairs / pairs, both judgments by p
//                                          (p asked the same question again);
//                     cross-agreement(p) = agreeing pairs / pairs, one by p, one by someone else.
//                   With counts a, b of p's two answers and a', b' of the others':
//                     same-person pairs C(a,2)+C(b,2) agree of C(a+b,2); cross a a' + b b' of (a+b)(a'+b').
//                   This needs nothing but the judgments, so it works for imported and stored ones.
//   violated        the non-retracted judgments the map gives a t-STE probability
//                   p = K(a,n) / (K(a,n) + K(a,f)), K(i,j) = (1 + d_ij^2/alpha)^(-(alpha+1)/2),
//                   below a threshold, least likely first;
//   history         per-person agreement with the map sampled over time, for a small chart.
// Pure functions and a plain value class; safe from any thread (the history from one at a time).
#pragma once
#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/measures/judgment_health.h"
#include "solver/base/points.h"

namespace kith {

// ---- filtering -----------------------------------------------------------------------------
struct JudgmentFilter {
  bool any_person = true;      // (default: everyone)
  std::string person;          // with any_person false: only this person ("" = nobody named)
  std::string item;            // part of an item id, any case; "" = any item (default: "")
  bool show_retracted = true;  // (default: shown, marked)
};

// Indices into `judgments` (in their order) of those passing the filter. `ids` names the items.
std::vector<size_t> filter_judgments(const std::vector<Judgment>& judgments, const std::vector<std::string>& ids,
                                     const JudgmentFilter& filter);

// The distinct people named in `judgments`, sorted ("" included when a judgment has no person).
std::vector<std::string> judgment_people(const std::vector<Judgment>& judgments);

// ---- the same question asked more than once -------------------------------------------------
struct QuestionKey {
  int32_t anchor = -1, low = -1, high = -1;  // the candidate pair as (smaller, larger) index
  bool operator<(const QuestionKey& o) const {
    return anchor != o.anchor ? anchor < o.anchor : low != o.low ? low < o.low : high < o.high;
  }
  bool operator==(const QuestionKey& o) const { return anchor == o.anchor && low == o.low && high == o.high; }
};
QuestionKey question_key(const Judgment& judgment);

struct PersonQuestionAgreement {
  std::string person;
  size_t repeat_pairs = 0, repeat_agreeing = 0;  // pairs of this person's own answers to one question
  size_t shared_pairs = 0, shared_agreeing = 0;  // pairs (this person's answer, another person's)
  double consistency() const { return repeat_pairs ? double(repeat_agreeing) / double(repeat_pairs) : -1.0; }
  double cross_agreement() const { return shared_pairs ? double(shared_agreeing) / double(shared_pairs) : -1.0; }
};
// One entry per person with a non-retracted judgment, sorted by name.
std::vector<PersonQuestionAgreement> same_question_agreement(const std::vector<Judgment>& judgments);

// Questions answered more than once (non-retracted), with how many times.
size_t repeated_questions(const std::vector<Judgment>& judgments);

// ---- judgments the map cannot satisfy -------------------------------------------------------
struct ViolatedJudgment {
  size_t index = 0;          // into the judgments given
  double probability = 0.0;  // t-STE probability the map agrees
};
struct ViolationOptions {
  double threshold = 0.1;  // listed when p is below this (default: 0.1, i.e. the map says 9 to 1 against)
  double alpha = 1.0;      // t-STE degrees of freedom (default: 1, the map's)
  size_t limit = 0;        // at most this many, least likely first; 0 = all (default: 0)
  bool IsValid(std::string* error) const;
};
// Least likely first (ties by index). Judgments naming items outside the map are skipped.
std::vector<ViolatedJudgment> strongly_violated(const Points& y, const std::vector<Judgment>& judgments,
                                                const ViolationOptions& options = {});

// ---- agreement over time --------------------------------------------------------------------
// Per-person agreement with the map, one sample per add(); each person's series keeps the time of
// every sample (a person who had no judgments yet is missing from the early samples).
class AgreementHistory {
 public:
  explicit AgreementHistory(size_t capacity = 600) : capacity_(capacity) {}
  struct Point {
    double seconds;
    float agreement;
  };
  void add(double seconds, const std::vector<PersonJudgmentAgreement>& figures);
  const std::map<std::string, std::vector<Point>>& series() const { return series_; }
  double first_seconds() const { return first_; }
  double last_seconds() const { return last_; }
  size_t samples() const { return samples_; }

 private:
  size_t capacity_;
  size_t samples_ = 0;
  double first_ = 0.0, last_ = 0.0;
  std::map<std::string, std::vector<Point>> series_;
};

}  // namespace kith
