// HNSW's parameters by measured recall (tests/bench/RESULTS-scale.md, "HNSW parameters"): for N
// invented items (bench_common.h's sheets, 50 dimensions, prepared as the map prepares them),
// the build and search time of kith's neighbour search (solver/features/neighbours.h) for each
// (links, build candidates, search candidates), and its recall at k = 90 (perplexity 30) against
// exact neighbours of a fixed 1,000-item sample (brute force over all N, in double).
//   bench_hnsw [--n 100000] [--settings 16:200:100,16:100:100,...] [--threads 2]
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <numeric>
#include <queue>
#include <random>
#include <string>
#include <vector>

#include "solver/base/portable_random.h"
#include "solver/features/feature_prep.h"
#include "solver/features/neighbours.h"
#include "tests/bench/bench_common.h"

int main(int argc, char** argv) {
  int n = 100000, threads = 2;
  std::string settings = "16:200:100,16:100:100,16:64:100,16:48:100,16:32:100,12:48:100,24:48:100";
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i], v = argv[i + 1];
    if (a == "--n") n = std::stoi(v);
    else if (a == "--settings") settings = v;
    else if (a == "--threads") threads = std::stoi(v);
    else {
      std::fprintf(stderr, "usage: bench_hnsw [--n 100000] [--settings M:EFC:EF,...] [--threads 2]\n");
      return 2;
    }
  }
  constexpr size_t k = 90, kSample = 1000;
  const kith::Points x = kith::prepare_features(kith::bench::sheets(n, 1), {});
  // Exact neighbours of the sample.
  std::mt19937_64 rng(7);
  std::vector<int32_t> rows(static_cast<size_t>(n));
  std::iota(rows.begin(), rows.end(), 0);
  kith::shuffle(rows.begin(), rows.end(), rng);
  rows.resize(kSample);
  std::vector<std::vector<int32_t>> truth(kSample);
  for (size_t s = 0; s < kSample; ++s) {
    const Eigen::Index i = rows[s];
    std::vector<std::pair<double, int32_t>> d(static_cast<size_t>(n));
    for (Eigen::Index j = 0; j < n; ++j) d[size_t(j)] = {(x.row(i) - x.row(j)).squaredNorm(), int32_t(j)};
    std::partial_sort(d.begin(), d.begin() + long(k + 1), d.end());
    for (size_t c = 0; c < k + 1; ++c)
      if (d[c].second != i && truth[s].size() < k) truth[s].push_back(d[c].second);
    std::sort(truth[s].begin(), truth[s].end());
  }
  std::printf("N %d x %ld (prepared), k %zu, recall on %zu items, %d threads\n", n, long(x.cols()), k, kSample, threads);
  std::printf("| links M | build candidates | search candidates | search s (build + queries) | recall at 90 | worst item |\n");
  std::printf("|---:|---:|---:|---:|---:|---:|\n");
  for (const std::string& setting : [&] {
         std::vector<std::string> out;
         size_t at = 0;
         while (at <= settings.size()) {
           const size_t comma = std::min(settings.find(',', at), settings.size());
           out.push_back(settings.substr(at, comma - at));
           at = comma + 1;
         }
         return out;
       }()) {
    const std::vector<int> v = kith::bench::int_list([&] {
      std::string t = setting;
      std::replace(t.begin(), t.end(), ':', ',');
      return t;
    }());
    kith::NeighbourOptions o;
    o.exact_below = 0;
    o.threads = threads;
    o.hnsw_links = size_t(v.at(0));
    o.hnsw_build_candidates = size_t(v.at(1));
    o.hnsw_search_candidates = size_t(v.at(2));
    const auto t0 = std::chrono::steady_clock::now();
    const kith::NeighbourGraph g = kith::find_neighbours(x, k, o);
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    double sum = 0, worst = 1;
    for (size_t s = 0; s < kSample; ++s) {
      std::vector<int32_t> got(g.index.begin() + long(size_t(rows[s]) * k), g.index.begin() + long(size_t(rows[s]) * k + k));
      std::sort(got.begin(), got.end());
      std::vector<int32_t> both;
      std::set_intersection(got.begin(), got.end(), truth[s].begin(), truth[s].end(), std::back_inserter(both));
      const double r = double(both.size()) / double(k);
      sum += r;
      worst = std::min(worst, r);
    }
    std::printf("| %d | %d | %d | %.1f | %.4f | %.3f |\n", v[0], v[1], v[2], secs, sum / kSample, worst);
    std::fflush(stdout);
  }
  return 0;
}
