#include "viewer/panels/ui_style.h"

#include <imgui.h>

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
    ImGui::TextDisabled("colour: %s", view.colour_title().c_str());
    ImDrawList* dl = ImGui::GetWindowDrawList();
    for (const auto& e : view.legend()) {
      const ImVec2 p = ImGui::GetCursorScreenPos();
      const float h = ImGui::GetTextLineHeight();
      dl->AddCircleFilled(ImVec2(p.x + h * 0.5f, p.y + h * 0.55f), h * 0.36f,
                          ImGui::ColorConvertFloat4ToU32(ImVec4(e.colour.r, e.colour.g, e.colour.b, 1.f)), 20);
      ImGui::Dummy(ImVec2(h, h));
      ImGui::SameLine();
      const std::string label = e.count ? e.label + "  (" + std::to_string(e.count) + ")" : e.label;
      if (interactive && e.tag_column >= 0) {
        if (ImGui::Selectable(label.c_str(), false)) {
          click.column = e.tag_column;
          click.value = e.value;
        }
        if (ImGui::IsItemHovered()) ImGui::SetTooltip("select the items tagged '%s'", e.value.c_str());
      } else {
        ImGui::TextUnformatted(label.c_str());
      }
    }
  }
  ImGui::End();
  return click;
}

}  // namespace kith
