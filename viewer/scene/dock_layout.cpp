#include "viewer/scene/dock_layout.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace kith {

std::string DockOptions::IsValid() const {
  const float all[] = {top,           bottom_strip,     left_width, right_width, min_column_width,
                       min_map_width, min_panel_height, gap};
  for (float v : all)
    if (!std::isfinite(v) || v < 0.f) return "dock sizes must be finite and not negative";
  if (min_column_width > left_width || min_column_width > right_width)
    return "a column's least width must not exceed its width";
  return "";
}

namespace {
// Water filling: a panel asking less than an even share of what is left gets what it asks; the
// others split the rest evenly. `ask` holds each panel's request (infinity: all there is).
void water_fill(float room, const std::vector<size_t>& who, const std::vector<float>& ask, std::vector<float>* out) {
  std::vector<bool> done(who.size(), false);
  for (size_t open = who.size(); open > 0;) {
    const float share = room / float(open);
    bool any = false;
    for (size_t m = 0; m < who.size(); ++m)
      if (!done[m] && ask[who[m]] <= share) {
        (*out)[who[m]] = ask[who[m]];
        room -= ask[who[m]];
        done[m] = true;
        --open;
        any = true;
      }
    if (!any) {
      for (size_t m = 0; m < who.size(); ++m)
        if (!done[m]) (*out)[who[m]] = std::floor(share);
      break;
    }
  }
}
}  // namespace

std::vector<float> share_column(float available, const std::vector<float>& wanted, float least, float gap,
                                float stretch_least) {
  const size_t n = wanted.size();
  std::vector<float> out(n, 0.f);
  // How many panels fit at their least height (the first ones keep their place).
  size_t fit = 0;
  for (float used = 0.f; fit < n; ++fit) {
    const float next = used + (fit ? gap : 0.f) + least;
    if (next > available + 1e-3f) break;
    used = next;
  }
  if (fit == 0) return out;
  const float room = available - gap * float(fit - 1);
  std::vector<float> ask(fit);
  std::vector<size_t> sized, stretching;
  for (size_t k = 0; k < fit; ++k) {
    ask[k] = wanted[k] > 0.f ? std::max(wanted[k], least) : std::numeric_limits<float>::infinity();
    (wanted[k] > 0.f ? sized : stretching).push_back(k);
  }
  // Panels that know their height are served first, keeping room for each stretching panel to
  // show stretch_least (or less when that would leave the others under their least).
  const float keep = std::min(float(stretching.size()) * std::max(stretch_least, least),
                              std::max(room - float(sized.size()) * least, float(stretching.size()) * least));
  water_fill(room - keep, sized, ask, &out);
  float used = 0.f;
  for (size_t k : sized) used += out[k];
  water_fill(room - used, stretching, ask, &out);
  for (size_t k = 0; k < fit; ++k) out[k] = std::max(out[k], least);
  return out;
}

DockLayout layout_docks(float width, float height, const std::vector<DockPanel>& panels, const DockOptions& o) {
  if (const std::string e = o.IsValid(); !e.empty()) throw std::invalid_argument("dock layout: " + e);
  DockLayout d;
  width = std::max(width, 0.f);
  height = std::max(height, 0.f);
  d.window = {0.f, 0.f, width, height};
  d.panels.assign(panels.size(), DockRect{});
  d.squeezed.assign(panels.size(), false);
  const float top = std::min(o.top, height);
  const float bottom = std::max(top, height - o.bottom_strip);
  if (o.bottom_strip > 0.f) d.strip = {0.f, bottom, width, height};

  bool has_left = false, has_right = false;
  for (const DockPanel& p : panels)
    if (p.shown) (p.side == DockSide::kLeft ? has_left : has_right) = true;
  // Column widths: as asked while the map keeps its least width, else both shrink in proportion.
  float lw = has_left ? o.left_width : 0.f, rw = has_right ? o.right_width : 0.f;
  // A shown column costs a gap at the window's edge and one beside the map.
  const float gaps = 2.f * o.gap * float(int(has_left) + int(has_right));
  const float room = width - gaps - o.min_map_width;
  if (lw + rw > room && lw + rw > 0.f) {
    const float scale = std::max(room, 0.f) / (lw + rw);
    lw = has_left ? std::max(o.min_column_width, std::floor(lw * scale)) : 0.f;
    rw = has_right ? std::max(o.min_column_width, std::floor(rw * scale)) : 0.f;
  }
  // A window too narrow even for the least widths: the columns share it and the map gets none.
  if (lw + rw > width - gaps && lw + rw > 0.f) {
    const float scale = std::max(width - gaps, 0.f) / (lw + rw);
    lw = std::floor(lw * scale), rw = std::floor(rw * scale);
  }
  const float col_top = top + o.gap, col_bottom = bottom - o.gap;
  if (has_left) d.left = {o.gap, col_top, o.gap + lw, col_bottom};
  if (has_right) d.right = {width - o.gap - rw, col_top, width - o.gap, col_bottom};
  // The map: between the columns (a gap beside each), under the menu, over the strip.
  d.map_area = {has_left ? d.left.x1 + o.gap : 0.f, top, has_right ? d.right.x0 - o.gap : width, bottom};
  if (d.map_area.x1 < d.map_area.x0) d.map_area.x1 = d.map_area.x0;

  for (const DockSide side : {DockSide::kLeft, DockSide::kRight}) {
    const DockRect& col = side == DockSide::kLeft ? d.left : d.right;
    std::vector<size_t> members;
    std::vector<float> wanted;
    for (size_t k = 0; k < panels.size(); ++k)
      if (panels[k].shown && panels[k].side == side) members.push_back(k), wanted.push_back(panels[k].wanted_height);
    if (members.empty() || col.empty()) {
      for (size_t k : members) d.squeezed[k] = true;
      continue;
    }
    const std::vector<float> h = share_column(col.height(), wanted, o.min_panel_height, o.gap, o.min_stretch_height);
    float y = col.y0;
    for (size_t m = 0; m < members.size(); ++m) {
      if (h[m] <= 0.f) {
        d.squeezed[members[m]] = true;
        continue;
      }
      d.panels[members[m]] = {col.x0, y, col.x1, std::min(y + h[m], col.y1)};
      y += h[m] + o.gap;
    }
  }
  return d;
}

}  // namespace kith
