// See judgment_set.h.
#include "solver/base/judgment_set.h"

#include <algorithm>

namespace kith {

JudgmentSet::JudgmentSet(std::vector<Judgment> judgments, uint64_t version)
    : judgments_(std::move(judgments)), version_(version) {
  for (const Judgment& j : judgments_) {
    active_ += j.retracted ? 0 : 1;
    max_id_ = std::max(max_id_, j.id);
  }
}

const std::shared_ptr<const JudgmentSet>& JudgmentSet::none() {
  static const std::shared_ptr<const JudgmentSet> empty = std::make_shared<const JudgmentSet>();
  return empty;
}

const Judgment* JudgmentSet::find(int64_t id) const {
  for (const Judgment& j : judgments_)
    if (j.id == id) return &j;
  return nullptr;
}

}  // namespace kith
