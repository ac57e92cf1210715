#include "viewer/panels/ui_style.h"

#include <imgui.h>

#include <algorithm>
#include <filesystem>
#include <utility>

namespace kith {

namespace {
ImVec4 c(const Rgb& x, float a = 1.f) { return ImVec4(x.r, x.g, x.b, a); }
}  // namespace

void apply_ui_style(bool dark) {
  const Palette p = dark ? Palette::night() : Palette::paper();
  ImGuiStyle& s = ImGui::GetStyle();
  s = ImGuiStyle();
  s.WindowRounding = 6.f;
  s.FrameRounding = s.GrabRounding = s.PopupRounding = 4.f;
  s.WindowBorderSize = 1.f;
  s.FrameBorderSize = 0.f;
  s.WindowPadding = ImVec2(10, 8);
  s.ItemSpacing = ImVec2(8, 5);
  s.ScrollbarSize = 11.f;
  s.WindowTitleAlign = ImVec2(0.02f, 0.5f);
  const Rgb panel = dark ? rgb_hex(0x272B30) : rgb_hex(0xFBF9F4);
  const Rgb frame = dark ? rgb_hex(0x343A41) : rgb_hex(0xE9E4D8);
  const Rgb frame_hover = dark ? rgb_hex(0x3F464E) : rgb_hex(0xDED7C7);
  const Rgb accent = rgb_hex(0x0072B2);
  const Rgb accent_soft = dark ? rgb_hex(0x1F4D6B) : rgb_hex(0xC9DDEB);
  // Which colour each part of the interface takes.
  const std::pair<ImGuiCol, ImVec4> colours[] = {
      {ImGuiCol_Text, c(p.ink)},
      {ImGuiCol_TextDisabled, c(p.muted)},
      {ImGuiCol_WindowBg, c(panel, 0.96f)},
      {ImGuiCol_ChildBg, c(panel, 0.f)},
      {ImGuiCol_PopupBg, c(panel, 0.98f)},
      {ImGuiCol_Border, c(p.faint)},
      {ImGuiCol_FrameBg, c(frame)},
      {ImGuiCol_FrameBgHovered, c(frame_hover)},
      {ImGuiCol_FrameBgActive, c(accent_soft)},
      {ImGuiCol_TitleBg, c(frame)},
      {ImGuiCol_TitleBgActive, c(frame_hover)},
      {ImGuiCol_TitleBgCollapsed, c(frame, 0.8f)},
      {ImGuiCol_MenuBarBg, c(frame)},
      {ImGuiCol_ScrollbarBg, c(panel, 0.f)},
      {ImGuiCol_ScrollbarGrab, c(frame_hover)},
      {ImGuiCol_CheckMark, c(accent)},
      {ImGuiCol_SliderGrab, c(accent)},
      {ImGuiCol_SliderGrabActive, c(rgb_hex(0xD55E00))},
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
    const ColourCode& code = view.colour_code();
    const std::string heading = code.ramp && !code.unit.empty() && code.title.find(code.unit) == std::string::npos
                                    ? code.title + " (" + code.unit + ")"
                                    : code.title;
    ImGui::TextDisabled("colour: %s", heading.c_str());
    ImDrawList* dl = ImGui::GetWindowDrawList();
    const float h = ImGui::GetTextLineHeight();
    if (code.ramp) {
      // A bar from the smallest to the largest value, the range printed under its ends.
      const ImVec2 p = ImGui::GetCursorScreenPos();
      const float width = 14.f * h;
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
    // A long list is cut short so that the legend stays inside the window.
    const size_t most = size_t(std::max(6.f, (ImGui::GetIO().DisplaySize.y - y) / (h + 4.f) - 8.f));
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
      ImGui::PushTextWrapPos(ImGui::GetCursorPosX() + 18.f * h);
      ImGui::TextDisabled("%s", note.c_str());
      ImGui::PopTextWrapPos();
    }
  }
  ImGui::End();
  return click;
}

}  // namespace kith
