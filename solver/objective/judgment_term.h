// JudgmentTerm: people's triplet judgments as a t-STE objective (van der Maaten & Weinberger 2012).
// For a judgment "anchor a is more like nearer n than like farther f" with weight w:
//   K(i,j) = (1 + |y_i - y_j|^2 / alpha)^(-(alpha+1)/2)        (Student-t kernel, alpha dof)
//   p      = K(a,n) / (K(a,n) + K(a,f))                        (probability the map agrees)
//   cost   = -sum_t w_t log p_t                                (over non-retracted judgments)
// Gradient, with c = (alpha+1)/alpha and g(i,j) = (1 + |y_i - y_j|^2 / alpha)^(-1):
//   dcost/dy_a = w (1-p) c [ g(a,n) (y_a - y_n) - g(a,f) (y_a - y_f) ]
//   dcost/dy_n = -w (1-p) c g(a,n) (y_a - y_n),   dcost/dy_f = w (1-p) c g(a,f) (y_a - y_f)
// Note g equals K only for alpha = 1; for other alpha the factor is not the kernel itself.
// The term is unweighted (the blended objective scales it). One thread at a time; evaluate may
// use worker threads inside.
#pragma once
#include <cstddef>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/objective/objective_term.h"

namespace kith {

struct JudgmentTermOptions {
  double alpha = 1.0;  // Student-t degrees of freedom of the kernel, > 0 (default: 1, the map's dof)
  int threads = 1;     // threads for one evaluation; 0 = all hardware threads (default: 1)
  bool IsValid(std::string* error) const;
};

// Thrown for a judgment that cannot be used (same item twice, unknown item, bad weight).
class JudgmentError : public std::invalid_argument {
 public:
  using std::invalid_argument::invalid_argument;
};

// Throws JudgmentError naming the first bad judgment by position and id.
void validate_judgments(const std::vector<Judgment>& judgments, size_t n);

// Probability under the t-STE model that the map y agrees with "a nearer to n than to f".
double tste_probability(const Points& y, int32_t a, int32_t n, int32_t f, double alpha);

class JudgmentTerm : public ObjectiveTerm {
 public:
  explicit JudgmentTerm(size_t n, JudgmentTermOptions options = {});
  double evaluate(const Points& y, Points* gradient) override;

  void set_judgments(std::vector<Judgment> judgments);  // throws JudgmentError; keeps the old set then
  void add(const Judgment& judgment);                   // throws JudgmentError
  bool set_retracted(int64_t judgment_id, bool retracted);  // false if no judgment has that id
  const std::vector<Judgment>& judgments() const { return judgments_; }

  void resize(size_t n);  // more (or the same) items; judgments unchanged
  // Items were removed (sorted row numbers): judgments naming them are dropped, the rest renumbered.
  void remove_items(const std::vector<int32_t>& sorted_rows);

  size_t size() const { return n_; }
  size_t active_count() const { return active_count_; }  // non-retracted judgments
  double active_weight() const { return active_weight_; }  // sum of their weights
  size_t touched_items() const { return touched_; }      // distinct items they name
  const JudgmentTermOptions& options() const { return options_; }
  void set_alpha(double alpha);

 private:
  void recount();
  size_t n_;
  JudgmentTermOptions options_;
  std::vector<Judgment> judgments_;
  size_t active_count_ = 0;
  double active_weight_ = 0.0;
  size_t touched_ = 0;
};

}  // namespace kith
