// Judgment: one triplet "anchor is more like nearer than like farther", with who made it, when,
// and how. Items are row indices into the collection. Plain value type.
#pragma once
#include <cstddef>
#include <cstdint>
#include <string>

namespace kith {

enum class JudgmentKind : int {
  kOwn = 0,     // a person picked the three items themselves in the map
  kPair = 1,    // answer to a pair question
  kGrid = 2,    // one of the K x (N-K) triplets from a grid question
  kDrag = 3,    // made by "teach" from a drag
  kImport = 4,  // read from a file
};
const char* to_string(JudgmentKind kind);
bool judgment_kind_from_string(const std::string& text, JudgmentKind* kind);

// A judgment's weight scales its term in the objective; past this one judgment would outweigh a
// thousand others, which no person means.
constexpr double kMaxJudgmentWeight = 1000.0;
// Judgment times: seconds since 1970-01-01T00:00:00Z, after it and before 10000-01-01 (so every
// time kith writes reads back as an ISO 8601 date). 0 means "not given".
constexpr double kLatestJudgmentTime = 253402300800.0;  // 10000-01-01T00:00:00Z

struct Judgment {
  int64_t id = -1;          // stable id in the session (-1: not stored yet)
  int32_t anchor = -1;      // item indices
  int32_t nearer = -1;
  int32_t farther = -1;
  std::string person;       // who made it; may be a pseudonym or empty
  double time = 0.0;        // seconds since the Unix epoch
  JudgmentKind kind = JudgmentKind::kOwn;
  double weight = 1.0;      // above 0, at most kMaxJudgmentWeight
  bool retracted = false;   // kept in the record, ignored by the objective
};

// "" if the judgment can be used with a collection of n items, else what is wrong, e.g.
// "anchor and farther are the same item (12)" or "nearer item 340 is unknown (the collection has 300 items)".
std::string judgment_problem(const Judgment& judgment, size_t n);

}  // namespace kith
