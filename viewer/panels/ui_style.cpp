#include "viewer/panels/ui_style.h"

#include <imgui.h>

#include <algorithm>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <utility>

namespace kith {

namespace {
ImVec4 c(const Rgb& x, float a = 1.f) { return ImVec4(x.r, x.g, x.b, a); }
ImU32 u32(const Rgb& x, float a = 1.f) { return ImGui::ColorConvertFloat4ToU32(c(x, a)); }
}  // namespace

// The accents of the moment (set by apply_ui_style), for chrome drawn by hand.
Rgb g_accent = rgb_hex(Palette::kSeaGreen), g_warm = rgb_hex(Palette::kCopper), g_ink, g_muted, g_faint, g_panel;

void apply_ui_style(bool dark) {
  const Palette p = dark ? Palette::night() : Palette::paper();
  ImGuiStyle& s = ImGui::GetStyle();
  s = ImGuiStyle();
  // Square-ish paper cards: small corners, no window border, hairline rules.
  s.WindowRounding = 3.f;
  s.FrameRounding = s.GrabRounding = s.PopupRounding = 3.f;
  s.ChildRounding = 0.f;
  s.WindowBorderSize = 0.f;
  s.FrameBorderSize = 0.f;
  s.WindowPadding = ImVec2(12, 8);
  s.FramePadding = ImVec2(6, 3);
  s.ItemSpacing = ImVec2(8, 5);
  s.ScrollbarSize = 8.f;
  s.ScrollbarRounding = 2.f;
  s.GrabMinSize = 9.f;
  s.TabRounding = 2.f;
  s.WindowTitleAlign = ImVec2(0.02f, 0.5f);
  const Rgb panel = dark ? rgb_hex(0x272B30) : rgb_hex(0xFBF9F4);
  const Rgb frame = dark ? rgb_hex(0x343A41) : rgb_hex(0xECE7DC);
  const Rgb frame_hover = dark ? rgb_hex(0x3F464E) : rgb_hex(0xE0D9CA);
  const Rgb accent = p.nearer;  // sea green
  const Rgb warm = p.farther;   // copper
  const Rgb accent_soft = dark ? rgb_hex(0x244A42) : rgb_hex(0xCFE3DC);
  g_accent = accent, g_warm = warm, g_ink = p.ink, g_muted = p.muted, g_faint = p.faint, g_panel = panel;
  // Which colour each part of the interface takes.
  const std::pair<ImGuiCol, ImVec4> colours[] = {
      {ImGuiCol_Text, c(p.ink)},
      {ImGuiCol_TextDisabled, c(dark ? rgb_hex(0x9C9FA4) : rgb_hex(0x6E6A62))},
      {ImGuiCol_WindowBg, c(panel, 0.97f)},
      {ImGuiCol_ChildBg, c(panel, 0.f)},
      {ImGuiCol_PopupBg, c(panel, 0.99f)},
      {ImGuiCol_Border, c(p.faint)},
      {ImGuiCol_FrameBg, c(frame)},
      {ImGuiCol_FrameBgHovered, c(frame_hover)},
      {ImGuiCol_FrameBgActive, c(accent_soft)},
      {ImGuiCol_TitleBg, c(frame)},
      {ImGuiCol_TitleBgActive, c(frame_hover)},
      {ImGuiCol_TitleBgCollapsed, c(frame, 0.8f)},
      {ImGuiCol_MenuBarBg, c(panel)},
      {ImGuiCol_ScrollbarBg, c(panel, 0.f)},
      {ImGuiCol_ScrollbarGrab, c(frame_hover)},
      {ImGuiCol_ScrollbarGrabHovered, c(p.muted)},
      {ImGuiCol_CheckMark, c(accent)},
      {ImGuiCol_SliderGrab, c(accent)},
      {ImGuiCol_SliderGrabActive, c(warm)},
      {ImGuiCol_Button, c(frame)},
      {ImGuiCol_ButtonHovered, c(accent_soft)},
      {ImGuiCol_ButtonActive, c(accent, 0.7f)},
      {ImGuiCol_Header, c(accent_soft, 0.7f)},
      {ImGuiCol_HeaderHovered, c(accent_soft)},
      {ImGuiCol_HeaderActive, c(accent, 0.6f)},
      {ImGuiCol_Separator, c(p.faint)},
      {ImGuiCol_Tab, c(frame)},
      {ImGuiCol_TabHovered, c(accent_soft)},
      {ImGuiCol_TabActive, c(accent_soft)},
      {ImGuiCol_PlotLines, c(accent)},
      {ImGuiCol_PlotHistogram, c(accent)},
      {ImGuiCol_TableHeaderBg, c(frame)},
      {ImGuiCol_TableRowBgAlt, c(frame, 0.35f)},
      {ImGuiCol_ResizeGrip, c(panel, 0.f)},
      {ImGuiCol_ResizeGripHovered, c(panel, 0.f)},
      {ImGuiCol_ResizeGripActive, c(panel, 0.f)},
  };
  for (const auto& [part, colour] : colours) s.Colors[part] = colour;
}

void table_heading(std::initializer_list<TableColumn> columns) {
  ImGui::TableSetupScrollFreeze(0, 1);
  for (const TableColumn& c : columns) {
    const ImGuiTableColumnFlags flags = c.stretch           ? ImGuiTableColumnFlags_WidthStretch
                                        : c.fixed_width > 0 ? ImGuiTableColumnFlags_WidthFixed
                                                            : ImGuiTableColumnFlags_None;
    ImGui::TableSetupColumn(c.name, flags, c.fixed_width);
  }
  ImGui::TableHeadersRow();
}

void load_ui_font(float pixels) {
  ImGuiIO& io = ImGui::GetIO();
  const char* candidates[] = {"/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf",
                              "/usr/share/fonts/dejavu/DejaVuSans.ttf"};
  for (const char* path : candidates) {
    std::error_code ec;
    if (std::filesystem::exists(path, ec)) {
      io.Fonts->AddFontFromFileTTF(path, pixels);
      return;
    }
  }
  io.Fonts->AddFontDefault();
}

void draw_mark(ImDrawList* dl, ImVec2 centre, float radius, Mark mark, ImU32 colour) {
  switch (mark) {
    case Mark::kDisc: dl->AddCircleFilled(centre, radius, colour, 20); break;
    case Mark::kRing: dl->AddCircle(centre, radius * 0.78f, colour, 20, radius * 0.45f); break;
    case Mark::kSquare:
      dl->AddRectFilled(ImVec2(centre.x - radius * 0.88f, centre.y - radius * 0.88f),
                        ImVec2(centre.x + radius * 0.88f, centre.y + radius * 0.88f), colour);
      break;
    case Mark::kDiamond:
      dl->AddQuadFilled(ImVec2(centre.x, centre.y - radius * 1.1f), ImVec2(centre.x + radius * 1.1f, centre.y),
                        ImVec2(centre.x, centre.y + radius * 1.1f), ImVec2(centre.x - radius * 1.1f, centre.y), colour);
      break;
  }
}

LegendClick legend_body(const MapView& view, bool interactive, bool with_heading, size_t most) {
  LegendClick click;
  const ColourCode& code = view.colour_code();
  const std::string heading = code.ramp && !code.unit.empty() && code.title.find(code.unit) == std::string::npos
                                  ? code.title + " (" + code.unit + ")"
                                  : code.title;
  if (with_heading) ImGui::TextDisabled("colour: %s", heading.c_str());
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const float h = ImGui::GetTextLineHeight();
  if (code.ramp) {
    // A bar from the smallest to the largest value, the range printed under its ends.
    const ImVec2 p = ImGui::GetCursorScreenPos();
    const float avail = ImGui::GetContentRegionAvail().x;
    const float width = avail > 4.f * h ? std::min(14.f * h, avail) : 14.f * h;
    constexpr int kSegments = 48;
    for (int k = 0; k < kSegments; ++k) {
      const Rgb a = view.palette().ramp(float(k) / kSegments);
      dl->AddRectFilled(ImVec2(p.x + width * k / kSegments, p.y + 2),
                        ImVec2(p.x + width * (k + 1) / kSegments + 0.5f, p.y + h),
                        ImGui::ColorConvertFloat4ToU32(ImVec4(a.r, a.g, a.b, 1.f)));
    }
    ImGui::Dummy(ImVec2(width, h + 2));
    const std::string lo = ramp_label(code.lo, code.unit), hi = ramp_label(code.hi, code.unit);
    const float left = ImGui::GetCursorPosX();
    ImGui::TextUnformatted(lo.c_str());
    // The largest value ends under the bar's right end, never over the smallest.
    ImGui::SameLine(std::max(left + ImGui::CalcTextSize(lo.c_str()).x + h,
                             left + width - ImGui::CalcTextSize(hi.c_str()).x));
    ImGui::TextUnformatted(hi.c_str());
  }
  // A long list is cut short (at `most` rows) so that the legend stays inside its place.
  size_t shown = 0, hidden = 0;
  for (const auto& e : view.legend()) {
    if (code.ramp && e.count == 0) continue;  // the bar shows the stops
    if (shown >= most) {
      ++hidden;
      continue;
    }
    ++shown;
    const ImVec2 p = ImGui::GetCursorScreenPos();
    draw_mark(dl, ImVec2(p.x + h * 0.5f, p.y + h * 0.55f), h * 0.36f, e.mark,
              ImGui::ColorConvertFloat4ToU32(ImVec4(e.colour.r, e.colour.g, e.colour.b, 1.f)));
    ImGui::Dummy(ImVec2(h, h));
    ImGui::SameLine();
    const std::string label = e.count ? e.label + "  (" + std::to_string(e.count) + ")" : e.label;
    if (interactive && e.tag_column >= 0) {
      if (ImGui::Selectable(label.c_str(), false)) {
        click.column = e.tag_column;
        click.value = e.value;
      }
      if (ImGui::IsItemHovered())
        ImGui::SetTooltip("select the items tagged '%s' (drawn as a %s)", e.value.c_str(), mark_name(e.mark));
    } else {
      ImGui::TextUnformatted(label.c_str());
    }
  }
  if (hidden) ImGui::TextDisabled("... and %zu more values", hidden);
  for (const std::string& note : code.notes) {
    const float avail = ImGui::GetContentRegionAvail().x;
    ImGui::PushTextWrapPos(ImGui::GetCursorPosX() + (avail > 4.f * h ? std::min(18.f * h, avail) : 18.f * h));
    ImGui::TextDisabled("%s", note.c_str());
    ImGui::PopTextWrapPos();
  }
  return click;
}

LegendClick draw_legend(const MapView& view, const std::string& title, const std::string& subtitle, bool interactive,
                        float x, float y) {
  LegendClick click;
  ImGui::SetNextWindowPos(ImVec2(x, y), ImGuiCond_Always);
  ImGui::SetNextWindowBgAlpha(0.88f);
  ImGuiWindowFlags flags = ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize |
                           ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoFocusOnAppearing |
                           ImGuiWindowFlags_NoNav | ImGuiWindowFlags_NoMove;
  if (!interactive) flags |= ImGuiWindowFlags_NoInputs;
  if (ImGui::Begin("##legend", nullptr, flags)) {
    ImGui::TextUnformatted(title.c_str());
    if (!subtitle.empty()) ImGui::TextDisabled("%s", subtitle.c_str());
    ImGui::Separator();
    const size_t most = size_t(std::max(6.f, (ImGui::GetIO().DisplaySize.y - y) / (ImGui::GetTextLineHeight() + 4.f) - 8.f));
    click = legend_body(view, interactive, true, most);
  }
  ImGui::End();
  return click;
}

// ============================================================================ kith's chrome

void begin_docked(const char* name, const DockRect& rect, bool* open) {
  ImGui::SetNextWindowPos(ImVec2(rect.x0, rect.y0), ImGuiCond_Always);
  ImGui::SetNextWindowSize(ImVec2(rect.width(), rect.height()), ImGuiCond_Always);
  const ImGuiWindowFlags flags = ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_NoResize | ImGuiWindowFlags_NoMove |
                                 ImGuiWindowFlags_NoCollapse | ImGuiWindowFlags_NoSavedSettings |
                                 ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoBringToFrontOnFocus;
  ImGui::Begin(name, nullptr, flags);
  panel_heading(name, open);
}

void panel_heading(const char* name, bool* open) {
  // The heading: a short sea-green bar, the name, and "hide" at the right; a hairline under it.
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const ImVec2 at = ImGui::GetCursorScreenPos();
  const float h = ImGui::GetTextLineHeight();
  dl->AddRectFilled(ImVec2(at.x, at.y + 2), ImVec2(at.x + 3, at.y + h - 1), u32(g_accent));
  ImGui::SetCursorScreenPos(ImVec2(at.x + 9, at.y));
  const char* shown_name = name;
  if (const char* hashes = std::strstr(name, "##")) {
    static std::string cut;
    cut.assign(name, hashes);
    shown_name = cut.c_str();
  }
  ImGui::TextUnformatted(shown_name);
  if (open) {
    const float w = ImGui::CalcTextSize("hide").x;
    ImGui::SameLine(ImGui::GetWindowContentRegionMax().x - w);
    ImGui::PushStyleColor(ImGuiCol_Text, c(g_muted));
    ImGui::PushID("hide");
    const ImVec2 p = ImGui::GetCursorScreenPos();
    if (ImGui::InvisibleButton("##hide", ImVec2(w, h))) *open = false;
    const bool hovered = ImGui::IsItemHovered();
    if (hovered) ImGui::SetTooltip("hide this panel (the View menu shows it again)");
    dl->AddText(p, hovered ? u32(g_warm) : u32(g_muted), "hide");
    if (hovered) dl->AddLine(ImVec2(p.x, p.y + h), ImVec2(p.x + w, p.y + h), u32(g_warm));
    ImGui::PopID();
    ImGui::PopStyleColor();
  }
  const ImVec2 rule = ImGui::GetCursorScreenPos();
  dl->AddLine(ImVec2(rule.x, rule.y), ImVec2(rule.x + ImGui::GetContentRegionAvail().x, rule.y), u32(g_faint));
  ImGui::Dummy(ImVec2(0, 2));
}

float end_docked() {
  const float wanted = ImGui::GetCursorPosY() + ImGui::GetStyle().WindowPadding.y - ImGui::GetStyle().ItemSpacing.y;
  ImGui::End();
  return wanted;
}

namespace {
// The label column and the value column of a slider row.
struct SliderRow {
  float label_w, value_w, slider_w;
};
SliderRow slider_row(float label_w) {
  const float avail = ImGui::GetContentRegionAvail().x;
  const float value_w = ImGui::CalcTextSize("00000.0").x;
  const float spacing = ImGui::GetStyle().ItemSpacing.x;
  return {label_w, value_w, std::max(40.f, avail - label_w - value_w - 2 * spacing)};
}
void value_beside(const char* format, float value, float width) {
  char text[32];
  std::snprintf(text, sizeof text, format, double(value));
  ImGui::SameLine();
  const float w = ImGui::CalcTextSize(text).x;
  ImGui::SetCursorPosX(ImGui::GetCursorPosX() + std::max(0.f, width - w));  // right-aligned
  ImGui::TextUnformatted(text);
}
}  // namespace

namespace {
SliderState state_of_last(bool changed) {
  const ImVec2 lo = ImGui::GetItemRectMin(), hi = ImGui::GetItemRectMax();
  return {changed, ImGui::IsItemActive(), ImGui::IsItemDeactivatedAfterEdit(),
          ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled), {lo.x, lo.y, hi.x, hi.y}};
}
}  // namespace

