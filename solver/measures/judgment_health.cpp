#include "solver/measures/judgment_health.h"

#include <algorithm>
#include <map>
#include <numeric>
#include <random>
#include <stdexcept>

#include "solver/base/portable_random.h"

namespace kith {

double judgment_satisfied(const Points& y, const Judgment& j) {
  const double dn = (y.row(j.anchor) - y.row(j.nearer)).squaredNorm();
  const double df = (y.row(j.anchor) - y.row(j.farther)).squaredNorm();
  return dn < df ? 1.0 : (dn == df ? 0.5 : 0.0);
}

double judgment_agreement(const Points& y, const std::vector<Judgment>& judgments) {
  double sum = 0.0;
  size_t m = 0;
  for (const auto& j : judgments) {
    if (j.retracted) continue;
    sum += judgment_satisfied(y, j);
    ++m;
  }
  return m == 0 ? -1.0 : sum / double(m);
}

std::vector<PersonJudgmentAgreement> per_person_agreement(const Points& y, const std::vector<Judgment>& judgments) {
  std::map<std::string, std::pair<double, size_t>> acc;
  for (const auto& j : judgments) {
    if (j.retracted) continue;
    auto& a = acc[j.person];
    a.first += judgment_satisfied(y, j);
    a.second += 1;
  }
  std::vector<PersonJudgmentAgreement> out;
  for (const auto& [person, a] : acc) out.push_back({person, a.second, a.first / double(a.second)});
  return out;
}

bool HeldOutOptions::IsValid(std::string* error) const {
  if (folds < 2) {
    if (error) *error = "held-out agreement needs at least 2 folds, got " + std::to_string(folds);
    return false;
  }
  return true;
}

HeldOutResult heldout_agreement(const std::vector<Judgment>& judgments, const FitFunction& fit,
                                const HeldOutOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  std::vector<Judgment> active;
  for (const auto& j : judgments)
    if (!j.retracted) active.push_back(j);
  HeldOutResult result;
  result.judgments = active.size();
  if (active.size() < size_t(options.folds)) return result;
  std::vector<size_t> order(active.size());
  std::iota(order.begin(), order.end(), 0);
  std::mt19937_64 rng(options.seed);
  shuffle(order.begin(), order.end(), rng);
  double pooled = 0.0;
  for (int f = 0; f < options.folds; ++f) {
    std::vector<Judgment> train, test;
    for (size_t r = 0; r < order.size(); ++r) (int(r % size_t(options.folds)) == f ? test : train).push_back(active[order[r]]);
    const Points y = fit(train);
    double sum = 0.0;
    for (const auto& j : test) sum += judgment_satisfied(y, j);
    pooled += sum;
    result.fold_agreement.push_back(sum / double(test.size()));
  }
  result.agreement = pooled / double(active.size());
  return result;
}

}  // namespace kith
