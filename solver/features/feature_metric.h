// FeatureMetric: a weight for every feature column, learned from people's triplet judgments, so
// that the features -- and the t-SNE affinities built from them, also of items nobody asked about
// -- follow the people's notion of similarity more finely than five block weights can
// (solver/features/block_weights.h: one weight per block, the same for all of a block's columns).
// A diagonal Mahalanobis metric, learned with the t-STE loss and pulled toward the block weights:
//
//   squared distance   s_w(i, j) = sum_d w_d (x_id - x_jd)^2
//   weights            w_d = T exp(u_d) / sum_c v_c exp(u_c),  T = sum_c v_c,  v_c = column c's variance
//                      so the mean squared distance between two random items stays that of the
//                      features as given: only the balance between columns is learned
//   prior              w0 = the block weights, learned first from the same judgments and spread
//                      over their blocks' columns (1 outside every block), normalized the same way
//   loss               L(u) = sum_t c_t (-log p_t) / sum_t c_t + (lambda / D) sum_d (log w_d - log w0_d)^2
//                      p_t the t-STE probability of judgment t (anchor, nearer, farther) as in
//                      block_weights.h, c_t its weight, D the number of columns
//   gradient           G_d = dL/dw_d = sum_t c_t [g_n,t A^n_td + g_f,t A^f_td] / sum c + 2 (lambda / D) (log w_d - log w0_d) / w_d
//                      (A^n_td = (x_ad - x_nd)^2, A^f_td = (x_ad - x_fd)^2; g as in block_weights.h)
//                      dL/du_c = w_c G_c - (v_c w_c / T) sum_d w_d G_d
// Minimized over u by L-BFGS with a backtracking (Armijo) line search, from u = log w0.
// lambda is chosen by validation on held-out answers: the judgments are split into `folds` by
// their anchor (all judgments of one grid answer share it, so an answer is never split), each
// candidate lambda is learned on the other folds (block weights included) and scored by the mean
// -log p of the held-out fold; a candidate of +infinity keeps the block weights alone, so the
// columns' weights are only used when they predict unseen answers better.
// Sums run in a fixed order on one thread: the same bits on every machine. Pure functions; any thread.
#pragma once
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"
#include "solver/features/block_weights.h"

namespace kith {

struct FeatureMetricOptions {
  // Candidates for lambda, chosen by validation; a value of +infinity (or any value >= 1e30) means
  // "the block weights alone" (default: 0.01, 0.1, 1, infinity)
  std::vector<double> lambdas = {0.01, 0.1, 1.0, 1e300};
  int folds = 3;             // validation folds, by anchor (default: 3)
  double alpha = 1.0;        // t-STE kernel degrees of freedom (default: 1, as the map's t-STE)
  int max_steps = 200;       // L-BFGS steps at most per fit (default: 200)
  double tolerance = 1e-6;   // stop when |dL/du| falls below this (default: 1e-6)
  BlockWeightOptions blocks; // the first stage, the prior (default: see block_weights.h)
  bool IsValid(std::string* error) const;
};

struct FeatureMetricResult {
  std::vector<double> weights;        // w_d, one per feature column
  BlockWeightsResult blocks;          // the block weights (the prior), from all the judgments
  double lambda = 0.0;                // the candidate validation chose
  std::vector<double> validation;     // held-out mean -log p of each candidate, in order
  double loss_before = 0.0;           // L at u = log w0
  double loss_after = 0.0;            // L at the learned weights
  int steps = 0;
  int judgments = 0;                  // judgments used
  std::string report() const;         // one line: the chosen lambda, the validation, the weights' range
};

// The loss L at u (one per column) with prior log weights log_w0 (already normalized as above)
// and its gradient dL/du (if grad is not null). For the tests and for learn_feature_metric.
double feature_metric_loss(const Points& features, const std::vector<Judgment>& judgments,
                           const std::vector<double>& u, const std::vector<double>& log_w0, double lambda,
                           double alpha, std::vector<double>* grad = nullptr);

// w from u as above (v the columns' variances).
std::vector<double> column_weights_from(const std::vector<double>& u, const std::vector<double>& variances);

// Learns the metric: block weights first, then the columns' weights with the validated lambda.
// Throws std::invalid_argument for bad options or blocks outside the columns. With no usable
// judgments every weight stays 1.
FeatureMetricResult learn_feature_metric(const Points& features, const std::vector<ColumnBlock>& blocks,
                                         const std::vector<Judgment>& judgments,
                                         const FeatureMetricOptions& options = {});

// x_id <- sqrt(w_d) x_id, so that Euclidean squared distances become s_w.
Points apply_column_weights(const Points& features, const std::vector<double>& weights);

}  // namespace kith
