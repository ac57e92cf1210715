// Benchmark of the live engine (solver/live/engine.h), 3-D, Barnes-Hut above 1,500 items.
// For each N: set-up time (neighbours and P, on the worker), iterations per second with snapshots
// on, the time from posting a drag target to the first snapshot that shows it (median, p95), and
// the time until a new judgment against the current map is satisfied (median of a few).
// Data: N items in 10 Gaussian clusters in 20-D (seeded, invented).
//   build/tests/bench_engine [--n 1000,10000,100000] [--threads 1] [--seconds 6] [--drags 60] [--trace]
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstring>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include <sys/resource.h>

#include "solver/live/engine.h"

using namespace kith;
using Clock = std::chrono::steady_clock;

namespace {

double cpu_seconds() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return double(u.ru_utime.tv_sec + u.ru_stime.tv_sec) + 1e-6 * double(u.ru_utime.tv_usec + u.ru_stime.tv_usec);
}

double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

Collection make_collection(size_t n, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> gauss;
  const int f = 20, k = 10;
  Collection c;
  c.features.resize(Eigen::Index(n), f);
  for (size_t i = 0; i < n; ++i) {
    const int cluster = int(i % k);
    for (int j = 0; j < f; ++j) c.features(Eigen::Index(i), j) = gauss(rng) + (j == cluster ? 6.0 : 0.0);
    c.ids.push_back("item" + std::to_string(i));
  }
  return c;
}

double percentile(std::vector<double> v, double q) {
  if (v.empty()) return -1;
  std::sort(v.begin(), v.end());
  const size_t i = std::min(v.size() - 1, size_t(q * double(v.size() - 1) + 0.5));
  return v[i];
}

