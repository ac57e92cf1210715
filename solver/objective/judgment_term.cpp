#include "solver/objective/judgment_term.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "solver/base/parallel.h"
#include "solver/base/portable_math.h"

namespace kith {

bool JudgmentTermOptions::IsValid(std::string* error) const {
  if (!(alpha > 0.0) || !std::isfinite(alpha)) {
    if (error) *error = "judgment kernel degrees of freedom (alpha) must be a positive number, got " + std::to_string(alpha);
    return false;
  }
  if (threads < 0) {
    if (error) *error = "judgment term threads must be 0 (all) or more, got " + std::to_string(threads);
    return false;
  }
  return true;
}


void validate_judgments(const std::vector<Judgment>& judgments, size_t n) {
  for (size_t t = 0; t < judgments.size(); ++t) {
    const std::string problem = judgment_problem(judgments[t], n);
    if (!problem.empty()) {
      std::ostringstream m;
      m << "judgment " << t + 1;
      if (judgments[t].id >= 0) m << " (id " << judgments[t].id << ")";
      m << ": " << problem;
      throw JudgmentError(m.str());
    }
  }
}

namespace {

// log K(d2) = -(alpha+1)/2 log(1 + d2/alpha)
inline double log_kernel(double d2, double alpha) { return -0.5 * (alpha + 1.0) * pm::log1p(d2 / alpha); }

// log(1 + exp(x)) without overflow.
inline double softplus(double x) { return x > 0 ? x + pm::log1p(pm::exp(-x)) : pm::log1p(pm::exp(x)); }

inline double squared_distance(const Points& y, int32_t i, int32_t j) {
  const double* a = y.data() + Eigen::Index(i) * y.cols();
  const double* b = y.data() + Eigen::Index(j) * y.cols();
  double s = 0.0;
  for (Eigen::Index c = 0; c < y.cols(); ++c) s += (a[c] - b[c]) * (a[c] - b[c]);
  return s;
}

// Cost of judgments [begin, end) into *cost; gradient accumulated into g (may be null).
void evaluate_range(const Points& y, const std::vector<Judgment>& js, size_t begin, size_t end, double alpha,
                    double* cost, Points* g) {
  const Eigen::Index d = y.cols();
  const double c = (alpha + 1.0) / alpha;
  double total = 0.0;
  for (size_t t = begin; t < end; ++t) {
    const Judgment& j = js[t];
    if (j.retracted) continue;
    const double d2n = squared_distance(y, j.anchor, j.nearer);
    const double d2f = squared_distance(y, j.anchor, j.farther);
    // -log p = log(1 + K_af / K_an) = softplus(log K_af - log K_an)
    const double x = log_kernel(d2f, alpha) - log_kernel(d2n, alpha);
    total += j.weight * softplus(x);
    if (!g) continue;
    const double one_minus_p = 1.0 / (1.0 + pm::exp(-x));  // K_af / (K_an + K_af)
    const double sn = j.weight * one_minus_p * c / (1.0 + d2n / alpha);
    const double sf = j.weight * one_minus_p * c / (1.0 + d2f / alpha);
    const double* ya = y.data() + Eigen::Index(j.anchor) * d;
    const double* yn = y.data() + Eigen::Index(j.nearer) * d;
    const double* yf = y.data() + Eigen::Index(j.farther) * d;
    double* ga = g->data() + Eigen::Index(j.anchor) * d;
    double* gn = g->data() + Eigen::Index(j.nearer) * d;
    double* gf = g->data() + Eigen::Index(j.farther) * d;
    for (Eigen::Index k = 0; k < d; ++k) {
      const double an = sn * (ya[k] - yn[k]);
      const double af = sf * (ya[k] - yf[k]);
      ga[k] += an - af;
      gn[k] -= an;
      gf[k] += af;
    }
  }
  *cost = total;
}

}  // namespace

double tste_probability(const Points& y, int32_t a, int32_t n, int32_t f, double alpha) {
  const double x = log_kernel(squared_distance(y, a, f), alpha) - log_kernel(squared_distance(y, a, n), alpha);
  return 1.0 / (1.0 + pm::exp(x));
}

JudgmentTerm::JudgmentTerm(size_t n, JudgmentTermOptions options) : n_(n), options_(options) {
  std::string error;
  if (!options_.IsValid(&error)) throw std::invalid_argument(error);
}

void JudgmentTerm::set_alpha(double alpha) {
  JudgmentTermOptions o = options_;
  o.alpha = alpha;
  std::string error;
  if (!o.IsValid(&error)) throw std::invalid_argument(error);
  options_ = o;
}

double JudgmentTerm::evaluate(const Points& y, Points* gradient) {
  if (size_t(y.rows()) != n_)
    throw std::invalid_argument("judgment term: map has " + std::to_string(y.rows()) + " rows, expected " +
                                std::to_string(n_));
  if (gradient) gradient->setZero(y.rows(), y.cols());
  const size_t m = judgments_.size();
  // Fixed chunks of judgments, each with its own cost and gradient, added in chunk order: the
  // chunks depend on the number of judgments only, so any thread count gives the same bits. Below
  // a few thousand judgments one chunk (a thread costs more than it saves).
  constexpr size_t kChunk = 4096, kMostChunks = 16;
  const size_t chunks = std::min(kMostChunks, std::max<size_t>(1, m / kChunk));
  if (chunks == 1) {
    double cost = 0.0;
    evaluate_range(y, judgments_, 0, m, options_.alpha, &cost, gradient);
    return cost;
  }
  std::vector<double> costs(chunks, 0.0);
  std::vector<Points> grads(chunks);
  parallel_for(chunks, options_.threads, [&](size_t c) {
    if (gradient) grads[c].setZero(y.rows(), y.cols());
    evaluate_range(y, judgments_, m * c / chunks, m * (c + 1) / chunks, options_.alpha, &costs[c],
                   gradient ? &grads[c] : nullptr);
  });
  double cost = 0.0;
  for (size_t c = 0; c < chunks; ++c) {
    cost += costs[c];
    if (gradient) *gradient += grads[c];
  }
  return cost;
}

void JudgmentTerm::set_judgments(std::vector<Judgment> judgments) {
  validate_judgments(judgments, n_);
  judgments_ = std::move(judgments);
  recount();
}

void JudgmentTerm::add(const Judgment& judgment) {
  const std::string problem = judgment_problem(judgment, n_);
  if (!problem.empty()) throw JudgmentError("judgment" + (judgment.id >= 0 ? " (id " + std::to_string(judgment.id) + ")" : std::string()) + ": " + problem);
  judgments_.push_back(judgment);
  recount();
}

bool JudgmentTerm::set_retracted(int64_t judgment_id, bool retracted) {
  bool found = false;
  for (auto& j : judgments_)
    if (j.id == judgment_id) {
      j.retracted = retracted;
      found = true;
    }
  if (found) recount();
  return found;
}

void JudgmentTerm::resize(size_t n) {
  if (n < n_) throw std::invalid_argument("judgment term: resize can only add items; use remove_items");
  n_ = n;
}

void JudgmentTerm::remove_items(const std::vector<int32_t>& sorted_rows) {
  std::vector<int32_t> new_index(n_, 0);
  size_t r = 0;
  int32_t next = 0;
  for (size_t i = 0; i < n_; ++i) {
    if (r < sorted_rows.size() && sorted_rows[r] == int32_t(i)) {
      new_index[i] = -1;
      ++r;
    } else {
      new_index[i] = next++;
    }
  }
  std::vector<Judgment> kept;
  for (auto j : judgments_) {
    j.anchor = new_index[size_t(j.anchor)];
    j.nearer = new_index[size_t(j.nearer)];
    j.farther = new_index[size_t(j.farther)];
    if (j.anchor >= 0 && j.nearer >= 0 && j.farther >= 0) kept.push_back(j);
  }
  n_ = size_t(next);
  judgments_ = std::move(kept);
  recount();
}

void JudgmentTerm::recount() {
  active_count_ = 0;
  active_weight_ = 0.0;
  std::vector<uint8_t> seen(n_, 0);
  touched_ = 0;
  for (const auto& j : judgments_) {
    if (j.retracted) continue;
    ++active_count_;
    active_weight_ += j.weight;
    for (int32_t i : {j.anchor, j.nearer, j.farther})
      if (!seen[size_t(i)]) {
        seen[size_t(i)] = 1;
        ++touched_;
      }
  }
}

}  // namespace kith
