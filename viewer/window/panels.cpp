// The map window's panels and overlays (see app_state.h). Index:
//   [SECTION] the menu bar and the docks (viewer/scene/dock_layout.h)
//   [SECTION] Colours: the colouring and its legend
//   [SECTION] Map: the balance, the view, the advanced fold
//   [SECTION] the engine strip
//   [SECTION] Selected items
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

// ============================================================================ [SECTION] the menu bar and the docks

namespace {
const char* state_word(const App& a) {
  const auto s = a.view->snapshot();
  return !a.feed.live() ? "still map" : a.paused() ? "held" : (s && s->settled) ? "settled" : "running";
}
}  // namespace

void App::menu_bar() {
  if (!ImGui::BeginMainMenuBar()) return;
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
    if (ImGui::MenuItem(paused() ? "Run" : "Hold", "Space", false, feed.live())) toggle_pause();
    if (ImGui::MenuItem("Start over", "shift+R", false, feed.live())) handle_key(keys::letter('r'), keys::kShift);
    ImGui::Separator();
    if (ImGui::MenuItem("Undo", "ctrl+Z", false, undo_feed && undo_feed->can_undo())) undo(false);
    if (ImGui::MenuItem("Redo", "ctrl+shift+Z", false, undo_feed && undo_feed->can_redo())) undo(true);
    ImGui::Separator();
    if (ImGui::MenuItem("Frame the whole map", "F")) view->fit_all(true);
    if (ImGui::MenuItem("Frame the selection", "Z")) view->focus_selection();
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
    ImGui::Separator();
    ImGui::MenuItem("Colours", nullptr, &show_colours);
    ImGui::MenuItem("Selected items", nullptr, &show_selected);
    ImGui::MenuItem("Structure", "S", &show_structure);
    ImGui::MenuItem("Map settings", nullptr, &show_map);
    if (hooks.panel_lines) ImGui::MenuItem(hooks.panel_title.empty() ? "More" : hooks.panel_title.c_str(), nullptr, &show_more);
    ImGui::MenuItem("Judgments", "L", &show_judgments);
    bool agreement = judgments_panel->agreement_shown();
    if (ImGui::MenuItem("Agreement", nullptr, &agreement, show_judgments)) judgments_panel->show_agreement(agreement);
    ImGui::MenuItem("Engine strip", nullptr, &show_strip);
    ImGui::Separator();
    ImGui::MenuItem("All panels", "Tab", &show_panels);
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
  char right[96];
  std::snprintf(right, sizeof right, "%zu items   %s   %.0f fps", collection.size(), state_word(*this), double(fps));
  ImGui::SameLine(ImGui::GetWindowWidth() - ImGui::CalcTextSize(right).x - 16.f);
  ImGui::TextDisabled("%s", right);
  ImGui::EndMainMenuBar();
}

// The docks' places this frame: the panels in their columns, the strip, the free map area (window
// pixels). Each panel asks for the height its content took last frame (a stretching one for all
// there is).
void App::lay_out_docks() {
  const ImGuiIO& io = ImGui::GetIO();
  const bool question_screen = asking && asking->desk().asking();
  const bool docks = show_panels && !question_screen;  // a question screen has the window to itself
  const bool shown[kDockCount] = {show_colours,   show_selected, show_structure,
                                  show_map,       show_more && bool(hooks.panel_lines),
                                  show_judgments, show_judgments && judgments_panel->agreement_shown()};
  std::vector<DockPanel> panels;
  for (int k = 0; k < kDockCount; ++k) {
    DockPanel p;
    p.name = kDockNames[k];
    p.side = k < kDockRightFirst ? DockSide::kLeft : DockSide::kRight;
    p.shown = docks && shown[k];
    const bool stretch = k == kDockStructure || k == kDockJudgments || k == kDockAgreement;
    p.wanted_height = stretch ? 0.f : std::max(dock_wanted[k], 60.f);
    panels.push_back(p);
  }
  DockOptions o;
  o.top = show_panels ? ImGui::GetFrameHeight() : 0.f;
  o.bottom_strip = docks && show_strip ? kStripHeight : 0.f;
  o.left_width = kLeftColumnWidth;
  o.right_width = show_judgments ? kJudgmentsColumnWidth : kRightColumnWidth;
  dock = layout_docks(io.DisplaySize.x, io.DisplaySize.y, panels, o);
}

