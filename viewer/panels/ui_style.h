// kith's look for Dear ImGui panels: the paper (or night) palette, soft corners, DejaVu Sans when
// the system has it (Debian's fonts-dejavu-core), else ImGui's built-in font. Also the legend
// box drawn over the map, shared by the window and the windowless PNG path.
// Call with the ImGui context current, from the thread that owns it.
#pragma once
#include <initializer_list>
#include <string>

#include "viewer/scene/map_view.h"

namespace kith {

void apply_ui_style(bool dark);

// The window's Selection panel: in the bottom-left corner, this far in and this wide (the own
// judgment window keeps clear of it).
constexpr float kSelectionPanelInset = 10.f, kSelectionPanelWidth = 420.f;
void load_ui_font(float pixels);

// A table column: its heading, and a fixed width in pixels or a share of what is left (stretch).
struct TableColumn {
  const char* name;
  float fixed_width = 0.f;  // 0: ImGui's default sizing
  bool stretch = false;
};
// Inside BeginTable: sets the columns up and draws the heading row, which stays in view while the
// rows scroll.
void table_heading(std::initializer_list<TableColumn> columns);

// The title and colour legend in the top-left corner. Returns the tag value clicked, if any
// (column, value) so the caller can select those items; column -1 when nothing was clicked.
struct LegendClick {
  int column = -1;
  std::string value;
};
LegendClick draw_legend(const MapView& view, const std::string& title, const std::string& subtitle, bool interactive,
                        float x = 12.f, float y = 12.f);

}  // namespace kith
