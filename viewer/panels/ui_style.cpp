#include "viewer/panels/ui_style.h"

#include <imgui.h>

#include <filesystem>

namespace kith {

namespace {
ImVec4 c(const Rgb& x, float a = 1.f) { return ImVec4(x.r, x.g, x.b, a); }
}  // namespace

void apply_ui_style(bool dark) {
  const Palette p = dark ? Palette::night() : Palette::paper();
  ImGuiStyle& s = ImGui::GetStyle();
  s = ImGuiStyle();
  s.WindowRounding = 6.f;
  s.FrameRounding = 4.f;
  s.GrabRounding = 4.f;
  s.PopupRounding = 4.f;
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
  ImVec4* col = s.Colors;
  col[ImGuiCol_Text] = c(p.ink);
  col[ImGuiCol_TextDisabled] = c(p.muted);
  col[ImGuiCol_WindowBg] = c(panel, 0.96f);
  col[ImGuiCol_ChildBg] = c(panel, 0.f);
  col[ImGuiCol_PopupBg] = c(panel, 0.98f);
  col[ImGuiCol_Border] = c(p.faint);
  col[ImGuiCol_FrameBg] = c(frame);
  col[ImGuiCol_FrameBgHovered] = c(frame_hover);
  col[ImGuiCol_FrameBgActive] = c(accent_soft);
  col[ImGuiCol_TitleBg] = c(frame);
  col[ImGuiCol_TitleBgActive] = c(frame_hover);
  col[ImGuiCol_TitleBgCollapsed] = c(frame, 0.8f);
  col[ImGuiCol_MenuBarBg] = c(frame);
  col[ImGuiCol_ScrollbarBg] = c(panel, 0.f);
  col[ImGuiCol_ScrollbarGrab] = c(frame_hover);
  col[ImGuiCol_CheckMark] = c(accent);
  col[ImGuiCol_SliderGrab] = c(accent);
  col[ImGuiCol_SliderGrabActive] = c(rgb_hex(0xD55E00));
  col[ImGuiCol_Button] = c(frame);
  col[ImGuiCol_ButtonHovered] = c(accent_soft);
  col[ImGuiCol_ButtonActive] = c(accent, 0.7f);
  col[ImGuiCol_Header] = c(accent_soft, 0.7f);
  col[ImGuiCol_HeaderHovered] = c(accent_soft);
  col[ImGuiCol_HeaderActive] = c(accent, 0.6f);
  col[ImGuiCol_Separator] = c(p.faint);
  col[ImGuiCol_Tab] = c(frame);
  col[ImGuiCol_TabHovered] = c(accent_soft);
  col[ImGuiCol_TabActive] = c(accent_soft);
  col[ImGuiCol_PlotLines] = c(accent);
  col[ImGuiCol_PlotHistogram] = c(accent);
  col[ImGuiCol_TableHeaderBg] = c(frame);
  col[ImGuiCol_TableRowBgAlt] = c(frame, 0.35f);
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