void App::panels() {
  menu_bar();
  if (hooks.windows) hooks.windows();
  if (hooks.take_selection) {
    std::vector<int> items;
    if (hooks.take_selection(&items)) {
      view->selection().set(items);
      view->selection_changed();
    }
  }
  auto place = [&](int k) -> const DockRect* { return dock.panels[size_t(k)].empty() ? nullptr : &dock.panels[size_t(k)]; };
  if (const DockRect* r = place(kDockColours)) {
    begin_docked(kDockNames[kDockColours], *r, &show_colours);
    panel_colours();
    dock_wanted[kDockColours] = end_docked();
  }
  if (const DockRect* r = place(kDockSelected)) {
    begin_docked(kDockNames[kDockSelected], *r, &show_selected);
    panel_selection();
    dock_wanted[kDockSelected] = end_docked();
  }
  if (const DockRect* r = place(kDockStructure)) structure->draw(&show_structure, *r);
  if (const DockRect* r = place(kDockMap)) {
    begin_docked(kDockNames[kDockMap], *r, &show_map);
    panel_map();
    dock_wanted[kDockMap] = end_docked();
  }
  if (const DockRect* r = place(kDockMore)) {
    const std::string name = (hooks.panel_title.empty() ? std::string("More") : hooks.panel_title) + "##more";
    begin_docked(name.c_str(), *r, &show_more);
    ImGui::PushTextWrapPos(0.f);
    for (const auto& line : hooks.panel_lines()) ImGui::TextUnformatted(line.c_str());
    ImGui::PopTextWrapPos();
    dock_wanted[kDockMore] = end_docked();
  }
  if (place(kDockJudgments)) {
    const DockRect none;
    const DockRect* agreement = place(kDockAgreement);
    judgments_panel->draw(&show_judgments, *place(kDockJudgments), agreement ? *agreement : none);
  }
  if (!dock.strip.empty()) engine_strip(dock.strip);
}

// ============================================================================ [SECTION] Colours: the colouring and its legend

