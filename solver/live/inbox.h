// Inbox: the engine's command queue. Any thread posts; the worker takes the whole queue at the top
// of an iteration. Every command gets the next sequence number (1, 2, 3, ...) under the same lock
// that queues it, so sequence order is queue order.
//
// Drag coalescing: within one taken batch, a run of consecutive DragTarget commands keeps only the
// last target of each item; the earlier ones come back separately, marked superseded (they never
// touch the map, but they are accounted for, so every posted command is seen exactly once).
//
// The worker may also sleep here (wait) until a command arrives or wake() is called (stop, a
// finished rebuild). The lock is held only to push, swap or test; never while computing.
// Threads: post() and wake() from any thread; take() and wait*() from the worker only.
#pragma once
#include <chrono>
#include <condition_variable>
#include <cstdint>
#include <mutex>
#include <vector>

#include "solver/live/engine.h"

namespace kith {

class Inbox {
 public:
  struct Batch {
    std::vector<Command> commands;    // in sequence order, to apply
    std::vector<Command> superseded;  // drags replaced by a later drag of the same item
  };

  uint64_t post(CommandBody body);
  Batch take();
  void wake();
  // Blocks until a command is waiting or wake() was called since the last take() or wait().
  void wait();
  // As wait(), but returns after `timeout` at the latest. Returns true if woken by a command/wake().
  bool wait_for(std::chrono::microseconds timeout);
  uint64_t last_sequence() const;  // sequence number of the newest posted command (0 if none)

 private:
  mutable std::mutex mutex_;
  std::condition_variable cv_;
  std::vector<Command> queue_;
  uint64_t next_seq_ = 0;
  bool woken_ = false;
};

// Exposed for tests: splits `commands` as take() does.
Inbox::Batch coalesce_drags(std::vector<Command> commands);

}  // namespace kith
