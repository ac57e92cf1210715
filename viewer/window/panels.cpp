// The map window's panels and overlays (see app_state.h). Index:
//   [SECTION] the menu bar and the panels' places
//   [SECTION] Map: run controls, the setting sliders, view options
//   [SECTION] Health and Selection
//   [SECTION] overlays: question screens, box, labels, tooltip, release choice, help, notice, toast
//   [SECTION] the title bar
#include <epoxy/gl.h>
// epoxy first: GLFW must not pull in the system GL header.
#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>
#include <imgui.h>

#include <algorithm>
#include <cfloat>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "viewer/scene/keys.h"
#include "viewer/scene/picking.h"
#include "viewer/panels/ui_style.h"
#include "viewer/window/app_state.h"
#include "viewer/window/key_table.h"

namespace kith {

// ============================================================================ [SECTION] the menu bar and the panels' places

void App::panels() {
  if (ImGui::BeginMainMenuBar()) {
    if (ImGui::BeginMenu("Collection")) {
      if (ImGui::MenuItem("Save picture of the view", "F12")) save_picture_now();
      if (ImGui::MenuItem("Import or export judgments...")) {
        show_judgments = true;
        judgments_panel->show_tab(JudgmentsPanel::Tab::kFiles);
      }
      ImGui::Separator();
      if (ImGui::MenuItem("Quit", "ctrl+Q")) quit = true;
      ImGui::EndMenu();
    }
    if (hooks.menus) hooks.menus();
    if (ImGui::BeginMenu("Map")) {
      if (ImGui::MenuItem(paused() ? "Resume" : "Pause", "Space")) toggle_pause();
      if (ImGui::MenuItem("Restart", "shift+R")) handle_key(keys::letter('r'), keys::kShift);
      ImGui::Separator();
      if (ImGui::MenuItem("Undo", "ctrl+Z", false, undo_feed && undo_feed->can_undo())) undo(false);
      if (ImGui::MenuItem("Redo", "ctrl+shift+Z", false, undo_feed && undo_feed->can_redo())) undo(true);
      ImGui::Separator();
      if (ImGui::MenuItem("Fit the whole map", "F")) view->fit_all(true);
      if (ImGui::MenuItem("Zoom to the selection", "Z")) view->focus_selection();
      if (ImGui::MenuItem("Slow turn", "R", view->auto_rotate)) view->auto_rotate = !view->auto_rotate;
      ImGui::EndMenu();
    }
    if (ImGui::BeginMenu("View")) {
      ViewOptions o = view->options();
      bool changed = false;
      changed |= ImGui::MenuItem("Floor grid", "G", &o.grid);
      changed |= ImGui::MenuItem("Judgment lines", "J", &o.lines);
      changed |= ImGui::MenuItem("Pictures (else discs)", "I", &o.pictures);
      changed |= ImGui::MenuItem("Night ground", "N", &o.dark);
      if (changed) {
        view->set_options(o);
        apply_ui_style(o.dark);
      }
      if (ImGui::MenuItem("Next colouring", "C")) cycle_colour();
      ImGui::MenuItem("Structure", "S", &show_structure);
      ImGui::MenuItem("Judgments", "L", &show_judgments);
      if (ImGui::MenuItem("Panels", "Tab", &show_panels)) {
      }
      ImGui::EndMenu();
    }
    if (ImGui::BeginMenu("Ask")) {
      const AskingMode m = asking->desk().mode();
      if (ImGui::MenuItem("Pair questions", "A", m == AskingMode::kPair)) ask({AskingAction::kStartPair});
      if (ImGui::MenuItem("Grid questions", "A twice", m == AskingMode::kGrid)) ask({AskingAction::kStartGrid});
      if (ImGui::MenuItem("Your own judgment", "O", m == AskingMode::kOwn)) ask({AskingAction::kStartOwn});
      ImGui::Separator();
      if (ImGui::MenuItem("Big type", "B", asking->desk().large_type())) ask({AskingAction::kLargeType});
      if (ImGui::MenuItem("Stop asking", "Esc", false, m != AskingMode::kOff)) ask({AskingAction::kLeave});
      ImGui::EndMenu();
    }
    if (ImGui::BeginMenu("Help")) {
      if (ImGui::MenuItem("Keys and mouse", "H")) show_help = true;
      ImGui::EndMenu();
    }
    const auto s = view->snapshot();
    const std::string state = !feed.live() ? "still map" : paused() ? "paused" : (s && s->settled) ? "settled" : "running";
    ImGui::SameLine(ImGui::GetWindowWidth() - 230.f);
    ImGui::TextDisabled("%s  %.0f fps", state.c_str(), double(fps));
    ImGui::EndMainMenuBar();
  }
  if (hooks.windows) hooks.windows();
  const float top = ImGui::GetFrameHeight();
  const ImGuiIO& io = ImGui::GetIO();
  // The legend, top-left under the menu.
  {
    const std::string title = options.title.empty() ? std::filesystem::path(collection.source).filename().string()
                                                    : options.title;
    LegendClick click = draw_legend(*view, title, std::to_string(collection.size()) + " items", true, 10, top + 8);
    if (click.column >= 0) {
      view->selection().set(items_with_tag(collection, size_t(click.column), click.value));
      view->selection_changed();
      say("selected " + std::to_string(view->selection().size()) + " tagged " + click.value);
    }
  }
  const float right_w = 300.f;
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x - right_w - 10, top + 8), ImGuiCond_FirstUseEver);
  ImGui::SetNextWindowSize(ImVec2(right_w, 0), ImGuiCond_FirstUseEver);
  panel_map();
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x - right_w - 10, top + 330), ImGuiCond_FirstUseEver);
  ImGui::SetNextWindowSize(ImVec2(right_w, 0), ImGuiCond_FirstUseEver);
  panel_health();
  ImGui::SetNextWindowPos(ImVec2(kSelectionPanelInset, io.DisplaySize.y - kSelectionPanelInset), ImGuiCond_Always,
                          ImVec2(0.f, 1.f));
  ImGui::SetNextWindowSizeConstraints(ImVec2(kSelectionPanelWidth, 0),
                                      ImVec2(kSelectionPanelWidth, io.DisplaySize.y * 0.5f));
  panel_selection();
  if (hooks.take_selection) {
    std::vector<int> items;
    if (hooks.take_selection(&items)) {
      view->selection().set(items);
      view->selection_changed();
    }
  }
  if (hooks.panel_lines) {
    ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x - right_w - 10, top + 520), ImGuiCond_FirstUseEver);
    ImGui::SetNextWindowSize(ImVec2(right_w, 0), ImGuiCond_FirstUseEver);
    if (ImGui::Begin(hooks.panel_title.empty() ? "More" : hooks.panel_title.c_str()))
      for (const auto& line : hooks.panel_lines()) ImGui::TextWrapped("%s", line.c_str());
    ImGui::End();
  }
  if (show_structure) structure->draw(&show_structure);
  if (show_judgments) judgments_panel->draw(&show_judgments);
}

