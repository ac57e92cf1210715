// BlendedObjective: the map's whole objective, the one the optimizer and the engine minimize.
//   E(Y) = KL(P || Q)                    (NeighbourTerm; absent for a judgments-only collection)
//        + blend * J(Y)                  (JudgmentTerm, t-STE, normalized so blend's meaning does not
//                                          depend on N or the number of judgments; see README)
//        + drag springs                  (soft, towards drag targets)
// and hard pins: the gradient rows of pinned items are set to zero, so they do not move.
//
// Normalization (what `blend` means; README "Judgments and the blend"). With N items, W the total
// weight of the active judgments and T the number of distinct items they name, the judgment sum
// -sum w log p is scaled by  s_J = T / (3 W N):
//   E = KL + blend * s_J * sum_t w_t (-log p_t) + drag_stiffness / N * 1/2 sum |y_i - t_i|^2.
// The KL gradient on one item is of order 1/N (its affinities sum to about 1/N); 3W/T is the mean
// judgment weight naming a touched item, so s_J makes the pull of its judgments on an average
// touched item also of order 1/N. blend = 1 therefore means "an item people have judged is pulled
// by those judgments about as hard as by its feature neighbours", whatever N and however many
// judgments there are; blend = 4 means judgments pull four times harder. Equivalently
//   blend * s_J * sum = blend * (T / 3N) * (weighted mean of -log p).
// Owns the weights; the terms stay unweighted. Used from one thread at a time (the engine's
// worker); set_* calls happen between evaluations.
#pragma once
#include <memory>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/objective/neighbour_term.h"
#include "solver/objective/objective_term.h"

namespace kith {

struct TermCosts {
  double neighbour = 0.0;  // KL(P||Q) (as exaggerated, if it is)
  double judgment = 0.0;   // unweighted: weighted mean of -log p over active judgments (log 2 = coin toss)
  double pin = 0.0;        // drag springs, unweighted: 1/2 sum |y_i - t_i|^2
};

class JudgmentTerm;

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

  // Additions beyond the first contract.
  void set_alpha(double alpha);               // t-STE kernel dof (default: 1)
  void set_drag_stiffness(double stiffness);  // springs weigh stiffness / N (default: 2)
  double judgment_scale() const;              // s_J above (0 with no active judgments)
  const JudgmentTerm& judgment_term() const;
  size_t size() const;
  void resize(size_t n);                                  // items appended at the end
  void remove_items(const std::vector<int32_t>& sorted_rows);  // judgments naming them are dropped

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace kith
