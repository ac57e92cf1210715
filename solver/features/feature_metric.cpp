// See feature_metric.h.
#include "solver/features/feature_metric.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <stdexcept>

#include "solver/base/portable_math.h"

namespace kith {

namespace {

constexpr double kBlocksOnly = 1e30;  // a lambda at least this large keeps the block weights alone

bool usable(const Judgment& j, Eigen::Index n) {
  return !j.retracted && j.weight > 0 && j.anchor >= 0 && j.nearer >= 0 && j.farther >= 0 && j.anchor < n &&
         j.nearer < n && j.farther < n;
}

// The columns' squared differences of every usable judgment, row-major J x D.
struct Differences {
  int rows = 0, cols = 0;
  std::vector<double> nearer, farther, weight;
  double total = 0.0;
};

Differences differences(const Points& x, const std::vector<Judgment>& judgments) {
  Differences d;
  d.cols = int(x.cols());
  for (const Judgment& j : judgments) {
    if (!usable(j, x.rows())) continue;
    for (int c = 0; c < d.cols; ++c) {
      const double dn = x(j.anchor, c) - x(j.nearer, c), df = x(j.anchor, c) - x(j.farther, c);
      d.nearer.push_back(dn * dn);
      d.farther.push_back(df * df);
    }
    d.weight.push_back(j.weight);
    d.total += j.weight;
    ++d.rows;
  }
  return d;
}

std::vector<double> column_variances(const Points& x) {
  std::vector<double> v(size_t(x.cols()), 0.0);
  const double n = double(x.rows());
  for (Eigen::Index c = 0; c < x.cols(); ++c) {
    double mean = 0.0, sq = 0.0;
    for (Eigen::Index i = 0; i < x.rows(); ++i) mean += x(i, c);
    mean /= n;
    for (Eigen::Index i = 0; i < x.rows(); ++i) sq += (x(i, c) - mean) * (x(i, c) - mean);
    v[size_t(c)] = sq / n;
  }
  return v;
}

// The loss and dL/du over precomputed differences (see the header).
double loss_of(const Differences& d, const std::vector<double>& variances, const std::vector<double>& u,
               const std::vector<double>& log_w0, double lambda, double alpha, std::vector<double>* grad) {
  const size_t D = size_t(d.cols);
  const std::vector<double> w = column_weights_from(u, variances);
  const double e = (alpha + 1.0) / 2.0;
  std::vector<double> g(D, 0.0);
  double loss = 0.0;
  for (int t = 0; t < d.rows; ++t) {
    const double* an = d.nearer.data() + size_t(t) * D;
    const double* af = d.farther.data() + size_t(t) * D;
    double sn = 0.0, sf = 0.0;
    for (size_t c = 0; c < D; ++c) {
      sn += w[c] * an[c];
      sf += w[c] * af[c];
    }
    const double z = -e * (pm::log1p(sf / alpha) - pm::log1p(sn / alpha));
    const double nlp = z > 0 ? z + pm::log1p(pm::exp(-z)) : pm::log1p(pm::exp(z));
    const double c_t = d.weight[size_t(t)];
    loss += c_t * nlp;
    if (grad) {
      const double q = 1.0 / (1.0 + pm::exp(-z));  // 1 - p
      const double gn = c_t * q * e / (alpha + sn), gf = -c_t * q * e / (alpha + sf);
      for (size_t c = 0; c < D; ++c) g[c] += gn * an[c] + gf * af[c];
    }
  }
  if (d.total > 0) {
    loss /= d.total;
    for (double& v : g) v /= d.total;
  }
  if (lambda > 0) {
    const double k = lambda / double(D);
    for (size_t c = 0; c < D; ++c) {
      const double r = pm::log(w[c]) - log_w0[c];
      loss += k * r * r;
      g[c] += 2.0 * k * r / w[c];
    }
  }
  if (grad) {
    double total_v = 0.0, wg = 0.0;
    for (size_t c = 0; c < D; ++c) total_v += variances[c], wg += w[c] * g[c];
    grad->assign(D, 0.0);
    for (size_t c = 0; c < D; ++c)
      (*grad)[c] = w[c] * g[c] - (total_v > 0 ? variances[c] * w[c] / total_v : 0.0) * wg;
  }
  return loss;
}

double dot(const std::vector<double>& a, const std::vector<double>& b) {
  double s = 0.0;
  for (size_t i = 0; i < a.size(); ++i) s += a[i] * b[i];
  return s;
}

// L-BFGS (memory 8) with Armijo backtracking, from u. Returns the steps taken.
int minimize(const Differences& d, const std::vector<double>& variances, const std::vector<double>& log_w0,
             double lambda, const FeatureMetricOptions& o, std::vector<double>* u, double* loss) {
  constexpr int kMemory = 8;
  const size_t D = u->size();
  std::vector<double> g, trial_g, dir(D), trial(D);
  *loss = loss_of(d, variances, *u, log_w0, lambda, o.alpha, &g);
  std::vector<std::vector<double>> s_hist, y_hist;
  std::vector<double> rho;
  int steps = 0;
  for (; steps < o.max_steps; ++steps) {
    if (std::sqrt(dot(g, g)) < o.tolerance) break;
    // Two-loop recursion: dir = -H g.
    std::vector<double> q = g, a(s_hist.size());
    for (size_t k = s_hist.size(); k-- > 0;) {
      a[k] = rho[k] * dot(s_hist[k], q);
      for (size_t i = 0; i < D; ++i) q[i] -= a[k] * y_hist[k][i];
    }
    const double scale = s_hist.empty() ? 1.0 : dot(s_hist.back(), y_hist.back()) / dot(y_hist.back(), y_hist.back());
    for (size_t i = 0; i < D; ++i) q[i] *= scale;
    for (size_t k = 0; k < s_hist.size(); ++k) {
      const double b = rho[k] * dot(y_hist[k], q);
      for (size_t i = 0; i < D; ++i) q[i] += (a[k] - b) * s_hist[k][i];
    }
    for (size_t i = 0; i < D; ++i) dir[i] = -q[i];
    double slope = dot(dir, g);
    if (!(slope < 0)) {  // not a descent direction: start the memory again
      s_hist.clear(), y_hist.clear(), rho.clear();
      for (size_t i = 0; i < D; ++i) dir[i] = -g[i];
      slope = -dot(g, g);
    }
    bool moved = false;
    double step = 1.0, trial_loss = 0.0;
    for (int tries = 0; tries < 40; ++tries, step *= 0.5) {
      for (size_t i = 0; i < D; ++i) trial[i] = (*u)[i] + step * dir[i];
      trial_loss = loss_of(d, variances, trial, log_w0, lambda, o.alpha, &trial_g);
      if (std::isfinite(trial_loss) && trial_loss <= *loss + 1e-4 * step * slope) {
        moved = true;
        break;
      }
    }
    if (!moved) break;
    std::vector<double> s(D), y(D);
    for (size_t i = 0; i < D; ++i) s[i] = trial[i] - (*u)[i], y[i] = trial_g[i] - g[i];
    const double sy = dot(s, y);
    if (sy > 1e-12) {
      if (int(s_hist.size()) == kMemory) s_hist.erase(s_hist.begin()), y_hist.erase(y_hist.begin()), rho.erase(rho.begin());
      s_hist.push_back(s), y_hist.push_back(y), rho.push_back(1.0 / sy);
    }
    u->swap(trial);
    g.swap(trial_g);
    const double before = *loss;
    *loss = trial_loss;
    if (before - trial_loss < 1e-12 * std::max(1.0, std::fabs(before))) {
      ++steps;
      break;
    }
  }
  return steps;
}

// log w0 over the columns from the block weights, normalized as w is.
std::vector<double> prior_log_weights(const std::vector<ColumnBlock>& blocks, const std::vector<double>& block_w,
                                      const std::vector<double>& variances) {
  std::vector<double> raw(variances.size(), 0.0);
  for (size_t b = 0; b < blocks.size() && b < block_w.size(); ++b)
    for (int c = blocks[b].begin; c < blocks[b].begin + blocks[b].size; ++c) raw[size_t(c)] = pm::log(block_w[b]);
  const std::vector<double> w = column_weights_from(raw, variances);
  std::vector<double> out(w.size());
  for (size_t c = 0; c < w.size(); ++c) out[c] = pm::log(w[c]);
  return out;
}

struct Fitted {
  std::vector<double> u, log_w0;
  BlockWeightsResult blocks;
  double loss_before = 0.0, loss_after = 0.0;
  int steps = 0;
};

Fitted fit(const Points& x, const std::vector<ColumnBlock>& blocks, const std::vector<Judgment>& judgments,
           const std::vector<double>& variances, double lambda, const FeatureMetricOptions& o) {
  Fitted f;
  if (!blocks.empty()) f.blocks = learn_block_weights(x, blocks, judgments, o.blocks);
  f.log_w0 = prior_log_weights(blocks, f.blocks.weights, variances);
  f.u = f.log_w0;
  const Differences d = differences(x, judgments);
  f.loss_before = f.loss_after = loss_of(d, variances, f.u, f.log_w0, lambda >= kBlocksOnly ? 0.0 : lambda, o.alpha, nullptr);
  if (lambda < kBlocksOnly && d.rows > 0) f.steps = minimize(d, variances, f.log_w0, lambda, o, &f.u, &f.loss_after);
  return f;
}

}  // namespace

bool FeatureMetricOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (lambdas.empty()) return fail("feature metric: at least one lambda is needed");
  for (double l : lambdas)
    if (!(l >= 0.0)) return fail("feature metric: every lambda must be a number >= 0");
  if (folds < 2) return fail("feature metric: at least 2 validation folds are needed");
  if (!(alpha > 0.0) || !std::isfinite(alpha)) return fail("feature metric: alpha must be > 0");
  if (max_steps < 0) return fail("feature metric: max_steps must be >= 0");
  if (!(tolerance > 0.0)) return fail("feature metric: tolerance must be > 0");
  return blocks.IsValid(error);
}

