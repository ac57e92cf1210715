// See simulated_people.h.
#include "solver/demo/simulated_people.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

#include "solver/base/portable_math.h"
#include "solver/base/portable_random.h"

namespace kith {
namespace {
constexpr double kInvLn2 = 1.4426950408889634;  // log2 x = ln x / ln 2
}  // namespace

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
  if (!(distance.pattern_weight >= 0.0) || !(distance.scale_weight >= 0.0) || !(distance.colour.kL > 0.0) ||
      !(distance.colour.kC > 0.0) || !(distance.colour.kH > 0.0)) {
    if (error) *error = "distance weights must be >= 0";
    return false;
  }
  return true;
}

bool people_scenario(const std::string& name, SimulatedPeopleOptions* options) {
  SimulatedPeopleOptions o = *options;
  if (name == "demo") o.distance = PerceptualDistanceOptions{};
  else if (name == "hue-blind") o.distance.colour.kH = 1000.0;
  else if (name == "scale-heavy") o.distance.scale_weight = 30.0;
  else if (name == "pattern-first") o.distance.pattern_weight = 60.0;
  else if (name == "light-first") o.distance.colour.kL = 0.4, o.distance.colour.kC = 2.5, o.distance.pattern_weight = 10.0;
  else return false;
  *options = o;
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
  double d = ciede2000(x.colour, y.colour, options_.distance.colour);
  if (x.pattern != y.pattern) d += options_.distance.pattern_weight;
  if (x.pattern != 0 && y.pattern != 0) d += options_.distance.scale_weight * std::abs(pm::log(x.period / y.period)) * kInvLn2;
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
  const double db = perceived(member, anchor, b) + m.noise * normal(rng_);
  const double dc = perceived(member, anchor, c) + m.noise * normal(rng_);
  Judgment j;
  j.anchor = anchor;
  j.nearer = db <= dc ? b : c;
  j.farther = db <= dc ? c : b;
  j.person = m.name;
  j.kind = JudgmentKind::kPair;
  return j;
}

std::vector<Judgment> SimulatedPeople::answer_grid(int32_t anchor, const std::vector<int32_t>& candidates, int choose,
                                                   int member) {
  const int n = int(candidates.size());
  if (choose < 1 || choose >= n) throw std::invalid_argument("a grid needs 1 <= choose < candidates");
  if (member < 0) member = int(turn_++ % options_.members.size());
  const SimulatedPerson& m = options_.members[size_t(member)];
  std::vector<double> seen(static_cast<size_t>(n));
  for (int c = 0; c < n; ++c) seen[size_t(c)] = perceived(member, anchor, candidates[size_t(c)]) + m.noise * normal(rng_);
  std::vector<int> order(static_cast<size_t>(n));
  std::iota(order.begin(), order.end(), 0);
  std::stable_sort(order.begin(), order.end(), [&](int a, int b) { return seen[size_t(a)] < seen[size_t(b)]; });
  std::vector<char> picked(static_cast<size_t>(n), 0);
  for (int k = 0; k < choose; ++k) picked[size_t(order[size_t(k)])] = 1;
  std::vector<Judgment> out;
  for (int k = 0; k < choose; ++k)
    for (int u = 0; u < n; ++u) {
      if (picked[size_t(u)]) continue;
      Judgment j;
      j.anchor = anchor;
      j.nearer = candidates[size_t(order[size_t(k)])];
      j.farther = candidates[size_t(u)];
      j.person = m.name;
      j.kind = JudgmentKind::kGrid;
      out.push_back(j);
    }
  return out;
}

std::vector<Judgment> SimulatedPeople::truth_triplets(size_t count, size_t neighbourhood, double min_gap,
                                                     uint64_t seed) const {
  std::mt19937_64 rng(seed);
  const int32_t n = int32_t(items_.size());
  std::vector<Judgment> out;
  if (n < 3) return out;
  auto any = [&rng, n] { return int32_t(below(rng, uint64_t(n))); };
  std::vector<int32_t> order(static_cast<size_t>(n));
  std::vector<double> d(static_cast<size_t>(n));
  const size_t k = neighbourhood == 0 ? size_t(n - 1) : std::min(neighbourhood, size_t(n - 1));
  for (size_t tries = 0; out.size() < count && tries < 100 * count; ++tries) {
    const int32_t a = any();
    if (neighbourhood > 0) {
      for (int32_t i = 0; i < n; ++i) d[size_t(i)] = i == a ? -1.0 : distance(a, i);
      std::iota(order.begin(), order.end(), 0);
      std::partial_sort(order.begin(), order.begin() + long(k) + 1, order.end(),
                        [&](int32_t x, int32_t y) { return d[size_t(x)] < d[size_t(y)]; });
    }
    // order[0] is the anchor itself when a neighbourhood is used
    const int32_t b = neighbourhood > 0 ? order[1 + below(rng, k)] : any();
    const int32_t c = neighbourhood > 0 ? order[1 + below(rng, k)] : any();
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
