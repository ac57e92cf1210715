// Multiscale start (see multiscale.h).
#include "solver/fit/multiscale.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <random>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/base/portable_random.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"

namespace kith {

size_t multiscale_sample_size(size_t n) {
  return std::min(n, std::clamp<size_t>(n / 10, 5000, 20000));
}

MultiscaleSample fit_multiscale_sample(const Points& prepared, const MultiscaleOptions& o) {
  const size_t n = size_t(prepared.rows());
  const size_t m = o.sample > 0 ? std::min(o.sample, n) : multiscale_sample_size(n);
  if (!(o.perplexity < double(m)))
    throw std::invalid_argument("multiscale start: a sample of " + std::to_string(m) + " items is too small for perplexity " +
                                std::to_string(o.perplexity));

  // 1. The sample, in table order.
  std::mt19937_64 rng(o.seed);
  std::vector<int32_t> all(n);
  std::iota(all.begin(), all.end(), 0);
  shuffle(all.begin(), all.end(), rng);
  std::vector<int32_t> sample(all.begin(), all.begin() + long(m));
  std::sort(sample.begin(), sample.end());
  Points xs(Eigen::Index(m), prepared.cols());
  for (size_t s = 0; s < m; ++s) xs.row(Eigen::Index(s)) = prepared.row(sample[s]);

  // 2 and 3. The sample's own P and map.
  AffinitySearch search;
  search.seed = o.seed;
  search.threads = o.threads;
  search.exact = true;
  auto ps = std::make_shared<const SparseAffinities>(joint_affinities_for(xs, o.perplexity, search));
  Points ys = pca_start(xs, o.dims, 1e-4, o.seed);
  NeighbourTermOptions to;
  to.dof = o.dof;
  to.theta = o.theta;
  to.threads = o.threads;
  NeighbourTerm term(ps, to);
  LoopOptions loop;
  loop.iterations = o.sample_iterations;
  loop.progress_every = int(std::max<int64_t>(1, o.sample_iterations));
  run_schedule(term, [&term](double e) { term.set_exaggeration(e); }, ys, loop);
  return {std::move(sample), std::move(ys)};
}

Points place_from_sample(const MultiscaleSample& ms, const SparseAffinities& p, const MultiscaleOptions& o) {
  const size_t n = p.n, m = ms.items.size();
  const std::vector<int32_t>& sample = ms.items;
  const Points& ys = ms.map;
  if (m == 0 || size_t(ys.rows()) != m || ys.cols() != o.dims)
    throw std::invalid_argument("multiscale start: the sample's map does not match its items");
  // The jitter's generator: its own stream, after the sample's draws.
  std::mt19937_64 rng(o.seed ^ 0x9e3779b97f4a7c15ULL);

  // 4. Everyone else from their sampled neighbours, then from placed ones.
  Points y = Points::Zero(Eigen::Index(n), o.dims);
  std::vector<uint8_t> placed(n, 0);
  for (size_t s = 0; s < m; ++s) {
    y.row(sample[s]) = ys.row(Eigen::Index(s));
    placed[size_t(sample[s])] = 1;
  }
  const Eigen::RowVectorXd centre = ys.colwise().mean();
  const double radius = std::sqrt((ys.rowwise() - centre).squaredNorm() / double(m));
  const double jitter = 0.5 * radius / std::cbrt(double(m));
  for (int pass = 0; pass < 4; ++pass) {
    std::vector<uint8_t> now = placed;
    size_t left = 0;
    for (size_t i = 0; i < n; ++i) {
      if (placed[i]) continue;
      Eigen::RowVectorXd at = Eigen::RowVectorXd::Zero(o.dims);
      double w = 0.0;
      for (int64_t e = p.row_ptr[i]; e < p.row_ptr[i + 1]; ++e) {
        const int32_t j = p.col[size_t(e)];
        if (!placed[size_t(j)]) continue;
        at += p.val[size_t(e)] * y.row(j);
        w += p.val[size_t(e)];
      }
      if (w > 0) {
        y.row(Eigen::Index(i)) = at / w;
        now[i] = 1;
      } else {
        ++left;
      }
    }
    placed.swap(now);
    if (left == 0) break;
  }
  for (size_t i = 0; i < n; ++i)
    if (!placed[i]) y.row(Eigen::Index(i)) = centre;
  // Jitter in table order after every position is known, so it does not depend on the passes.
  std::vector<uint8_t> in_sample(n, 0);
  for (int32_t s : sample) in_sample[size_t(s)] = 1;
  for (size_t i = 0; i < n; ++i)
    if (!in_sample[i])
      for (int d = 0; d < o.dims; ++d) y(Eigen::Index(i), d) += normal(rng, 0.0, jitter);
  return y;
}

Points multiscale_start(const Points& prepared, const SparseAffinities& p, const MultiscaleOptions& o) {
  if (p.n != size_t(prepared.rows()))
    throw std::invalid_argument("multiscale start: P has " + std::to_string(p.n) + " items, the features " +
                                std::to_string(prepared.rows()));
  return place_from_sample(fit_multiscale_sample(prepared, o), p, o);
}

}  // namespace kith
