// Perplexity calibration and symmetrization (see affinities.h).
//
// For each item, bisection on beta (doubling/halving until bracketed, as in van der Maaten's
// reference code and scikit-learn's _binary_search_perplexity) until |exp(H_i) - perplexity|
// <= tolerance, with H_i in nats. Distances are shifted by the row's smallest one before
// exponentiating; p(j|i) is unchanged by the shift and nothing underflows to an all-zero row.
#include "solver/features/affinities.h"

#include "solver/base/portable_math.h"
#include "solver/base/map_parameters.h"

#include <algorithm>
#include <climits>
#include <cstdint>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "solver/base/parallel.h"

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
      const double e = pm::exp(-beta * shifted);
      p[c] = e;
      sum += e;
      dsum += shifted * e;
    }
    // H = log(sum) + beta * E[d - dmin]   (nats)
    const double entropy = pm::log(sum) + beta * dsum / sum;
    const double perplexity = pm::exp(entropy);
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
  // P_cond + P_cond^T as CSR without an intermediate list of all 2Nk edges (memory matters at
  // N = 100,000): the transpose is built by counting, with each of its rows in source order, then
  // row i of the result merges i's own neighbours (sorted by column) with row i of the transpose.
  // Each entry is the sum of at most two numbers, so the result does not depend on any order.
  std::vector<int64_t> tptr(n + 1, 0);
  for (size_t e = 0; e < n * k; ++e) ++tptr[size_t(graph.index[e]) + 1];
  for (size_t i = 0; i < n; ++i) tptr[i + 1] += tptr[i];
  std::vector<int32_t> tcol(n * k);
  std::vector<double> tval(n * k);
  {
    std::vector<int64_t> fill(tptr.begin(), tptr.end() - 1);
    for (size_t i = 0; i < n; ++i)
      for (size_t c = 0; c < k; ++c) {
        const size_t j = size_t(graph.index[i * k + c]);
        tcol[size_t(fill[j])] = int32_t(i);
        tval[size_t(fill[j]++)] = cond[i * k + c];
      }
  }
  // Own neighbours of every row sorted by column (positions into the row).
  std::vector<int32_t> own_order(n * k);
  for (size_t i = 0; i < n; ++i) {
    int32_t* o = &own_order[i * k];
    for (size_t c = 0; c < k; ++c) o[c] = int32_t(c);
    const int32_t* idx = &graph.index[i * k];
    std::sort(o, o + k, [idx](int32_t a, int32_t b) { return idx[a] < idx[b]; });
  }
  auto merge_row = [&](size_t i, auto&& emit) {
    const int32_t* idx = &graph.index[i * k];
    const int32_t* o = &own_order[i * k];
    size_t a = 0;
    int64_t b = tptr[i];
    const int64_t be = tptr[i + 1];
    while (a < k || b < be) {
      const int32_t ja = a < k ? idx[o[a]] : INT32_MAX;
      const int32_t jb = b < be ? tcol[size_t(b)] : INT32_MAX;
      if (ja == jb) {
        emit(ja, cond[i * k + size_t(o[a])] + tval[size_t(b)]);
        ++a;
        ++b;
      } else if (ja < jb) {
        emit(ja, cond[i * k + size_t(o[a])]);
        ++a;
      } else {
        emit(jb, tval[size_t(b)]);
        ++b;
      }
    }
  };
  SparseAffinities p;
  p.n = n;
  p.row_ptr.assign(n + 1, 0);
  for (size_t i = 0; i < n; ++i) {
    int64_t count = 0;
    merge_row(i, [&count](int32_t, double) { ++count; });
    p.row_ptr[i + 1] = p.row_ptr[i] + count;
  }
  p.col.resize(size_t(p.row_ptr[n]));
  p.val.resize(size_t(p.row_ptr[n]));
  for (size_t i = 0; i < n; ++i) {
    size_t at = size_t(p.row_ptr[i]);
    merge_row(i, [&](int32_t j, double v) {
      p.col[at] = j;
      p.val[at++] = v;
    });
  }
  double total = 0.0;
  for (double v : p.val) total += v;
  // total is 2N up to rounding; dividing by the actual sum makes P sum to 1 exactly as
  // scikit-learn's _joint_probabilities_nn does.
  for (double& v : p.val) v /= total;
  return p;
}

SparseAffinities joint_affinities_for(const Points& features, double perplexity, const AffinitySearch& search,
                                      NeighbourGraph* graph) {
  NeighbourOptions no;
  no.seed = search.seed;
  no.threads = search.threads;
  no.metric = search.metric;
  if (search.exact) no.exact_below = size_t(-1);
  const size_t k = std::max<size_t>(neighbour_count(size_t(features.rows()), perplexity), 1);
  if (search.stages)
    search.stages->begin(searches_with_hnsw(size_t(features.rows()), no) ? "neighbours (HNSW)" : "neighbours (exact)");
  NeighbourGraph found = find_neighbours(features, k, no);
  if (search.stages) search.stages->begin("affinities");
  AffinityOptions ao;
  ao.perplexity = perplexity;
  SparseAffinities p = joint_affinities(found, ao);
  p.neighbour_recall = found.recall;
  p.recall_sample = found.recall_sample;
  if (graph) *graph = std::move(found);
  return p;
}

SparseAffinities joint_affinities_from_graph(const NeighbourGraph& graph, double perplexity) {
  const size_t k = std::max<size_t>(std::min(graph.k, neighbour_count(graph.n, perplexity)), 1);
  AffinityOptions ao;
  ao.perplexity = perplexity;
  if (k == graph.k) return joint_affinities(graph, ao);
  NeighbourGraph nearest;
  nearest.n = graph.n;
  nearest.k = k;
  nearest.index.resize(graph.n * k);
  nearest.distance2.resize(graph.n * k);
  for (size_t i = 0; i < graph.n; ++i)
    for (size_t c = 0; c < k; ++c) {
      nearest.index[i * k + c] = graph.index[i * graph.k + c];
      nearest.distance2[i * k + c] = graph.distance2[i * graph.k + c];
    }
  return joint_affinities(nearest, ao);
}

}  // namespace kith
