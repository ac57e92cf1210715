#include "viewer/scene/label_placement.h"

#include <algorithm>
#include <limits>

namespace kith {

float ScreenRect::overlap(const ScreenRect& o) const {
  const float w = std::min(x1, o.x1) - std::max(x0, o.x0), h = std::min(y1, o.y1) - std::max(y0, o.y0);
  return w > 0.f && h > 0.f ? w * h : 0.f;
}

namespace {
ScreenRect ring_rect(const LabelRequest& r) { return {r.x - r.ring, r.y - r.ring, r.x + r.ring, r.y + r.ring}; }

// The eight spots of one ring, nearest first, as top-left corners.
void spots(const LabelRequest& r, float d, std::vector<ScreenRect>* out) {
  const float w = r.width, h = r.height, c = d * 0.72f;
  const float at[8][2] = {{r.x + d, r.y - h * 0.5f}, {r.x - d - w, r.y - h * 0.5f}, {r.x - w * 0.5f, r.y - d - h},
                          {r.x - w * 0.5f, r.y + d}, {r.x + c, r.y - c - h},        {r.x - c - w, r.y - c - h},
                          {r.x + c, r.y + c},        {r.x - c - w, r.y + c}};
  for (const auto& p : at) out->push_back({p[0], p[1], p[0] + w, p[1] + h});
}
}  // namespace

std::vector<PlacedLabel> place_labels(const std::vector<LabelRequest>& labels, const ScreenRect& area,
                                      const std::vector<ScreenRect>& obstacles, LabelPlacementOptions o) {
  std::vector<ScreenRect> taken = obstacles;
  for (const LabelRequest& r : labels) taken.push_back(ring_rect(r));
  std::vector<PlacedLabel> out;
  std::vector<ScreenRect> candidates;
  for (const LabelRequest& r : labels) {
    candidates.clear();
    for (int k = 0; k < LabelPlacementOptions::kRings; ++k)
      spots(r, r.ring + o.gap + k * (r.height + o.gap), &candidates);
    float best_cost = std::numeric_limits<float>::max();
    size_t best = 0;
    for (size_t s = 0; s < candidates.size(); ++s) {
      // Labels keep a gap between them: test a rectangle grown by half of it on each side.
      const ScreenRect& c = candidates[s];
      const ScreenRect grown{c.x0 - o.gap * 0.5f, c.y0 - o.gap * 0.5f, c.x1 + o.gap * 0.5f, c.y1 + o.gap * 0.5f};
      float cost = 0.f;
      for (const ScreenRect& t : taken) cost += grown.overlap(t);
      const ScreenRect clipped{std::max(c.x0, area.x0), std::max(c.y0, area.y0), std::min(c.x1, area.x1),
                               std::min(c.y1, area.y1)};
      const float inside = clipped.width() > 0 && clipped.height() > 0 ? clipped.width() * clipped.height() : 0.f;
      cost += (c.width() * c.height() - inside) * 4.f;  // outside the area counts more than an overlap
      if (cost < best_cost) best_cost = cost, best = s;
      if (cost <= 0.f) break;
    }
    PlacedLabel p;
    p.rect = candidates[best];
    p.clear = best_cost <= 0.f;
    p.moved = best >= 8;
    out.push_back(p);
    taken.push_back(p.rect);
  }
  return out;
}

}  // namespace kith
