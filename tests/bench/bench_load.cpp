// Benchmark: loading a 100,000 x 50 CSV collection with load_collection, side by side with
// numpy.loadtxt (NumPy 1.24 from Debian's /usr/bin/python3) reading the same file in the same run.
// Prints a table of median wall and CPU seconds over several runs, and the ratio.
//   build/tests/bench_load [ROWS] [COLS] [RUNS]     (default 100000 50 5)
// The file is written once to tests/bench/out/ (ignored by git) and reused.
#include <sys/resource.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <random>
#include <string>
#include <vector>

#include "solver/io/collection.h"

namespace {

double cpu_seconds() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return double(u.ru_utime.tv_sec + u.ru_stime.tv_sec) + 1e-6 * double(u.ru_utime.tv_usec + u.ru_stime.tv_usec);
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v[v.size() / 2];
}

void write_table(const std::string& path, long rows, long cols) {
  std::FILE* f = std::fopen(path.c_str(), "w");
  if (!f) throw std::runtime_error("cannot write " + path);
  std::mt19937_64 rng(20261201);
  std::normal_distribution<double> normal(0.0, 1.0);
  std::fprintf(f, "id");
  for (long j = 0; j < cols; ++j) std::fprintf(f, ",f%ld", j);
  std::fprintf(f, "\n");
  for (long i = 0; i < rows; ++i) {
    std::fprintf(f, "item%ld", i);
    for (long j = 0; j < cols; ++j) std::fprintf(f, ",%.9g", normal(rng) * (1.0 + double(j)));
    std::fprintf(f, "\n");
  }
  std::fclose(f);
}

}  // namespace

int main(int argc, char** argv) {
  const long rows = argc > 1 ? std::atol(argv[1]) : 100000;
  const long cols = argc > 2 ? std::atol(argv[2]) : 50;
  const int runs = argc > 3 ? std::atoi(argv[3]) : 5;
  namespace fs = std::filesystem;
  const fs::path out = fs::path(KITH_TESTS_DIR) / "bench" / "out";
  fs::create_directories(out);
  const std::string path = (out / ("load_" + std::to_string(rows) + "x" + std::to_string(cols) + ".csv")).string();
  if (!fs::exists(path)) write_table(path, rows, cols);
  std::printf("file: %s (%.1f MB, %ld items x %ld features), %d runs each\n", path.c_str(),
              double(fs::file_size(path)) / 1e6, rows, cols, runs);

  std::vector<double> wall, cpu;
  double sum = 0.0;
  for (int r = 0; r < runs; ++r) {
    const double c0 = cpu_seconds();
    const auto t0 = std::chrono::steady_clock::now();
    const kith::Collection c = kith::load_collection(path);
    wall.push_back(std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
    cpu.push_back(cpu_seconds() - c0);
    sum = c.features.sum();
    if (long(c.size()) != rows || c.features.cols() != cols) {
      std::fprintf(stderr, "wrong shape\n");
      return 1;
    }
  }

  // Reference: numpy.loadtxt on the same file, timed inside Python (interpreter start-up excluded).
  const std::string command = "/usr/bin/python3 " + std::string(KITH_TESTS_DIR) + "/bench/reference_load.py " +
                              path + " " + std::to_string(runs);
  std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(command.c_str(), "r"), pclose);
  double ref_wall = -1, ref_cpu = -1, ref_sum = 0;
  if (!pipe || std::fscanf(pipe.get(), "%lf %lf %lf", &ref_wall, &ref_cpu, &ref_sum) != 3) {
    std::fprintf(stderr, "reference (numpy.loadtxt) did not run\n");
  }

  const double w = median(wall), c = median(cpu);
  std::printf("\n| reader | median wall s | median CPU s | wall ratio | CPU ratio |\n");
  std::printf("|---|---|---|---|---|\n");
  std::printf("| kith load_collection | %.3f | %.3f | %.2f | %.2f |\n", w, c, ref_wall > 0 ? w / ref_wall : 0.0,
              ref_cpu > 0 ? c / ref_cpu : 0.0);
  if (ref_wall > 0) std::printf("| numpy.loadtxt (reference) | %.3f | %.3f | 1.00 | 1.00 |\n", ref_wall, ref_cpu);
  std::printf("\nsum of all features: kith %.9e, numpy %.9e (relative difference %.1e)\n", sum, ref_sum,
              ref_sum != 0 ? std::abs(sum - ref_sum) / std::abs(ref_sum) : 0.0);
  std::printf("target: under 2 s wall for 100,000 x 50 -> %s\n", w < 2.0 ? "met" : "NOT met");
  return 0;
}