SliderState value_slider(const char* label, float* value, float lo, float hi, const char* format, int flags) {
  ImGui::PushID(label);
  const SliderRow row = slider_row(ImGui::CalcTextSize("perplexity").x + 6.f);
  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted(label);
  ImGui::SameLine(row.label_w + ImGui::GetStyle().WindowPadding.x);
  ImGui::SetNextItemWidth(row.slider_w);
  const bool changed = ImGui::SliderFloat("##v", value, lo, hi, "", flags | ImGuiSliderFlags_NoRoundToFormat);
  const SliderState state = state_of_last(changed);
  ImGui::PopID();
  value_beside(format, *value, row.value_w);
  return state;
}

SliderState balance_slider(const char* id, float* value, float lo, float hi, bool logarithmic, const char* format) {
  ImGui::PushID(id);
  ImGui::AlignTextToFramePadding();
  ImGui::TextDisabled("features");
  ImGui::SameLine();
  const float people_w = ImGui::CalcTextSize("people").x, value_w = ImGui::CalcTextSize("000.00").x;
  const float spacing = ImGui::GetStyle().ItemSpacing.x;
  ImGui::SetNextItemWidth(std::max(40.f, ImGui::GetContentRegionAvail().x - people_w - value_w - 2 * spacing));
  const ImGuiSliderFlags flags = ImGuiSliderFlags_AlwaysClamp | ImGuiSliderFlags_NoRoundToFormat |
                                 (logarithmic ? ImGuiSliderFlags_Logarithmic : 0);
  const bool changed = ImGui::SliderFloat("##balance", value, lo, hi, "", flags);
  const SliderState state = state_of_last(changed);
  ImGui::PopID();
  ImGui::SameLine();
  ImGui::TextDisabled("people");
  value_beside(format, *value, value_w);
  return state;
}

