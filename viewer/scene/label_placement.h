// Label placement for the marks a question screen draws in the map (the anchor, left, right,
// grid places): each label goes, in order, to the first spot around the point it names whose
// rectangle stays inside the free area and overlaps nothing already there (labels placed before
// it, the screen's panels, the band, the rings of the other points). The spots are tried
// nearest first: right, left, above, below, then the four corners, each at the ring's radius plus
// a gap, then the same eight again one label height farther out, up to kRings times. A label with
// no free spot takes the spot with the least overlapping area and is marked not clear.
// Pure geometry in screen pixels (y down); any thread.
#pragma once
#include <vector>

namespace kith {

struct ScreenRect {
  float x0 = 0, y0 = 0, x1 = 0, y1 = 0;
  float width() const { return x1 - x0; }
  float height() const { return y1 - y0; }
  // Area shared with `o` (0 when they only touch).
  float overlap(const ScreenRect& o) const;
  bool overlaps(const ScreenRect& o) const { return overlap(o) > 0.f; }
  bool inside(const ScreenRect& o) const { return x0 >= o.x0 && y0 >= o.y0 && x1 <= o.x1 && y1 <= o.y1; }
  bool empty() const { return x1 <= x0 || y1 <= y0; }
  bool contains(float x, float y) const { return x >= x0 && x <= x1 && y >= y0 && y <= y1; }
};

struct LabelRequest {
  float x = 0, y = 0;           // the point the label names
  float ring = 0;               // radius of the ring drawn around it (kept clear)
  float width = 0, height = 0;  // the label's size, plate included
};

struct PlacedLabel {
  ScreenRect rect;
  bool clear = true;   // overlaps nothing and lies inside the area
  bool moved = false;  // not in the first ring of spots: the caller draws a line to the point
};

struct LabelPlacementOptions {
  float gap = 4.f;  // between a ring and its label, and between labels (default: 4 px)
  static constexpr int kRings = 8;
};

std::vector<PlacedLabel> place_labels(const std::vector<LabelRequest>& labels, const ScreenRect& area,
                                      const std::vector<ScreenRect>& obstacles, LabelPlacementOptions options = {});

}  // namespace kith
