// See demo_ceilings.h.
#include "solver/demo/demo_ceilings.h"

#include <algorithm>
#include <cmath>
#include <memory>
#include <stdexcept>

#include "solver/base/map_parameters.h"
#include "solver/demo/demo_trial.h"
#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"

namespace kith {
namespace {

// SMACOF with unit weights: X <- (1/n) B(X) X, B_ij = -d_ij / |x_i - x_j| (i != j, 0 where the map
// distance is 0), B_ii = -sum_{j != i} B_ij. Returns stress / sum d^2.
double smacof(const Eigen::MatrixXd& d, Points& x, int iterations) {
  const Eigen::Index n = x.rows(), dims = x.cols();
  double total = 0.0;
  for (Eigen::Index i = 0; i < n; ++i)
    for (Eigen::Index j = i + 1; j < n; ++j) total += d(i, j) * d(i, j);
  auto stress = [&](const Points& y) {
    double s = 0.0;
    for (Eigen::Index i = 0; i < n; ++i)
      for (Eigen::Index j = i + 1; j < n; ++j) {
        const double e = (y.row(i) - y.row(j)).norm() - d(i, j);
        s += e * e;
      }
    return s;
  };
  double last = stress(x);
  Points next(n, dims);
  for (int it = 0; it < iterations; ++it) {
    next.setZero();
    for (Eigen::Index i = 0; i < n; ++i) {
      double bii = 0.0;
      for (Eigen::Index j = 0; j < n; ++j) {
        if (j == i) continue;
        const double dist = (x.row(i) - x.row(j)).norm();
        const double bij = dist > 0.0 ? -d(i, j) / dist : 0.0;
        bii -= bij;
        next.row(i) += bij * x.row(j);
      }
      next.row(i) += bii * x.row(i);
    }
    x = next / double(n);
    const double now = stress(x);
    const bool converged = last - now < 1e-6 * last;
    last = now;
    if (converged) break;
  }
  return total > 0 ? last / total : 0.0;
}

}  // namespace

DemoCeilings demo_ceilings(const SimulatedPeople& people, const std::vector<Judgment>& heldout,
                           const std::vector<int32_t>& hidden, int local_k, const CeilingOptions& options) {
  const Eigen::Index n = Eigen::Index(people.size());
  if (n < 4) throw std::invalid_argument("ceilings need at least 4 items");
  Eigen::MatrixXd d(n, n);
  for (Eigen::Index i = 0; i < n; ++i) {
    d(i, i) = 0.0;
    for (Eigen::Index j = i + 1; j < n; ++j) d(i, j) = d(j, i) = people.distance(int32_t(i), int32_t(j));
  }
  const Eigen::MatrixXd d2 = d.cwiseProduct(d);
  const Points start = classical_scaling(d2, options.dims);
  DemoCeilings c;

  // t-SNE on the hidden distance.
  const size_t k = std::max<size_t>(neighbour_count(size_t(n), options.perplexity), 1);
  NeighbourGraph g;
  g.n = size_t(n);
  g.k = k;
  g.index.resize(size_t(n) * k);
  g.distance2.resize(size_t(n) * k);
  std::vector<std::pair<double, int32_t>> row(size_t(n - 1));
  for (Eigen::Index i = 0; i < n; ++i) {
    size_t at = 0;
    for (Eigen::Index j = 0; j < n; ++j)
      if (j != i) row[at++] = {d2(i, j), int32_t(j)};
    std::partial_sort(row.begin(), row.begin() + long(k), row.end());
    for (size_t c2 = 0; c2 < k; ++c2) {
      g.index[size_t(i) * k + c2] = row[c2].second;
      g.distance2[size_t(i) * k + c2] = row[c2].first;
    }
  }
  AffinityOptions ao;
  ao.perplexity = options.perplexity;
  auto p = std::make_shared<SparseAffinities>(joint_affinities(g, ao));
  Points y = start;
  const Eigen::VectorXd c0 = y.col(0);
  const double sd = std::sqrt((c0.array() - c0.mean()).square().mean());
  if (sd > 0) y *= 1e-4 / sd;
  NeighbourTermOptions no;
  no.threads = options.threads;
  no.force_exact = true;  // as the trial's maps (demo_trial.cpp), so its recorded figures hold
  NeighbourTerm term(p, no);
  LoopOptions loop;
  loop.iterations = options.iterations;
  run_schedule(term, [&term](double e) { term.set_exaggeration(e); }, y, loop);
  c.tsne_map = y;
  c.tsne_heldout = triplet_agreement(y, heldout);
  c.tsne_local = local_agreement(y, hidden, local_k);

  // Metric MDS of the hidden distance.
  Points x = start;
  c.mds_stress = smacof(d, x, options.mds_iterations);
  c.mds_map = x;
  c.mds_heldout = triplet_agreement(x, heldout);
  c.mds_local = local_agreement(x, hidden, local_k);
  return c;
}

}  // namespace kith
