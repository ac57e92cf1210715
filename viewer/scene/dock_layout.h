// DockLayout: where the window's panels sit. Panels are docked in two columns along the window's
// left and right edges, between the menu bar and the engine strip along the bottom; they never
// float over the map or over each other. What the columns leave is the free map area, which the
// camera frames (Camera::set_free_area), so "frame the whole map" and flying to an item centre it
// there and not under a panel.
//
// Sizes, in window pixels (top-left origin):
//   - a column is as wide as asked while the map keeps at least min_map_width; on a narrower
//     window both columns shrink in proportion, down to min_column_width each (narrower only when
//     the window cannot hold them at all, and then the map gets no width), and a column with
//     no shown panel takes no width at all;
//   - a column's height is shared out by "water filling": each panel asks for a height (what its
//     content took last frame, or "as much as there is" for a stretching panel, a list); panels
//     that ask less than an even share get what they ask, the rest split what is left evenly.
//     Panels that know their height are served first, while min_stretch_height is kept for each
//     stretching one, which then share what is left. Each panel gets at least min_panel_height (its
//     heading and a line; the content scrolls inside), and a panel that no longer fits even at
//     that height is left out (squeezed) rather than drawn over another.
// Pure logic: no ImGui, no GL. Any thread; value types.
#pragma once
#include <string>
#include <vector>

#include "viewer/scene/label_placement.h"

namespace kith {

// A place in window pixels (ScreenRect: overlaps() is true only when the interiors meet).
using DockRect = ScreenRect;

enum class DockSide { kLeft, kRight };

struct DockPanel {
  std::string name;                 // e.g. "Colours" (also its heading)
  DockSide side = DockSide::kLeft;  // (default: left)
  bool shown = true;                // hidden panels take no room (default: shown)
  float wanted_height = 0.f;        // what its content asks for, heading included; <= 0: stretch (default: stretch)
};

struct DockOptions {
  float top = 0.f;                   // under the menu bar (default: 0)
  float bottom_strip = 0.f;          // the engine strip's height along the bottom (default: 0)
  float left_width = 300.f;          // the left column's width when there is room (default: 300)
  float right_width = 300.f;         // (default: 300)
  float min_column_width = 210.f;    // a column never narrower than this (default: 210)
  float min_map_width = 380.f;       // columns shrink before the map gets narrower (default: 380)
  float min_panel_height = 64.f;     // heading plus a line or two (default: 64)
  float min_stretch_height = 180.f;  // room kept for a stretching panel (a list) when there is any (default: 180)
  float gap = 6.f;                   // between panels, and between a column and the window's edge (default: 6)
  std::string IsValid() const;       // "" when usable, else why not
};

struct DockLayout {
  DockRect window;               // the whole window
  DockRect left, right;          // the columns (empty when they hold no shown panel)
  DockRect strip;                // the engine strip (empty when bottom_strip is 0)
  DockRect map_area;             // what is left for the map
  std::vector<DockRect> panels;  // one per DockPanel, in order; empty when hidden or squeezed
  std::vector<bool> squeezed;    // shown but left out for want of room
};

// The layout of `panels` in a window of width x height. Throws std::invalid_argument when the
// options are not usable (see DockOptions::IsValid).
DockLayout layout_docks(float width, float height, const std::vector<DockPanel>& panels, const DockOptions& options);

// The heights a column of `available` pixels gives panels asking `wanted` (<= 0: stretch), each
// at least `least`, keeping `stretch_least` for each stretching panel where there is room; a
// panel that does not fit even at `least` gets 0. Sums to at most `available` minus the gaps
// between the panels that got room.
std::vector<float> share_column(float available, const std::vector<float>& wanted, float least, float gap,
                                float stretch_least);

}  // namespace kith
