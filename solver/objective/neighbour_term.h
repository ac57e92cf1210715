// The neighbour term: KL(P || Q) between feature affinities P and map affinities Q, with the
// Student-t kernel of `dof` degrees of freedom:
//   w_ij = (1 + |y_i - y_j|^2 / dof)^(-(dof+1)/2),   q_ij = w_ij / Z,   Z = sum_{k != l} w_kl
//   C = sum_ij p_ij log(p_ij / q_ij)      (P multiplied by `exaggeration` while exaggerating)
//   dC/dy_i = (2 (dof+1) / dof) sum_j (e p_ij - q_ij) (1 + d_ij^2/dof)^(-1) (y_i - y_j)
// which for dof = 1 is the familiar 4 sum_j (p_ij - q_ij) w_ij (y_i - y_j).
// Repulsion (the q part) is exact O(N^2) or Barnes-Hut (octree in 3-D, quadtree in 2-D) with
// opening angle theta. One thread calls evaluate; it uses worker threads inside.
#pragma once
#include <memory>

#include "solver/features/affinities.h"
#include "solver/objective/objective_term.h"

namespace kith {

struct NeighbourTermOptions {
  double dof = 1.0;           // Student-t degrees of freedom, > 0 (default: 1)
  double theta = 0.5;         // Barnes-Hut opening angle; 0 = exact answer via the tree (default: 0.5)
  // Exact O(N^2) repulsion below this many items (default: 100). Chosen by measurement
  // (tests/bench/bench_crossover.cpp, RESULTS-scale.md): on one thread Barnes-Hut's 1000 steps
  // are already faster from 40 items up (1.6x at 100, 5x at 700), so exact repulsion is kept only
  // where it costs under 0.1 s a fit, and fit time has no step where the paths meet.
  size_t exact_below = 100;
  bool force_exact = false;   // exact repulsion whatever N (default: false)
  int threads = 0;            // 0 = all hardware threads (default: 0)
};

class NeighbourTerm : public ObjectiveTerm {
 public:
  NeighbourTerm(std::shared_ptr<const SparseAffinities> p, NeighbourTermOptions options);
  ~NeighbourTerm() override;
  double evaluate(const Points& y, Points* gradient) override;

  void set_affinities(std::shared_ptr<const SparseAffinities> p);  // e.g. after a perplexity change
  std::shared_ptr<const SparseAffinities> affinities() const;       // the P in use
  void set_exaggeration(double factor);                            // default 1
  void set_theta(double theta);
  const NeighbourTermOptions& options() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace kith
