// k nearest neighbours (see neighbours.h).
//
// Exact: rows in blocks of kBlock; squared distances of a block to every row from one Eigen
// product, |a|^2 + |b|^2 - 2 a.b, then the k + 1 smallest (the item itself dropped). The chosen
// neighbours' distances are recomputed as sum (a - b)^2 in double, so cancellation in the product
// form never reaches P. Ties are broken by index, so the result is deterministic.
// HNSW (hnswlib, M = 16, ef_construction = 200, ef = max(2k + 2, 100); NeighbourOptions): the index is built on one
// thread, in row order, with a seeded level generator, so a seed gives one graph; queries run in
// parallel (read-only). Distances are again recomputed exactly in double. The share of the
// exact neighbours found is then measured on evenly spaced sample rows by brute force, and the
// search repeated with twice the candidates while it is below NeighbourOptions::min_recall.
#include "solver/features/neighbours.h"

#include <hnswlib/hnswlib.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <numeric>
#include <stdexcept>

#include "solver/base/parallel.h"

namespace kith {
namespace {

constexpr Eigen::Index kBlock = 256;

double exact_d2(const Points& x, Eigen::Index i, Eigen::Index j) {
  return (x.row(i) - x.row(j)).squaredNorm();
}

// Sorts row i's candidates by (exact distance, index) and writes the first k.
void finish_row(const Points& x, Eigen::Index i, std::vector<int32_t>& cand, size_t k, NeighbourGraph& g) {
  std::vector<std::pair<double, int32_t>> dj;
  dj.reserve(cand.size());
  for (int32_t j : cand)
    if (j != i) dj.emplace_back(exact_d2(x, i, j), j);
  std::sort(dj.begin(), dj.end());
  for (size_t c = 0; c < k; ++c) {
    g.index[size_t(i) * k + c] = dj[c].second;
    g.distance2[size_t(i) * k + c] = dj[c].first;
  }
}

void exact_search(const Points& x, size_t k, int threads, NeighbourGraph& g) {
  const Eigen::Index n = x.rows();
  const Eigen::VectorXd norms = x.rowwise().squaredNorm();
  const size_t blocks = size_t((n + kBlock - 1) / kBlock);
  parallel_for(blocks, threads, [&](size_t b) {
    const Eigen::Index r0 = Eigen::Index(b) * kBlock, rows = std::min(kBlock, n - r0);
    Points d = -2.0 * (x.middleRows(r0, rows) * x.transpose());
    d.rowwise() += norms.transpose();
    d.colwise() += norms.segment(r0, rows);
    std::vector<int32_t> order(static_cast<size_t>(n));
    std::vector<int32_t> cand;
    // One more than needed (the item itself), plus a margin so that rounding in the product form
    // cannot push a true neighbour out before the exact re-sort.
    const size_t keep = std::min<size_t>(size_t(n), k + 1 + 8);
    for (Eigen::Index r = 0; r < rows; ++r) {
      std::iota(order.begin(), order.end(), 0);
      const double* row = &d(r, 0);
      auto less = [row](int32_t a, int32_t c) { return row[a] < row[c] || (row[a] == row[c] && a < c); };
      std::nth_element(order.begin(), order.begin() + (keep - 1), order.end(), less);
      cand.assign(order.begin(), order.begin() + keep);
      finish_row(x, r0 + r, cand, k, g);
    }
  });
}

// The exact k nearest of row i (ties by index), by brute force over every row.
std::vector<int32_t> exact_row(const Points& x, Eigen::Index i, size_t k) {
  const Eigen::Index n = x.rows();
  std::vector<std::pair<double, int32_t>> dj;
  dj.reserve(size_t(n));
  for (Eigen::Index j = 0; j < n; ++j)
    if (j != i) dj.emplace_back(exact_d2(x, i, j), int32_t(j));
  std::nth_element(dj.begin(), dj.begin() + (k - 1), dj.end());
  std::vector<int32_t> out;
  for (size_t c = 0; c < k; ++c) out.push_back(dj[c].second);
  return out;
}

// The share of the exact neighbours of `sample` rows that G holds.
double sampled_recall(const NeighbourGraph& g, const std::vector<Eigen::Index>& sample,
                      const std::vector<std::vector<int32_t>>& exact) {
  size_t found = 0, wanted = 0;
  for (size_t s = 0; s < sample.size(); ++s) {
    const int32_t* row = &g.index[size_t(sample[s]) * g.k];
    std::vector<int32_t> have(row, row + g.k);
    std::sort(have.begin(), have.end());
    for (int32_t j : exact[s]) found += std::binary_search(have.begin(), have.end(), j);
    wanted += exact[s].size();
  }
  return wanted ? double(found) / double(wanted) : 1.0;
}

using FloatRows = Eigen::Matrix<float, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

void hnsw_query(const Points& x, const FloatRows& xf, hnswlib::HierarchicalNSW<float>& index, size_t k, size_t ef,
                int threads, NeighbourGraph& g) {
  const Eigen::Index n = x.rows();
  index.setEf(ef);
  constexpr Eigen::Index kChunk = 512;
  const size_t chunks = size_t((n + kChunk - 1) / kChunk);
  parallel_for(chunks, threads, [&](size_t c) {
    std::vector<int32_t> cand;
    for (Eigen::Index i = Eigen::Index(c) * kChunk; i < std::min(n, Eigen::Index(c + 1) * kChunk); ++i) {
      auto found = index.searchKnn(xf.row(i).data(), k + 1);
      cand.clear();
      while (!found.empty()) {
        cand.push_back(int32_t(found.top().second));
        found.pop();
      }
      // The item itself normally comes back among the k + 1; if not (exact duplicates), finish_row
      // keeps the k nearest of the others.
      const bool has_self = std::find(cand.begin(), cand.end(), int32_t(i)) != cand.end();
      if (cand.size() < k + (has_self ? 1 : 0))
        throw std::runtime_error("HNSW returned too few neighbours for item " + std::to_string(i));
      finish_row(x, i, cand, k, g);
    }
  });
  g.search_candidates = ef;
}

void hnsw_search(const Points& x, size_t k, const NeighbourOptions& options, NeighbourGraph& g) {
  const Eigen::Index n = x.rows(), f = x.cols();
  // hnswlib works in float; the found neighbours' distances are recomputed in double afterwards.
  FloatRows xf = x.cast<float>();
  hnswlib::L2Space space(static_cast<size_t>(f));
  auto index = std::make_unique<hnswlib::HierarchicalNSW<float>>(&space, size_t(n), options.hnsw_links,
                                                                  options.hnsw_build_candidates, size_t(options.seed));
  for (Eigen::Index i = 0; i < n; ++i) index->addPoint(xf.row(i).data(), hnswlib::labeltype(i));
  size_t ef = std::max<size_t>(2 * k + 2, options.hnsw_search_candidates);
  hnsw_query(x, xf, *index, k, ef, options.threads, g);
  if (options.recall_sample == 0) return;
  // Evenly spaced rows: no generator, the same sample on every machine.
  const size_t s = std::min<size_t>(options.recall_sample, size_t(n));
  std::vector<Eigen::Index> sample(s);
  for (size_t i = 0; i < s; ++i) sample[i] = Eigen::Index((i * size_t(n)) / s);
  std::vector<std::vector<int32_t>> exact(s);
  parallel_for(s, options.threads, [&](size_t i) { exact[i] = exact_row(x, sample[i], k); });
  g.recall = sampled_recall(g, sample, exact);
  g.recall_sample = s;
  for (int retry = 0; retry < options.hnsw_retries && g.recall < options.min_recall; ++retry) {
    ef *= 2;
    hnsw_query(x, xf, *index, k, ef, options.threads, g);
    g.recall = sampled_recall(g, sample, exact);
  }
}

}  // namespace

Eigen::Index first_zero_row(const Points& x) {
  for (Eigen::Index i = 0; i < x.rows(); ++i) {
    const double length = x.row(i).norm();
    if (!(length > 0) || !std::isfinite(length)) return i;
  }
  return -1;
}

Points unit_rows(const Points& x) {
  if (const Eigen::Index bad = first_zero_row(x); bad >= 0)
    throw std::invalid_argument("row " + std::to_string(bad + 1) +
                                " has no direction (all its features are 0), so it has no cosine distance");
  return x.rowwise().normalized();
}

NeighbourGraph find_neighbours(const Points& given, size_t k, const NeighbourOptions& options) {
  // Under cosine the search runs on the unit rows (a copy), so both paths below stay Euclidean.
  Points unit;
  if (options.metric == Metric::kCosine) unit = unit_rows(given);
  const Points& x = options.metric == Metric::kCosine ? unit : given;
  const size_t n = size_t(x.rows());
  if (n < 2) throw std::invalid_argument("find_neighbours: need at least 2 items");
  if (k == 0 || k > n - 1) throw std::invalid_argument("find_neighbours: k must be in 1 .. N-1");
  NeighbourGraph g;
  g.n = n;
  g.k = k;
  g.index.assign(n * k, 0);
  g.distance2.assign(n * k, 0.0);
  if (searches_with_hnsw(n, options))
    hnsw_search(x, k, options, g);
  else
    exact_search(x, k, options.threads, g);
  return g;
}

}  // namespace kith
