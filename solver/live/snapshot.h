// What the engine publishes: an immutable Snapshot of the live map, taken by the window once a
// frame from the engine's mailbox (latest wins). Besides the map it carries everything the window
// shows about the engine's state, so the window keeps no copies of its own: the judgment set in
// force (shared between snapshots while unchanged), the map parameters in force, and the commands
// refused lately with the reason. Shared through shared_ptr<const Snapshot>; never changed after
// publishing, so any thread may read it.
#pragma once
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "solver/base/judgment_set.h"
#include "solver/base/map_parameters.h"
#include "solver/base/points.h"

namespace kith {

struct HealthFigures {
  double kl = 0.0;                    // KL(P||Q) at this map
  double judgment_agreement = -1.0;   // fraction of active judgments satisfied; -1 if none
  double trustworthiness = -1.0;      // -1 until computed (it is computed now and then, not every frame)
  double neighbour_recall = -1.0;
};

// The health figures over time, for the window's timelines: a sample at most every
// kSampleSeconds of running, the newest kMaxSamples kept, oldest first. Shared between snapshots
// while unchanged (a new sample makes a new history); never null in a snapshot.
struct HealthSample {
  uint64_t iteration = 0;
  HealthFigures figures;
};
struct HealthHistory {
  static constexpr size_t kMaxSamples = 240;
  static constexpr double kSampleSeconds = 0.25;
  std::vector<HealthSample> samples;
  static std::shared_ptr<const HealthHistory> none();  // the empty history
};

// A command that was not applied, and why.
struct Refusal {
  uint64_t seq = 0;     // the command's sequence number
  std::string command;  // its name (command_name(), e.g. "set-theta")
  std::string reason;   // e.g. "theta must be between 0 and 1.5, got 9.99"
};

struct Snapshot {
  static constexpr size_t kMaxRefusals = 8;  // refusals kept, newest last
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
  uint64_t quiet_steps = 0;         // steps in a row that moved the map less than the settling tolerance
  bool quiet = false;               // the map is quiet enough that the engine has begun to slow down
  // An estimate of the steps left before the engine settles (0 when settled or held): the quiet
  // steps still needed once the map is quiet, else the steps until the cap on running without a
  // command. Divide by iterations_per_second for the time.
  uint64_t steps_to_settle = 0;
  std::shared_ptr<const HealthHistory> history = HealthHistory::none();
  bool rebuilding = false;          // a heavy rebuild (perplexity, new items) runs on the helper thread
  size_t waiting_commands = 0;      // taken from the inbox but waiting for that rebuild
  std::string last_rejected;        // why the most recent rejected command was rejected ("" if none)
  std::vector<Refusal> refusals;    // the last kMaxRefusals refused commands, oldest first
  // The judgments in force, retracted ones included; never null (JudgmentSet::none() before any).
  std::shared_ptr<const JudgmentSet> judgments = JudgmentSet::none();
  // The settings in force: the engine's after every setting it applied; perplexity is the one the
  // affinities were built with (MapParameters::perplexity_for), updated when a rebuild is swapped in.
  MapParameters parameters;
};

}  // namespace kith
