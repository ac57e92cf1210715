// Judgment health: how well a map honours people's judgments.
//   agreement           = (1/M) sum_t [d(a,n) < d(a,f)]  over the M non-retracted judgments
//                         (a tie counts one half); -1 when there are none;
//   per-person agreement  the same, per person;
//   held-out agreement  k-fold over judgments: fit a map without fold f, measure agreement on f,
//                         pool the folds. It tells whether the judgments generalize or are merely
//                         memorized. The fitting is the caller's (a function from the training
//                         judgments to a map), so this stays independent of the optimizer.
// Pure functions; safe from any thread.
#pragma once
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"

namespace kith {

// 1 if the map satisfies the judgment, 0 if not, 0.5 on a tie.
double judgment_satisfied(const Points& y, const Judgment& judgment);

double judgment_agreement(const Points& y, const std::vector<Judgment>& judgments);

struct PersonJudgmentAgreement {
  std::string person;   // "" for judgments with no person
  size_t judgments = 0;  // non-retracted
  double agreement = -1.0;
};
// Sorted by person name.
std::vector<PersonJudgmentAgreement> per_person_agreement(const Points& y, const std::vector<Judgment>& judgments);

struct HeldOutOptions {
  int folds = 5;       // k (default: 5)
  uint64_t seed = 1;   // fold assignment (default: 1)
  bool IsValid(std::string* error) const;
};

struct HeldOutResult {
  double agreement = -1.0;            // pooled over all held-out judgments
  std::vector<double> fold_agreement;  // per fold
  size_t judgments = 0;                // non-retracted judgments used
};

using FitFunction = std::function<Points(const std::vector<Judgment>& training)>;
HeldOutResult heldout_agreement(const std::vector<Judgment>& judgments, const FitFunction& fit,
                                const HeldOutOptions& options = {});

}  // namespace kith