std::string FeatureMetricResult::report() const {
  char buf[160];
  double lo = INFINITY, hi = 0.0;
  for (double w : weights) lo = std::min(lo, w), hi = std::max(hi, w);
  if (lambda >= kBlocksOnly)
    std::snprintf(buf, sizeof buf, "the block weights alone (validation chose them)");
  else
    std::snprintf(buf, sizeof buf, "column weights %.2f .. %.2f (lambda %g by validation)", weights.empty() ? 0.0 : lo,
                  hi, lambda);
  return buf;
}

std::vector<double> column_weights_from(const std::vector<double>& u, const std::vector<double>& variances) {
  if (u.size() != variances.size()) throw std::invalid_argument("feature metric: one parameter per column is needed");
  double top = -INFINITY, total_v = 0.0, sum = 0.0;
  for (double v : u) top = std::max(top, v);
  std::vector<double> w(u.size());
  for (size_t c = 0; c < u.size(); ++c) {
    w[c] = pm::exp(u[c] - top);
    sum += variances[c] * w[c];
    total_v += variances[c];
  }
  if (!(sum > 0) || !(total_v > 0)) return std::vector<double>(u.size(), 1.0);
  for (double& v : w) v *= total_v / sum;
  return w;
}

double feature_metric_loss(const Points& features, const std::vector<Judgment>& judgments,
                           const std::vector<double>& u, const std::vector<double>& log_w0, double lambda,
                           double alpha, std::vector<double>* grad) {
  if (u.size() != size_t(features.cols()) || log_w0.size() != u.size())
    throw std::invalid_argument("feature metric: one parameter per column is needed");
  return loss_of(differences(features, judgments), column_variances(features), u, log_w0, lambda, alpha, grad);
}

