// See simulated_people.h.
#include "solver/demo/simulated_people.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

namespace kith {

std::vector<PerceptualItem> perceptual_items(const std::vector<Swatch>& swatches) {
  std::vector<PerceptualItem> out;
  out.reserve(swatches.size());
  for (const auto& s : swatches) out.push_back({s.base, int(s.pattern), s.period});
  return out;
}

bool SimulatedPeopleOptions::IsValid(std::string* error) const {
  if (members.empty()) {
    if (error) *error = "the simulated people needs at least one member";
    return false;
  }
  for (const auto& m : members)
    if (!(m.noise >= 0.0) || !std::isfinite(m.noise)) {
      if (error) *error = "member " + m.name + ": noise must be finite and >= 0";
      return false;
    }
  if (!(distance.pattern_weight >= 0.0) || !(distance.scale_weight >= 0.0)) {
    if (error) *error = "distance weights must be >= 0";
    return false;
  }
  return true;
}

SimulatedPeople::SimulatedPeople(std::vector<PerceptualItem> items, SimulatedPeopleOptions options)
    : items_(std::move(items)), options_(std::move(options)), rng_(options_.seed) {
  std::string error;
  if (!options_.IsValid(&error)) throw std::invalid_argument(error);
}

double SimulatedPeople::distance(int32_t i, int32_t j) const {
  const auto& x = items_[size_t(i)];
  const auto& y = items_[size_t(j)];
  double d = ciede2000(x.colour, y.colour);
  if (x.pattern != y.pattern) d += options_.distance.pattern_weight;
  if (x.pattern != 0 && y.pattern != 0) d += options_.distance.scale_weight * std::abs(std::log2(x.period / y.period));
  return d;
}

double SimulatedPeople::perceived(int member, int32_t i, int32_t j) const {
  if (!options_.members[size_t(member)].contrarian) return distance(i, j);
  const auto& x = items_[size_t(i)];
  const auto& y = items_[size_t(j)];
  return 2.0 * std::abs(x.colour.L - y.colour.L) + (x.pattern != y.pattern ? options_.distance.pattern_weight : 0.0);
}

Judgment SimulatedPeople::answer(int32_t anchor, int32_t b, int32_t c, int member) {
  if (member < 0) member = int(turn_++ % options_.members.size());
  const SimulatedPerson& m = options_.members[size_t(member)];
  std::normal_distribution<double> noise(0.0, 1.0);
  const double db = perceived(member, anchor, b) + m.noise * noise(rng_);
  const double dc = perceived(member, anchor, c) + m.noise * noise(rng_);
  Judgment j;
  j.anchor = anchor;
  j.nearer = db <= dc ? b : c;
  j.farther = db <= dc ? c : b;
  j.person = m.name;
  j.kind = JudgmentKind::kPair;
  return j;
}

std::vector<Judgment> SimulatedPeople::truth_triplets(size_t count, size_t neighbourhood, double min_gap,
                                                     uint64_t seed) const {
  std::mt19937_64 rng(seed);
  const int32_t n = int32_t(items_.size());
  std::vector<Judgment> out;
  if (n < 3) return out;
  std::uniform_int_distribution<int32_t> any(0, n - 1);
  std::vector<int32_t> order(static_cast<size_t>(n));
  std::vector<double> d(static_cast<size_t>(n));
  const size_t k = neighbourhood == 0 ? size_t(n - 1) : std::min(neighbourhood, size_t(n - 1));
  for (size_t tries = 0; out.size() < count && tries < 100 * count; ++tries) {
    const int32_t a = any(rng);
    if (neighbourhood > 0) {
      for (int32_t i = 0; i < n; ++i) d[size_t(i)] = i == a ? -1.0 : distance(a, i);
      std::iota(order.begin(), order.end(), 0);
      std::partial_sort(order.begin(), order.begin() + long(k) + 1, order.end(),
                        [&](int32_t x, int32_t y) { return d[size_t(x)] < d[size_t(y)]; });
    }
    std::uniform_int_distribution<size_t> pick(0, k - 1);
    // order[0] is the anchor itself when a neighbourhood is used
    const int32_t b = neighbourhood > 0 ? order[1 + pick(rng)] : any(rng);
    const int32_t c = neighbourhood > 0 ? order[1 + pick(rng)] : any(rng);
    if (b == a || c == a || b == c) continue;
    const double db = distance(a, b), dc = distance(a, c);
    if (std::abs(db - dc) < min_gap) continue;
    Judgment j;
    j.anchor = a;
    j.nearer = db < dc ? b : c;
    j.farther = db < dc ? c : b;
    j.person = "hidden distance";
    j.kind = JudgmentKind::kImport;
    out.push_back(j);
  }
  return out;
}

}  // namespace kith