// ============================================================================ [SECTION] Map: run controls, the setting sliders, view options

void App::panel_map() {
  if (!ImGui::Begin("Map")) return ImGui::End();
  const auto s = view->snapshot();
  if (feed.live()) {
    if (ImGui::Button(paused() ? "Resume  [Space]" : "Pause  [Space]")) toggle_pause();
    ImGui::SameLine();
    if (ImGui::Button("Restart")) handle_key(keys::letter('r'), keys::kShift);
    ImGui::SameLine();
    if (ImGui::Button("Ask  [A]")) ask({AskingAction::kStartPair});
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("ask the people in the room which items are more alike");
    setting_sliders();
    if (s)
      ImGui::Text("step %llu   %.0f steps a second%s", (unsigned long long)s->iteration, s->iterations_per_second,
                  s->rebuilding ? "   rebuilding..." : "");
  } else {
    ImGui::TextDisabled("still map: no optimizer in this build");
  }
  ImGui::Text("%zu items   %.0f fps", collection.size(), double(fps));
  ImGui::Separator();
  ViewOptions o = view->options();
  bool changed = false;
  const std::string current = view->colour_title();
  ImGui::SetNextItemWidth(150);
  if (ImGui::BeginCombo("colour", current.c_str())) {
    for (size_t t = 0; t < collection.tags.size(); ++t)
      if (ImGui::Selectable(collection.tags[t].name.c_str())) o.colour_by = {ColourKind::kTag, int(t), -1}, changed = true;
    if (!collection.feature_names.empty()) ImGui::TextDisabled("numbers, on a ramp");
    for (size_t f = 0; f < collection.feature_names.size(); ++f) {
      ImGui::PushID(int(f));
      if (ImGui::Selectable(collection.feature_names[f].c_str())) o.colour_by = {ColourKind::kColumn, -1, int(f)}, changed = true;
      ImGui::PopID();
    }
    if (ImGui::Selectable("judgments per item")) o.colour_by.kind = ColourKind::kJudgments, changed = true;
    if (ImGui::Selectable("moved since opening")) o.colour_by.kind = ColourKind::kDisplacement, changed = true;
    if (ImGui::Selectable("plain")) o.colour_by.kind = ColourKind::kPlain, changed = true;
    ImGui::EndCombo();
  }
  float size = o.point_size > 0 ? o.point_size : 0.f;
  ImGui::SetNextItemWidth(150);
  if (ImGui::SliderFloat("disc size", &size, 0.f, 24.f, size == 0.f ? "auto" : "%.1f px")) o.point_size = size, changed = true;
  ImGui::SetNextItemWidth(150);
  changed |= ImGui::SliderFloat("depth fade", &o.fade, 0.f, 1.f, "%.2f");
  changed |= ImGui::Checkbox("grid", &o.grid);
  ImGui::SameLine();
  changed |= ImGui::Checkbox("lines", &o.lines);
  ImGui::SameLine();
  changed |= ImGui::Checkbox("pictures", &o.pictures);
  changed |= ImGui::Checkbox("night", &o.dark);
  ImGui::SameLine();
  ImGui::Checkbox("slow turn", &view->auto_rotate);
  if (changed) {
    view->set_options(o);
    apply_ui_style(o.dark);
  }
  ImGui::End();
}

