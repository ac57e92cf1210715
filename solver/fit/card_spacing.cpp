#include "solver/fit/card_spacing.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <unordered_map>

#include "solver/features/neighbours.h"

namespace kith {
namespace {

// Calls VISIT(i, j) once for every pair of cards whose rectangles, grown by GAP, might overlap:
// cards sit in grid cells the size of the largest grown card, so a pair that overlaps lies in the
// same or neighbouring cells.
template <typename Visit>
void for_near_pairs(const Points& c, const std::vector<double>& w, const std::vector<double>& h, double gap,
                    Visit visit) {
  const size_t n = size_t(c.rows());
  if (n < 2) return;
  const double cw = *std::max_element(w.begin(), w.end()) + gap;
  const double ch = *std::max_element(h.begin(), h.end()) + gap;
  std::unordered_map<int64_t, std::vector<int32_t>> cells;
  cells.reserve(n);
  auto key = [](int64_t x, int64_t y) { return (x << 32) ^ (y & 0xffffffff); };
  std::vector<int64_t> gx(n), gy(n);
  for (size_t i = 0; i < n; ++i) {
    gx[i] = int64_t(std::floor(c(Eigen::Index(i), 0) / cw));
    gy[i] = int64_t(std::floor(c(Eigen::Index(i), 1) / ch));
    cells[key(gx[i], gy[i])].push_back(int32_t(i));
  }
  for (size_t i = 0; i < n; ++i)
    for (int64_t dx = -1; dx <= 1; ++dx)
      for (int64_t dy = -1; dy <= 1; ++dy) {
        const auto it = cells.find(key(gx[i] + dx, gy[i] + dy));
        if (it == cells.end()) continue;
        for (const int32_t j : it->second)
          if (size_t(j) > i) visit(i, size_t(j));
      }
}

// Overlap of cards I and J (grown by GAP) on each axis; both positive when they overlap.
void overlap(const Points& c, const std::vector<double>& w, const std::vector<double>& h, double gap, size_t i,
             size_t j, double* ox, double* oy) {
  const Eigen::Index a = Eigen::Index(i), b = Eigen::Index(j);
  *ox = 0.5 * (w[i] + w[j]) + gap - std::abs(c(b, 0) - c(a, 0));
  *oy = 0.5 * (h[i] + h[j]) + gap - std::abs(c(b, 1) - c(a, 1));
}

// One round of pushing: every overlapping pair moves apart along its smaller overlap, half each
// (the moves of a round are summed, then applied). Returns the pairs that overlapped.
size_t push(Points* c, const std::vector<double>& w, const std::vector<double>& h, double gap) {
  Points move = Points::Zero(c->rows(), 2);
  size_t pairs = 0;
  for_near_pairs(*c, w, h, gap, [&](size_t i, size_t j) {
    double ox, oy;
    overlap(*c, w, h, gap, i, j, &ox, &oy);
    if (ox <= 0.0 || oy <= 0.0) return;
    ++pairs;
    const Eigen::Index a = Eigen::Index(i), b = Eigen::Index(j);
    const double dx = (*c)(b, 0) - (*c)(a, 0), dy = (*c)(b, 1) - (*c)(a, 1);
    const double need_x = 0.5 * (w[i] + w[j]) + gap, need_y = 0.5 * (h[i] + h[j]) + gap;
    // Apart along the line between the centres, just far enough that the cards clear on one
    // axis: the pair keeps its direction, so the cards around keep their order. Cards (nearly)
    // on one spot part along the axis of the smaller overlap instead, by index.
    const double t = std::min(std::abs(dx) > 0 ? need_x / std::abs(dx) : HUGE_VAL,
                              std::abs(dy) > 0 ? need_y / std::abs(dy) : HUGE_VAL);
    const double cap = std::max(need_x, need_y);  // a round moves a pair at most a card apart
    Eigen::Vector2d step(dx, dy);
    if (std::isfinite(t) && (t - 1.0) * step.norm() <= cap) {
      step *= 0.5 * (t - 1.0) * 1.0001;  // a hair more than half each, so a pair alone ends clear
    } else {
      const int axis = ox < oy ? 0 : 1;
      const double d = axis == 0 ? dx : dy;
      const double sign = d > 0.0 ? 1.0 : d < 0.0 ? -1.0 : (((i + j) & 1) ? 1.0 : -1.0);
      step = Eigen::Vector2d::Zero();
      step(axis) = sign * 0.5 * (axis == 0 ? ox : oy) * 1.0001;
    }
    move.row(a) -= step.transpose();
    move.row(b) += step.transpose();
  });
  *c += move;
  return pairs;
}

}  // namespace

bool CardSpacingOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (!(spread >= 0.0 && std::isfinite(spread))) return fail("spread must be 0 or more");
  if (!(fill >= 0.0 && fill < 1.0)) return fail("fill must be at least 0 and below 1");
  if (!(gap >= 0.0 && std::isfinite(gap))) return fail("gap must be 0 or more");
  if (!(pull >= 0.0 && pull <= 1.0)) return fail("pull must be between 0 and 1");
  if (rounds < 0 || settle_rounds < 1) return fail("rounds must be 0 or more and settle_rounds at least 1");
  return true;
}

