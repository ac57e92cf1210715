#include "solver/live/inbox.h"

#include <unordered_map>
#include <utility>

namespace kith {

uint64_t Inbox::post(CommandBody body) {
  uint64_t seq;
  {
    std::lock_guard<std::mutex> lock(mutex_);
    seq = ++next_seq_;
    Command c;
    c.seq = seq;
    c.body = std::move(body);
    queue_.push_back(std::move(c));
  }
  cv_.notify_one();
  return seq;
}

Inbox::Batch Inbox::take() {
  std::vector<Command> taken;
  {
    std::lock_guard<std::mutex> lock(mutex_);
    taken.swap(queue_);
    woken_ = false;
  }
  return coalesce_drags(std::move(taken));
}

void Inbox::wake() {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    woken_ = true;
  }
  cv_.notify_one();
}

void Inbox::wait() {
  std::unique_lock<std::mutex> lock(mutex_);
  cv_.wait(lock, [&] { return woken_ || !queue_.empty(); });
  woken_ = false;
}

bool Inbox::wait_for(std::chrono::microseconds timeout) {
  std::unique_lock<std::mutex> lock(mutex_);
  const bool got = cv_.wait_for(lock, timeout, [&] { return woken_ || !queue_.empty(); });
  woken_ = false;
  return got;
}

uint64_t Inbox::last_sequence() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return next_seq_;
}

Inbox::Batch coalesce_drags(std::vector<Command> commands) {
  Inbox::Batch batch;
  batch.commands.reserve(commands.size());
  size_t i = 0;
  while (i < commands.size()) {
    if (!std::holds_alternative<cmd::DragTarget>(commands[i].body)) {
      batch.commands.push_back(std::move(commands[i++]));
      continue;
    }
    // A run of drag targets [i, j): keep the last one of each item, in its place.
    size_t j = i;
    std::unordered_map<int32_t, size_t> last;
    while (j < commands.size() && std::holds_alternative<cmd::DragTarget>(commands[j].body)) {
      last[std::get<cmd::DragTarget>(commands[j].body).item] = j;
      ++j;
    }
    for (size_t k = i; k < j; ++k) {
      const int32_t item = std::get<cmd::DragTarget>(commands[k].body).item;
      if (last[item] == k) {
        batch.commands.push_back(std::move(commands[k]));
      } else {
        commands[k].superseded = true;
        batch.superseded.push_back(std::move(commands[k]));
      }
    }
    i = j;
  }
  return batch;
}

}  // namespace kith
