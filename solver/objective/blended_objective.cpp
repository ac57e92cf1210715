#include "solver/objective/blended_objective.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include "solver/objective/judgment_term.h"
#include "solver/objective/spring_term.h"

namespace kith {

struct BlendedObjective::Impl {
  Impl(size_t n_, int dims_) : n(n_), dims(dims_), judgments(n_), springs(dims_), pinned(n_, 0) {}
  size_t n;
  int dims;
  std::shared_ptr<NeighbourTerm> neighbour;
  JudgmentTerm judgments;
  SpringTerm springs;
  std::vector<uint8_t> pinned;
  double blend = 1.0;
  double drag_stiffness = 2.0;
  TermCosts costs;
  Points scratch;

  void check_item(int32_t item, const char* what) const {
    if (item < 0 || size_t(item) >= n)
      throw std::invalid_argument(std::string(what) + ": item " + std::to_string(item) + " is unknown (the map has " +
                                  std::to_string(n) + " items)");
  }
};

BlendedObjective::BlendedObjective(size_t n, int dims) : impl_(std::make_unique<Impl>(n, dims)) {
  if (dims < 1) throw std::invalid_argument("blended objective: dims must be at least 1");
}
BlendedObjective::~BlendedObjective() = default;

double BlendedObjective::judgment_scale() const {
  const JudgmentTerm& j = impl_->judgments;
  if (j.active_count() == 0 || impl_->n == 0) return 0.0;
  return double(j.touched_items()) / (3.0 * j.active_weight() * double(impl_->n));
}

double BlendedObjective::evaluate(const Points& y, Points* gradient) {
  Impl& m = *impl_;
  if (size_t(y.rows()) != m.n || y.cols() != m.dims)
    throw std::invalid_argument("blended objective: map is " + std::to_string(y.rows()) + " x " +
                                std::to_string(y.cols()) + ", expected " + std::to_string(m.n) + " x " +
                                std::to_string(m.dims));
  if (gradient) gradient->setZero(y.rows(), y.cols());
  Points* scratch = gradient ? &m.scratch : nullptr;
  double total = 0.0;
  m.costs = TermCosts{};

  if (m.neighbour) {
    m.costs.neighbour = m.neighbour->evaluate(y, scratch);
    total += m.costs.neighbour;
    if (gradient) *gradient += m.scratch;
  }
  const double sj = judgment_scale();
  if (sj > 0.0) {
    const bool want = gradient && m.blend != 0.0;
    const double sum = m.judgments.evaluate(y, want ? scratch : nullptr);
    m.costs.judgment = sum / m.judgments.active_weight();
    total += m.blend * sj * sum;
    if (want) *gradient += (m.blend * sj) * m.scratch;
  }
  if (!m.springs.empty()) {
    const double k = m.drag_stiffness / double(m.n);
    m.costs.pin = m.springs.evaluate(y, scratch);
    total += k * m.costs.pin;
    if (gradient) *gradient += k * m.scratch;
  }
  if (gradient)
    for (size_t i = 0; i < m.n; ++i)
      if (m.pinned[i]) gradient->row(Eigen::Index(i)).setZero();
  return total;
}

void BlendedObjective::set_neighbour_term(std::shared_ptr<NeighbourTerm> term) { impl_->neighbour = std::move(term); }
NeighbourTerm* BlendedObjective::neighbour_term() const { return impl_->neighbour.get(); }

void BlendedObjective::set_blend(double blend) {
  if (!(blend >= 0.0) || !std::isfinite(blend))
    throw std::invalid_argument("blend must be a number >= 0, got " + std::to_string(blend));
  impl_->blend = blend;
}
double BlendedObjective::blend() const { return impl_->blend; }

void BlendedObjective::set_judgments(std::vector<Judgment> judgments) { impl_->judgments.set_judgments(std::move(judgments)); }
void BlendedObjective::add_judgment(const Judgment& judgment) { impl_->judgments.add(judgment); }
bool BlendedObjective::set_retracted(int64_t judgment_id, bool retracted) {
  return impl_->judgments.set_retracted(judgment_id, retracted);
}
const std::vector<Judgment>& BlendedObjective::judgments() const { return impl_->judgments.judgments(); }
const JudgmentTerm& BlendedObjective::judgment_term() const { return impl_->judgments; }

void BlendedObjective::pin(int32_t item) {
  impl_->check_item(item, "pin");
  impl_->pinned[size_t(item)] = 1;
}
void BlendedObjective::unpin(int32_t item) {
  impl_->check_item(item, "unpin");
  impl_->pinned[size_t(item)] = 0;
}
bool BlendedObjective::pinned(int32_t item) const {
  return item >= 0 && size_t(item) < impl_->n && impl_->pinned[size_t(item)] != 0;
}
void BlendedObjective::set_drag(int32_t item, const double* target) {
  impl_->check_item(item, "drag");
  for (int c = 0; c < impl_->dims; ++c)
    if (!std::isfinite(target[c])) throw std::invalid_argument("drag: target position is not a finite number");
  impl_->springs.set_target(item, target);
}
void BlendedObjective::clear_drag(int32_t item) { impl_->springs.clear(item); }

TermCosts BlendedObjective::last_costs() const { return impl_->costs; }

void BlendedObjective::set_alpha(double alpha) { impl_->judgments.set_alpha(alpha); }
void BlendedObjective::set_drag_stiffness(double stiffness) {
  if (!(stiffness >= 0.0) || !std::isfinite(stiffness))
    throw std::invalid_argument("drag stiffness must be a number >= 0, got " + std::to_string(stiffness));
  impl_->drag_stiffness = stiffness;
}
size_t BlendedObjective::size() const { return impl_->n; }

void BlendedObjective::resize(size_t n) {
  impl_->judgments.resize(n);
  impl_->pinned.resize(n, 0);
  impl_->n = n;
}

void BlendedObjective::remove_items(const std::vector<int32_t>& sorted_rows) {
  Impl& m = *impl_;
  m.judgments.remove_items(sorted_rows);
  m.springs.remove_items(sorted_rows);
  std::vector<uint8_t> kept;
  size_t r = 0;
  for (size_t i = 0; i < m.n; ++i) {
    if (r < sorted_rows.size() && sorted_rows[r] == int32_t(i)) {
      ++r;
      continue;
    }
    kept.push_back(m.pinned[i]);
  }
  m.pinned = std::move(kept);
  m.n = m.pinned.size();
}

}  // namespace kith
