// Engine: the live optimizer. A worker thread owns the map and the blended objective and runs
// iterations continuously; other threads talk to it only through
//   - the command inbox: post() is thread-safe, returns the command's sequence number; the worker
//     takes the whole inbox at the top of an iteration and applies it between evaluations;
//   - the snapshot mailbox: latest() is thread-safe and never blocks on the optimizer; it returns
//     the newest immutable Snapshot (latest wins, published at most every ~16 ms).
// Nothing else is shared. Heavy rebuilds (perplexity, new features) run on a helper thread and
// are swapped in between iterations.
#pragma once
#include <cstdint>
#include <memory>
#include <string>
#include <variant>
#include <vector>

#include "solver/io/collection.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"
#include "solver/base/judgment.h"
#include "solver/base/map_parameters.h"
#include "solver/base/points.h"

namespace kith {

// ---- the engine ---------------------------------------------------------------
// The map's settings (MapParameters: dims, perplexity, theta, dof, learning rate, blend,
// exaggeration, seed; iterations is not used, the engine runs until it settles), and how the
// worker runs.
struct EngineOptions : MapParameters {
  int threads = 0;              // threads for one evaluation, 0 = all (default: 0)
  bool start_paused = false;    // (default: false)
  // Settling: an iteration is quiet when the items moved less than settle_tolerance (mean step
  // over the map's RMS radius); after slow_after quiet iterations the worker slows down, after
  // settle_after it sleeps until a command arrives. It also sleeps after settle_cap iterations
  // without a command, however much the map still drifts (0 = never).
  double settle_tolerance = 3e-4;  // (default: 3e-4)
  int slow_after = 50;             // (default: 50)
  int settle_after = 150;          // (default: 150)
  uint64_t settle_cap = 3000;      // (default: 3000)
  double publish_interval_ms = 16.0;  // minimum time between two routine snapshots (default: 16)
  // From this many items up, a map without a given start begins as a multiscale start
  // (solver/fit/multiscale.h: a sample fitted, the rest placed by their neighbours) and refines
  // from there without early exaggeration; 0 = never (default: 20000, kMultiscaleAbove).
  size_t multiscale_above = 20000;
  // MapParameters::IsValid(error, item_count), then the worker's own settings.
  bool IsValid(std::string* error, size_t item_count = 0) const;
};

class Engine {
 public:
  // Copies what it needs from the collection; `start` is an optional initial map (N x dims),
  // e.g. a session's last checkpoint; empty means the PCA start.
  Engine(const Collection& collection, const EngineOptions& options, std::vector<Judgment> judgments = {},
         Points start = {});
  ~Engine();  // stops and joins the worker
  Engine(const Engine&) = delete;
  Engine& operator=(const Engine&) = delete;

  void start();                                   // starts the worker thread
  void stop();                                    // stops it (idempotent)
  uint64_t post(CommandBody body);                // thread-safe; returns the sequence number
  std::shared_ptr<const Snapshot> latest() const; // thread-safe, never blocks on the optimizer
  std::vector<Command> command_log() const;       // applied commands with their iterations

  // Replays a recorded command log on the calling thread (the worker must not be running): from
  // this engine's start, applies every logged command at its logged iteration and runs
  // `iterations` iterations in all, then publishes the result. Same start + same log + same
  // options -> the identical map.
  void replay(const std::vector<Command>& log, uint64_t iterations);

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace kith
