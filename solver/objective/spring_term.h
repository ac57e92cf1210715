// SpringTerm: soft springs pulling items towards target points (drag targets).
//   cost = 1/2 sum_{i with a target} |y_i - t_i|^2,    dcost/dy_i = y_i - t_i
// Unweighted; the blended objective sets the stiffness. One thread at a time.
#pragma once
#include <cstdint>
#include <map>
#include <vector>

#include "solver/objective/objective_term.h"

namespace kith {

class SpringTerm : public ObjectiveTerm {
 public:
  explicit SpringTerm(int dims) : dims_(dims) {}
  double evaluate(const Points& y, Points* gradient) override;

  void set_target(int32_t item, const double* target);  // dims numbers; replaces an older target
  void clear(int32_t item);
  bool has_target(int32_t item) const { return targets_.count(item) != 0; }
  const std::map<int32_t, std::vector<double>>& targets() const { return targets_; }
  // Items were removed (sorted row numbers): their targets are dropped, the rest renumbered.
  void remove_items(const std::vector<int32_t>& sorted_rows);
  bool empty() const { return targets_.empty(); }

 private:
  int dims_;
  std::map<int32_t, std::vector<double>> targets_;
};

}  // namespace kith
