#include "solver/asking/picker.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

#include "solver/base/portable_random.h"
#include "solver/base/portable_math.h"

namespace kith {

struct Response;  // below

bool PickerOptions::IsValid(std::string* error) const {
  std::string e;
  if (near_candidates < 2) e = "picker: near_candidates must be at least 2";
  else if (feature_candidates < 0 || random_candidates < 0) e = "picker: candidate counts must not be negative";
  else if (anchor_draws < 1) e = "picker: anchor_draws must be at least 1";
  else if (anchors_scored < 1) e = "picker: anchors_scored must be at least 1";
  else if (!(random_share >= 0.0 && random_share <= 1.0)) e = "picker: random_share must be between 0 and 1";
  else if (warm_up_judgments < 0) e = "picker: warm_up_judgments must not be negative";
  else if (samples < 1) e = "picker: samples must be at least 1";
  else if (scored_places < 0) e = "picker: scored_places must not be negative";
  else if (!(local_share >= 0.0 && local_share <= 1.0)) e = "picker: local_share must be between 0 and 1";
  else if (!(local_spread > 0.0)) e = "picker: local_spread must be positive";
  else if (!(alpha > 0.0)) e = "picker: alpha must be positive";
  if (error) *error = e;
  return e.empty();
}

namespace {

double entropy(double p) {
  double h = 0.0;
  if (p > 1e-300) h -= p * pm::log(p);
  if (1.0 - p > 1e-300) h -= (1.0 - p) * pm::log(1.0 - p);
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
  // Eigen's row-wise reduction is vectorized (a plain loop with one accumulator is not).
  const Eigen::VectorXd d2 = (x.rowwise() - x.row(anchor)).rowwise().squaredNorm();
  std::vector<std::pair<double, int32_t>> d;
  d.reserve(size_t(x.rows()));
  for (Eigen::Index i = 0; i < x.rows(); ++i)
    if (i != anchor) d.emplace_back(d2[i], int32_t(i));
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

inline double log_kernel(double d2, double alpha) { return -0.5 * (alpha + 1.0) * pm::log1p(d2 / alpha); }

}  // namespace
// How the picker predicts an answer: "b" with probability sigma(g(x,b) - g(x,c)) for an anchor at x,
// with g = log K (t-STE, kernel dof alpha) or g = -beta d (a logistic in the distance difference,
// beta calibrated to the answers on the current map).
struct Response {
  bool calibrated = false;
  double alpha = 1.0, beta = 1.0;
  double g(double d2) const { return calibrated ? -beta * std::sqrt(d2) : log_kernel(d2, alpha); }
};
namespace {

inline double d2_rows(const double* a, const double* b, Eigen::Index d) {
  double s = 0.0;
  for (Eigen::Index k = 0; k < d; ++k) s += (a[k] - b[k]) * (a[k] - b[k]);
  return s;
}

// Candidate places for the anchor: its own map position; `local_share` of the samples drawn
// around it (Gaussian, standard deviation `local_scale`, which resolves where the anchor sits among
// its neighbours); the rest at the map positions of random items (which catches an anchor folded
// into the wrong region). Each is weighted by the t-STE likelihood of every active judgment naming
// the anchor if the anchor stood there (uniform prior over the places, as in Tamuz et al. 2011,
// who use the embedding's own points as the prior).
AnchorPosterior anchor_posterior(const Points& y, int32_t anchor, const std::vector<Judgment>* judgments,
                                 const PickerOptions& o, const Response& r, double local_scale, std::mt19937_64& rng) {
  const Eigen::Index d = y.cols(), n = y.rows();
  AnchorPosterior post;
  const int local = local_scale > 0 ? int(std::lround(o.local_share * o.samples)) : 0;
  const int global = o.samples - local;
  std::vector<int32_t> places = {anchor};
  if (n - 1 <= global) {
    for (int32_t i = 0; i < int32_t(n); ++i)
      if (i != anchor) places.push_back(i);
  } else {
    auto item = [n](std::mt19937_64& g) { return int32_t(below(g, uint64_t(n))); };
    while (int(places.size()) < global + 1) {
      const int32_t i = item(rng);
      if (i != anchor) places.push_back(i);
    }
  }
  const size_t S = places.size() + size_t(local);
  post.x.resize(S * size_t(d));
  for (size_t s = 0; s < places.size(); ++s)
    for (Eigen::Index k = 0; k < d; ++k) post.x[s * size_t(d) + size_t(k)] = y(places[s], k);
  const double jitter_sd = local_scale > 0 ? local_scale : 1.0;
  for (size_t s = places.size(); s < S; ++s)
    for (Eigen::Index k = 0; k < d; ++k) post.x[s * size_t(d) + size_t(k)] = y(anchor, k) + normal(rng, 0.0, jitter_sd);
  std::vector<double> loglik(S, 0.0);
  if (judgments)
    for (const Judgment& j : *judgments) {
      if (j.retracted || (j.anchor != anchor && j.nearer != anchor && j.farther != anchor)) continue;
      for (size_t s = 0; s < S; ++s) {
        const double* x = post.x.data() + s * size_t(d);
        auto at = [&](int32_t i) { return i == anchor ? x : y.data() + Eigen::Index(i) * d; };
        const double ln = r.g(d2_rows(at(j.anchor), at(j.nearer), d));
        const double lf = r.g(d2_rows(at(j.anchor), at(j.farther), d));
        // log p = -softplus(lf - ln)
        const double z = lf - ln;
        loglik[s] -= j.weight * (z > 0 ? z + pm::log1p(pm::exp(-z)) : pm::log1p(pm::exp(z)));
      }
    }
  const double top = *std::max_element(loglik.begin(), loglik.end());
  post.w.resize(S);
  double total = 0.0;
  for (size_t s = 0; s < S; ++s) total += (post.w[s] = pm::exp(loglik[s] - top));
  for (auto& w : post.w) w /= total;
  return post;
}

// At most `keep` places standing for the posterior: the places themselves when few carry weight,
// else `keep` places drawn by systematic resampling (each then weighs 1/keep). An unbiased
// stand-in for the posterior that makes scoring pairs cost O(keep) instead of O(samples).
AnchorPosterior thin_posterior(const AnchorPosterior& post, int keep, size_t d, std::mt19937_64& rng) {
  std::vector<size_t> live;
  for (size_t s = 0; s < post.size(); ++s)
    if (post.w[s] > 1e-6) live.push_back(s);
  AnchorPosterior out;
  auto take = [&](size_t s, double w) {
    out.x.insert(out.x.end(), post.x.begin() + std::ptrdiff_t(s * d), post.x.begin() + std::ptrdiff_t((s + 1) * d));
    out.w.push_back(w);
  };
  if (keep <= 0 || int(live.size()) <= keep) {
    double total = 0.0;
    for (size_t s : live) total += post.w[s];
    for (size_t s : live) take(s, post.w[s] / total);
    return out;
  }
  const double step = 1.0 / keep;
  double u = step * uniform01(rng), cum = 0.0;
  for (size_t s = 0; s < post.size() && int(out.size()) < keep; ++s) {
    cum += post.w[s];
    while (u < cum && int(out.size()) < keep) {
      take(s, step);
      u += step;
    }
  }
  return out;
}

// beta of the calibrated response: maximum likelihood of sigma(beta (d(a,f) - d(a,n))) over (up to
// 1,000 sampled) active judgments on the current map, by Newton's method, with one agreeing and one
// disagreeing pseudo-answer at the median |distance difference| so that a map that satisfies every
// judgment still gets a finite beta. Without judgments: 20 / the median distance between items.
double calibrate_beta(const Points& y, const std::vector<Judgment>* judgments, std::mt19937_64& rng) {
  const Eigen::Index d = y.cols(), n = y.rows();
  std::vector<const Judgment*> active;
  if (judgments)
    for (const Judgment& j : *judgments)
      if (!j.retracted && j.anchor >= 0 && j.anchor < n && j.nearer >= 0 && j.nearer < n && j.farther >= 0 &&
          j.farther < n)
        active.push_back(&j);
  auto dist = [&](int32_t a, int32_t b) { return std::sqrt(d2_rows(y.data() + Eigen::Index(a) * d, y.data() + Eigen::Index(b) * d, d)); };
  if (active.size() < 10) {
    auto item = [n](std::mt19937_64& g) { return int32_t(below(g, uint64_t(n))); };
    std::vector<double> pd;
    for (int t = 0; t < 101; ++t) pd.push_back(dist(item(rng), item(rng)));
    std::nth_element(pd.begin(), pd.begin() + 50, pd.end());
    return pd[50] > 0 ? 20.0 / pd[50] : 1.0;
  }
  std::vector<double> delta;  // d(a,f) - d(a,n): positive where the map agrees
  const size_t m = std::min<size_t>(active.size(), 1000);
  auto pick = [&active](std::mt19937_64& g) { return size_t(below(g, active.size())); };
  for (size_t t = 0; t < m; ++t) {
    const Judgment& j = active.size() <= 1000 ? *active[t] : *active[pick(rng)];
    delta.push_back(dist(j.anchor, j.farther) - dist(j.anchor, j.nearer));
  }
  std::vector<double> mag(delta.size());
  for (size_t t = 0; t < delta.size(); ++t) mag[t] = std::abs(delta[t]);
  std::nth_element(mag.begin(), mag.begin() + std::ptrdiff_t(mag.size() / 2), mag.end());
  const double med = std::max(mag[mag.size() / 2], 1e-12);
  delta.push_back(med);
  delta.push_back(-med);
  double beta = 1.0 / med;
  for (int it = 0; it < 30; ++it) {
    double grad = 0.0, hess = 0.0;
    for (double x : delta) {
      const double s = 1.0 / (1.0 + pm::exp(-beta * x));
      grad += x * (1.0 - s);
      hess += x * x * s * (1.0 - s);
    }
    if (hess <= 0) break;
    const double next = std::clamp(beta + grad / hess, 0.5 * beta, 2.0 * beta);
    const bool done = std::abs(next - beta) < 1e-6 * beta;
    beta = next;
    if (done) break;
  }
  return beta;
}

// Expected information gain about the anchor's place for every pair of candidates (C x C, symmetric):
//   I(b,c) = H(sum_s w_s p_s) - sum_s w_s H(p_s),   p_s = sigma(g(x_s,b) - g(x_s,c)) = k_b / (k_b + k_c)
// with k = exp(g) (for t-STE, k = K). H(p_s) = log(k_b + k_c) - (k_b g_b + k_c g_c) / (k_b + k_c):
// one logarithm per place and pair.
std::vector<double> pair_information(const Points& y, const AnchorPosterior& post, const std::vector<int32_t>& cand,
                                     const Response& r) {
  const size_t C = cand.size(), S = post.size();
  const Eigen::Index d = y.cols();
  std::vector<size_t> live;
  for (size_t s = 0; s < S; ++s)
    if (post.w[s] > 1e-6) live.push_back(s);
  const size_t L = live.size();
  // Column-major by candidate so the inner loop over places runs along memory.
  std::vector<double> logk(L * C), k(L * C), kl(L * C), w(L);
  double wsum = 0.0;
  for (size_t l = 0; l < L; ++l) wsum += (w[l] = post.w[live[l]]);
  for (size_t c = 0; c < C; ++c)
    for (size_t l = 0; l < L; ++l) {
      const size_t at = c * L + l;
      // g <= 0 for both responses; kept above -600 so that exp(g) stays a normal number.
      logk[at] = std::max(r.g(d2_rows(post.x.data() + live[l] * size_t(d), y.data() + Eigen::Index(cand[c]) * d, d)), -600.0);
      k[at] = pm::exp(logk[at]);
      kl[at] = k[at] * logk[at];
    }
  std::vector<double> info(C * C, 0.0);
  for (size_t b = 0; b < C; ++b)
    for (size_t c = b + 1; c < C; ++c) {
      const double *kb = &k[b * L], *kc = &k[c * L], *klb = &kl[b * L], *klc = &kl[c * L];
      double pbar = 0.0, hbar = 0.0;
      for (size_t l = 0; l < L; ++l) {
        const double s = kb[l] + kc[l];
        pbar += w[l] * kb[l] / s;
        hbar += w[l] * (pm::log(s) - (klb[l] + klc[l]) / s);
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
    if (all) return int32_t(below(rng_, n));
    return pool[below(rng_, pool.size())];
  };
  if (options_.rule == PickerRule::kRandom || counts.empty()) return draw();
  int32_t best = draw();
  for (int t = 1; t < options_.anchor_draws; ++t) {
    const int32_t a = draw();
    if (counts[size_t(a)] < counts[size_t(best)]) best = a;
  }
  return best;
}

std::vector<int32_t> Picker::candidates(const PickerInput& in, int32_t anchor, int want, double* local_scale) {
  const int32_t n = int32_t(in.map->rows());
  std::vector<int32_t> out = nearest_rows(*in.map, anchor, options_.near_candidates);
  if (local_scale) {
    // The spread of the anchor's local places: a fraction of the distance to its third nearest
    // item in the map (the nearest ones are partial_sorted first).
    *local_scale = 0.0;
    if (!out.empty()) {
      const int32_t r = out[std::min<size_t>(2, out.size() - 1)];
      *local_scale = options_.local_spread * (in.map->row(anchor) - in.map->row(r)).norm();
    }
  }
  if (in.features && in.features->rows() == n && in.features->cols() > 0)
    for (int32_t i : nearest_rows(*in.features, anchor, options_.feature_candidates)) out.push_back(i);
  auto item = [n](std::mt19937_64& g) { return int32_t(below(g, uint64_t(n))); };
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

Response Picker::make_response(const PickerInput& in) {
  Response r;
  r.alpha = options_.alpha;
  r.calibrated = options_.response == PickerResponse::kCalibrated;
  if (r.calibrated) r.beta = calibrate_beta(*in.map, in.judgments, rng_);
  return r;
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

  // Without features the map means nothing until the judgments have reached every item: warm up
  // with random questions, each anchored at the least judged of a few random items.
  std::vector<int> warm_counts;
  if (options_.warm_up_judgments > 0 && (!in.features || in.features->cols() == 0)) {
    warm_counts = judgment_counts(in, size_t(n));
    if (*std::min_element(warm_counts.begin(), warm_counts.end()) >= options_.warm_up_judgments) warm_counts.clear();
  }
  const bool warming_up = !warm_counts.empty() && options_.rule != PickerRule::kRandom;
  const bool random_now = options_.rule == PickerRule::kRandom || warming_up ||
                          (options_.random_share > 0 &&
                           uniform01(rng_) < options_.random_share);
  if (random_now) {
    const PickerRule rule = options_.rule;
    if (!warming_up) options_.rule = PickerRule::kRandom;
    q.anchor = choose_anchor(in, warming_up ? warm_counts : std::vector<int>{});
    options_.rule = rule;
    auto item = [n](std::mt19937_64& g) { return int32_t(below(g, uint64_t(n))); };
    while (int(q.candidates.size()) < size) {
      const int32_t i = item(rng_);
      if (i != q.anchor && std::find(q.candidates.begin(), q.candidates.end(), i) == q.candidates.end())
        q.candidates.push_back(i);
    }
    return q;
  }

  const std::vector<int> counts = judgment_counts(in, size_t(n));
  const Response response = make_response(in);
  double best_anchor_info = -1.0;
  for (int attempt = 0; attempt < options_.anchors_scored; ++attempt) {
    const int32_t anchor = choose_anchor(in, counts);
    double local_scale = 0.0;
    const std::vector<int32_t> cand = candidates(in, anchor, size, &local_scale);
    const size_t C = cand.size();
    const AnchorPosterior post = thin_posterior(
        anchor_posterior(*in.map, anchor, in.judgments, options_, response, local_scale, rng_), options_.scored_places,
        size_t(in.map->cols()), rng_);
    const std::vector<double> info = pair_information(*in.map, post, cand, response);
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
  shuffle(q.candidates.begin(), q.candidates.end(), rng_);
  return q;
}

double Picker::information(const PickerInput& in, int32_t anchor, int32_t b, int32_t c) {
  check_input(in);
  double local_scale = 0.0;
  candidates(in, anchor, 2, &local_scale);
  const Response response = make_response(in);
  const AnchorPosterior post = anchor_posterior(*in.map, anchor, in.judgments, options_, response, local_scale, rng_);
  return pair_information(*in.map, post, {b, c}, response)[1];
}

}  // namespace kith

namespace kith {
double Picker::calibrated_beta(const PickerInput& in) {
  check_input(in);
  return calibrate_beta(*in.map, in.judgments, rng_);
}
}  // namespace kith
