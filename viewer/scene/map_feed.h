// MapFeed: where the window gets its map from and sends its commands to. The live one wraps the
// engine (viewer/window/engine_feed.h): post() goes to its inbox, latest() reads its snapshot mailbox.
// StillFeed holds a fixed map and applies pins, drags, judgments and settings itself; it serves
// `kith render` of a finished layout and the tests, and builds without the engine.
// Every command the window sends goes through prepare() first (see there): that is where a setting
// is checked and where judgment ids are assigned, before anything is recorded or posted.
// prepare() from the window's thread; post()/latest()/command_log() are thread-safe.
#pragma once
#include <functional>
#include <memory>
#include <mutex>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"

namespace kith {

class MapFeed {
 public:
  virtual ~MapFeed() = default;
  virtual uint64_t post(CommandBody body) = 0;
  // Called by the window before post(), in this order:
  //   1. a setting is checked by setting_problem() (MapParameters) against the map's item count:
  //      an impossible value is refused with its message and goes no further;
  //   2. a new judgment without an id gets the feed's next one (one counter, kept above every
  //      judgment in the newest snapshot);
  //   3. record(): a feed may complete the command or refuse it (a session writes it to its file
  //      and gives a new judgment the id it was stored under instead).
  // A non-empty result means refused: the window does not post it (and nothing was recorded).
  // So a judgment's id is assigned here or by the session store, and nowhere else.
  std::string prepare(CommandBody& body);
  virtual std::shared_ptr<const Snapshot> latest() const = 0;
  virtual std::vector<Command> command_log() const = 0;
  virtual bool live() const = 0;  // true when an optimizer moves the map

 protected:
  // Step 3 of prepare(); default: accept as is.
  virtual std::string record(CommandBody& body) {
    (void)body;
    return "";
  }

 private:
  int64_t next_judgment_id_ = 1;
};

class StillFeed : public MapFeed {
 public:
  // A judgment posted without an id gets JudgmentSet::next_id(); a setting is checked as the
  // engine checks it, and a refused command is listed in the snapshot's refusals.
  StillFeed(std::vector<std::string> ids, Points positions, std::vector<Judgment> judgments = {},
            MapParameters parameters = {});
  uint64_t post(CommandBody body) override;
  std::shared_ptr<const Snapshot> latest() const override;
  std::vector<Command> command_log() const override;
  bool live() const override { return false; }

 private:
  mutable std::mutex mutex_;
  std::string apply(const CommandBody& body, Snapshot& next);  // "" or why it was refused
  std::shared_ptr<Snapshot> current_;
  std::vector<Command> log_;
  uint64_t next_seq_ = 1;
};

// A feed that runs `recorder` on every command the window prepares (e.g. writing it to a
// session file, committed before the window moves on) and otherwise forwards to `inner`.
class RecordingFeed : public MapFeed {
 public:
  using Recorder = std::function<std::string(CommandBody& body)>;
  RecordingFeed(MapFeed& inner, Recorder recorder) : inner_(inner), recorder_(std::move(recorder)) {}
  uint64_t post(CommandBody body) override { return inner_.post(std::move(body)); }
  std::shared_ptr<const Snapshot> latest() const override { return inner_.latest(); }
  std::vector<Command> command_log() const override { return inner_.command_log(); }
  bool live() const override { return inner_.live(); }

 protected:
  std::string record(CommandBody& body) override { return recorder_ ? recorder_(body) : std::string(); }

 private:
  MapFeed& inner_;
  Recorder recorder_;
};

// A starting map without the optimizer: the first three feature columns, standardized
// (zeros where there are fewer). For `kith render` of a collection with no engine in the build.
Points rough_positions(const Collection& collection);

}  // namespace kith
