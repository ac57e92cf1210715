// Where exact repulsion stops paying: the optimization loop (1000 steps, fit's schedule) with exact
// O(N^2) repulsion and with Barnes-Hut (theta 0.5) on the same P and start, then fit_map end to end
// with the switch it uses (NeighbourTermOptions::exact_below), for N from 100 to 20,000, on one
// thread by default. Invented data: 12 seeded Gaussian clusters in 50 dimensions.
//
//   build/tests/bench_crossover [--sizes 100,200,...] [--exact-up-to N] [--runs R] [--threads T]
//
// Prints a markdown table; the medians of R runs (R = 3 by default; one run above 5,000 items).
// Results: tests/bench/RESULTS-scale.md.
#include <chrono>
#include <cstdio>
#include <cstring>
#include <memory>
#include <random>
#include <string>
#include <vector>

#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"
#include "tests/bench/bench_common.h"

namespace {

using Clock = std::chrono::steady_clock;

kith::Points clusters(size_t n, int dims, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0.0, 1.0);
  kith::Points centres(12, dims);
  for (Eigen::Index i = 0; i < centres.size(); ++i) centres.data()[i] = 4.0 * g(rng);
  kith::Points x(Eigen::Index(n), dims);
  for (Eigen::Index i = 0; i < x.rows(); ++i) {
    const Eigen::Index c = Eigen::Index(rng() % 12);
    for (int d = 0; d < dims; ++d) x(i, d) = centres(c, d) + g(rng);
  }
  return x;
}

// Seconds and final KL of the 1000-step loop with one repulsion path.
std::pair<double, double> loop_seconds(const std::shared_ptr<const kith::SparseAffinities>& p,
                                       const kith::Points& start, bool exact, int threads) {
  kith::NeighbourTermOptions o;
  o.force_exact = exact;
  o.exact_below = 0;
  o.threads = threads;
  kith::NeighbourTerm term(p, o);
  kith::Points y = start;
  kith::LoopOptions loop;
  const auto t0 = Clock::now();
  const kith::FitSummary s = kith::run_schedule(
      term, [&term](double e) { term.set_exaggeration(e); }, y, loop);
  return {std::chrono::duration<double>(Clock::now() - t0).count(), s.kl};
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<int> sizes = {100, 200, 300, 400, 500, 600, 800, 1000, 1200, 1400, 1600, 2000, 3000, 5000, 10000, 20000};
  int exact_up_to = 2000, runs = 3, threads = 1;
  for (int a = 1; a + 1 < argc; a += 2) {
    if (!std::strcmp(argv[a], "--sizes")) sizes = kith::bench::int_list(argv[a + 1]);
    if (!std::strcmp(argv[a], "--exact-up-to")) exact_up_to = std::atoi(argv[a + 1]);
    if (!std::strcmp(argv[a], "--runs")) runs = std::atoi(argv[a + 1]);
    if (!std::strcmp(argv[a], "--threads")) threads = std::atoi(argv[a + 1]);
  }
  std::printf("| N | exact loop (s) | Barnes-Hut loop (s) | exact / BH | KL exact | KL BH | fit_map (s) | path |\n");
  std::printf("|---:|---:|---:|---:|---:|---:|---:|---|\n");
  for (int n : sizes) {
    const kith::Points x = clusters(size_t(n), 50, 7);
    kith::FitOptions fo;
    fo.threads = threads;
    const int r = n > 5000 ? 1 : runs;
    auto p = std::make_shared<const kith::SparseAffinities>(
        kith::joint_affinities_for(x, fo.perplexity_for(size_t(n)), {fo.seed, threads, false}));
    const kith::Points start = kith::pca_start(x, 3, 1e-4, fo.seed);
    std::vector<double> te, tb, tf;
    double kle = -1, klb = -1;
    for (int run = 0; run < r; ++run) {
      if (n <= exact_up_to) {
        const auto e = loop_seconds(p, start, true, threads);
        te.push_back(e.first);
        kle = e.second;
      }
      const auto b = loop_seconds(p, start, false, threads);
      tb.push_back(b.first);
      klb = b.second;
      const auto t0 = Clock::now();
      kith::fit_map(x, fo);
      tf.push_back(std::chrono::duration<double>(Clock::now() - t0).count());
    }
    const double me = kith::bench::median(te), mb = kith::bench::median(tb);
    kith::NeighbourTermOptions defaults;
    if (te.empty())
      std::printf("| %d | - | %.3f | - | - | %.4f | %.3f | %s |\n", n, mb, klb, kith::bench::median(tf),
                  size_t(n) < defaults.exact_below ? "exact" : "Barnes-Hut");
    else
      std::printf("| %d | %.3f | %.3f | %.2f | %.4f | %.4f | %.3f | %s |\n", n, me, mb, me / mb, kle, klb,
                  kith::bench::median(tf), size_t(n) < defaults.exact_below ? "exact" : "Barnes-Hut");
    std::fflush(stdout);
  }
  return 0;
}
