// Session store timings: how long one map checkpoint takes to write at N = 10,000 and 100,000
// (3-D, float64), how long post_checkpoint() holds its caller, and what a judgment commit costs
// with and without checkpoints being written at the same time (the window's view of a stall).
// Prints a table; results and the command are in tests/bench/RESULTS-sessions.md.
//   cmake --build build --target bench_sessions && build/tests/bench_sessions [folder]
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <random>
#include <string>
#include <vector>

#include "solver/session/session_store.h"

namespace {
using Clock = std::chrono::steady_clock;
double ms_since(Clock::time_point t) { return std::chrono::duration<double, std::milli>(Clock::now() - t).count(); }
double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v.empty() ? 0 : v[v.size() / 2];
}
double maxof(const std::vector<double>& v) { return v.empty() ? 0 : *std::max_element(v.begin(), v.end()); }

kith::Collection collection(size_t n, int f) {
  kith::Collection c;
  c.features = kith::Points::Random(Eigen::Index(n), f);
  for (size_t i = 0; i < n; ++i) c.ids.push_back("item-" + std::to_string(i));
  for (int j = 0; j < f; ++j) c.feature_names.push_back("f" + std::to_string(j));
  c.tags.push_back({"kind", std::vector<std::string>(n, "cloth")});
  return c;
}

kith::Judgment judgment(std::mt19937& rng, int n) {
  std::uniform_int_distribution<int> item(0, n - 1);
  kith::Judgment j;
  j.anchor = item(rng);
  do j.nearer = item(rng); while (j.nearer == j.anchor);
  do j.farther = item(rng); while (j.farther == j.anchor || j.farther == j.nearer);
  j.person = "bench";
  return j;
}
}  // namespace

int main(int argc, char** argv) {
  const std::string dir = argc > 1 ? argv[1] : (std::filesystem::temp_directory_path() / "kith-bench-sessions").string();
  std::filesystem::create_directories(dir);
  std::printf("%8s %10s %12s %14s %14s %16s %16s %12s\n", "N", "create ms", "file MB", "checkpoint ms",
              "post() us", "judgment ms", "judgment ms", "reopen ms");
  std::printf("%8s %10s %12s %14s %14s %16s %16s %12s\n", "", "", "", "(median of 7)", "(median)", "(alone, median)",
              "(during ckpts, max)", "");
  std::mt19937 rng(1);
  for (size_t n : {size_t(10000), size_t(100000)}) {
    const std::string path = dir + "/bench-" + std::to_string(n) + ".kith";
    std::filesystem::remove(path);
    auto t = Clock::now();
    auto store = kith::SessionStore::create(path, collection(n, 16));
    const double create_ms = ms_since(t);

    std::vector<double> sync;
    for (int k = 0; k < 7; ++k) {
      kith::Points map = kith::Points::Random(Eigen::Index(n), 3);
      t = Clock::now();
      store->write_checkpoint(map, uint64_t(k));
      sync.push_back(ms_since(t));
    }
    std::vector<double> alone;
    for (int k = 0; k < 15; ++k) {
      t = Clock::now();
      store->add_judgment(judgment(rng, int(n)));
      alone.push_back(ms_since(t));
    }
    // Checkpoints posted every 50 ms (faster than the every-few-seconds of the window) while
    // judgments are committed: the post() call and the judgment commits are what a caller feels.
    std::vector<double> post_us, during;
    for (int k = 0; k < 15; ++k) {
      kith::Points map = kith::Points::Random(Eigen::Index(n), 3);
      t = Clock::now();
      store->post_checkpoint(std::move(map), uint64_t(100 + k));
      post_us.push_back(ms_since(t) * 1000);
      for (int q = 0; q < 3; ++q) {
        t = Clock::now();
        store->add_judgment(judgment(rng, int(n)));
        during.push_back(ms_since(t));
      }
    }
    store->flush_checkpoints();
    store.reset();
    t = Clock::now();
    auto reopened = kith::SessionStore::open(path);
    auto last = reopened->last_checkpoint();
    const double reopen_ms = ms_since(t);
    const double mb = double(std::filesystem::file_size(path)) / 1e6;
    std::printf("%8zu %10.0f %12.1f %14.1f %14.1f %16.1f %16.1f %12.0f\n", n, create_ms, mb, median(sync),
                median(post_us), median(alone), maxof(during), reopen_ms);
    (void)last;
  }
  return 0;
}
