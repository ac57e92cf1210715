// BlockWeights: what people's triplet judgments say about the FEATURES, not only about the items
// they name. The feature columns come in blocks (e.g. the picture descriptors' colour, texture and
// layout blocks); judgments are used to learn how much each block matters (metric learning from
// relative comparisons, after Schultz & Joachims 2003), and the features are reweighted so that
// the t-SNE affinities -- and so the whole map, also where nobody answered -- follow the people's
// notion of similarity ("these people care about colour more than pattern").
//
//   squared distance   s_w(i, j) = sum_b w_b ||x_ib - x_jb||^2            (x_ib: item i's block b)
//   weights            w_b = B exp(u_b) / sum_c exp(u_c)                  (B = number of blocks)
//                      positive and summing to B: all 1 means "the features as given"; the overall
//                      scale is fixed, only the balance between the blocks is learned
//   t-STE kernel       k(s) = (1 + s / alpha)^(-(alpha + 1) / 2)          (s a squared distance)
//   per judgment t     p_t = k(s_w(a, n)) / (k(s_w(a, n)) + k(s_w(a, f)))  (anchor, nearer, farther)
//   loss               L(u) = sum_t c_t (-log p_t) / sum_t c_t + lambda sum_b (log w_b)^2
//                      (c_t the judgment's weight; the penalty pulls toward the given features)
//   gradient           G_b = dL/dw_b = sum_t c_t [g_n,t A_tb^n + g_f,t A_tb^f] / sum c + 2 lambda log(w_b) / w_b
//                      g_n = (1 - p) (alpha + 1) / (2 (alpha + s_n)),  g_f = -(1 - p) (alpha + 1) / (2 (alpha + s_f))
//                      A^n_tb, A^f_tb the block squared distances of (a, n) and (a, f)
//                      dL/du_c = w_c G_c - (w_c / B) sum_b w_b G_b
// Minimized over u by gradient descent with a backtracking (Armijo) line search; five or so
// parameters, so it takes milliseconds for hundreds of judgments.
// Pure functions; any thread.
#pragma once
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"

namespace kith {

struct ColumnBlock {
  std::string name;
  int begin = 0;  // first column
  int size = 0;   // columns
};

struct BlockWeightOptions {
  double lambda = 0.002;    // pull toward the given features, per block, on log w (default: 0.002)
  double alpha = 1.0;       // t-STE kernel degrees of freedom (default: 1, as the map's t-STE)
  int max_steps = 500;      // gradient steps at most (default: 500)
  double tolerance = 1e-7;  // stop when |dL/du| falls below this (default: 1e-7)
  bool IsValid(std::string* error) const;
};

struct BlockWeightsResult {
  std::vector<double> weights;  // w_b, one per block, summing to the number of blocks
  double loss_before = 0.0;     // L at all weights 1
  double loss_after = 0.0;      // L at the learned weights
  int steps = 0;
  int judgments = 0;            // judgments used (retracted ones and those with bad ids are skipped)
  std::string report(const std::vector<ColumnBlock>& blocks) const;  // one line: "colour_stats 1.62, ..."
};

// The loss L at weights parameterized by u (one per block), and its gradient dL/du (if grad is not
// null). For the tests and for learn_block_weights.
double block_weight_loss(const Points& features, const std::vector<ColumnBlock>& blocks,
                         const std::vector<Judgment>& judgments, const std::vector<double>& u,
                         const BlockWeightOptions& options, std::vector<double>* grad = nullptr);

// w from u as above.
std::vector<double> block_weights_from(const std::vector<double>& u);

// Learns the weights. Throws std::invalid_argument for bad options or blocks outside the columns.
// With no usable judgments the weights stay 1.
BlockWeightsResult learn_block_weights(const Points& features, const std::vector<ColumnBlock>& blocks,
                                       const std::vector<Judgment>& judgments, const BlockWeightOptions& options = {});

// x_ib <- sqrt(w_b) x_ib, so that Euclidean squared distances become s_w. Columns outside every
// block are left as they are.
Points apply_block_weights(const Points& features, const std::vector<ColumnBlock>& blocks,
                           const std::vector<double>& weights);

}  // namespace kith
