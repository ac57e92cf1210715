// Displacement between the reference and current maps, and judgment attribution (see displacement.h).
#include "solver/measures/displacement.h"

#include <algorithm>
#include <numeric>
#include <stdexcept>
#include <string>

#include "solver/objective/judgment_term.h"

namespace kith {

Displacement measure_displacement(const Points& reference, const Points& current, bool allow_scale) {
  Displacement d;
  d.alignment = align_maps(reference, current, allow_scale);
  d.aligned_reference = apply_alignment(d.alignment, reference);
  const size_t n = size_t(current.rows());
  d.distance.resize(n);
  for (size_t i = 0; i < n; ++i)
    d.distance[i] = (current.row(Eigen::Index(i)) - d.aligned_reference.row(Eigen::Index(i))).norm();
  d.ranking.resize(n);
  std::iota(d.ranking.begin(), d.ranking.end(), 0);
  std::stable_sort(d.ranking.begin(), d.ranking.end(),
                   [&](int32_t a, int32_t b) { return d.distance[size_t(a)] > d.distance[size_t(b)]; });
  return d;
}

std::vector<JudgmentPull> judgments_moving(int32_t item, const Points& current, const Displacement& displacement,
                                           const std::vector<Judgment>& judgments, size_t count, double alpha) {
  const size_t n = size_t(current.rows());
  if (item < 0 || size_t(item) >= n)
    throw std::invalid_argument("judgment attribution: item " + std::to_string(item) + " is unknown (there are " +
                                std::to_string(n) + " items)");
  if (displacement.aligned_reference.rows() != current.rows())
    throw std::invalid_argument("judgment attribution: the displacement was measured on another map");
  Eigen::RowVectorXd travel = current.row(item) - displacement.aligned_reference.row(item);
  const double length = travel.norm();
  if (length > 0.0) travel /= length;

  JudgmentTermOptions options;
  options.alpha = alpha;
  JudgmentTerm term(n, options);
  Points gradient;
  std::vector<JudgmentPull> out;
  for (size_t j = 0; j < judgments.size(); ++j) {
    const Judgment& jd = judgments[j];
    if (jd.retracted || (jd.anchor != item && jd.nearer != item && jd.farther != item)) continue;
    term.set_judgments({jd});
    term.evaluate(current, &gradient);
    const Eigen::RowVectorXd force = -gradient.row(item);
    JudgmentPull p;
    p.index = j;
    p.id = jd.id;
    p.force = force.norm();
    p.pull = length > 0.0 ? force.dot(travel) : p.force;
    out.push_back(p);
  }
  std::stable_sort(out.begin(), out.end(), [](const JudgmentPull& a, const JudgmentPull& b) { return a.pull > b.pull; });
  if (out.size() > count) out.resize(count);
  return out;
}

}  // namespace kith
