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
  else if (anchors_scored < 1) e = "picker: anchors_scored must be at least 1";
  else if (!(random_share >= 0.0 && random_share <= 1.0)) e = "picker: random_share must be between 0 and 1";
  else if (samples < 1) e = "picker: samples must be at least 1";
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

// Where might the anchor belong? Candidate places x_s: the anchor's own map position and the map
// positions of up to `samples` random items; each weighted by the likelihood, under the t-STE
// model, of every active judgment naming the anchor if the anchor stood there (uniform prior over
// the places, as in Tamuz et al. 2011, who use the embedding's own points as the prior).
struct AnchorPosterior {
  std::vector<double> x;  // S x d
  std::vector<double> w;  // S, sums to 1
  size_t size() const { return w.size(); }
};

inline double log_kernel(double d2, double alpha) { return -0.5 * (alpha + 1.0) * std::log1p(d2 / alpha); }

inline double d2_rows(const double* a, const double* b, Eigen::Index d) {
  double s = 0.0;
  for (Eigen::Index k = 0; k < d; ++k) s += (a[k] - b[k]) * (a[k] - b[k]);
  return s;
}

AnchorPosterior anchor_posterior(const Points& y, int32_t anchor, const std::vector<Judgment>* judgments,
                                 const PickerOptions& o, std::mt19937_64& rng) {
  const Eigen::Index d = y.cols(), n = y.rows();
  AnchorPosterior post;
  std::vector<int32_t> places = {anchor};
  if (n - 1 <= o.samples) {
    for (int32_t i = 0; i < int32_t(n); ++i)
      if (i != anchor) places.push_back(i);
  } else {
    std::uniform_int_distribution<int32_t> item(0, int32_t(n) - 1);
    while (int(places.size()) < o.samples + 1) {
      const int32_t i = item(rng);
      if (i != anchor) places.push_back(i);
    }
  }
  const size_t S = places.size();
  post.x.resize(S * size_t(d));
  for (size_t s = 0; s < S; ++s)
    for (Eigen::Index k = 0; k < d; ++k) post.x[s * size_t(d) + size_t(k)] = y(places[s], k);
  std::vector<double> loglik(S, 0.0);
  if (judgments)
    for (const Judgment& j : *judgments) {
      if (j.retracted || (j.anchor != anchor && j.nearer != anchor && j.farther != anchor)) continue;
      for (size_t s = 0; s < S; ++s) {
        const double* x = post.x.data() + s * size_t(d);
        auto at = [&](int32_t i) { return i == anchor ? x : y.data() + Eigen::Index(i) * d; };
        const double ln = log_kernel(d2_rows(at(j.anchor), at(j.nearer), d), o.alpha);
        const double lf = log_kernel(d2_rows(at(j.anchor), at(j.farther), d), o.alpha);
        // log p = -softplus(lf - ln)
        const double z = lf - ln;
        loglik[s] -= j.weight * (z > 0 ? z + std::log1p(std::exp(-z)) : std::log1p(std::exp(z)));
      }
    }
  const double top = *std::max_element(loglik.begin(), loglik.end());
  post.w.resize(S);
  double total = 0.0;
  for (size_t s = 0; s < S; ++s) total += (post.w[s] = std::exp(loglik[s] - top));
  for (auto& w : post.w) w /= total;
  return post;
}

// Expected information gain about the anchor's place for every pair of candidates (C x C, symmetric):
//   I(b,c) = H(sum_s w_s p_s) - sum_s w_s H(p_s),   p_s = K(x_s,b) / (K(x_s,b) + K(x_s,c)).
std::vector<double> pair_information(const Points& y, const AnchorPosterior& post, const std::vector<int32_t>& cand,
                                     double alpha) {
  const size_t C = cand.size(), S = post.size();
  const Eigen::Index d = y.cols();
  // Places with negligible weight change nothing; skip them.
  std::vector<size_t> live;
  for (size_t s = 0; s < S; ++s)
    if (post.w[s] > 1e-6) live.push_back(s);
  std::vector<double> logk(live.size() * C);
  for (size_t l = 0; l < live.size(); ++l)
    for (size_t c = 0; c < C; ++c)
      logk[l * C + c] = log_kernel(d2_rows(post.x.data() + live[l] * size_t(d), y.data() + Eigen::Index(cand[c]) * d, d), alpha);
  std::vector<double> info(C * C, 0.0);
  for (size_t b = 0; b < C; ++b)
    for (size_t c = b + 1; c < C; ++c) {
      double pbar = 0.0, hbar = 0.0, wsum = 0.0;
      for (size_t l = 0; l < live.size(); ++l) {
        const double w = post.w[live[l]];
        const double p = 1.0 / (1.0 + std::exp(logk[l * C + c] - logk[l * C + b]));
        pbar += w * p;
        hbar += w * entropy(p);
        wsum += w;
      }
      const double v = entropy(pbar / wsum) - hbar / wsum;
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
  if (options_.rule == PickerRule::kRandom || counts.empty()) return draw();
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

  const bool random_now = options_.rule == PickerRule::kRandom ||
                          (options_.random_share > 0 &&
                           std::uniform_real_distribution<double>(0.0, 1.0)(rng_) < options_.random_share);
  if (random_now) {
    const PickerRule rule = options_.rule;
    options_.rule = PickerRule::kRandom;
    q.anchor = choose_anchor(in, {});
    options_.rule = rule;
    std::uniform_int_distribution<int32_t> item(0, n - 1);
    while (int(q.candidates.size()) < size) {
      const int32_t i = item(rng_);
      if (i != q.anchor && std::find(q.candidates.begin(), q.candidates.end(), i) == q.candidates.end())
        q.candidates.push_back(i);
    }
    return q;
  }

  const std::vector<int> counts = judgment_counts(in, size_t(n));
  double best_anchor_info = -1.0;
  for (int attempt = 0; attempt < options_.anchors_scored; ++attempt) {
    const int32_t anchor = choose_anchor(in, counts);
    const std::vector<int32_t> cand = candidates(in, anchor, size);
    const size_t C = cand.size();
    const AnchorPosterior post = anchor_posterior(*in.map, anchor, in.judgments, options_, rng_);
    const std::vector<double> info = pair_information(*in.map, post, cand, options_.alpha);
    size_t bb = 0, bc = 1;
    double best = -1.0;
    for (size_t b = 0; b < C; ++b)
      for (size_t c = b + 1; c < C; ++c)
        if (info[b * C + c] > best) best = info[b * C + c], bb = b, bc = c;
    if (best <= best_anchor_info) continue;
    best_anchor_info = best;
    // Grow the grid greedily: each new candidate adds the most information over pairs with those
    // already chosen.
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
    q.anchor = anchor;
    q.candidates.clear();
    for (size_t c : chosen) q.candidates.push_back(cand[c]);
  }
  // Show candidates in no telling order.
  std::shuffle(q.candidates.begin(), q.candidates.end(), rng_);
  return q;
}

double Picker::information(const PickerInput& in, int32_t anchor, int32_t b, int32_t c) {
  check_input(in);
  const AnchorPosterior post = anchor_posterior(*in.map, anchor, in.judgments, options_, rng_);
  return pair_information(*in.map, post, {b, c}, options_.alpha)[1];
}

}  // namespace kith
