// kith's look for Dear ImGui panels: the paper (or night) palette, soft corners, DejaVu Sans when
// the system has it (Debian's fonts-dejavu-core), else ImGui's built-in font; kith's own panel
// chrome (a docked panel: no title bar, grip or collapse triangle, a heading of kith's with a
// "hide" control), sliders with their value printed beside them, on/off chips, the balance
// between features and people, and small timelines. Also the legend, drawn in the Colours panel
// or as a box over the map (the windowless PNG path).
// Call with the ImGui context current, from the thread that owns it.
#pragma once
#include <initializer_list>
#include <string>
#include <vector>

#include "viewer/scene/dock_layout.h"
#include "viewer/scene/map_view.h"

namespace kith {

void apply_ui_style(bool dark);

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
// The legend's body (the colouring's name when `with_heading`, the ramp or the values, at most
// `most` rows, and the notes) inside the current window.
LegendClick legend_body(const MapView& view, bool interactive, bool with_heading, size_t most);
LegendClick draw_legend(const MapView& view, const std::string& title, const std::string& subtitle, bool interactive,
                        float x = 12.f, float y = 12.f);

// ---- kith's chrome ----------------------------------------------------------------------------
// A docked panel at `rect` (window pixels): a fixed window with kith's heading, `name` and a
// "hide" control that sets *open false. Always pair with end_docked(), which returns the height
// the content asked for (heading included), for the next frame's layout.
void begin_docked(const char* name, const DockRect& rect, bool* open);
float end_docked();
// kith's heading alone, at the top of any window of kith's (a "hide" control when open is given).
void panel_heading(const char* name, bool* open);
// What a slider did this frame (the item queries of the slider itself, not of the text beside it).
struct SliderState {
  bool changed = false, active = false, let_go = false, hovered = false;
  DockRect rect;  // the slider's own place in window pixels
};
// A slider whose value is printed beside it (never under the grab): label on the left, value on
// the right, printed with `format`. `flags` are ImGuiSliderFlags.
SliderState value_slider(const char* label, float* value, float lo, float hi, const char* format, int flags = 0);
// The blend as a balance: "features" at the left end, "people" at the right, the value beside.
SliderState balance_slider(const char* id, float* value, float lo, float hi, bool logarithmic, const char* format);
// An on/off chip: a rounded label filled with the accent when on. Returns true when clicked (and flips *on).
bool chip(const char* label, bool* on);
// A choice of a few words as chips side by side ("ground: paper | night"); returns true when changed.
bool chip_choice(const char* label, int* chosen, std::initializer_list<const char*> words);
// A small timeline of `values` (negative values are gaps), `width` x `height`, with the newest
// value printed after `name`.
void sparkline(const char* name, const std::vector<float>& values, float width, float height, const char* format,
               const char* hint);
// A fold of kith's: "+ label" when closed, "- label" when open, in the accent; a click flips
// *open. Returns *open (draw the folded part when true).
bool fold(const char* label, bool* open);
// A quiet heading inside a panel.
void section_label(const char* text);

}  // namespace kith
