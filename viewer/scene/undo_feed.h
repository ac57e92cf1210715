// UndoFeed: undo and redo for what changes a map for good: pins and unpins (a drag ended with
// P included), judgments added (teach, answers, own judgments, imports) and retractions.
// It sits between the window and the feed it was given, so it sees every command the window
// prepares, whoever sends it (map, panels, question screens). Each command it accepts is kept
// with its inverse, worked out from the newest snapshot before it is applied:
//   pin      -> unpin, or the pin where it was before;   unpin -> the pin where it was;
//   judgment -> its retraction (judgments are never deleted, so redo restores it);
//   retract  -> restore, and restore -> retract.
// The commands of one frame (a teach that adds several judgments, pinning a selection) are one
// step: end_step() closes it. undo() and redo() post their commands through the inner feed's
// prepare(), so a session records them like any other pin, unpin or retraction, and the map
// after an undo is what reopening the session shows. A new step clears what redo would do.
// Drags in progress, settings and pause are not steps. Window thread only (post() and
// latest() forward to the inner feed).
#pragma once
#include <cstddef>
#include <string>
#include <vector>

#include "viewer/scene/map_feed.h"

namespace kith {

class UndoFeed : public MapFeed {
 public:
  explicit UndoFeed(MapFeed& inner) : inner_(inner) {}
  uint64_t post(CommandBody body) override { return inner_.post(std::move(body)); }
  std::shared_ptr<const Snapshot> latest() const override { return inner_.latest(); }
  std::vector<Command> command_log() const override { return inner_.command_log(); }
  bool live() const override { return inner_.live(); }

  // Closes the step being gathered (the window calls it once a frame).
  void end_step();
  bool can_undo() const { return !done_.empty() || !open_.forward.empty(); }
  bool can_redo() const { return !undone_.empty() && open_.forward.empty(); }
  // Undoes (redoes) the newest step. Returns what it was, e.g. "pin of c7" or "3 judgments";
  // "" when there is nothing to undo (redo); *refused gets the first refusal, if any.
  std::string undo(std::string* refused = nullptr);
  std::string redo(std::string* refused = nullptr);
  size_t undo_depth() const { return done_.size() + (open_.forward.empty() ? 0 : 1); }
  size_t redo_depth() const { return undone_.size(); }

  // The most steps kept; older ones are forgotten (not undone).
  static constexpr size_t kMostSteps = 200;

 protected:
  std::string record(CommandBody& body) override;

 private:
  struct Step {
    std::vector<CommandBody> forward;   // as applied, in order
    std::vector<CommandBody> backward;  // their inverses, in the same order (applied in reverse)
    size_t added = 0;                   // judgments added (their forward is a restore)
    std::string what;
  };
  // Posts `bodies` (in reverse order when `reversed`) without recording them; the first refusal or "".
  std::string replay(const std::vector<CommandBody>& bodies, bool reversed);

  MapFeed& inner_;
  std::vector<Step> done_, undone_;
  Step open_;
  bool replaying_ = false;
};

// What a step does, in words: "pin of c7", "unpin of 3 items", "2 judgments", "retraction";
// `added` of the forward restores are judgments the step added.
std::string describe_step(const std::vector<CommandBody>& forward, size_t added, const std::vector<std::string>& ids);

}  // namespace kith