// Each slider shows the setting in force (the snapshot's parameters, or the value asked for while
// its command is on its way), is bounded by what MapParameters accepts, and posts only when let go.
void App::setting_sliders() {
  const auto s = view->snapshot();
  for (const SettingControl& c : settings.controls(s ? s->ids.size() : collection.size())) {
    const int k = int(c.setting);
    float value = editing == k ? editing_value : float(settings.shown(c.setting, s.get()));
    ImGui::SetNextItemWidth(150);
    if (!c.enabled) ImGui::BeginDisabled();
    ImGuiSliderFlags flags = ImGuiSliderFlags_AlwaysClamp | (c.logarithmic ? ImGuiSliderFlags_Logarithmic : 0);
    ImGui::SliderFloat(c.name, &value, float(c.lo), float(c.hi), c.format, flags);
    const ImVec2 lo = ImGui::GetItemRectMin(), hi = ImGui::GetItemRectMax();
    const float rect[4] = {lo.x, lo.y, hi.x, hi.y};
    std::copy(rect, rect + 4, control_rects[k]);
    if (ImGui::IsItemActive()) editing = k, editing_value = value;
    if (ImGui::IsItemDeactivatedAfterEdit()) settings.release(c.setting, double(value), seconds());
    if (!ImGui::IsItemActive() && editing == k) editing = -1;
    if (!c.enabled) ImGui::EndDisabled();
    if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled))
      ImGui::SetTooltip("%s", c.enabled ? c.hint : c.why_disabled.c_str());
    if (settings.pending(c.setting)) {
      ImGui::SameLine();
      ImGui::TextDisabled("...");
    }
  }
}

// ============================================================================ [SECTION] Health and Selection

void App::panel_health() {
  if (!ImGui::Begin("Health")) return ImGui::End();
  const auto s = view->snapshot();
  auto row = [&](const char* name, const History& h, float now, const char* hint) {
    char label[64];
    if (now < 0)
      std::snprintf(label, sizeof label, "%s  -", name);
    else
      std::snprintf(label, sizeof label, "%s  %.3f", name, double(now));
    ImGui::TextUnformatted(label);
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", hint);
    if (!h.values.empty())
      ImGui::PlotLines((std::string("##") + name).c_str(), h.values.data(), int(h.values.size()), 0, nullptr, FLT_MAX,
                       FLT_MAX, ImVec2(ImGui::GetContentRegionAvail().x, 34));
  };
  const HealthFigures f = s ? s->health : HealthFigures{};
  row("KL", kl, s ? float(f.kl) : -1.f, "how far the map's neighbours are from the features' (lower is better)");
  row("judgment agreement", agreement, float(f.judgment_agreement), "share of judgments the map honours");
  row("trustworthiness", trust, float(f.trustworthiness), "are map neighbours true feature neighbours? (1 is best)");
  row("neighbour recall", recall, float(f.neighbour_recall), "share of feature neighbours kept near in the map");
  ImGui::End();
}

