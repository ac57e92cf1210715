// Schedule: what the optimizer does at iteration `it`, shared by the batch fit (solver/fit/fit.h) and
// the live engine, so both run the same effective schedule as scikit-learn 1.2's TSNE.
//
//   it <  exaggeration_iterations: P x early_exaggeration (12), momentum 0.5
//   it >= exaggeration_iterations: P x 1,                       momentum 0.8
//   learning rate "auto" = max(N / early_exaggeration / 4, 50)
//
// Units of the learning rate: kith's gradient is the full derivative of KL(P||Q), which for
// dof = 1 carries the factor 4 (4 sum_j (p_ij - q_ij) w_ij (y_i - y_j)); scikit-learn's gradient
// carries the same factor (2 (dof+1)/dof), and its 'auto' is max(N / early_exaggeration / 4, 50)
// (sklearn/manifold/_t_sne.py, 1.2). Implementations whose gradient omits the 4 (bhtsne, FIt-SNE,
// openTSNE) write the same step as N / 12 (Belkina et al. 2019; Kobak & Berens 2019). Dividing by
// 4 here is therefore exactly "N/12 in those units", and equal to scikit-learn's step.
//
// scikit-learn also restarts momentum and gains when exaggeration ends (two separate calls of its
// _gradient_descent); reset_state_at_switch reproduces that. Pure value type; any thread.
#pragma once
#include <algorithm>
#include <cstdint>

#include "solver/fit/optimizer.h"

namespace kith {

struct Schedule {
  double early_exaggeration = 12.0;       // P multiplier at the start (default: 12)
  int64_t exaggeration_iterations = 250;  // how long it lasts (default: 250)
  double early_momentum = 0.5;            // momentum while exaggerating (default: 0.5)
  double momentum = 0.8;                  // momentum afterwards (default: 0.8)
  double learning_rate = 0.0;             // <= 0: auto, see auto_learning_rate (default: auto)
  double min_gain = 0.01;                 // (default: 0.01)
  bool reset_state_at_switch = true;      // forget momentum and gains when exaggeration ends (default: true)

  // max(N / early_exaggeration / 4, 50): N/12 in the units of implementations without the
  // gradient's factor 4, the same number scikit-learn 1.2 uses (see the header comment).
  static double auto_learning_rate(size_t n, double early_exaggeration = 12.0) {
    return std::max(double(n) / early_exaggeration / 4.0, 50.0);
  }
  double learning_rate_for(size_t n) const {
    return learning_rate > 0 ? learning_rate : auto_learning_rate(n, early_exaggeration);
  }
  double exaggeration_at(int64_t it) const { return it < exaggeration_iterations ? early_exaggeration : 1.0; }
  // True at the first iteration after exaggeration: the caller resets the optimizer if asked.
  bool switches_at(int64_t it) const { return it == exaggeration_iterations; }
  StepOptions step_at(int64_t it, size_t n) const {
    StepOptions s;
    s.learning_rate = learning_rate_for(n);
    s.momentum = it < exaggeration_iterations ? early_momentum : momentum;
    s.min_gain = min_gain;
    return s;
  }
};

}  // namespace kith
