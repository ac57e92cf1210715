// The poster's card spacing step (solver/fit/card_spacing.h) at growing sizes: seconds, rounds,
// spreads, overlaps left (always 0) and the share of 10 nearest neighbours kept. Invented places:
// seven Gaussian clumps in a row (fixed seed), square cards. Results: tests/bench/RESULTS-poster.md.
//   cmake --build build --target bench_card_spacing && build/tests/bench_card_spacing [N,N,...]
#include <chrono>
#include <cstdio>
#include <random>

#include "solver/fit/card_spacing.h"
#include "solver/measures/health.h"
#include "tests/bench/bench_common.h"

int main(int argc, char** argv) {
  const std::vector<int> sizes = kith::bench::int_list(argc > 1 ? argv[1] : "1000,3000,10000,30000");
  std::printf("%8s %9s %7s %8s %9s %14s\n", "cards", "seconds", "rounds", "spreads", "overlaps", "10-NN kept");
  for (const int n : sizes) {
    std::mt19937 rng(3);
    std::normal_distribution<double> g(0.0, 1.0);
    kith::Points places(n, 2);
    const std::vector<double> w(size_t(n), 1.0), h(size_t(n), 1.0);
    for (int i = 0; i < n; ++i) {
      places(i, 0) = g(rng) + 5.0 * (i % 7);
      places(i, 1) = g(rng);
    }
    const auto start = std::chrono::steady_clock::now();
    const kith::CardSpacing s = kith::space_cards(places, w, h);
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    kith::HealthOptions o;  // past 5,000 cards on its fixed-seed sample
    o.trust_k = 1;
    const double kept = kith::measure_health(places, s.centres, o).neighbour_recall;
    std::printf("%8d %9.2f %7d %8d %9zu %14.3f\n", n, seconds, s.rounds, s.spreads,
                kith::count_overlaps(s.centres, w, h), kept);
  }
}
