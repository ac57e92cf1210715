// One evaluation of the neighbour term at scale: how long the live engine's step takes at
// 100,000 items, and where the time goes (tests/bench/RESULTS-scale.md, "Faster live steps").
//   bench_step prepare N DIR     fit N x 50 invented items for 300 schedule steps (PCA start,
//                                exaggeration then 50 plain steps) and keep the map and P in DIR
//   bench_step time DIR [threads] [reps]
//                                median wall seconds of attraction, repulsion and the whole
//                                evaluation (gradient included) on the kept map, and steps/s
// The data: 10 Gaussian clusters in 50 dimensions (seed 1), rows in cluster order i % 10, so an
// item's neighbours are spread over the whole index range as in most real tables.
#include <chrono>
#include <cstdio>
#include <fstream>
#include <random>
#include <stdexcept>
#include <string>

#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"
#include "tests/bench/bench_common.h"

namespace {


template <typename T>
void put(std::ofstream& out, const std::vector<T>& v) {
  const uint64_t size = v.size();
  out.write(reinterpret_cast<const char*>(&size), sizeof size);
  out.write(reinterpret_cast<const char*>(v.data()), std::streamsize(sizeof(T) * v.size()));
}
template <typename T>
void get(std::ifstream& in, std::vector<T>& v) {
  uint64_t size = 0;
  in.read(reinterpret_cast<char*>(&size), sizeof size);
  v.resize(size);
  in.read(reinterpret_cast<char*>(v.data()), std::streamsize(sizeof(T) * size));
  if (!in) throw std::runtime_error("short file");
}

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

int main(int argc, char** argv) {
  const std::string what = argc > 2 ? argv[1] : "";
  if (what == "prepare" && argc == 4) {
    const int n = std::stoi(argv[2]);
    kith::FitOptions o;
    o.iterations = 300;
    const auto r = kith::fit_map(kith::bench::mixture(n, 50, 1), o);
    std::ofstream out(std::string(argv[3]) + "/step.bin", std::ios::binary);
    const std::vector<double> map(r.map.data(), r.map.data() + r.map.size());
    put(out, map);
    put(out, r.p->row_ptr);
    put(out, r.p->col);
    put(out, r.p->val);
    std::printf("kept %d items, %zu affinities, setup %.1f s, fit %.1f s\n", n, r.p->col.size(),
                r.summary.setup_seconds, r.summary.seconds);
    return 0;
  }
  if (what == "time") {
    std::ifstream in(std::string(argv[2]) + "/step.bin", std::ios::binary);
    std::vector<double> map;
    auto p = std::make_shared<kith::SparseAffinities>();
    get(in, map);
    get(in, p->row_ptr);
    get(in, p->col);
    get(in, p->val);
    p->n = p->row_ptr.size() - 1;
    const int threads = argc > 3 ? std::stoi(argv[3]) : 2;
    const int reps = argc > 4 ? std::stoi(argv[4]) : 15;
    kith::Points y(Eigen::Index(p->n), 3);
    std::copy(map.begin(), map.end(), y.data());
    kith::NeighbourTermOptions to;
    to.threads = threads;
    kith::NeighbourTerm term(p, to);
    kith::Points g;
    std::vector<double> whole;
    double cost = 0;
    for (int r = 0; r < reps; ++r) {
      const auto t0 = std::chrono::steady_clock::now();
      cost = term.evaluate(y, &g);
      whole.push_back(seconds_since(t0));
    }
    const double med = kith::bench::median(whole);
    std::printf("n %zu, %zu affinities, %d threads: evaluation median %.4f s (%.1f per second), cost %.9f\n", p->n,
                p->col.size(), threads, med, 1.0 / med, cost);
    return 0;
  }
  std::fprintf(stderr, "usage: bench_step prepare N DIR | bench_step time DIR [threads] [reps]\n");
  return 2;
}
