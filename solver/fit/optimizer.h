// Gradient descent with momentum and per-coordinate gains (Jacobs 1988, as used for t-SNE by
// van der Maaten & Hinton 2008):
//   gain <- (sign(g) != sign(update)) ? gain + 0.2 : gain * 0.8,  gain >= min_gain
//   update <- momentum * update - learning_rate * gain * g
//   y <- y + update
// Rows whose gradient is exactly zero (hard pins) keep a zero update and so never move.
// Single-threaded object; the objective may use threads inside evaluate.
#pragma once
#include <string>

#include "solver/objective/objective_term.h"

namespace kith {

struct StepOptions {
  double learning_rate = 200.0;  // (default: 200; see schedule.h for "auto")
  double momentum = 0.8;         // (default: 0.8)
  double min_gain = 0.01;        // (default: 0.01)
};

struct StepResult {
  double cost = 0.0;
  double gradient_norm = 0.0;   // Frobenius norm of the gradient at the start of the step
  bool finite = true;           // false if the cost, gradient or positions went NaN or infinite
};

class GradientDescent {
 public:
  GradientDescent() = default;
  // One step: evaluates the objective at y, updates y in place.
  StepResult step(ObjectiveTerm& objective, Points& y, const StepOptions& options);
  void reset();                       // forget momentum and gains (e.g. on restart)
  void resize(Eigen::Index n, Eigen::Index dims);  // keep state of surviving rows, zero for new
  void remove_rows(const std::vector<int32_t>& sorted_rows);

 private:
  Points update_;
  Points gains_;
  Points gradient_;
};

}  // namespace kith
