// Suspect scores from neighbour graphs (see suspects.h for the formula).
#include "solver/measures/suspects.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <sstream>
#include <stdexcept>

#include "solver/base/portable_math.h"

namespace kith {

const char* to_string(SuspectSpace space) {
  switch (space) {
    case SuspectSpace::kFeatures: return "features";
    case SuspectSpace::kMap: return "map";
    case SuspectSpace::kBoth: return "both";
  }
  return "?";
}

bool suspect_space_from_string(const std::string& text, SuspectSpace* space) {
  for (SuspectSpace s : {SuspectSpace::kFeatures, SuspectSpace::kMap, SuspectSpace::kBoth}) {
    if (text == to_string(s)) {
      *space = s;
      return true;
    }
  }
  return false;
}

bool SuspectOptions::IsValid(std::string* error) const {
  if (k < 1) {
    if (error) *error = "suspects: k must be at least 1";
    return false;
  }
  return true;
}

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct SpaceScore {
  double score = kNaN;
  std::string likely_tag;
  double likely_share = 0.0;
};

// One item's score in one space.
SpaceScore score_one(const std::vector<std::string>& tags, const NeighbourGraph& g, size_t i, size_t k) {
  SpaceScore out;
  const std::string& own = tags[i];
  const size_t kk = std::min(k, g.k);
  if (kk == 0) return out;
  const int32_t* nb = g.index.data() + i * g.k;
  const double* d2 = g.distance2.data() + i * g.k;
  // The bandwidth is the distance to the last neighbour looked at; zero (duplicates) means equal weights.
  double h2 = 0.0;
  for (size_t r = 0; r < kk; ++r)
    if (nb[r] >= 0 && std::isfinite(d2[r])) h2 = std::max(h2, d2[r]);
  double total = 0.0, differ = 0.0;
  std::map<std::string, double> other;  // ordered: ties between other tags resolve the same way every time
  for (size_t r = 0; r < kk; ++r) {
    const int32_t j = nb[r];
    if (j < 0 || size_t(j) == i) continue;
    const std::string& t = tags[size_t(j)];
    if (t.empty()) continue;
    const double w = h2 > 0.0 ? pm::exp(-std::max(0.0, d2[r]) / h2) : 1.0;
    total += w;
    if (t != own) {
      differ += w;
      other[t] += w;
    }
  }
  if (total <= 0.0) return out;
  out.score = differ / total;
  for (const auto& [tag, w] : other)
    if (w / total > out.likely_share) {
      out.likely_share = w / total;
      out.likely_tag = tag;
    }
  return out;
}

void check_graph(const NeighbourGraph* g, size_t n, const char* what) {
  if (!g) throw std::invalid_argument(std::string("suspects: the ") + what + " neighbour graph is needed");
  if (g->n != n || g->index.size() != g->n * g->k || g->distance2.size() != g->n * g->k)
    throw std::invalid_argument(std::string("suspects: the ") + what + " neighbour graph has " + std::to_string(g->n) +
                                " items, the tags " + std::to_string(n));
}

}  // namespace

SuspectScores score_suspects(const std::vector<std::string>& tags, const NeighbourGraph* features,
                             const NeighbourGraph* map, const SuspectOptions& options) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  const size_t n = tags.size();
  const bool use_f = options.space != SuspectSpace::kMap;
  const bool use_m = options.space != SuspectSpace::kFeatures;
  if (use_f) check_graph(features, n, "feature");
  if (use_m) check_graph(map, n, "map");

  SuspectScores out;
  out.score.assign(n, kNaN);
  out.feature_score.assign(n, kNaN);
  out.map_score.assign(n, kNaN);
  out.likely_tag.assign(n, "");
  out.likely_share.assign(n, 0.0);
  for (size_t i = 0; i < n; ++i) {
    if (tags[i].empty()) continue;
    SpaceScore f, m;
    if (use_f) f = score_one(tags, *features, i, options.k);
    if (use_m) m = score_one(tags, *map, i, options.k);
    out.feature_score[i] = f.score;
    out.map_score[i] = m.score;
    if (use_f && use_m) {
      // Mean of the spaces that have a score.
      if (std::isnan(f.score)) out.score[i] = m.score;
      else if (std::isnan(m.score)) out.score[i] = f.score;
      else out.score[i] = 0.5 * (f.score + m.score);
      const SpaceScore& best = (m.likely_share > f.likely_share) ? m : f;
      out.likely_tag[i] = best.likely_tag;
      out.likely_share[i] = use_f && use_m && !std::isnan(f.score) && !std::isnan(m.score)
                                ? 0.5 * (f.likely_share + m.likely_share)
                                : best.likely_share;
    } else {
      const SpaceScore& s = use_f ? f : m;
      out.score[i] = s.score;
      out.likely_tag[i] = s.likely_tag;
      out.likely_share[i] = s.likely_share;
    }
    if (!std::isnan(out.score[i])) out.ranking.push_back(int32_t(i));
  }
  std::stable_sort(out.ranking.begin(), out.ranking.end(), [&](int32_t a, int32_t b) {
    if (out.score[a] != out.score[b]) return out.score[a] > out.score[b];
    if (out.likely_share[a] != out.likely_share[b]) return out.likely_share[a] > out.likely_share[b];
    return a < b;
  });
  return out;
}

std::string SuspectScores::summary() const {
  size_t high = 0;
  for (int32_t i : ranking)
    if (score[size_t(i)] >= 0.5) ++high;
  std::ostringstream s;
  s << ranking.size() << " tagged items scored; " << high << " with most of their neighbours tagged otherwise";
  return s.str();
}

}  // namespace kith
