// MapFeed: where the window gets its map from and sends its commands to. The live one wraps the
// engine (viewer/window/engine_feed.h): post() goes to its inbox, latest() reads its snapshot mailbox.
// StillFeed holds a fixed map and applies pins and drags itself; it serves `kith render` of a
// finished layout and builds without the engine. post()/latest()/command_log() are thread-safe.
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
  // Called by the window before post(): a feed may complete the command (a session gives a new
  // judgment the id it was stored under, so the engine and the window know it by that id) or
  // refuse it, returning a message; the window then does not post it. Default: accept as is.
  virtual std::string prepare(CommandBody& body) { (void)body; return ""; }
  virtual std::shared_ptr<const Snapshot> latest() const = 0;
  virtual std::vector<Command> command_log() const = 0;
  virtual bool live() const = 0;  // true when an optimizer moves the map
};

class StillFeed : public MapFeed {
 public:
  StillFeed(std::vector<std::string> ids, Points positions);
  uint64_t post(CommandBody body) override;
  std::shared_ptr<const Snapshot> latest() const override;
  std::vector<Command> command_log() const override;
  bool live() const override { return false; }

 private:
  mutable std::mutex mutex_;
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
  std::string prepare(CommandBody& body) override;
  std::shared_ptr<const Snapshot> latest() const override { return inner_.latest(); }
  std::vector<Command> command_log() const override { return inner_.command_log(); }
  bool live() const override { return inner_.live(); }

 private:
  MapFeed& inner_;
  Recorder recorder_;
};

// A starting map without the optimizer: the first three feature columns, standardized
// (zeros where there are fewer). For `kith render` of a collection with no engine in the build.
Points rough_positions(const Collection& collection);

}  // namespace kith
