// Mailbox<T>: a latest-wins slot for immutable values handed from one thread to others.
// The writer publishes a new shared_ptr<const T>; readers take the newest. A mutex guards only
// the pointer copy or swap (a few nanoseconds, never held while the value is built, read or
// destroyed), so a reader never waits on the writer's computation and the writer never waits on
// a reader's use of the value. (std::atomic<std::shared_ptr> would do the same, but GCC 12's
// libstdc++ does not have it lock-free either.)
// Threads: publish() from the writer; latest() from any thread.
#pragma once
#include <memory>
#include <mutex>
#include <utility>

namespace kith {

template <typename T>
class Mailbox {
 public:
  void publish(std::shared_ptr<const T> value) {
    std::shared_ptr<const T> old;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      old = std::move(value_);
      value_ = std::move(value);
    }
    // `old` is released here, outside the lock (freeing a large snapshot takes time).
  }
  std::shared_ptr<const T> latest() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return value_;
  }

 private:
  mutable std::mutex mutex_;
  std::shared_ptr<const T> value_;
};

}  // namespace kith
