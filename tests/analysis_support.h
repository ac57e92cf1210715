// Helpers for the analysis tests: a brute-force neighbour graph (the slow, obvious reference
// for find_neighbours' output format) and a tiny CSV reader for the reference scripts' files.
#pragma once
#include <algorithm>
#include <fstream>
#include <numeric>
#include <sstream>
#include <string>
#include <vector>

#include "solver/features/neighbours.h"

namespace kith::test {

inline NeighbourGraph brute_neighbours(const Points& x, size_t k) {
  const size_t n = size_t(x.rows());
  NeighbourGraph g;
  g.n = n;
  g.k = k;
  g.index.resize(n * k);
  g.distance2.resize(n * k);
  std::vector<double> d(n);
  std::vector<int32_t> order(n);
  for (size_t i = 0; i < n; ++i) {
    for (size_t j = 0; j < n; ++j) d[j] = (x.row(Eigen::Index(i)) - x.row(Eigen::Index(j))).squaredNorm();
    order.resize(n);
    std::iota(order.begin(), order.end(), 0);
    order.erase(order.begin() + long(i));
    std::partial_sort(order.begin(), order.begin() + long(k), order.end(), [&](int32_t a, int32_t b) {
      return d[size_t(a)] != d[size_t(b)] ? d[size_t(a)] < d[size_t(b)] : a < b;
    });
    for (size_t r = 0; r < k; ++r) {
      g.index[i * k + r] = order[r];
      g.distance2[i * k + r] = d[size_t(order[r])];
    }
  }
  return g;
}

// Reads a CSV whose first column is an id, then `text_columns - 1` text columns, then numbers.
struct SimpleTable {
  std::vector<std::string> ids;
  std::vector<std::vector<std::string>> text;  // per text column after the id
  Points numbers;
};
inline SimpleTable read_simple_csv(const std::string& path, size_t text_columns) {
  std::ifstream in(path);
  std::string line;
  std::getline(in, line);  // header
  SimpleTable t;
  t.text.resize(text_columns - 1);
  std::vector<std::vector<double>> rows;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::stringstream s(line);
    std::string cell;
    std::vector<double> row;
    for (size_t c = 0; std::getline(s, cell, ','); ++c) {
      if (c == 0) t.ids.push_back(cell);
      else if (c < text_columns) t.text[c - 1].push_back(cell);
      else row.push_back(std::stod(cell));
    }
    rows.push_back(row);
  }
  t.numbers.resize(Eigen::Index(rows.size()), rows.empty() ? 0 : Eigen::Index(rows[0].size()));
  for (size_t i = 0; i < rows.size(); ++i)
    for (size_t j = 0; j < rows[i].size(); ++j) t.numbers(Eigen::Index(i), Eigen::Index(j)) = rows[i][j];
  return t;
}

}  // namespace kith::test
