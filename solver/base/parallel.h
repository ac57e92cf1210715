// parallel_for: runs f(chunk) for chunk = 0 .. chunks-1 on `threads` threads (0 = all hardware
// threads), the calling thread included. Chunks are handed out by an atomic counter, so which
// thread runs which chunk varies, but each chunk's work is fixed: callers that write per-chunk
// results and reduce them in chunk order get the same numbers whatever the thread count.
// Call from any thread; f must be safe to run concurrently on different chunks.
#pragma once
#include <algorithm>
#include <atomic>
#include <cstddef>
#include <thread>
#include <vector>

namespace kith {

inline int resolve_threads(int threads) {
  if (threads > 0) return threads;
  const unsigned hw = std::thread::hardware_concurrency();
  return hw == 0 ? 1 : int(hw);
}

template <typename F>
void parallel_for(size_t chunks, int threads, F&& f) {
  const size_t workers = std::min<size_t>(size_t(resolve_threads(threads)), chunks);
  if (workers <= 1) {
    for (size_t c = 0; c < chunks; ++c) f(c);
    return;
  }
  std::atomic<size_t> next{0};
  auto run = [&]() {
    for (size_t c = next.fetch_add(1); c < chunks; c = next.fetch_add(1)) f(c);
  };
  std::vector<std::thread> pool;
  pool.reserve(workers - 1);
  for (size_t t = 1; t < workers; ++t) pool.emplace_back(run);
  run();
  for (auto& t : pool) t.join();
}

}  // namespace kith
