#include "solver/judgment.h"

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

}  // namespace kith