void App::panel_selection() {
  if (!ImGui::Begin("Selection", nullptr, ImGuiWindowFlags_AlwaysAutoResize)) return ImGui::End();
  if (focus_search) {
    ImGui::SetKeyboardFocusHere();
    focus_search = false;
  }
  ImGui::SetNextItemWidth(200);
  if (ImGui::InputTextWithHint("##search", "search id or tag  [/]", search_text, sizeof search_text,
                               ImGuiInputTextFlags_EnterReturnsTrue)) {
    search_hits = search_items(collection, search_text);
    view->selection().set(search_hits);
    view->selection_changed();
    if (!search_hits.empty()) view->focus_selection();
    say(std::to_string(search_hits.size()) + " found");
  }
  ImGui::SameLine();
  if (ImGui::Button("zoom [Z]")) view->focus_selection();
  ImGui::SameLine();
  if (ImGui::Button("pin")) interaction->pin_selection();
  ImGui::SameLine();
  if (ImGui::Button("unpin")) interaction->unpin_selection();
  const auto& sel = view->selection().items();
  ImGui::TextDisabled("%zu selected", sel.size());
  if (!sel.empty()) {
    const int item = sel.back();
    const auto feat = view->nearest_in_features(item, 8);
    const auto map = view->nearest_in_map(item, 8);
    int shared = 0;
    for (int a : feat) shared += std::count(map.begin(), map.end(), a) ? 1 : 0;
    ImGui::Text("nearest to %s: %d of 8 agree", collection.ids[item].c_str(), shared);
    if (ImGui::BeginTable("near", 2, ImGuiTableFlags_BordersInnerV | ImGuiTableFlags_RowBg)) {
      ImGui::TableSetupColumn("in features");
      ImGui::TableSetupColumn("in the map");
      ImGui::TableHeadersRow();
      for (size_t r = 0; r < std::max(feat.size(), map.size()); ++r) {
        for (int c = 0; c < 2; ++c) {
          ImGui::TableNextColumn();
          const auto& list = c == 0 ? feat : map;
          if (r >= list.size()) continue;
          const int other = list[r];
          const bool both = std::count((c == 0 ? map : feat).begin(), (c == 0 ? map : feat).end(), other) > 0;
          const Rgb col = view->colour_of(other);
          {
            const ImVec2 at = ImGui::GetCursorScreenPos();
            const float h = ImGui::GetTextLineHeight();
            ImGui::GetWindowDrawList()->AddCircleFilled(ImVec2(at.x + h * 0.4f, at.y + h * 0.55f), h * 0.3f,
                                                        ImGui::ColorConvertFloat4ToU32(ImVec4(col.r, col.g, col.b, 1.f)));
            ImGui::Dummy(ImVec2(h * 0.8f, h));
            ImGui::SameLine();
          }
          ImGui::PushID(int(r * 2 + c));
          if (ImGui::Selectable(collection.ids[other].c_str(), both)) {
            view->selection().set({other});
            view->selection_changed();
          }
          ImGui::PopID();
        }
      }
      ImGui::EndTable();
    }
    if (sel.size() > 1 && ImGui::TreeNode("all selected")) {
      for (size_t k = 0; k < sel.size() && k < 300; ++k) {
        ImGui::Text("%s%s", collection.ids[sel[k]].c_str(), view->pinned(sel[k]) ? "  (pinned)" : "");
      }
      ImGui::TreePop();
    }
  }
  if (!collection.tags.empty()) {
    ImGui::Separator();
    ImGui::SetNextItemWidth(120);
    tag_column_choice = std::clamp(tag_column_choice, 0, int(collection.tags.size()) - 1);
    if (ImGui::BeginCombo("##tagcol", collection.tags[tag_column_choice].name.c_str())) {
      for (size_t t = 0; t < collection.tags.size(); ++t)
        if (ImGui::Selectable(collection.tags[t].name.c_str())) tag_column_choice = int(t);
      ImGui::EndCombo();
    }
    ImGui::SameLine();
    ImGui::TextDisabled("select by tag: click a legend entry");
  }
  ImGui::End();
}

