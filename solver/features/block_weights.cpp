// See block_weights.h.
#include "solver/features/block_weights.h"

#include <cmath>
#include <cstdio>
#include <stdexcept>

#include "solver/base/portable_math.h"

namespace kith {

bool BlockWeightOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (!(lambda >= 0.0) || !std::isfinite(lambda)) return fail("block weights: lambda must be a number >= 0");
  if (!(alpha > 0.0) || !std::isfinite(alpha)) return fail("block weights: alpha must be > 0");
  if (max_steps < 0) return fail("block weights: max_steps must be >= 0");
  if (!(tolerance > 0.0)) return fail("block weights: tolerance must be > 0");
  return true;
}

std::string BlockWeightsResult::report(const std::vector<ColumnBlock>& blocks) const {
  std::string out;
  char buf[96];
  for (size_t b = 0; b < weights.size(); ++b) {
    std::snprintf(buf, sizeof buf, "%s%s %.2f", b ? ", " : "", b < blocks.size() ? blocks[b].name.c_str() : "?",
                  weights[b]);
    out += buf;
  }
  return out;
}

std::vector<double> block_weights_from(const std::vector<double>& u) {
  double top = -INFINITY;
  for (double v : u) top = std::max(top, v);
  std::vector<double> w(u.size());
  double sum = 0.0;
  for (size_t b = 0; b < u.size(); ++b) sum += (w[b] = pm::exp(u[b] - top));
  for (double& v : w) v *= double(u.size()) / sum;
  return w;
}

namespace {

void check_blocks(const Points& features, const std::vector<ColumnBlock>& blocks) {
  if (blocks.empty()) throw std::invalid_argument("block weights: no blocks given");
  for (const auto& b : blocks)
    if (b.begin < 0 || b.size < 1 || b.begin + b.size > features.cols())
      throw std::invalid_argument("block weights: block '" + b.name + "' (columns " + std::to_string(b.begin + 1) +
                                  ".." + std::to_string(b.begin + b.size) + ") lies outside the " +
                                  std::to_string(features.cols()) + " feature columns");
}

bool usable(const Judgment& j, Eigen::Index n) {
  return !j.retracted && j.weight > 0 && j.anchor >= 0 && j.nearer >= 0 && j.farther >= 0 && j.anchor < n &&
         j.nearer < n && j.farther < n;
}

// Block squared distances of item pairs.
double block_sq(const Points& x, const ColumnBlock& b, int32_t i, int32_t j) {
  return (x.row(i).segment(b.begin, b.size) - x.row(j).segment(b.begin, b.size)).squaredNorm();
}

}  // namespace

double block_weight_loss(const Points& features, const std::vector<ColumnBlock>& blocks,
                         const std::vector<Judgment>& judgments, const std::vector<double>& u,
                         const BlockWeightOptions& options, std::vector<double>* grad) {
  const size_t nb = blocks.size();
  if (u.size() != nb) throw std::invalid_argument("block weights: one parameter per block is needed");
  const std::vector<double> w = block_weights_from(u);
  const double a = options.alpha, e = (a + 1.0) / 2.0;
  std::vector<double> g(nb, 0.0), an(nb), af(nb);
  double loss = 0.0, total = 0.0;
  for (const Judgment& j : judgments) {
    if (!usable(j, features.rows())) continue;
    double sn = 0.0, sf = 0.0;
    for (size_t b = 0; b < nb; ++b) {
      an[b] = block_sq(features, blocks[b], j.anchor, j.nearer);
      af[b] = block_sq(features, blocks[b], j.anchor, j.farther);
      sn += w[b] * an[b];
      sf += w[b] * af[b];
    }
    // log k(s) = -e log(1 + s/a); p = 1 / (1 + k_f/k_n), -log p = log(1 + exp(log k_f - log k_n)).
    const double z = -e * (pm::log1p(sf / a) - pm::log1p(sn / a));
    const double nlp = z > 0 ? z + pm::log1p(pm::exp(-z)) : pm::log1p(pm::exp(z));
    const double q = 1.0 / (1.0 + pm::exp(-z));  // 1 - p
    loss += j.weight * nlp;
    total += j.weight;
    if (grad) {
      const double gn = q * e / (a + sn), gf = -q * e / (a + sf);
      for (size_t b = 0; b < nb; ++b) g[b] += j.weight * (gn * an[b] + gf * af[b]);
    }
  }
  if (total > 0) {
    loss /= total;
    for (double& v : g) v /= total;
  }
  for (size_t b = 0; b < nb; ++b) {
    const double lw = pm::log(w[b]);
    loss += options.lambda * lw * lw;
    g[b] += 2.0 * options.lambda * lw / w[b];
  }
  if (grad) {
    double wg = 0.0;
    for (size_t b = 0; b < nb; ++b) wg += w[b] * g[b];
    grad->assign(nb, 0.0);
    for (size_t c = 0; c < nb; ++c) (*grad)[c] = w[c] * g[c] - w[c] / double(nb) * wg;
  }
  return loss;
}

BlockWeightsResult learn_block_weights(const Points& features, const std::vector<ColumnBlock>& blocks,
                                       const std::vector<Judgment>& judgments, const BlockWeightOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  check_blocks(features, blocks);
  BlockWeightsResult r;
  for (const Judgment& j : judgments) r.judgments += usable(j, features.rows()) ? 1 : 0;
  std::vector<double> u(blocks.size(), 0.0), g, trial_u, trial_g;
  double loss = block_weight_loss(features, blocks, judgments, u, options, &g);
  r.loss_before = loss;
  if (r.judgments > 0) {
    double step = 1.0;
    for (; r.steps < options.max_steps; ++r.steps) {
      double gg = 0.0;
      for (double v : g) gg += v * v;
      if (std::sqrt(gg) < options.tolerance) break;
      bool moved = false;
      for (int tries = 0; tries < 40; ++tries, step *= 0.5) {  // Armijo backtracking
        trial_u = u;
        for (size_t b = 0; b < u.size(); ++b) trial_u[b] -= step * g[b];
        const double trial = block_weight_loss(features, blocks, judgments, trial_u, options, &trial_g);
        if (trial <= loss - 1e-4 * step * gg) {
          u.swap(trial_u);
          g.swap(trial_g);
          loss = trial;
          moved = true;
          break;
        }
      }
      if (!moved) break;
      step = std::min(step * 2.0, 1e3);
    }
  }
  r.loss_after = loss;
  r.weights = block_weights_from(u);
  return r;
}

Points apply_block_weights(const Points& features, const std::vector<ColumnBlock>& blocks,
                           const std::vector<double>& weights) {
  check_blocks(features, blocks);
  if (weights.size() != blocks.size()) throw std::invalid_argument("block weights: one weight per block is needed");
  Points out = features;
  for (size_t b = 0; b < blocks.size(); ++b) {
    if (!(weights[b] >= 0.0) || !std::isfinite(weights[b]))
      throw std::invalid_argument("block weights: the weight of '" + blocks[b].name + "' is not a number >= 0");
    out.middleCols(blocks[b].begin, blocks[b].size) *= std::sqrt(weights[b]);
  }
  return out;
}

}  // namespace kith
