// Small helpers the benchmarks in tests/bench share: the median of figures over seeds, and a
// comma-separated list of numbers from the command line, a seeded demo scenario. Header-only.
#pragma once
#include <algorithm>
#include <cstdlib>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "solver/demo/demo_trial.h"
#include "solver/demo/simulated_people.h"

namespace kith::bench {

// The median (the mean of the middle two for an even count; -1 for none).
inline double median(std::vector<double> v) {
  if (v.empty()) return -1.0;
  std::sort(v.begin(), v.end());
  const size_t m = v.size() / 2;
  return v.size() % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}

// The demo trial's and the people's options for one seed (set_trial_seed) judging by the named
// scenario (people_scenario); false for an unknown scenario.
inline bool seeded_scenario(uint64_t seed, const std::string& scenario, DemoTrialOptions* trial,
                            SimulatedPeopleOptions* people) {
  *trial = {};
  *people = {};
  set_trial_seed(seed, trial, people);
  return people_scenario(scenario, people);
}

// N invented items in F dimensions: 10 Gaussian clusters (centres N(0, 16), unit spread), row i
// in cluster i % 10, so an item's neighbours are spread over the whole index range.
inline Points mixture(int n, int f, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  const int centres = 10;
  Points c(centres, f);
  for (int i = 0; i < centres; ++i)
    for (int j = 0; j < f; ++j) c(i, j) = 4.0 * g(rng);
  Points x(n, f);
  for (int i = 0; i < n; ++i)
    for (int j = 0; j < f; ++j) x(i, j) = c(i % centres, j) + g(rng);
  return x;
}

// N invented items in 50 dimensions with structure at every scale: 10 clusters, each a curved
// 3-dimensional sheet (latent z ~ N(0, I_3); centre + A z + 0.3 B (z*z) + 0.05 noise, A and B
// random 50 x 3), row i in cluster i % 10. Unlike `mixture`, whose clusters are pure noise
// inside, an item's nearest neighbours mean something here, so a map can keep them or not.
inline Points sheets(int n, uint64_t seed) {
  constexpr int f = 50, clusters = 10;
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  std::vector<Points> a(clusters, Points(f, 3)), b(clusters, Points(f, 3));
  Points c(clusters, f);
  for (int k = 0; k < clusters; ++k)
    for (int j = 0; j < f; ++j) {
      c(k, j) = 6.0 * g(rng);
      for (int d = 0; d < 3; ++d) {
        a[size_t(k)](j, d) = g(rng);
        b[size_t(k)](j, d) = g(rng);
      }
    }
  Points x(n, f);
  for (int i = 0; i < n; ++i) {
    const int k = i % clusters;
    double z[3];
    for (double& v : z) v = g(rng);
    for (int j = 0; j < f; ++j) {
      double v = c(k, j) + 0.05 * g(rng);
      for (int d = 0; d < 3; ++d) v += a[size_t(k)](j, d) * z[d] + 0.3 * b[size_t(k)](j, d) * z[d] * z[d];
      x(i, j) = v;
    }
  }
  return x;
}

// "25,50,100" -> {25, 50, 100}.
inline std::vector<int> int_list(const std::string& text) {
  std::vector<int> out;
  std::stringstream in(text);
  std::string part;
  while (std::getline(in, part, ',')) out.push_back(std::atoi(part.c_str()));
  return out;
}

}  // namespace kith::bench