bool chip(const char* label, bool* on) {
  const ImVec2 size = ImGui::CalcTextSize(label);
  const ImVec2 pad(8.f, 2.f);
  const ImVec2 at = ImGui::GetCursorScreenPos();
  const ImVec2 box(size.x + 2 * pad.x, size.y + 2 * pad.y);
  const bool clicked = ImGui::InvisibleButton(label, box);
  if (clicked) *on = !*on;
  const bool hovered = ImGui::IsItemHovered();
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const ImVec2 end(at.x + box.x, at.y + box.y);
  if (*on) {
    dl->AddRectFilled(at, end, u32(g_accent), box.y * 0.5f);
  } else {
    dl->AddRect(at, end, u32(hovered ? g_accent : g_muted), box.y * 0.5f, 0, 1.f);
  }
  // Text on the filled chip in the panel's colour (light on sea green), else in ink.
  dl->AddText(ImVec2(at.x + pad.x, at.y + pad.y), *on ? u32(g_panel) : u32(g_ink), label);
  return clicked;
}

bool chip_choice(const char* label, int* chosen, std::initializer_list<const char*> words) {
  ImGui::PushID(label);
  ImGui::AlignTextToFramePadding();
  ImGui::TextDisabled("%s", label);
  bool changed = false;
  int k = 0;
  for (const char* w : words) {
    ImGui::SameLine(0.f, k ? 4.f : ImGui::GetStyle().ItemSpacing.x);
    bool on = *chosen == k;
    if (chip(w, &on) && *chosen != k) *chosen = k, changed = true;
    ++k;
  }
  ImGui::PopID();
  return changed;
}

