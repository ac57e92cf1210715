// Small helpers the benchmarks in tests/bench share: the median of figures over seeds, and a
// comma-separated list of numbers from the command line. Header-only.
#pragma once
#include <algorithm>
#include <cstdlib>
#include <sstream>
#include <string>
#include <vector>

namespace kith::bench {

// The median (the mean of the middle two for an even count; -1 for none).
inline double median(std::vector<double> v) {
  if (v.empty()) return -1.0;
  std::sort(v.begin(), v.end());
  const size_t m = v.size() / 2;
  return v.size() % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
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