// ============================================================================ [SECTION] overlays: question screens, box, labels, tooltip, release choice, help, notice, toast

void App::overlays() {
  ImDrawList* fg = ImGui::GetForegroundDrawList();
  const ImGuiIO& io = ImGui::GetIO();
  const float inv = 1.f / fb_scale;
  // While a question screen is up it shows the window's messages in its own status line.
  const bool question_screen = asking && asking->desk().mode() != AskingMode::kOff;
  if (asking) {
    const bool live = !toast.empty() && Clock::now() < toast_until;
    asking->set_status(live ? toast : "", settings.notice_showing(seconds()) ? settings.notice() : "",
                       [this] { settings.dismiss(); });
    asking->draw(show_panels ? ImGui::GetFrameHeight() : 0.f, inv);
  }
  // Box selection.
  if (interaction->state() == MapInteraction::State::kBoxing) {
    const glm::vec2 a = interaction->box_start() * inv, b = interaction->pointer() * inv;
    fg->AddRectFilled(ImVec2(std::min(a.x, b.x), std::min(a.y, b.y)), ImVec2(std::max(a.x, b.x), std::max(a.y, b.y)),
                      IM_COL32(0, 114, 178, 40));
    fg->AddRect(ImVec2(std::min(a.x, b.x), std::min(a.y, b.y)), ImVec2(std::max(a.x, b.x), std::max(a.y, b.y)),
                IM_COL32(0, 114, 178, 200));
  }
  // Lasso selection: the path drawn so far, closed back to where it started.
  if (interaction->state() == MapInteraction::State::kLasso && interaction->lasso_path().size() > 1) {
    std::vector<ImVec2> path;
    for (const glm::vec2& p : interaction->lasso_path()) path.push_back(ImVec2(p.x * inv, p.y * inv));
    fg->AddPolyline(path.data(), int(path.size()), IM_COL32(0, 114, 178, 220), ImDrawFlags_Closed, 1.5f);
  }
  // Labels for the selection (first few) and the hovered item.
  const Rgb ink = view->palette().ink;
  const ImU32 ink32 = ImGui::ColorConvertFloat4ToU32(ImVec4(ink.r, ink.g, ink.b, 0.9f));
  auto label = [&](int item) {
    if (item < 0 || size_t(item) >= view->positions().size()) return;
    const Projected p = view->camera().project(view->positions()[item]);
    if (!p.visible) return;
    // Behind the panels (the background list is drawn over the map, under every window).
    ImGui::GetBackgroundDrawList()->AddText(ImVec2(p.screen.x * inv + 9, p.screen.y * inv - 8), ink32,
                                            collection.ids[item].c_str());
  };
  const auto& sel = view->selection().items();
  for (size_t k = 0; k < sel.size() && k < 24 && !question_screen; ++k) label(sel[k]);
  // Hover tooltip: id, tags, pinned.
  const int h = view->hovered();
  if (h >= 0 && !io.WantCaptureMouse && interaction->state() != MapInteraction::State::kDragging) {
    const int pushed = question_screen ? asking->push_colours() : 0;  // in the question screens' colours
    ImGui::BeginTooltip();
    ImGui::TextUnformatted(collection.ids[h].c_str());
    for (const auto& t : collection.tags)
      if (size_t(h) < t.values.size()) ImGui::TextDisabled("%s: %s", t.name.c_str(), t.values[h].c_str());
    if (view->pinned(h)) ImGui::TextDisabled("pinned (U unpins the selection)");
    if (!collection.pictures.empty()) ImGui::TextDisabled("picture: %s", std::filesystem::path(collection.pictures[h]).filename().c_str());
    ImGui::EndTooltip();
    ImGui::PopStyleColor(pushed);
  }
  // The release choice after a drag.
  if (interaction->choosing()) {
    const Projected p = view->camera().project(interaction->choice_position());
    ImGui::SetNextWindowPos(ImVec2(p.screen.x * inv + 14, p.screen.y * inv + 14), ImGuiCond_Always);
    ImGui::Begin("##release", nullptr,
                 ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings);
    ImGui::Text("%s here:", collection.ids[interaction->choice_item()].c_str());
    if (ImGui::Button("Pin  [P]")) interaction->choose_pin();
    ImGui::SameLine();
    if (ImGui::Button("Let go  [Esc]")) interaction->choose_release();
    if (interaction->can_teach()) {
      ImGui::SameLine();
      if (ImGui::Button("Teach  [T]")) interaction->choose_teach();
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("turn this move into judgments, then let go");
    }
    ImGui::End();
  }
  if (show_help) help_overlay();
  if (question_screen) return;
  notice_line();
  // A short message at the bottom centre.
  if (!toast.empty() && Clock::now() < toast_until) {
    const ImVec2 size = ImGui::CalcTextSize(toast.c_str());
    const ImVec2 at(io.DisplaySize.x * 0.5f - size.x * 0.5f, io.DisplaySize.y - size.y - 24);
    fg->AddRectFilled(ImVec2(at.x - 10, at.y - 6), ImVec2(at.x + size.x + 10, at.y + size.y + 6),
                      ImGui::GetColorU32(ImGuiCol_PopupBg), 6.f);
    fg->AddText(at, ImGui::GetColorU32(ImGuiCol_Text), toast.c_str());
  }
}

