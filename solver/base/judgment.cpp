#include "solver/base/judgment.h"

#include <sstream>

#include <cmath>

namespace kith {

namespace {
struct KindName {
  JudgmentKind kind;
  const char* name;
};
constexpr KindName kKindNames[] = {{JudgmentKind::kOwn, "own"},   {JudgmentKind::kPair, "pair"},
                                   {JudgmentKind::kGrid, "grid"}, {JudgmentKind::kDrag, "drag"},
                                   {JudgmentKind::kImport, "import"}};
}  // namespace

const char* to_string(JudgmentKind kind) {
  for (const auto& k : kKindNames)
    if (k.kind == kind) return k.name;
  return "unknown";
}

bool judgment_kind_from_string(const std::string& text, JudgmentKind* kind) {
  for (const auto& k : kKindNames)
    if (text == k.name) {
      *kind = k.kind;
      return true;
    }
  return false;
}

std::string judgment_problem(const Judgment& j, size_t n) {
  const struct {
    const char* name;
    int32_t item;
  } roles[] = {{"anchor", j.anchor}, {"nearer", j.nearer}, {"farther", j.farther}};
  for (const auto& r : roles)
    if (r.item < 0 || size_t(r.item) >= n) {
      std::ostringstream m;
      m << r.name << " item " << r.item << " is unknown (the collection has " << n << " items)";
      return m.str();
    }
  for (int a = 0; a < 3; ++a)
    for (int b = a + 1; b < 3; ++b)
      if (roles[a].item == roles[b].item) {
        std::ostringstream m;
        m << roles[a].name << " and " << roles[b].name << " are the same item (" << roles[a].item << ")";
        return m.str();
      }
  if (!(j.weight > 0.0) || !(j.weight <= kMaxJudgmentWeight)) {
    std::ostringstream m;
    m << "weight must be a number above 0 and at most " << kMaxJudgmentWeight << ", got " << j.weight;
    return m.str();
  }
  return "";
}

}  // namespace kith
