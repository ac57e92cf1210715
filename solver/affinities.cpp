// Perplexity calibration and symmetrization (see affinities.h).
//
// For each item, bisection on beta (doubling/halving until bracketed, as in van der Maaten's
// reference code and scikit-learn's _binary_search_perplexity) until |exp(H_i) - perplexity|
// <= tolerance, with H_i in nats. Distances are shifted by the row's smallest one before
// exponentiating; p(j|i) is unchanged by the shift and nothing underflows to an all-zero row.
#include "solver/affinities.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "solver/parallel.h"

namespace kith {
namespace {

// Writes p(j|i) for one row, returns beta.
double calibrate_row(const double* d2, size_t k, const AffinityOptions& o, double* p) {
  double dmin = std::numeric_limits<double>::infinity();
  for (size_t c = 0; c < k; ++c) dmin = std::min(dmin, d2[c]);
  double beta = 1.0, lo = 0.0, hi = std::numeric_limits<double>::infinity();
  // Start at a scale that suits the data: beta ~ 1 / (typical distance spread).
  double spread = 0.0;
  for (size_t c = 0; c < k; ++c) spread += d2[c] - dmin;
  if (spread > 0) beta = double(k) / spread;
  for (int step = 0; step < o.max_steps; ++step) {
    double sum = 0.0, dsum = 0.0;
    for (size_t c = 0; c < k; ++c) {
      const double shifted = d2[c] - dmin;
      const double e = std::exp(-beta * shifted);
      p[c] = e;
      sum += e;
      dsum += shifted * e;
    }
    // H = log(sum) + beta * E[d - dmin]   (nats)
    const double entropy = std::log(sum) + beta * dsum / sum;
    const double perplexity = std::exp(entropy);
    for (size_t c = 0; c < k; ++c) p[c] /= sum;
    if (std::abs(perplexity - o.perplexity) <= o.tolerance) break;
    if (perplexity > o.perplexity) {  // too flat: sharpen
      lo = beta;
      beta = std::isinf(hi) ? beta * 2.0 : 0.5 * (beta + hi);
    } else {
      hi = beta;
      beta = 0.5 * (beta + lo);
    }
  }
  return beta;
}

}  // namespace

std::vector<double> conditional_affinities(const NeighbourGraph& graph, const AffinityOptions& options,
                                           std::vector<double>* betas) {
  if (!(options.perplexity > 0)) throw std::invalid_argument("perplexity must be positive");
  const size_t n = graph.n, k = graph.k;
  std::vector<double> p(n * k);
  if (betas) betas->assign(n, 0.0);
  constexpr size_t kChunk = 256;
  parallel_for((n + kChunk - 1) / kChunk, 0, [&](size_t c) {
    for (size_t i = c * kChunk; i < std::min(n, (c + 1) * kChunk); ++i) {
      const double beta = calibrate_row(&graph.distance2[i * k], k, options, &p[i * k]);
      if (betas) (*betas)[i] = beta;
    }
  });
  return p;
}

SparseAffinities joint_affinities(const NeighbourGraph& graph, const AffinityOptions& options) {
  const size_t n = graph.n, k = graph.k;
  const std::vector<double> cond = conditional_affinities(graph, options);
  // P_cond + P_cond^T as a CSR matrix: each edge (i, j, p) goes to row i and row j, then rows are
  // sorted by column and duplicates merged. Summation order within a row is fixed (by column,
  // then by source), so the result does not depend on threads.
  std::vector<int64_t> count(n + 1, 0);
  for (size_t i = 0; i < n; ++i)
    for (size_t c = 0; c < k; ++c) {
      ++count[i + 1];
      ++count[size_t(graph.index[i * k + c]) + 1];
    }
  for (size_t i = 0; i < n; ++i) count[i + 1] += count[i];
  std::vector<std::pair<int32_t, double>> entries(size_t(count[n]));
  std::vector<int64_t> fill(count.begin(), count.end() - 1);
  for (size_t i = 0; i < n; ++i)
    for (size_t c = 0; c < k; ++c) {
      const int32_t j = graph.index[i * k + c];
      const double v = cond[i * k + c];
      entries[size_t(fill[i]++)] = {j, v};
      entries[size_t(fill[size_t(j)]++)] = {int32_t(i), v};
    }
  SparseAffinities p;
  p.n = n;
  p.row_ptr.assign(n + 1, 0);
  p.col.reserve(entries.size());
  p.val.reserve(entries.size());
  double total = 0.0;
  for (size_t i = 0; i < n; ++i) {
    auto b = entries.begin() + count[i], e = entries.begin() + count[i + 1];
    std::stable_sort(b, e, [](const auto& a, const auto& c) { return a.first < c.first; });
    for (auto it = b; it != e; ++it) {
      if (!p.col.empty() && int64_t(p.col.size()) > p.row_ptr[i] && p.col.back() == it->first) {
        p.val.back() += it->second;
      } else {
        p.col.push_back(it->first);
        p.val.push_back(it->second);
      }
    }
    p.row_ptr[i + 1] = int64_t(p.col.size());
  }
  for (double v : p.val) total += v;
  // total is 2N up to rounding; dividing by the actual sum makes P sum to 1 exactly as
  // scikit-learn's _joint_probabilities_nn does.
  for (double& v : p.val) v /= total;
  p.col.shrink_to_fit();
  p.val.shrink_to_fit();
  return p;
}

}  // namespace kith