// The keys and the mouse, from the one key table that also runs them (key_table.h).
void App::help_overlay() {
  const ImGuiIO& io = ImGui::GetIO();
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x * 0.5f, io.DisplaySize.y * 0.5f), ImGuiCond_Always, ImVec2(0.5f, 0.5f));
  ImGui::Begin("Keys and mouse", &show_help, ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings);
  if (ImGui::BeginTable("keys", 2, ImGuiTableFlags_RowBg)) {
    for (const KeyRow& row : key_table()) {
      if (!row.keys) continue;
      ImGui::TableNextColumn();
      ImGui::TextUnformatted(row.keys);
      ImGui::TableNextColumn();
      ImGui::TextDisabled("%s", row.what);
    }
    ImGui::EndTable();
  }
  ImGui::End();
}

// The newest refusal (a setting the window's check refused, or any command the engine refused,
// read from the snapshot), as one line under the menu bar until it is dismissed or times out.
void App::notice_line() {
  if (!settings.notice_showing(seconds())) return;
  const ImGuiIO& io = ImGui::GetIO();
  const float top = (show_panels ? ImGui::GetFrameHeight() : 0.f) + 8.f;
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x * 0.5f, top), ImGuiCond_Always, ImVec2(0.5f, 0.f));
  ImGui::SetNextWindowSizeConstraints(ImVec2(0, 0), ImVec2(io.DisplaySize.x * 0.7f, FLT_MAX));
  const Rgb warn = view->palette().farther;
  ImGui::PushStyleColor(ImGuiCol_Border, ImVec4(warn.r, warn.g, warn.b, 1.f));
  ImGui::PushStyleVar(ImGuiStyleVar_WindowBorderSize, 2.f);
  ImGui::Begin("##notice", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings |
                   ImGuiWindowFlags_NoFocusOnAppearing);
  ImGui::PushTextWrapPos(io.DisplaySize.x * 0.65f);
  ImGui::TextUnformatted(settings.notice().c_str());
  ImGui::PopTextWrapPos();
  ImGui::SameLine();
  if (ImGui::SmallButton("OK")) settings.dismiss();
  ImGui::End();
  ImGui::PopStyleVar();
  ImGui::PopStyleColor();
}

// ============================================================================ [SECTION] the title bar

void App::update_title() { glfwSetWindowTitle(window, title_text().c_str()); }

std::string App::title_text() const {
  const auto s = view->snapshot();
  std::string name = options.title.empty() ? std::filesystem::path(collection.source).filename().string() : options.title;
  std::string state = !feed.live() ? "still map" : paused() ? "paused" : (s && s->settled) ? "settled" : "running";
  std::string title = "kith \xe2\x80\x94 " + name + " \xe2\x80\x94 " + std::to_string(collection.size()) + " items, " + state;
  if (s && feed.live()) title += ", iteration " + std::to_string(s->iteration);
  const std::string saving = hooks.title_state ? hooks.title_state() : options.session_state;
  if (!saving.empty()) title += " \xe2\x80\x94 " + saving;
  return title;
}

}  // namespace kith
