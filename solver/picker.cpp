#include "solver/picker.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

namespace kith {

bool PickerOptions::IsValid(std::string* error) const {
  std::string e;
  if (near_candidates < 2) e = "picker: near_candidates must be at least 2";
  else if (feature_candidates < 0 || random_candidates < 0) e = "picker: candidate counts must not be negative";
  else if (anchor_draws < 1) e = "picker: anchor_draws must be at least 1";
  else if (samples < 1) e = "picker: samples must be at least 1";
  else if (!(jitter >= 0.0)) e = "picker: jitter must be >= 0";
  else if (!(alpha > 0.0)) e = "picker: alpha must be positive";
  if (error) *error = e;
  return e.empty();
}

namespace {

double entropy(double p) {
  double h = 0.0;
  if (p > 1e-300) h -= p * std::log(p);
  if (1.0 - p > 1e-300) h -= (1.0 - p) * std::log(1.0 - p);
  return h;
}

std::vector<int> judgment_counts(const PickerInput& in, size_t n) {
  std::vector<int> counts(n, 0);
  if (!in.judgments) return counts;
  for (const auto& j : *in.judgments) {
    if (j.retracted) continue;
    for (int32_t i : {j.anchor, j.nearer, j.farther})
      if (i >= 0 && size_t(i) < n) ++counts[size_t(i)];
  }
  return counts;
}

// k nearest rows of x to row `anchor` (excluding it).
std::vector<int32_t> nearest_rows(const Points& x, int32_t anchor, int k) {
  std::vector<std::pair<double, int32_t>> d;
  d.reserve(size_t(x.rows()));
  const double* a = x.data() + Eigen::Index(anchor) * x.cols();
  for (Eigen::Index i = 0; i < x.rows(); ++i) {
    if (i == anchor) continue;
    const double* b = x.data() + i * x.cols();
    double s = 0.0;
    for (Eigen::Index c = 0; c < x.cols(); ++c) s += (a[c] - b[c]) * (a[c] - b[c]);
    d.emplace_back(s, int32_t(i));
  }
  const size_t kk = std::min(d.size(), size_t(std::max(k, 0)));
  std::partial_sort(d.begin(), d.begin() + std::ptrdiff_t(kk), d.end());
  std::vector<int32_t> out;
  for (size_t i = 0; i < kk; ++i) out.push_back(d[i].second);
  return out;
}

// Expected information gain for every pair of candidates (C x C, symmetric) around one anchor.
std::vector<double> pair_information(const Points& y, int32_t anchor, const std::vector<int32_t>& cand,
                                     const std::vector<int>& counts, const PickerOptions& o, std::mt19937_64& rng) {
  const size_t C = cand.size();
  const Eigen::Index d = y.cols();
  // Scale: mean distance from the anchor to its candidates.
  double s = 0.0;
  for (int32_t c : cand) s += (y.row(c) - y.row(anchor)).norm();
  s = C ? s / double(C) : 1.0;
  if (!(s > 0)) s = 1.0;
  std::normal_distribution<double> gauss(0.0, 1.0);
  std::vector<double> pmean(C * C, 0.0), hmean(C * C, 0.0), logk(C);
  std::vector<double> ya(static_cast<size_t>(d));
  auto sigma = [&](int32_t i) { return o.jitter * s / std::sqrt(1.0 + double(counts[size_t(i)])); };
  for (int t = 0; t < o.samples; ++t) {
    const double sa = sigma(anchor);
    for (Eigen::Index k = 0; k < d; ++k) ya[size_t(k)] = y(anchor, k) + sa * gauss(rng);
    for (size_t c = 0; c < C; ++c) {
      const double sc = sigma(cand[c]);
      double d2 = 0.0;
      for (Eigen::Index k = 0; k < d; ++k) {
        const double v = y(cand[c], k) + sc * gauss(rng) - ya[size_t(k)];
        d2 += v * v;
      }
      logk[c] = -0.5 * (o.alpha + 1.0) * std::log1p(d2 / o.alpha);
    }
    for (size_t b = 0; b < C; ++b)
      for (size_t c = b + 1; c < C; ++c) {
        const double p = 1.0 / (1.0 + std::exp(logk[c] - logk[b]));
        pmean[b * C + c] += p;
        hmean[b * C + c] += entropy(p);
      }
  }
  std::vector<double> info(C * C, 0.0);
  for (size_t b = 0; b < C; ++b)
    for (size_t c = b + 1; c < C; ++c) {
      const double v = entropy(pmean[b * C + c] / o.samples) - hmean[b * C + c] / o.samples;
      info[b * C + c] = info[c * C + b] = std::max(v, 0.0);
    }
  return info;
}

void check_input(const PickerInput& in) {
  if (!in.map) throw std::invalid_argument("picker: no map given");
  if (in.features && in.features->rows() != 0 && in.features->rows() != in.map->rows())
    throw std::invalid_argument("picker: features have " + std::to_string(in.features->rows()) + " rows, the map " +
                                std::to_string(in.map->rows()));
}

}  // namespace

Picker::Picker(PickerOptions options) : options_(options), rng_(options.seed) {
  std::string error;
  if (!options_.IsValid(&error)) throw std::invalid_argument(error);
}

void Picker::set_selection(std::vector<int32_t> items) {
  std::sort(items.begin(), items.end());
  items.erase(std::unique(items.begin(), items.end()), items.end());
  selection_ = std::move(items);
}

int32_t Picker::choose_anchor(const PickerInput& in, const std::vector<int>& counts) {
  const size_t n = size_t(in.map->rows());
  std::vector<int32_t> pool;
  for (int32_t i : selection_)
    if (i >= 0 && size_t(i) < n) pool.push_back(i);
  const bool all = pool.empty();
  auto draw = [&]() -> int32_t {
    if (all) return int32_t(std::uniform_int_distribution<size_t>(0, n - 1)(rng_));
    return pool[std::uniform_int_distribution<size_t>(0, pool.size() - 1)(rng_)];
  };
  if (options_.rule == PickerRule::kRandom) return draw();
  int32_t best = draw();
  for (int t = 1; t < options_.anchor_draws; ++t) {
    const int32_t a = draw();
    if (counts[size_t(a)] < counts[size_t(best)]) best = a;
  }
  return best;
}

std::vector<int32_t> Picker::candidates(const PickerInput& in, int32_t anchor, int want) {
  const int32_t n = int32_t(in.map->rows());
  std::vector<int32_t> out = nearest_rows(*in.map, anchor, options_.near_candidates);
  if (in.features && in.features->rows() == n && in.features->cols() > 0)
    for (int32_t i : nearest_rows(*in.features, anchor, options_.feature_candidates)) out.push_back(i);
  std::uniform_int_distribution<int32_t> item(0, n - 1);
  const int extra = std::max(options_.random_candidates, want - int(out.size()));
  for (int t = 0, tries = 0; t < extra && tries < 20 * extra; ++tries) {
    const int32_t i = item(rng_);
    if (i == anchor) continue;
    out.push_back(i);
    ++t;
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

Question Picker::pair(const PickerInput& in) { return next(in, QuestionKind::kPair, 2, 1); }

Question Picker::grid(const PickerInput& in, int grid_size, int grid_choose) {
  return next(in, QuestionKind::kGrid, grid_size, grid_choose);
}

Question Picker::next(const PickerInput& in, QuestionKind kind, int grid_size, int grid_choose) {
  check_input(in);
  Question q;
  q.kind = kind;
  const int size = kind == QuestionKind::kPair ? 2 : grid_size;
  q.choose = kind == QuestionKind::kPair ? 1 : grid_choose;
  const int32_t n = int32_t(in.map->rows());
  if (size < 2 || q.choose < 1 || q.choose >= size)
    throw std::invalid_argument("picker: a grid needs at least 2 candidates and 1 <= choose < candidates");
  if (n < size + 1) return q;  // anchor -1: nothing to ask
  const std::vector<int> counts =
      options_.rule == PickerRule::kRandom ? std::vector<int>(size_t(n), 0) : judgment_counts(in, size_t(n));
  const int32_t anchor = choose_anchor(in, counts);
  q.anchor = anchor;

  if (options_.rule == PickerRule::kRandom) {
    std::uniform_int_distribution<int32_t> item(0, n - 1);
    while (int(q.candidates.size()) < size) {
      const int32_t i = item(rng_);
      if (i != anchor && std::find(q.candidates.begin(), q.candidates.end(), i) == q.candidates.end())
        q.candidates.push_back(i);
    }
    return q;
  }

  const std::vector<int32_t> cand = candidates(in, anchor, size);
  const size_t C = cand.size();
  const std::vector<double> info = pair_information(*in.map, anchor, cand, counts, options_, rng_);
  // Best pair first (ties broken at random by the jitter itself).
  size_t bb = 0, bc = 1;
  double best = -1.0;
  for (size_t b = 0; b < C; ++b)
    for (size_t c = b + 1; c < C; ++c)
      if (info[b * C + c] > best) best = info[b * C + c], bb = b, bc = c;
  std::vector<size_t> chosen = {bb, bc};
  std::vector<uint8_t> used(C, 0);
  used[bb] = used[bc] = 1;
  while (int(chosen.size()) < size) {
    size_t pick = C;
    double gain = -1.0;
    for (size_t x = 0; x < C; ++x) {
      if (used[x]) continue;
      double g = 0.0;
      for (size_t c : chosen) g += info[x * C + c];
      if (g > gain) gain = g, pick = x;
    }
    if (pick == C) break;
    used[pick] = 1;
    chosen.push_back(pick);
  }
  for (size_t c : chosen) q.candidates.push_back(cand[c]);
  // Show candidates in no telling order.
  std::shuffle(q.candidates.begin(), q.candidates.end(), rng_);
  return q;
}

double Picker::information(const PickerInput& in, int32_t anchor, int32_t b, int32_t c) {
  check_input(in);
  const std::vector<int> counts = judgment_counts(in, size_t(in.map->rows()));
  // The scale comes from the anchor's map neighbourhood, as when picking.
  std::vector<int32_t> cand = nearest_rows(*in.map, anchor, options_.near_candidates);
  cand.erase(std::remove_if(cand.begin(), cand.end(), [&](int32_t i) { return i == b || i == c; }), cand.end());
  cand.insert(cand.begin(), {b, c});
  const std::vector<double> info = pair_information(*in.map, anchor, cand, counts, options_, rng_);
  return info[1];
}

}  // namespace kith
