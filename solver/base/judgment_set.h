// JudgmentSet: the judgments in force in a live map, as one immutable value with a version.
// The engine makes a new set whenever a judgment is added, retracted or restored (or dropped with
// its items), with a larger version, and hands the same set to every snapshot while nothing
// changes, so publishing a snapshot copies one pointer. The window reads the judgments it shows
// from here and keeps no list of its own.
// Never changed after construction: any thread may read it.
#pragma once
#include <cstddef>
#include <cstdint>
#include <memory>
#include <vector>

#include "solver/base/judgment.h"

namespace kith {

class JudgmentSet {
 public:
  JudgmentSet() = default;
  JudgmentSet(std::vector<Judgment> judgments, uint64_t version);

  // The set with no judgments and version 0, shared (what a snapshot holds before any is set).
  static const std::shared_ptr<const JudgmentSet>& none();

  const std::vector<Judgment>& all() const { return judgments_; }
  size_t size() const { return judgments_.size(); }
  bool empty() const { return judgments_.empty(); }
  const Judgment& operator[](size_t i) const { return judgments_[i]; }
  std::vector<Judgment>::const_iterator begin() const { return judgments_.begin(); }
  std::vector<Judgment>::const_iterator end() const { return judgments_.end(); }

  uint64_t version() const { return version_; }  // larger after every change
  size_t active() const { return active_; }      // not retracted
  const Judgment* find(int64_t id) const;        // null when no judgment has this id
  // One above the largest id (1 for an empty set): the id a new judgment without one is given.
  int64_t next_id() const { return max_id_ + 1; }

 private:
  std::vector<Judgment> judgments_;
  uint64_t version_ = 0;
  size_t active_ = 0;
  int64_t max_id_ = 0;
};

}  // namespace kith
