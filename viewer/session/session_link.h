// SessionLink: the window's link to a session file (.kith).
//  - Opening a session reads the collection, settings, judgments, pins and the last map
//    checkpoint. While the window runs, every judgment, retraction, pin, unpin and settings change
//    goes through recording() (MapFeed::prepare): it is committed to the session before the engine
//    sees it, and a new judgment gets its stored id. The map is checkpointed every few seconds
//    through the store's writer thread. Events that are not engine commands (a "can't tell"
//    answer, a person added or renamed) go through record_event().
//  - A plain collection opened in the window has no file at first. The first thing worth keeping
//    (a judgment, a pin, an event) creates one next to the collection, ITEMS.kith (or ITEMS-2.kith
//    and so on: an existing file is never touched; when that folder cannot be written, in
//    $XDG_DATA_HOME/kith/sessions), and the window's title says so.
//  - Read-only: nothing is written; commands that would need writing are refused with a message.
// Main (window) thread only.
#pragma once
#include <memory>
#include <string>
#include <vector>

#include "solver/asking/session_event.h"
#include "solver/base/judgment.h"
#include "solver/io/collection.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"
#include "solver/session/session_store.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/window_hooks.h"

namespace kith {

// The session's pins as commands to FEED (what opening a session does before the window runs).
void post_pins(const SessionStore& store, MapFeed& feed);
// Per item (of N), 1 where the session holds a pin: RenderOptions::pinned for a picture.
std::vector<uint8_t> pinned_items(const SessionStore& store, size_t n);

class SessionLink {
 public:
  // An existing session. Throws SessionError with the store's message when it cannot be opened.
  explicit SessionLink(const std::string& path, bool read_only = false);
  // A plain collection read from `source` ("" for a generated one: then no file is ever created)
  // with the reading flags `reading` (reading_flags in collection.h), which its session keeps.
  SessionLink(Collection collection, const MapParameters& parameters, const std::string& source,
              const std::string& reading = "");
  ~SessionLink();

  const Collection& collection() const { return collection_; }
  const SessionSettings& settings() const { return settings_; }  // as stored (or to be stored)
  const std::vector<Judgment>& judgments() const { return judgments_; }
  Points start() const;                 // the last checkpoint, or empty
  void post_pins(MapFeed& feed) const;  // the stored pins, as commands

  // The feed the window should use (see above). Keep this object alive while the window runs.
  std::unique_ptr<MapFeed> recording(MapFeed& inner);
  // Hooks: map checkpoints every few seconds, record_event, and the title's saving state.
  WindowHooks hooks(WindowHooks base = {});
  // "" or a message; see WindowHooks::record_event.
  std::string record_event(const SessionEvent& event);
  void final_checkpoint(const Snapshot& snapshot);

  // "Save as": a complete copy at PATH (never over an existing file), which then becomes the
  // file written to; for a plain collection, the session is created there. "" or a message.
  std::string save_as(const std::string& path);

  std::string title_state() const;
  const std::string& path() const { return path_; }  // "" while a plain collection has no file
  bool read_only() const { return read_only_; }
  SessionStore* store() { return store_.get(); }          // null while there is no file
  std::string last_error() const { return last_error_; }  // the newest write that failed, "" if none
  size_t writes() const { return writes_; }               // commits made by this window
  // Print "saved judgment ID: ANCHOR,NEARER,FARTHER" to stdout for each judgment once it is on
  // disk (for scripts and the crash test: a printed line is a promise). (default: off)
  void print_saved(bool on) { print_saved_ = on; }

  // Where a session for a collection read from `source` would be created (see above).
  static std::string path_for(const std::string& source);
  // The session a collection read from `source` started before: the first of the names path_for
  // walks through (ITEMS.kith, ITEMS-2.kith, ...) that is a session made from content with this
  // content_hash; "" when none is. Files it cannot read are passed over, never changed.
  static std::string earlier_session(const std::string& source, const std::string& content_hash);

 private:
  std::string record(CommandBody& body);
  std::string ensure_store(const char* why);
  // A person event also updates the session's people table; throws SessionError (e.g. a rename
  // to a name already taken).
  void apply_person_event(const SessionEvent& event);
  std::unique_ptr<SessionStore> store_;
  Collection collection_;
  std::vector<Judgment> judgments_;
  SessionSettings settings_;  // kept for a plain collection until its file exists
  std::string source_;
  std::string reading_;
  std::shared_ptr<const Snapshot> last_;
  double last_checkpoint_ = 0.0;
  std::string path_;
  bool read_only_ = false;
  std::string last_error_;
  size_t writes_ = 0;
  bool print_saved_ = false;
};

}  // namespace kith
