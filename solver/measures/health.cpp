// Health measures (see health.h).
#include "solver/measures/health.h"

#include <algorithm>
#include <cstdio>
#include <numeric>
#include <random>
#include <stdexcept>
#include <vector>

#include "solver/base/parallel.h"

namespace kith {
namespace {

void squared_distances(const Points& x, Eigen::Index i, std::vector<double>& out) {
  const Eigen::Index n = x.rows(), f = x.cols();
  out.resize(size_t(n));
  const double* xi = &x(i, 0);
  for (Eigen::Index j = 0; j < n; ++j) {
    const double* xj = &x(j, 0);
    double s = 0.0;
    for (Eigen::Index c = 0; c < f; ++c) {
      const double d = xi[c] - xj[c];
      s += d * d;
    }
    out[size_t(j)] = s;
  }
}

// The k nearest rows to i (excluding i), by (distance, index).
void nearest(const std::vector<double>& d, Eigen::Index i, int k, std::vector<int32_t>& idx, std::vector<int32_t>& out) {
  idx.resize(d.size());
  std::iota(idx.begin(), idx.end(), 0);
  std::swap(idx[size_t(i)], idx.back());
  idx.pop_back();
  auto less = [&d](int32_t a, int32_t b) { return d[size_t(a)] < d[size_t(b)] || (d[size_t(a)] == d[size_t(b)] && a < b); };
  std::nth_element(idx.begin(), idx.begin() + (k - 1), idx.end(), less);
  std::sort(idx.begin(), idx.begin() + k, less);
  out.assign(idx.begin(), idx.begin() + k);
}

template <typename RowFn>
double sum_over_rows(Eigen::Index n, int threads, RowFn&& row) {
  constexpr Eigen::Index kChunk = 64;
  const size_t chunks = size_t((n + kChunk - 1) / kChunk);
  std::vector<double> partial(chunks, 0.0);
  parallel_for(chunks, threads, [&](size_t c) {
    double s = 0.0;
    for (Eigen::Index i = Eigen::Index(c) * kChunk; i < std::min(n, Eigen::Index(c + 1) * kChunk); ++i) s += row(i);
    partial[c] = s;
  });
  double total = 0.0;
  for (double v : partial) total += v;
  return total;
}

void check_shapes(const Points& x, const Points& y) {
  if (x.rows() != y.rows())
    throw std::invalid_argument("health: features have " + std::to_string(x.rows()) + " rows, map " +
                                std::to_string(y.rows()));
}

}  // namespace

double trustworthiness(const Points& x, const Points& y, int k, int threads) {
  check_shapes(x, y);
  const Eigen::Index n = x.rows();
  if (k < 1 || double(k) >= double(n) / 2.0)
    throw std::invalid_argument("trustworthiness: k must be at least 1 and less than n / 2");
  const double penalty = sum_over_rows(n, threads, [&](Eigen::Index i) {
    thread_local std::vector<double> dx, dy;
    thread_local std::vector<int32_t> idx, map_nn;
    squared_distances(x, i, dx);
    squared_distances(y, i, dy);
    nearest(dy, i, k, idx, map_nn);
    double s = 0.0;
    for (int32_t j : map_nn) {
      // rank of j among i's feature neighbours, 1-based, ties in index order (a stable sort)
      const double dj = dx[size_t(j)];
      long rank = 1;
      for (Eigen::Index l = 0; l < n; ++l) {
        if (l == i) continue;
        const double dl = dx[size_t(l)];
        rank += (dl < dj || (dl == dj && l < j)) ? 1 : 0;
      }
      if (rank > k) s += double(rank - k);
    }
    return s;
  });
  const double nn = double(n), kk = double(k);
  return 1.0 - penalty * (2.0 / (nn * kk * (2.0 * nn - 3.0 * kk - 1.0)));
}

double neighbour_recall(const Points& x, const Points& y, int k, int threads) {
  check_shapes(x, y);
  const Eigen::Index n = x.rows();
  if (k < 1 || k >= n) throw std::invalid_argument("neighbour recall: k must be in 1 .. n-1");
  const double hits = sum_over_rows(n, threads, [&](Eigen::Index i) {
    thread_local std::vector<double> d;
    thread_local std::vector<int32_t> idx, a, b;
    squared_distances(x, i, d);
    nearest(d, i, k, idx, a);
    squared_distances(y, i, d);
    nearest(d, i, k, idx, b);
    std::sort(a.begin(), a.end());
    std::sort(b.begin(), b.end());
    std::vector<int32_t> both;
    std::set_intersection(a.begin(), a.end(), b.begin(), b.end(), std::back_inserter(both));
    return double(both.size());
  });
  return hits / (double(n) * double(k));
}

std::string MapHealth::BriefReport() const {
  char buf[200];
  std::snprintf(buf, sizeof buf, "KL %.4f, trustworthiness %.4f, neighbour recall %.4f (on %zu items)", kl,
                trustworthiness, neighbour_recall, sample);
  return buf;
}

MapHealth measure_health(const Points& x, const Points& y, const HealthOptions& o) {
  check_shapes(x, y);
  MapHealth h;
  const size_t n = size_t(x.rows());
  if (n > o.sample_above) {
    std::vector<int32_t> rows(n);
    std::iota(rows.begin(), rows.end(), 0);
    std::mt19937_64 rng(o.seed);
    // Partial Fisher-Yates with our own index draw: std::shuffle's output differs between
    // standard libraries, this does not.
    for (size_t i = 0; i < o.sample_above; ++i) {
      const size_t j = i + size_t(rng() % uint64_t(n - i));
      std::swap(rows[i], rows[j]);
    }
    rows.resize(o.sample_above);
    std::sort(rows.begin(), rows.end());
    Points xs(Eigen::Index(rows.size()), x.cols()), ys(Eigen::Index(rows.size()), y.cols());
    for (size_t r = 0; r < rows.size(); ++r) {
      xs.row(Eigen::Index(r)) = x.row(rows[r]);
      ys.row(Eigen::Index(r)) = y.row(rows[r]);
    }
    h.trustworthiness = trustworthiness(xs, ys, o.trust_k, o.threads);
    h.neighbour_recall = neighbour_recall(xs, ys, o.recall_k, o.threads);
    h.sample = rows.size();
  } else {
    h.sample = n;
    if (double(o.trust_k) < double(n) / 2.0) h.trustworthiness = trustworthiness(x, y, o.trust_k, o.threads);
    if (size_t(o.recall_k) < n) h.neighbour_recall = neighbour_recall(x, y, o.recall_k, o.threads);
  }
  return h;
}

}  // namespace kith