FeatureMetricResult learn_feature_metric(const Points& features, const std::vector<ColumnBlock>& blocks,
                                         const std::vector<Judgment>& judgments, const FeatureMetricOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  const std::vector<double> variances = column_variances(features);
  FeatureMetricResult r;
  for (const Judgment& j : judgments) r.judgments += usable(j, features.rows()) ? 1 : 0;

  // Folds by anchor, in the order anchors first appear, so an answer is never split.
  std::map<int32_t, int> fold_of;
  std::vector<int> fold(judgments.size(), -1);
  for (size_t t = 0; t < judgments.size(); ++t) {
    if (!usable(judgments[t], features.rows())) continue;
    auto it = fold_of.find(judgments[t].anchor);
    if (it == fold_of.end()) it = fold_of.emplace(judgments[t].anchor, int(fold_of.size()) % options.folds).first;
    fold[t] = it->second;
  }
  r.lambda = kBlocksOnly;
  if (options.lambdas.size() == 1) {
    r.lambda = options.lambdas[0];
  } else if (int(fold_of.size()) >= options.folds) {
    r.validation.assign(options.lambdas.size(), 0.0);
    double total = 0.0;
    for (int f = 0; f < options.folds; ++f) {
      std::vector<Judgment> train, test;
      for (size_t t = 0; t < judgments.size(); ++t)
        if (fold[t] >= 0) (fold[t] == f ? test : train).push_back(judgments[t]);
      const Differences dt = differences(features, test);
      for (size_t l = 0; l < options.lambdas.size(); ++l) {
        const Fitted fitted = fit(features, blocks, train, variances, options.lambdas[l], options);
        r.validation[l] += dt.total * loss_of(dt, variances, fitted.u, fitted.log_w0, 0.0, options.alpha, nullptr);
      }
      total += dt.total;
    }
    size_t best = 0;
    for (size_t l = 0; l < options.lambdas.size(); ++l) {
      r.validation[l] /= total;
      if (r.validation[l] < r.validation[best]) best = l;
    }
    r.lambda = options.lambdas[best];
  }
  const Fitted all = fit(features, blocks, judgments, variances, r.lambda, options);
  r.blocks = all.blocks;
  r.weights = column_weights_from(all.u, variances);
  r.loss_before = all.loss_before;
  r.loss_after = all.loss_after;
  r.steps = all.steps;
  return r;
}

Points apply_column_weights(const Points& features, const std::vector<double>& weights) {
  if (weights.size() != size_t(features.cols()))
    throw std::invalid_argument("feature metric: one weight per feature column is needed");
  Points out = features;
  for (Eigen::Index c = 0; c < features.cols(); ++c) {
    if (!(weights[size_t(c)] >= 0.0) || !std::isfinite(weights[size_t(c)]))
      throw std::invalid_argument("feature metric: the weight of column " + std::to_string(c + 1) +
                                  " is not a number >= 0");
    out.col(c) *= std::sqrt(weights[size_t(c)]);
  }
  return out;
}

}  // namespace kith
