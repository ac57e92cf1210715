// LiveLoop: the engine's threading, separate from the mathematics. It owns
//   - the Inbox (commands in), the Mailbox of Snapshots (latest wins, out) and the command log;
//   - the worker thread, which at the top of every iteration takes the whole inbox, applies it
//     through a LiveModel, runs one iteration (LiveModel::step) and publishes a snapshot at most
//     every publish_interval (and at once after commands were applied, so a drag shows quickly);
//   - the helper thread for heavy commands (perplexity, new items): LiveModel::prepare() captures
//     the inputs on the worker, the job runs on the helper, its finisher is applied on the worker
//     between iterations. Commands that change item indices, and all after them, wait for it;
//     others go on (the map keeps moving);
//   - settling: after slow_after quiet iterations the worker sleeps a little between iterations,
//     after settle_after it blocks on the inbox until any command arrives (no CPU while idle);
//   - progress: each snapshot says how many quiet steps in a row the map has taken, whether it is
//     quiet enough to slow down, and an estimate of the steps left before it settles; and it
//     carries the health figures over time (a sample at most every HealthHistory::kSampleSeconds
//     of running, and one when the map settles), shared between snapshots while unchanged;
//   - refusals: every command the model rejects is kept (the last few) with its name and reason,
//     and each snapshot carries them, so the window can say which command was refused and why;
//   - replay: the same model start and the same log give the same map, because commands are
//     applied at their logged iterations and step() depends only on the model's state.
// The model is touched only by the worker thread (or by replay()'s caller when no worker runs).
// Threads: post(), latest(), command_log() from any thread; start/stop/replay from the owner.
#pragma once
#include <atomic>
#include <chrono>
#include <functional>
#include <memory>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "solver/live/engine.h"
#include "solver/live/inbox.h"
#include "solver/live/mailbox.h"

namespace kith {

struct StepReport {
  double cost = 0.0;
  double movement = 0.0;  // mean step length of the items over the map's RMS radius
  bool finite = true;
};

// What the loop drives. Called from one thread at a time (the worker).
class LiveModel {
 public:
  using Finish = std::function<void()>;  // runs on the worker, between iterations
  using Job = std::function<Finish()>;   // runs on the helper thread; must touch only what it captured

  virtual ~LiveModel() = default;
  virtual bool heavy(const CommandBody& body) const = 0;      // goes through prepare()
  virtual bool reindexes(const CommandBody& body) const = 0;  // changes item indices
  // Light commands (everything not heavy, except Pause/Resume which the loop handles).
  // Returns "" when applied, else why it was rejected (and nothing changed).
  virtual std::string apply(const CommandBody& body) = 0;
  // Heavy commands: returns the job, or nullptr and *error when rejected.
  virtual Job prepare(const CommandBody& body, std::string* error) = 0;
  virtual StepReport step() = 0;
  virtual bool may_settle() const = 0;  // false e.g. during early exaggeration
  // Fills positions, ids, pinned, costs, health, the judgment set and the parameters in force;
  // the loop fills the rest (iteration, generation, states, refusals).
  virtual void fill(Snapshot& snapshot) = 0;  // called after the loop's own fields (iteration, settled...) are set
};

struct LiveLoopOptions {
  double publish_interval_ms = 16.0;
  double settle_tolerance = 3e-4;
  int slow_after = 50;
  int settle_after = 150;
  uint64_t settle_cap = 3000;
  double slow_sleep_ms = 5.0;  // pause between iterations while slowing down
  bool start_paused = false;
};

class LiveLoop {
 public:
  LiveLoop(std::unique_ptr<LiveModel> model, LiveLoopOptions options);
  ~LiveLoop();
  LiveLoop(const LiveLoop&) = delete;
  LiveLoop& operator=(const LiveLoop&) = delete;

  void start();
  void stop();  // joins the worker and any helper job; publishes a last snapshot
  uint64_t post(CommandBody body) { return inbox_.post(std::move(body)); }
  std::shared_ptr<const Snapshot> latest() const { return mailbox_.latest(); }
  std::vector<Command> command_log() const;
  void replay(const std::vector<Command>& log, uint64_t iterations);
  LiveModel& model() { return *model_; }  // only while no worker runs

 private:
  void run();
  bool top_of_iteration();  // returns true if anything was applied, rejected or superseded
  void process_pending(bool* changed);
  void log(Command c);
  void publish();
  void join_helper();
  uint64_t steps_to_settle() const;       // the estimate each snapshot carries
  void record_health(const Snapshot& s);  // a timeline sample, when one is due

  std::unique_ptr<LiveModel> model_;
  LiveLoopOptions options_;
  Inbox inbox_;
  Mailbox<Snapshot> mailbox_;
  mutable std::mutex log_mutex_;
  std::vector<Command> log_;
  std::thread worker_;
  std::atomic<bool> stop_{false};

  // Worker-only state.
  std::vector<Command> pending_;  // taken, not yet applied (waiting for a heavy job)
  uint64_t iteration_ = 0;
  uint64_t last_command_ = 0;
  uint64_t generation_ = 0;
  uint64_t since_command_ = 0;
  int quiet_ = 0;
  bool paused_ = false;
  bool settled_ = false;
  double seconds_per_iteration_ = 0.0;  // running mean
  double movement_ = 0.0;
  std::string last_rejected_;
  std::vector<Refusal> refusals_;  // the last Snapshot::kMaxRefusals, oldest first
  std::chrono::steady_clock::time_point last_publish_{};
  std::shared_ptr<const HealthHistory> history_ = HealthHistory::none();  // what snapshots carry
  std::chrono::steady_clock::time_point last_sample_{};

  // The heavy job in flight: started by the worker, finished by the helper.
  struct Flight {
    Command command;
    std::thread thread;
    std::mutex mutex;                 // guards finish and done
    LiveModel::Finish finish;
    std::string error;
    bool done = false;
  };
  std::unique_ptr<Flight> flight_;
};

}  // namespace kith
