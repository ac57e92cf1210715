// SessionLink: the window's link to a session file (.kith). Opening reads the collection,
// settings, judgments, pins and the last map checkpoint; while the window runs, every judgment,
// retraction, pin, unpin and settings change the window posts is written to the session at once
// (SessionStore commits before it returns), and the map is checkpointed every few seconds
// through the store's writer thread. Main (window) thread only.
#pragma once
#include <memory>
#include <string>
#include <vector>

#include "solver/collection.h"
#include "solver/engine.h"
#include "solver/judgment.h"
#include "solver/session_store.h"
#include "viewer/app.h"
#include "viewer/map_feed.h"

namespace kith {

class SessionLink {
 public:
  // Throws SessionError with the store's message when the file cannot be opened.
  explicit SessionLink(const std::string& path);
  ~SessionLink();

  const Collection& collection() const { return collection_; }
  EngineOptions engine_options() const;
  const std::vector<Judgment>& judgments() const { return judgments_; }
  Points start() const;                  // the last checkpoint, or empty
  void post_pins(MapFeed& feed) const;   // the stored pins, as commands
  // The feed the window should use: every judgment, retraction, pin and settings change is
  // committed to the session before it reaches the engine (a new judgment gets its stored id);
  // a failed write refuses the command. Keep this object alive while the window runs.
  std::unique_ptr<MapFeed> recording(MapFeed& inner);
  // Hooks that checkpoint the map every few seconds.
  WindowHooks hooks(WindowHooks base = {});
  std::string title_state() const;
  void final_checkpoint(const Snapshot& snapshot);

 private:
  std::string record(CommandBody& body);
  std::unique_ptr<SessionStore> store_;
  Collection collection_;
  std::vector<Judgment> judgments_;
  std::shared_ptr<const Snapshot> last_;
  double last_checkpoint_ = 0.0;
  std::string path_;
};

}  // namespace kith
