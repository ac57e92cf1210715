// Solver benchmark driver, run by tests/bench/bench_solver.py (which also runs scikit-learn side
// by side and prints the table). Subcommands:
//   bench_solver fit FEATURES.npy MAP.npy [iterations dims dof threads]   -> one JSON line
//   bench_solver kl FEATURES.npy MAP.npy [dof]                             -> one JSON line (same P for any map)
//   bench_solver rate N [threads dims dof]                                  -> iterations per second on an N x 50 mixture
// .npy files: little-endian float64, C order, 2-D (what numpy.save writes for float64 arrays).
#include <chrono>
#include <ctime>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <random>
#include <stdexcept>
#include <string>

#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"
#include "solver/features/neighbours.h"
#include "solver/fit/optimizer.h"
#include "solver/fit/schedule.h"
#include "tests/bench/bench_common.h"

namespace {

kith::Points read_npy(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw std::runtime_error("cannot open " + path);
  char magic[8];
  in.read(magic, 8);
  uint16_t hlen = 0;
  if (magic[6] == 1) {
    unsigned char b[2];
    in.read(reinterpret_cast<char*>(b), 2);
    hlen = uint16_t(b[0] | (b[1] << 8));
  } else {
    unsigned char b[4];
    in.read(reinterpret_cast<char*>(b), 4);
    hlen = uint16_t(b[0] | (b[1] << 8));
  }
  std::string header(hlen, ' ');
  in.read(header.data(), hlen);
  if (header.find("'<f8'") == std::string::npos || header.find("'fortran_order': False") == std::string::npos)
    throw std::runtime_error(path + ": need float64 C-order");
  const auto open = header.find('('), comma = header.find(',', open), close = header.find(')', open);
  const long rows = std::stol(header.substr(open + 1, comma - open - 1));
  const long cols = std::stol(header.substr(comma + 1, close - comma - 1));
  kith::Points x(rows, cols);
  in.read(reinterpret_cast<char*>(x.data()), std::streamsize(sizeof(double) * size_t(rows * cols)));
  if (!in) throw std::runtime_error(path + ": short file");
  return x;
}

void write_npy(const std::string& path, const kith::Points& x) {
  std::string header = "{'descr': '<f8', 'fortran_order': False, 'shape': (" + std::to_string(x.rows()) + ", " +
                       std::to_string(x.cols()) + "), }";
  while ((10 + header.size() + 1) % 64) header += ' ';
  header += '\n';
  std::ofstream out(path, std::ios::binary);
  out.write("\x93NUMPY\x01\x00", 8);
  const uint16_t len = uint16_t(header.size());
  out.put(char(len & 0xff));
  out.put(char(len >> 8));
  out.write(header.data(), std::streamsize(header.size()));
  out.write(reinterpret_cast<const char*>(x.data()), std::streamsize(sizeof(double) * size_t(x.size())));
}


double cpu_seconds() {
  timespec ts;
  clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
  return double(ts.tv_sec) + 1e-9 * double(ts.tv_nsec);
}

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 3) {
    std::fprintf(stderr, "usage: bench_solver fit|kl|rate ...\n");
    return 2;
  }
  const std::string what = argv[1];
  if (what == "fit") {
    const kith::Points x = read_npy(argv[2]);
    kith::FitOptions o;
    if (argc > 4) o.iterations = std::stol(argv[4]);
    if (argc > 5) o.dims = std::stoi(argv[5]);
    if (argc > 6) o.dof = std::stod(argv[6]);
    if (argc > 7) o.threads = std::stoi(argv[7]);
    const auto r = kith::fit_map(x, o);
    write_npy(argv[3], r.map);
    std::printf("{\"seconds\": %.3f, \"setup_seconds\": %.3f, \"kl\": %.6f}\n", r.summary.seconds,
                r.summary.setup_seconds, r.summary.kl);
  } else if (what == "kl") {
    const kith::Points x = kith::prepare_features(read_npy(argv[2]), {});
    const kith::Points y = read_npy(argv[3]);
    const double dof = argc > 4 ? std::stod(argv[4]) : 1.0;
    auto g = kith::find_neighbours(x, std::min<size_t>(size_t(x.rows()) - 1, 90));
    auto p = std::make_shared<kith::SparseAffinities>(kith::joint_affinities(g, {}));
    kith::NeighbourTermOptions o;
    o.dof = dof;
    o.exact_below = 20000;  // exact Z up to 20k items
    kith::NeighbourTerm t(p, o);
    std::printf("{\"kl\": %.6f}\n", t.evaluate(y, nullptr));
  } else if (what == "rate") {
    const int n = std::stoi(argv[2]);
    const int threads = argc > 3 ? std::stoi(argv[3]) : 1;
    const int dims = argc > 4 ? std::stoi(argv[4]) : 3;
    const double dof = argc > 5 ? std::stod(argv[5]) : 1.0;
    // A realistic map: 300 iterations of the usual schedule first, then time 100 more.
    kith::FitOptions o;
    o.iterations = 300;
    o.dims = dims;
    o.dof = dof;
    auto r = kith::fit_map(kith::bench::mixture(n, 50, 1), o);
    kith::NeighbourTermOptions to;
    to.dof = dof;
    to.threads = threads;
    kith::NeighbourTerm term(r.p, to);
    kith::GradientDescent gd;
    kith::Schedule s;
    const int steps = n >= 100000 ? 20 : 100;
    const auto t0 = std::chrono::steady_clock::now();
    const double c0 = cpu_seconds();
    for (int i = 0; i < steps; ++i) gd.step(term, r.map, s.step_at(300 + i, size_t(n)));
    const double t = seconds_since(t0), c = cpu_seconds() - c0;
    // CPU seconds of the whole process: on a loaded machine wall time overstates the cost; with
    // one thread, iterations per CPU second is what one free core would do.
    std::printf("{\"n\": %d, \"threads\": %d, \"iterations_per_second\": %.2f, \"iterations_per_cpu_second\": %.2f}\n",
                n, threads, steps / t, steps / c);
  }
  return 0;
}