void App::panel_colours() {
  ViewOptions o = view->options();
  bool changed = false;
  ImGui::AlignTextToFramePadding();
  ImGui::TextDisabled("by");
  ImGui::SameLine();
  ImGui::SetNextItemWidth(-1.f);
  if (ImGui::BeginCombo("##colouring", view->colour_title().c_str())) {
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
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("what the items' colours show (C: the next colouring)");
  if (changed) view->set_options(o);
  const float row = ImGui::GetTextLineHeight() + ImGui::GetStyle().ItemSpacing.y;
  const size_t most = size_t(std::max(4.f, (ImGui::GetIO().DisplaySize.y * 0.45f) / row));
  const LegendClick click = legend_body(*view, true, false, most);
  if (click.column >= 0) {
    view->selection().set(items_with_tag(collection, size_t(click.column), click.value));
    view->selection_changed();
    say("selected " + std::to_string(view->selection().size()) + " tagged " + click.value);
  }
  if (!collection.tags.empty() && view->options().colour_by.kind == ColourKind::kTag)
    ImGui::TextDisabled("click a value to select its items");
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("shift + drag draws a box, ctrl + drag a lasso");
}

// ============================================================================ [SECTION] Map: the balance, the view, the advanced fold

void App::panel_map() {
  ViewOptions o = view->options();
  bool changed = false;
  if (feed.live()) {
    section_label("the map listens to");
    setting_sliders(true);
    if (fold("advanced: perplexity, theta", &show_advanced)) setting_sliders(false);
  } else {
    ImGui::TextDisabled("still map: no engine in this build");
  }
  section_label("view");
  int ground = o.dark ? 1 : 0;
  if (chip_choice("ground", &ground, {"paper", "night"})) o.dark = ground == 1, changed = true;
  changed |= chip("grid", &o.grid);
  ImGui::SameLine(0, 4);
  changed |= chip("lines", &o.lines);
  ImGui::SameLine(0, 4);
  changed |= chip("pictures", &o.pictures);
  ImGui::SameLine(0, 4);
  chip("slow turn", &view->auto_rotate);
  float size = o.point_size > 0 ? o.point_size : 0.f;
  if (value_slider("disc size", &size, 0.f, 24.f, size == 0.f ? "auto" : "%.1f px").changed) o.point_size = size, changed = true;
  changed |= value_slider("depth fade", &o.fade, 0.f, 1.f, "%.2f").changed;
  if (changed) {
    view->set_options(o);
    apply_ui_style(o.dark);
  }
  if (feed.live()) {
    if (ImGui::Button("Ask the room  [A]")) ask({AskingAction::kStartPair});
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("ask the people in the room which items are more alike");
  }
}

// Each slider shows the setting in force (the snapshot's parameters, or the value asked for while
// its command is on its way), is bounded by what MapParameters accepts, and posts only when let go.
// The blend is drawn as a balance between the features and the people; perplexity and theta are
// the advanced ones.
void App::setting_sliders(bool blend) {
  const auto s = view->snapshot();
  for (const SettingControl& c : settings.controls(s ? s->ids.size() : collection.size())) {
    if ((c.setting == Setting::kBlend) != blend) continue;
    const int k = int(c.setting);
    float value = editing == k ? editing_value : float(settings.shown(c.setting, s.get()));
    if (!c.enabled) ImGui::BeginDisabled();
    const ImGuiSliderFlags flags = ImGuiSliderFlags_AlwaysClamp | (c.logarithmic ? ImGuiSliderFlags_Logarithmic : 0);
    const SliderState st = blend ? balance_slider(c.name, &value, float(c.lo), float(c.hi), c.logarithmic, c.format)
                                 : value_slider(c.name, &value, float(c.lo), float(c.hi), c.format, flags);
    const float rect[4] = {st.rect.x0, st.rect.y0, st.rect.x1, st.rect.y1};
    std::copy(rect, rect + 4, control_rects[k]);
    if (st.active) editing = k, editing_value = value;
    if (st.let_go) settings.release(c.setting, double(value), seconds());
    if (!st.active && editing == k) editing = -1;
    if (!c.enabled) ImGui::EndDisabled();
    if (st.hovered) ImGui::SetTooltip("%s", c.enabled ? c.hint : c.why_disabled.c_str());
    if (settings.pending(c.setting)) {
      ImGui::SameLine();
      ImGui::TextDisabled("...");
    }
  }
}

// ============================================================================ [SECTION] the engine strip

// Along the bottom: hold or run, start over, the pace and the time to go in kith's words, and
// timelines of the health figures, all read from the snapshot (its health history).
void App::engine_strip(const DockRect& r) {
  ImGui::SetNextWindowPos(ImVec2(r.x0, r.y0), ImGuiCond_Always);
  ImGui::SetNextWindowSize(ImVec2(r.width(), r.height()), ImGuiCond_Always);
  ImGui::Begin("##engine", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoMove |
                   ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoBringToFrontOnFocus |
                   ImGuiWindowFlags_NoScrollWithMouse);
  const auto s = view->snapshot();
  const float line = ImGui::GetFrameHeight();
  const float y0 = ImGui::GetCursorPosY() + (r.height() - 2 * ImGui::GetStyle().WindowPadding.y - line) * 0.5f;
  ImGui::SetCursorPosY(std::max(ImGui::GetCursorPosY(), y0));
  if (feed.live()) {
    const bool held = paused();
    if (ImGui::Button(held ? "Run" : "Hold", ImVec2(ImGui::CalcTextSize("Hold").x + 24.f, 0))) toggle_pause();
    if (ImGui::IsItemHovered()) ImGui::SetTooltip(held ? "let the engine run again (Space)" : "hold the map still (Space)");
    ImGui::SameLine();
    if (ImGui::Button("start over")) handle_key(keys::letter('r'), keys::kShift);
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("begin again from the start map (shift+R)");
    ImGui::SameLine(0, 18);
    ImGui::AlignTextToFramePadding();
    ImGui::TextUnformatted(engine_progress(s.get()).c_str());
  } else {
    ImGui::AlignTextToFramePadding();
    ImGui::TextDisabled("still map: no engine in this build");
  }
  // The timelines, right-aligned.
  std::vector<float> kl, agreement, trust, recall;
  if (s)
    for (const HealthSample& h : s->history->samples) {
      kl.push_back(float(h.figures.kl));
      agreement.push_back(float(h.figures.judgment_agreement));
      trust.push_back(float(h.figures.trustworthiness));
      recall.push_back(float(h.figures.neighbour_recall));
    }
  const float w = std::min(120.f, std::max(60.f, (r.width() - 620.f) / 4.f - 12.f));
  const float h = std::max(8.f, r.height() - 2 * ImGui::GetStyle().WindowPadding.y - ImGui::GetTextLineHeight() -
                                     ImGui::GetStyle().ItemSpacing.y - 3.f);
  const float start = r.width() - 4 * (w + 14.f) - ImGui::GetStyle().WindowPadding.x;
  ImGui::SetCursorPosY(ImGui::GetStyle().WindowPadding.y);
  float x = std::max(start, ImGui::GetCursorPosX());
  ImGui::SameLine(x);
  ImGui::SetCursorPosY(ImGui::GetStyle().WindowPadding.y);
  sparkline("KL", kl, w, h, "%.3f", "how far the map's neighbours are from the features' (lower is better), over time");
  ImGui::SameLine(0, 14);
  sparkline("agreement", agreement, w, h, "%.2f", "share of judgments the map honours, over time");
  ImGui::SameLine(0, 14);
  sparkline("trust", trust, w, h, "%.3f", "trustworthiness: are map neighbours true feature neighbours? (1 is best)");
  ImGui::SameLine(0, 14);
  sparkline("recall", recall, w, h, "%.2f", "share of feature neighbours kept near in the map");
  ImGui::End();
}

// "running, 140 steps per second, about 3 s to go" in kith's own words.
std::string App::engine_progress(const Snapshot* s) const {
  if (!s) return "starting";
  char text[160];
  if (s->paused) return "held at step " + std::to_string(s->iteration);
  if (s->settled) return "settled at step " + std::to_string(s->iteration);
  const double pace = s->iterations_per_second;
  std::string left;
  if (pace > 0 && s->steps_to_settle > 0) {
    const double secs = double(s->steps_to_settle) / pace;
    std::snprintf(text, sizeof text, secs < 1.5 ? "about a second to go" : secs < 90 ? "about %.0f s to go" : "about %.0f min to go",
                  secs < 90 ? secs : secs / 60.0);
    left = text;
  }
  std::snprintf(text, sizeof text, "%s%.0f steps per second%s%s", s->rebuilding ? "rebuilding the neighbours, " : "", pace,
                left.empty() ? "" : ", ", left.c_str());
  return text;
}

// ============================================================================ [SECTION] Selected items

void App::panel_selection() {
  if (focus_search) {
    ImGui::SetKeyboardFocusHere();
    focus_search = false;
  }
  ImGui::SetNextItemWidth(-1.f);
  if (ImGui::InputTextWithHint("##search", "find an id or tag  [/]", search_text, sizeof search_text,
                               ImGuiInputTextFlags_EnterReturnsTrue)) {
    search_hits = search_items(collection, search_text);
    view->selection().set(search_hits);
    view->selection_changed();
    if (!search_hits.empty()) view->focus_selection();
    say(std::to_string(search_hits.size()) + " found");
  }
  if (ImGui::Button("frame  [Z]")) view->focus_selection();
  ImGui::SameLine();
  if (ImGui::Button("pin")) interaction->pin_selection();
  ImGui::SameLine();
  if (ImGui::Button("unpin")) interaction->unpin_selection();
  const auto& sel = view->selection().items();
  ImGui::SameLine();
  ImGui::TextDisabled("%zu selected", sel.size());
  if (!sel.empty()) {
    const int item = sel.back();
    const auto feat = view->nearest_in_features(item, 8);
    const auto map = view->nearest_in_map(item, 8);
    int shared = 0;
    for (int a : feat) shared += std::count(map.begin(), map.end(), a) ? 1 : 0;
    ImGui::TextWrapped("nearest to %s: %d of 8 agree", collection.ids[item].c_str(), shared);
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
    if (sel.size() > 1 && fold("all selected", &show_all_selected))
      for (size_t k = 0; k < sel.size() && k < 300; ++k)
        ImGui::Text("%s%s", collection.ids[sel[k]].c_str(), view->pinned(sel[k]) ? "  (pinned)" : "");
  } else if (!collection.tags.empty()) {
    ImGui::PushTextWrapPos(0.f);
    ImGui::TextDisabled("click an item, drag a box, or click a value in Colours");
    ImGui::PopTextWrapPos();
  }
}

// ============================================================================ [SECTION] overlays: question screens, box, labels, tooltip, release choice, help, notice, toast

void App::overlays() {
  ImDrawList* fg = ImGui::GetForegroundDrawList();
  const Rgb accent = view->palette().nearer;  // sea green
  auto accent32 = [&](int alpha) {
    return IM_COL32(int(accent.r * 255.f), int(accent.g * 255.f), int(accent.b * 255.f), alpha);
  };
  const ImGuiIO& io = ImGui::GetIO();
  const float inv = 1.f / fb_scale;
  // While a question screen is up it shows the window's messages in its own status line.
  const bool question_screen = asking && asking->desk().mode() != AskingMode::kOff;
  if (asking) {
    const bool live = !toast.empty() && Clock::now() < toast_until;
    asking->set_status(live ? toast : "", settings.notice_showing(seconds()) ? settings.notice() : "",
                       [this] { settings.dismiss(); });
    asking->set_free_area(dock.map_area.x0, dock.map_area.y0, dock.map_area.x1, dock.map_area.y1);
    asking->draw(show_panels ? ImGui::GetFrameHeight() : 0.f, inv);
  }
  // Box selection.
  if (interaction->state() == MapInteraction::State::kBoxing) {
    const glm::vec2 a = interaction->box_start() * inv, b = interaction->pointer() * inv;
    fg->AddRectFilled(ImVec2(std::min(a.x, b.x), std::min(a.y, b.y)), ImVec2(std::max(a.x, b.x), std::max(a.y, b.y)),
                      accent32(40));
    fg->AddRect(ImVec2(std::min(a.x, b.x), std::min(a.y, b.y)), ImVec2(std::max(a.x, b.x), std::max(a.y, b.y)),
                accent32(200));
  }
  // Lasso selection: the path drawn so far, closed back to where it started.
  if (interaction->state() == MapInteraction::State::kLasso && interaction->lasso_path().size() > 1) {
    std::vector<ImVec2> path;
    for (const glm::vec2& p : interaction->lasso_path()) path.push_back(ImVec2(p.x * inv, p.y * inv));
    fg->AddPolyline(path.data(), int(path.size()), accent32(220), ImDrawFlags_Closed, 1.5f);
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
  // A short message at the bottom of the free map area, wrapped to its width so it covers no panel.
  if (!toast.empty() && Clock::now() < toast_until) {
    const float wrap = std::max(120.f, dock.map_area.width() - 40.f);
    const ImVec2 size = ImGui::CalcTextSize(toast.c_str(), nullptr, false, wrap);
    const ImVec2 at(std::floor((dock.map_area.x0 + dock.map_area.x1) * 0.5f - size.x * 0.5f), dock.map_area.y1 - size.y - 16);
    fg->AddRectFilled(ImVec2(at.x - 10, at.y - 6), ImVec2(at.x + size.x + 10, at.y + size.y + 6),
                      ImGui::GetColorU32(ImGuiCol_PopupBg), 6.f);
    fg->AddText(ImGui::GetFont(), ImGui::GetFontSize(), at, ImGui::GetColorU32(ImGuiCol_Text), toast.c_str(), nullptr, wrap);
  }
}

// The keys and the mouse, from the one key table that also runs them (key_table.h).
void App::help_overlay() {
  const ImGuiIO& io = ImGui::GetIO();
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x * 0.5f, io.DisplaySize.y * 0.5f), ImGuiCond_Always, ImVec2(0.5f, 0.5f));
  ImGui::Begin("Keys and mouse", nullptr,
               ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_NoResize | ImGuiWindowFlags_NoMove |
                   ImGuiWindowFlags_NoCollapse | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings);
  panel_heading("Keys and mouse", &show_help);
  if (ImGui::BeginTable("keys", 2, ImGuiTableFlags_RowBg | ImGuiTableFlags_SizingFixedFit)) {
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
  const float top = dock.map_area.y0 + 8.f;
  const float width = std::max(200.f, dock.map_area.width() - 16.f);
  ImGui::SetNextWindowPos(ImVec2((dock.map_area.x0 + dock.map_area.x1) * 0.5f, top), ImGuiCond_Always, ImVec2(0.5f, 0.f));
  ImGui::SetNextWindowSizeConstraints(ImVec2(0, 0), ImVec2(width, FLT_MAX));
  const Rgb warn = view->palette().farther;
  ImGui::PushStyleColor(ImGuiCol_Border, ImVec4(warn.r, warn.g, warn.b, 1.f));
  ImGui::PushStyleVar(ImGuiStyleVar_WindowBorderSize, 2.f);
  ImGui::Begin("##notice", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings |
                   ImGuiWindowFlags_NoFocusOnAppearing);
  ImGui::PushTextWrapPos(ImGui::GetCursorPosX() + width - 80.f);
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
  const std::string state = state_word(*this);
  std::string title = "kith \xe2\x80\x94 " + name + " \xe2\x80\x94 " + std::to_string(collection.size()) + " items, " + state;
  if (s && feed.live()) title += ", step " + std::to_string(s->iteration);
  const std::string saving = hooks.title_state ? hooks.title_state() : options.session_state;
  if (!saving.empty()) title += " \xe2\x80\x94 " + saving;
  return title;
}

}  // namespace kith
