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

#include "solver/collection.h"
#include "solver/judgment.h"
#include "solver/points.h"

namespace kith {

// ---- commands ---------------------------------------------------------------
namespace cmd {
struct AddJudgment { Judgment judgment; };
struct RetractJudgment { int64_t judgment_id; bool retracted = true; };  // false = restore
struct Pin { int32_t item; std::vector<double> position; };              // empty position = where it is
struct Unpin { int32_t item; };
struct DragTarget { int32_t item; std::vector<double> position; };       // coalesced per item
struct ClearDrag { int32_t item; };
struct SetBlend { double blend; };
struct SetTheta { double theta; };
struct SetLearningRate { double learning_rate; };  // <= 0 means "auto"
struct SetExaggeration { double exaggeration; };
struct SetPerplexity { double perplexity; };       // rebuilt off the hot loop
struct Pause {};
struct Resume {};
struct Restart {};                                 // from the PCA start, schedule from zero
struct InsertItems { std::vector<std::string> ids; Points features; };
struct RemoveItems { std::vector<int32_t> items; };
// New features for the same items (e.g. reweighted by what judgments taught, solver/block_weights.h):
// rebuilt off the hot loop like SetPerplexity; when swapped in, the neighbour term is exaggerated
// by regroup_exaggeration for regroup_iterations iterations so groups can move past each other.
struct SetFeatures { Points features; int regroup_iterations = 0; double regroup_exaggeration = 12.0; };
}  // namespace cmd

using CommandBody = std::variant<cmd::AddJudgment, cmd::RetractJudgment, cmd::Pin, cmd::Unpin, cmd::DragTarget,
                                 cmd::ClearDrag, cmd::SetBlend, cmd::SetTheta, cmd::SetLearningRate,
                                 cmd::SetExaggeration, cmd::SetPerplexity, cmd::Pause, cmd::Resume, cmd::Restart,
                                 cmd::InsertItems, cmd::RemoveItems, cmd::SetFeatures>;

struct Command {
  uint64_t seq = 0;         // assigned by post()
  uint64_t iteration = 0;   // iteration at which the worker applied it (filled in the log)
  CommandBody body;
  bool superseded = false;  // replaced before it was applied: by a later drag target of the same item, or
                            // (perplexity) by a later one while it waited for a rebuild
  std::string rejected;     // non-empty: not applied, and why (unknown item, NaN, impossible value)
};

// ---- snapshots --------------------------------------------------------------
struct HealthFigures {
  double kl = 0.0;                    // KL(P||Q) at this map
  double judgment_agreement = -1.0;   // fraction of active judgments satisfied; -1 if none
  double trustworthiness = -1.0;      // -1 until computed (it is computed now and then, not every frame)
  double neighbour_recall = -1.0;
};

struct Snapshot {
  Points positions;                 // N x dims
  std::vector<std::string> ids;     // N, same order as positions
  std::vector<uint8_t> pinned;      // N, 1 where hard-pinned
  double neighbour_cost = 0.0;      // per-term costs
  double judgment_cost = 0.0;
  double pin_cost = 0.0;
  HealthFigures health;
  uint64_t iteration = 0;
  uint64_t last_command = 0;        // highest sequence number applied (or rejected/superseded) so far
  uint64_t generation = 0;          // increases with every publish
  double iterations_per_second = 0.0;
  double movement = 0.0;            // mean step of the last iteration over the map's RMS radius
  bool paused = false;
  bool settled = false;             // converged and sleeping
  bool rebuilding = false;          // a heavy rebuild (perplexity, new items) runs on the helper thread
  size_t waiting_commands = 0;      // taken from the inbox but waiting for that rebuild
  std::string last_rejected;        // why the most recent rejected command was rejected ("" if none)
};

// ---- the engine ---------------------------------------------------------------
struct EngineOptions {
  int dims = 3;                 // 2 or 3 (default: 3)
  double perplexity = 30.0;     // (default: 30)
  double dof = 1.0;             // Student-t degrees of freedom of the map (default: 1)
  double theta = 0.5;           // Barnes-Hut angle (default: 0.5)
  double blend = 1.0;           // weight of the judgment term (default: 1; see README)
  double learning_rate = 0.0;   // <= 0: auto (default: auto)
  uint64_t seed = 42;           // (default: 42)
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
  bool IsValid(std::string* error) const;
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
