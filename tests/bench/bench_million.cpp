// Data for the million-item batch fit (tests/bench/RESULTS-scale.md, "A million in one batch"):
// writes N invented items of bench_common.h's `sheets` (10 curved 3-D sheets in 50 dimensions) as
// a float32 .npy file, through kith's one safe writer (it refuses a path that exists).
//   bench_million N OUT.npy
// tests/bench/million.sh then times `kith fit` on it, stage by stage.
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

#include "solver/io/safe_file.h"
#include "tests/bench/bench_common.h"

int main(int argc, char** argv) {
  if (argc != 3) {
    std::fprintf(stderr, "usage: bench_million N OUT.npy\n");
    return 2;
  }
  const int n = std::atoi(argv[1]);
  if (n < 10) {
    std::fprintf(stderr, "bench_million: N must be at least 10, got '%s'\n", argv[1]);
    return 2;
  }
  const kith::Points x = kith::bench::sheets(n, 1);
  // NumPy's format 1.0: magic, version, header length, a dict padded to 64 bytes, then C-order
  // little-endian float32 values.
  std::string header = "{'descr': '<f4', 'fortran_order': False, 'shape': (" + std::to_string(x.rows()) + ", " +
                       std::to_string(x.cols()) + "), }";
  while ((10 + header.size() + 1) % 64) header += ' ';
  header += '\n';
  std::string bytes = "\x93NUMPY";
  bytes += char(1);
  bytes += char(0);
  bytes += char(header.size() & 0xff);
  bytes += char(header.size() >> 8);
  bytes += header;
  const size_t start = bytes.size();
  bytes.resize(start + size_t(x.size()) * 4);
  for (Eigen::Index i = 0; i < x.size(); ++i) {
    const float v = float(x.data()[i]);
    std::memcpy(&bytes[start + size_t(i) * 4], &v, 4);
  }
  if (const std::string problem = kith::write_file_safely(argv[2], bytes); !problem.empty()) {
    std::fprintf(stderr, "bench_million: %s\n", problem.c_str());
    return 1;
  }
  std::printf("wrote %s: %d x %ld float32\n", argv[2], n, long(x.cols()));
  return 0;
}
