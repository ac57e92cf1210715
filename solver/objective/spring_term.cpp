#include "solver/objective/spring_term.h"

#include <algorithm>
#include <stdexcept>
#include <string>

namespace kith {

double SpringTerm::evaluate(const Points& y, Points* gradient) {
  if (y.cols() != dims_)
    throw std::invalid_argument("spring term: map has " + std::to_string(y.cols()) + " columns, expected " +
                                std::to_string(dims_));
  if (gradient) gradient->setZero(y.rows(), y.cols());
  double cost = 0.0;
  for (const auto& [item, target] : targets_) {
    if (item >= y.rows()) throw std::invalid_argument("spring term: item " + std::to_string(item) + " is not in the map");
    for (int c = 0; c < dims_; ++c) {
      const double diff = y(item, c) - target[size_t(c)];
      cost += 0.5 * diff * diff;
      if (gradient) (*gradient)(item, c) = diff;
    }
  }
  return cost;
}

void SpringTerm::set_target(int32_t item, const double* target) {
  if (item < 0) throw std::invalid_argument("spring term: item " + std::to_string(item) + " is unknown");
  targets_[item] = std::vector<double>(target, target + dims_);
}

void SpringTerm::clear(int32_t item) { targets_.erase(item); }

void SpringTerm::remove_items(const std::vector<int32_t>& sorted_rows) {
  std::map<int32_t, std::vector<double>> kept;
  for (auto& [item, target] : targets_) {
    if (std::binary_search(sorted_rows.begin(), sorted_rows.end(), item)) continue;
    const auto shift = std::lower_bound(sorted_rows.begin(), sorted_rows.end(), item) - sorted_rows.begin();
    kept[item - int32_t(shift)] = target;
  }
  targets_ = std::move(kept);
}

}  // namespace kith
