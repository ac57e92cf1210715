// Time to a good first map at scale (tests/bench/RESULTS-scale.md, "A good first map fast"):
// the live engine on N invented items (bench_common.h's sheets, 50 dimensions) from the PCA
// start and from the multiscale start (solver/fit/multiscale.h), one after the other in one run.
// Every `--every` seconds the latest snapshot's map is kept; afterwards each kept map gets its
// trustworthiness (k = 5) and neighbour recall (k = 10) on a fixed 5,000-item sample
// (solver/measures/health.h, the live engine's own measure) and its KL from the snapshot.
//   bench_first_map [--n 100000] [--seconds 240] [--every 5] [--threads 2]
// Prints one table row per kept map, then for each start: the final figures and the first time the
// trustworthiness came within 0.01 (and 0.001) of its own final value and of the PCA start's final value.
#include <chrono>
#include <cstdio>
#include <string>
#include <thread>
#include <vector>

#include "solver/features/feature_prep.h"
#include "solver/live/engine.h"
#include "solver/measures/health.h"
#include "tests/bench/bench_common.h"

namespace {

struct Kept {
  double seconds;
  uint64_t iteration;
  double kl;
  kith::Points map;
  double trust = -1, recall = -1;
};

std::vector<Kept> run(const kith::Collection& c, size_t multiscale_above, int threads, double seconds, double every) {
  kith::EngineOptions o;
  o.threads = threads;
  o.multiscale_above = multiscale_above;
  o.settle_cap = 0;
  o.settle_after = 1 << 30;
  o.slow_after = 1 << 30;
  const auto t0 = std::chrono::steady_clock::now();
  kith::Engine e(c, o);
  e.start();
  std::vector<Kept> kept;
  for (double t = every; t <= seconds + 1e-9; t += every) {
    std::this_thread::sleep_until(t0 + std::chrono::duration<double>(t));
    const auto s = e.latest();
    kept.push_back({t, s->iteration, s->health.kl, s->positions});
  }
  e.stop();
  return kept;
}

}  // namespace

int main(int argc, char** argv) {
  int n = 100000, threads = 2;
  double seconds = 240, every = 5;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i], v = argv[i + 1];
    if (a == "--n") n = std::stoi(v);
    else if (a == "--seconds") seconds = std::stod(v);
    else if (a == "--every") every = std::stod(v);
    else if (a == "--threads") threads = std::stoi(v);
    else {
      std::fprintf(stderr, "usage: bench_first_map [--n 100000] [--seconds 240] [--every 5] [--threads 2]\n");
      return 2;
    }
  }
  kith::Collection c;
  c.features = kith::bench::sheets(n, 1);
  for (int i = 0; i < n; ++i) c.ids.push_back("i" + std::to_string(i));
  const kith::Points x = kith::prepare_features(c.features, {});
  std::vector<std::vector<Kept>> runs;
  const char* names[2] = {"PCA start", "multiscale"};
  runs.push_back(run(c, 0, threads, seconds, every));
  runs.push_back(run(c, 1, threads, seconds, every));
  for (auto& r : runs)
    for (Kept& k : r) {
      kith::HealthOptions h;
      h.threads = threads;
      const kith::MapHealth m = kith::measure_health(x, k.map, h);
      k.trust = m.trustworthiness;
      k.recall = m.neighbour_recall;
    }
  std::printf("N %d x 50, %d threads; trustworthiness (k 5) and recall (k 10) on a 5,000-item sample\n", n, threads);
  std::printf("| s | PCA: steps | PCA: T | PCA: recall | PCA: KL | multiscale: steps | multiscale: T | multiscale: recall | multiscale: KL |\n");
  std::printf("|---:|---:|---:|---:|---:|---:|---:|---:|---:|\n");
  for (size_t i = 0; i < runs[0].size(); ++i) {
    std::printf("| %.0f", runs[0][i].seconds);
    for (const auto& r : runs)
      std::printf(" | %llu | %.4f | %.4f | %.4f", (unsigned long long)r[i].iteration, r[i].trust, r[i].recall, r[i].kl);
    std::printf(" |\n");
  }
  const double pca_final = runs[0].back().trust;
  for (int s = 0; s < 2; ++s) {
    const auto& r = runs[size_t(s)];
    auto first_within = [&](double target, double margin) {
      for (const Kept& k : r)
        if (k.trust >= target - margin) return k.seconds;
      return -1.0;
    };
    std::printf("%s: final T %.4f, recall %.4f, KL %.4f after %llu steps; T within 0.01 of its final at %.0f s, of "
                "the PCA start's final at %.0f s; within 0.001 at %.0f s and %.0f s\n",
                names[s], r.back().trust, r.back().recall, r.back().kl, (unsigned long long)r.back().iteration,
                first_within(r.back().trust, 0.01), first_within(pca_final, 0.01), first_within(r.back().trust, 0.001),
                first_within(pca_final, 0.001));
  }
  return 0;
}
