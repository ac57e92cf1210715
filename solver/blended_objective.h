// BlendedObjective: the map's whole objective, the one the optimizer and the engine minimize.
//   E(Y) = KL(P || Q)                    (NeighbourTerm; absent for a judgments-only collection)
//        + blend * J(Y)                  (JudgmentTerm, t-STE, normalized so blend's meaning does not
//                                          depend on N or the number of judgments; see README)
//        + drag springs                  (soft, towards drag targets)
// and hard pins: the gradient rows of pinned items are set to zero, so they do not move.
// Owns the weights; the terms stay unweighted. Used from one thread at a time (the engine's
// worker); set_* calls happen between evaluations.
#pragma once
#include <memory>
#include <vector>

#include "solver/judgment.h"
#include "solver/neighbour_term.h"
#include "solver/objective_term.h"

namespace kith {

struct TermCosts {
  double neighbour = 0.0;
  double judgment = 0.0;  // unweighted
  double pin = 0.0;       // drag springs
};

class BlendedObjective : public ObjectiveTerm {
 public:
  BlendedObjective(size_t n, int dims);
  ~BlendedObjective() override;
  double evaluate(const Points& y, Points* gradient) override;

  void set_neighbour_term(std::shared_ptr<NeighbourTerm> term);  // null: judgments only
  NeighbourTerm* neighbour_term() const;
  void set_blend(double blend);
  double blend() const;

  // Judgments (retracted ones are kept but ignored).
  void set_judgments(std::vector<Judgment> judgments);
  void add_judgment(const Judgment& judgment);
  bool set_retracted(int64_t judgment_id, bool retracted);
  const std::vector<Judgment>& judgments() const;

  void pin(int32_t item);                           // hold where it is
  void unpin(int32_t item);
  bool pinned(int32_t item) const;
  void set_drag(int32_t item, const double* target);  // dims numbers
  void clear_drag(int32_t item);

  TermCosts last_costs() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace kith