template <typename Pred>
std::shared_ptr<const Snapshot> wait_for(const Engine& e, Pred pred, double limit_s) {
  const auto t0 = Clock::now();
  auto s = e.latest();
  while (!pred(*s) && since(t0) < limit_s) {
    std::this_thread::sleep_for(std::chrono::microseconds(200));
    s = e.latest();
  }
  return s;
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<size_t> sizes = {1000, 10000, 100000};
  int threads = 1, drags = 60;
  double seconds = 6;
  bool trace = false;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&]() -> std::string {
      if (i + 1 >= argc) {
        std::fprintf(stderr, "bench_engine: %s needs a value\n", a.c_str());
        std::exit(2);
      }
      return argv[++i];
    };
    if (a == "--n") {
      sizes.clear();
      std::stringstream ss(next());
      std::string part;
      while (std::getline(ss, part, ',')) sizes.push_back(std::stoul(part));
    } else if (a == "--threads") threads = std::stoi(next());
    else if (a == "--seconds") seconds = std::stod(next());
    else if (a == "--drags") drags = std::stoi(next());
    else if (a == "--trace") trace = true;
    else {
      std::fprintf(stderr, "usage: bench_engine [--n 1000,10000,100000] [--threads 1] [--seconds 6] [--drags 60] [--trace]\n");
      return 2;
    }
  }
  std::printf("threads per evaluation: %d; snapshots every >= 16 ms; %u hardware threads\n", threads,
              std::thread::hardware_concurrency());
  std::printf("%8s | %8s | %10s | %10s | %12s | %12s | %10s | %14s | %8s\n", "N", "setup s", "it/s", "it/cpu-s", "drag med ms",
              "drag p95 ms", "snap/s", "judgment s", "settled");
  for (size_t n : sizes) {
    const Collection c = make_collection(n, 17);
    EngineOptions o;
    o.threads = threads;
    o.settle_cap = 0;          // keep iterating: this measures the running engine
    o.settle_tolerance = 0.0;
    Engine e(c, o);
    const auto t0 = Clock::now();
    e.start();
    auto s = wait_for(e, [](const Snapshot& s) { return s.iteration > 0; }, 600);
    const double setup = since(t0);

    // Iterations per second, with the snapshots being published (and read here as a viewer would).
    const uint64_t it0 = s->iteration, gen0 = s->generation;
    const auto t1 = Clock::now();
    const double cpu1 = cpu_seconds();
    while (since(t1) < seconds) {
      s = e.latest();
      if (trace) {
        static uint64_t shown = 0;
        if (s->iteration / 50 != shown / 50) {
          std::printf("  it %6lu  movement %.3g  kl %.4f\n", (unsigned long)s->iteration, s->movement, s->health.kl);
          shown = s->iteration;
        }
      }
      std::this_thread::sleep_for(std::chrono::milliseconds(4));
    }
    const double span = since(t1);
    const double ips = double(s->iteration - it0) / span;
    const double snaps = double(s->generation - gen0) / span;
    // Iterations per CPU second of this process: what one dedicated worker core would give (the
    // machine is shared, so wall-clock it/s understates it).
    const double ipc = double(s->iteration - it0) / std::max(1e-9, cpu_seconds() - cpu1);

    // Drag latency: post, then watch snapshots until one shows the item at the target.
    std::mt19937_64 rng(3);
    std::uniform_real_distribution<double> jitter(0, 1);
    std::vector<double> lat;
    for (int d = 0; d < drags; ++d) {
      s = e.latest();
      const int32_t item = int32_t(rng() % n);
      std::vector<double> target = {s->positions(item, 0) + 1.0, s->positions(item, 1) - 0.5, s->positions(item, 2)};
      const auto tp = Clock::now();
      const uint64_t seq = e.post(cmd::DragTarget{item, target});
      auto r = wait_for(
          e, [&](const Snapshot& x) { return x.last_command >= seq && x.positions(item, 0) == target[0]; }, 30);
      lat.push_back(1000 * since(tp));
      if (r->last_command < seq) std::printf("  drag %d not reflected after 30 s\n", d);
      e.post(cmd::ClearDrag{item});
      // Post at a random moment of the next iteration.
      std::this_thread::sleep_for(std::chrono::microseconds(int(jitter(rng) * 1e6 / std::max(ips, 1.0))));
    }

    // A new judgment against the current map: anchor a, its neighbour f in the map is "farther"
    // than n, an item a little further away. Time until the snapshot shows it satisfied.
    std::vector<double> judge;
    for (int t = 0; t < 3; ++t) {
      s = e.latest();
      const int32_t a = int32_t(rng() % n);
      std::vector<std::pair<double, int32_t>> d2;
      for (Eigen::Index j = 0; j < s->positions.rows(); ++j)
        if (j != a) d2.push_back({(s->positions.row(j) - s->positions.row(a)).squaredNorm(), int32_t(j)});
      std::nth_element(d2.begin(), d2.begin() + 40, d2.end());
      std::sort(d2.begin(), d2.begin() + 41);
      Judgment j;
      j.id = 1000 + t;
      j.anchor = a, j.nearer = d2[40].second, j.farther = d2[0].second;
      const auto tj = Clock::now();
      e.post(cmd::AddJudgment{j});
      auto r = wait_for(e, [&](const Snapshot& x) { return x.health.judgment_agreement == 1.0; }, 60);
      judge.push_back(r->health.judgment_agreement == 1.0 ? since(tj) : -1);
      e.post(cmd::RetractJudgment{j.id});
      wait_for(e, [&](const Snapshot& x) { return x.health.judgment_agreement < 0; }, 10);
    }
    s = e.latest();
    e.stop();
    std::printf("%8zu | %8.2f | %10.1f | %10.1f | %12.2f | %12.2f | %10.1f | %14.3f | %8s\n", n, setup, ips, ipc,
                percentile(lat, 0.5),
                percentile(lat, 0.95), snaps, percentile(judge, 0.5), s->settled ? "yes" : "no");
    std::fflush(stdout);
  }
  return 0;
}