size_t count_overlaps(const Points& c, const std::vector<double>& w, const std::vector<double>& h, double gap) {
  size_t pairs = 0;
  for_near_pairs(c, w, h, gap, [&](size_t i, size_t j) {
    double ox, oy;
    overlap(c, w, h, gap, i, j, &ox, &oy);
    pairs += ox > 0.0 && oy > 0.0;
  });
  return pairs;
}

CardSpacing space_cards(const Points& places, const std::vector<double>& w, const std::vector<double>& h,
                        const CardSpacingOptions& o) {
  const size_t n = size_t(places.rows());
  if (places.cols() != 2) throw std::invalid_argument("card spacing: the places must be 2-D");
  if (w.size() != n || h.size() != n) throw std::invalid_argument("card spacing: one width and height per place");
  for (size_t i = 0; i < n; ++i)
    if (!(w[i] > 0.0 && h[i] > 0.0 && std::isfinite(w[i]) && std::isfinite(h[i])))
      throw std::invalid_argument("card spacing: card sizes must be positive");
  if (!places.allFinite()) throw std::invalid_argument("card spacing: the places must be finite");
  if (std::string e; !o.IsValid(&e)) throw std::invalid_argument("card spacing: " + e);

  CardSpacing out;
  out.places = places;
  if (n == 0) return out;
  const Eigen::RowVector2d lo = places.colwise().minCoeff(), hi = places.colwise().maxCoeff();
  const Eigen::RowVector2d mid = 0.5 * (lo + hi);
  if (o.spread > 0.0 && n >= 2) {
    // The median distance from a place to its nearest other place becomes `spread` card sides.
    const NeighbourGraph g = find_neighbours(places, 1);
    std::vector<double> nearest(g.distance2.begin(), g.distance2.end());
    std::vector<double> side(n);
    for (size_t i = 0; i < n; ++i) side[i] = std::max(w[i], h[i]) + o.gap;
    std::nth_element(nearest.begin(), nearest.begin() + nearest.size() / 2, nearest.end());
    std::nth_element(side.begin(), side.begin() + n / 2, side.end());
    const double median = std::sqrt(nearest[nearest.size() / 2]);
    out.scale = median > 0 ? o.spread * side[n / 2] / median : 1.0;
  }
  if (o.fill > 0.0) {
    double cards = 0.0;
    for (size_t i = 0; i < n; ++i) cards += (w[i] + o.gap) * (h[i] + o.gap);
    // Bounding box of the places, not less than one card on a side (all places on one line or spot).
    const double bw = std::max(hi(0) - lo(0), 1e-12), bh = std::max(hi(1) - lo(1), 1e-12);
    double fill_scale = std::sqrt(cards / o.fill / (bw * bh));
    const double side = std::sqrt(cards / o.fill);
    if (bw * fill_scale < side && bh * fill_scale < side) fill_scale = side / std::max(bw, bh);
    out.scale = o.spread > 0.0 ? std::min(out.scale, fill_scale) : fill_scale;
  }
  out.places = (places.rowwise() - mid) * out.scale;
  Points c = out.places;
  out.overlaps_at_start = count_overlaps(c, w, h, o.gap);
  for (int r = 0; r < o.rounds; ++r, ++out.rounds) {
    push(&c, w, h, o.gap);
    c += o.pull * (out.places - c);
  }
  const Eigen::RowVector2d centre = c.colwise().mean();
  // Pushes until clear (a push that finds no overlapping pair moves nothing); false when LIMIT
  // rounds do not do it.
  auto settle = [&](Points* cards, int limit) {
    for (int r = 0; r <= limit; ++r, ++out.rounds)
      if (push(cards, w, h, o.gap) == 0) return true;
    return false;
  };
  while (!settle(&c, o.settle_rounds)) {
    c = ((c.rowwise() - centre) * 1.05).rowwise() + centre;
    ++out.spreads;
  }
  out.centres = c;
  return out;
}

}  // namespace kith