void sparkline(const char* name, const std::vector<float>& values, float width, float height, const char* format,
               const char* hint) {
  ImGui::BeginGroup();
  float last = -1.f;
  for (auto it = values.rbegin(); it != values.rend(); ++it)
    if (*it >= 0.f) {
      last = *it;
      break;
    }
  char text[48];
  if (last < 0.f)
    std::snprintf(text, sizeof text, "-");
  else
    std::snprintf(text, sizeof text, format, double(last));
  ImGui::TextDisabled("%s", name);
  ImGui::SameLine();
  ImGui::TextUnformatted(text);
  const ImVec2 at = ImGui::GetCursorScreenPos();
  ImGui::Dummy(ImVec2(width, height));
  ImDrawList* dl = ImGui::GetWindowDrawList();
  dl->AddLine(ImVec2(at.x, at.y + height), ImVec2(at.x + width, at.y + height), u32(g_faint));
  float lo = 1e30f, hi = -1e30f;
  for (float v : values)
    if (v >= 0.f) lo = std::min(lo, v), hi = std::max(hi, v);
  if (hi >= lo && values.size() > 1) {
    const float span = hi > lo ? hi - lo : 1.f;
    ImVec2 prev;
    bool have = false;
    for (size_t k = 0; k < values.size(); ++k) {
      if (values[k] < 0.f) {
        have = false;
        continue;
      }
      const ImVec2 p(at.x + width * float(k) / float(values.size() - 1),
                     at.y + height - 1.f - (height - 2.f) * (hi > lo ? (values[k] - lo) / span : 0.5f));
      if (have) dl->AddLine(prev, p, u32(g_accent), 1.5f);
      prev = p, have = true;
    }
    if (have) dl->AddCircleFilled(prev, 2.5f, u32(g_warm));
  }
  ImGui::EndGroup();
  if (hint && ImGui::IsItemHovered()) ImGui::SetTooltip("%s", hint);
}

bool fold(const char* label, bool* open) {
  const std::string text = std::string(*open ? "- " : "+ ") + label;  // the UI font holds Latin-1 only
  const ImVec2 size = ImGui::CalcTextSize(text.c_str());
  const ImVec2 at = ImGui::GetCursorScreenPos();
  ImGui::PushID(label);
  if (ImGui::InvisibleButton("##fold", size)) *open = !*open;
  const bool hovered = ImGui::IsItemHovered();
  ImGui::PopID();
  ImGui::GetWindowDrawList()->AddText(at, hovered ? u32(g_warm) : u32(g_accent), text.c_str());
  return *open;
}

void section_label(const char* text) {
  ImGui::Spacing();
  ImGui::TextDisabled("%s", text);
}

}  // namespace kith
