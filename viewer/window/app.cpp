// The map window. Index:
//   [SECTION] options and helpers
//   [SECTION] App: state of one window
//   [SECTION] input: GLFW callbacks, scripted events, keys
//   [SECTION] panels: menu, map controls, health, selection, tooltip, release choice, help
//   [SECTION] state dump and pictures
//   [SECTION] main loop: set-up, poll / new frame / panels / draw / swap, tear-down
#include "viewer/window/engine_feed.h"
#include "viewer/window/app.h"

#include <epoxy/gl.h>
// epoxy first: GLFW must not pull in the system GL header.
#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>
#include <backends/imgui_impl_glfw.h>
#include <backends/imgui_impl_opengl3.h>
#include <imgui.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <deque>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <unordered_map>

#include "viewer/scene/exit_code.h"
#include "viewer/gl/gl_renderer.h"
#include "viewer/window/input_script.h"
#include "viewer/window/offscreen_render.h"
#include "viewer/panels/panel_asking.h"
#include "viewer/panels/panel_judgments.h"
#include "viewer/panels/panel_structure.h"
#include "viewer/scene/picking.h"
#include "viewer/panels/ui_style.h"
#include "solver/asking/teach.h"

namespace kith {

// ============================================================================ [SECTION] options and helpers

std::string WindowOptions::IsValid() const {
  if (width < 200 || height < 150 || width > 16384 || height > 16384) return "window size must be at least 200x150";
  if (frames < 0) return "frames must be >= 0";
  return view.IsValid();
}

bool display_available() {
  const char* x = std::getenv("DISPLAY");
  const char* w = std::getenv("WAYLAND_DISPLAY");
  return (x && *x) || (w && *w);
}

namespace {

using Clock = std::chrono::steady_clock;

// A short history of one health figure for the small plots.
struct History {
  std::vector<float> values;
  void add(float v) {
    values.push_back(v);
    if (values.size() > 240) values.erase(values.begin());
  }
};

struct QueuedEvent {
  enum Kind { kMove, kButton, kScroll, kKey } kind;
  glm::vec2 pos{0.f};
  int button = 0, action = 0, key = 0, mods = 0;
  float amount = 0.f;
};

// ============================================================================ [SECTION] App: state of one window

struct App {
  App(const Collection& c, MapFeed& f, const WindowOptions& o, WindowHooks h)
      : collection(c), feed(f), options(o), hooks(std::move(h)) {}

  const Collection& collection;
  MapFeed& feed;
  WindowOptions options;
  WindowHooks hooks;

  GLFWwindow* window = nullptr;
  std::unique_ptr<GlRenderer> renderer;
  std::unique_ptr<MapView> view;
  std::unique_ptr<MapInteraction> interaction;
  std::unique_ptr<StructurePanel> structure;  // suspects, groups, neighbours (key S)
  bool show_structure = false;
  std::unique_ptr<AskingPanel> asking;        // pair, grid and own judgments; people (keys A, O, W, B)
  std::unique_ptr<JudgmentsPanel> judgments_panel;  // list, agreement, CSV files (key L)
  bool show_judgments = false;
  std::unordered_map<std::string, int> index_of_id;

  // Input.
  std::deque<QueuedEvent> queue;
  std::vector<InputEvent> script;
  size_t script_next = 0;
  bool scripted = false;
  bool scripted_down[3] = {false, false, false};
  int script_frame = 0;
  uint64_t wait_until_iteration = 0;
  Clock::time_point glide_hold_started{};
  Clock::time_point wait_started;
  bool quit = false;
  float fb_scale = 1.f;  // framebuffer pixels per window pixel

  // Panels.
  bool show_panels = true, show_help = false, focus_search = false;
  char search_text[128] = "";
  std::vector<int> search_hits;
  int tag_column_choice = 0;
  float blend = 1.f, perplexity = 30.f, theta = 0.5f;
  std::string toast;
  Clock::time_point toast_until;

  // Figures.
  uint64_t last_generation = 0;
  History kl, agreement, trust, recall;
  Clock::time_point last_health = Clock::now() - std::chrono::seconds(1);
  std::vector<double> frame_seconds;
  float fps = 0.f;
  int frame = 0;
  Clock::time_point started = Clock::now();

  void say(const std::string& text) {
    toast = text;
    toast_until = Clock::now() + std::chrono::milliseconds(2500);
  }
  uint64_t post(CommandBody body) {
    if (const std::string refused = feed.prepare(body); !refused.empty()) {
      say(refused);
      return 0;
    }
    const CommandBody copy = body;
    const uint64_t seq = feed.post(std::move(body));
    if (hooks.on_post) hooks.on_post(copy, seq);
    return seq;
  }
  // For panels: like post(), but says why a command was refused and hands back the body as the
  // feed completed it (a new judgment's stored id).
  std::string post_checked(CommandBody& body) {
    if (const std::string refused = feed.prepare(body); !refused.empty()) {
      say(refused);
      return refused;
    }
    const uint64_t seq = feed.post(body);
    if (hooks.on_post) hooks.on_post(body, seq);
    return "";
  }
  bool paused() const { return view->snapshot() && view->snapshot()->paused; }
  void toggle_pause() {
    if (paused()) {
      post(cmd::Resume{});
      say("running");
    } else {
      post(cmd::Pause{});
      say("paused");
    }
  }
  void set_view(const std::function<void(ViewOptions&)>& change) {
    ViewOptions o = view->options();
    change(o);
    view->set_options(o);
  }
  void cycle_colour() {
    set_view([&](ViewOptions& o) {
      // tag columns in order, then judgments, moved, plain
      auto& by = o.colour_by;
      const int tags = int(collection.tags.size());
      if (by.kind == ColourKind::kTag && by.tag_column + 1 < tags) {
        ++by.tag_column;
      } else if (by.kind == ColourKind::kTag) {
        by.kind = ColourKind::kJudgments;
      } else if (by.kind == ColourKind::kJudgments) {
        by.kind = ColourKind::kDisplacement;
      } else if (by.kind == ColourKind::kDisplacement) {
        by.kind = ColourKind::kPlain;
      } else {
        by = tags > 0 ? ColourBy{ColourKind::kTag, 0} : ColourBy{ColourKind::kPlain, 0};
      }
    });
    say("colour: " + view->colour_title());
  }
  void select_all() {
    std::vector<int> all(view->positions().size());
    for (size_t i = 0; i < all.size(); ++i) all[i] = int(i);
    view->selection().set(all);
    view->selection_changed();
  }
  void save_picture(const std::string& path);
  void dump_state(const std::string& path);
  void handle_key(int key, int mods);
  void apply_script_events();
  void process_queue();
  void panels();
  void panel_map();
  void panel_health();
  void panel_selection();
  void overlays();
  void update_title();
};

// ============================================================================ [SECTION] input: GLFW callbacks, scripted events, keys

App* app_of(GLFWwindow* w) { return static_cast<App*>(glfwGetWindowUserPointer(w)); }

void on_cursor(GLFWwindow* w, double x, double y) {
  App* a = app_of(w);
  if (!a->scripted) a->queue.push_back({QueuedEvent::kMove, glm::vec2(float(x), float(y)) * a->fb_scale});
}
void on_button(GLFWwindow* w, int button, int action, int mods) {
  App* a = app_of(w);
  if (a->scripted) return;
  QueuedEvent e{QueuedEvent::kButton};
  e.button = button == GLFW_MOUSE_BUTTON_LEFT ? 0 : button == GLFW_MOUSE_BUTTON_RIGHT ? 1 : 2;
  e.action = action;
  e.mods = mods;
  a->queue.push_back(e);
}
void on_scroll(GLFWwindow* w, double, double dy) {
  App* a = app_of(w);
  if (a->scripted) return;
  QueuedEvent e{QueuedEvent::kScroll};
  e.amount = float(dy);
  a->queue.push_back(e);
}
void on_key(GLFWwindow* w, int key, int, int action, int mods) {
  if (action == GLFW_RELEASE) return;
  QueuedEvent e{QueuedEvent::kKey};
  e.key = key;
  e.mods = mods;
  e.action = action;
  app_of(w)->queue.push_back(e);
}

void App::process_queue() {
  const ImGuiIO& io = ImGui::GetIO();
  const bool gesture = interaction->state() != MapInteraction::State::kIdle &&
                       interaction->state() != MapInteraction::State::kChoosing;
  while (!queue.empty()) {
    const QueuedEvent e = queue.front();
    queue.pop_front();
    switch (e.kind) {
      case QueuedEvent::kMove:
        if (gesture || !io.WantCaptureMouse || scripted)
          interaction->pointer_move(e.pos);
        break;
      case QueuedEvent::kButton:
        if (e.action == GLFW_PRESS && e.button == 0 && asking && asking->wants_item_clicks() &&
            (!io.WantCaptureMouse || scripted)) {
          if (const int item = view->item_at(interaction->pointer()); item >= 0) {
            asking->click_item(item);  // own judgment: the next of anchor, nearer, farther
            break;
          }
        }
        if (e.action == GLFW_PRESS) {
          if (!io.WantCaptureMouse || scripted) interaction->button_down(e.button, (e.mods & GLFW_MOD_SHIFT) != 0);
        } else {
          interaction->button_up(e.button);  // always, so a gesture never sticks
        }
        break;
      case QueuedEvent::kScroll:
        if (!io.WantCaptureMouse || scripted) interaction->scroll(e.amount);
        break;
      case QueuedEvent::kKey:
        if (!io.WantTextInput || e.key == GLFW_KEY_ESCAPE) handle_key(e.key, e.mods);
        break;
    }
  }
}

void App::apply_script_events() {
  if (wait_until_iteration > 0) {
    const auto s = view->snapshot();
    const bool reached = s && s->iteration >= wait_until_iteration;
    if (!reached && Clock::now() - wait_started < std::chrono::seconds(10)) return;
    wait_until_iteration = 0;
  }
  while (script_next < script.size() && script[script_next].frame <= script_frame) {
    const InputEvent& e = script[script_next++];
    QueuedEvent q{QueuedEvent::kMove};
    switch (e.kind) {
      case InputEvent::kMove:
        q.pos = e.pos * fb_scale;
        queue.push_back(q);
        break;
      case InputEvent::kMoveBy:
        q.pos = interaction->pointer() + e.pos * fb_scale;
        queue.push_back(q);
        break;
      case InputEvent::kMoveToItem: {
        auto it = index_of_id.find(e.text);
        if (it == index_of_id.end()) {
          std::fprintf(stderr, "kith open: script: no item '%s'\n", e.text.c_str());
          break;
        }
        const Projected p = view->camera().project(view->positions()[it->second]);
        q.pos = p.screen;
        queue.push_back(q);
        break;
      }
      case InputEvent::kPress:
      case InputEvent::kRelease:
        q.kind = QueuedEvent::kButton;
        q.button = e.button;
        q.action = e.kind == InputEvent::kPress ? GLFW_PRESS : GLFW_RELEASE;
        scripted_down[e.button] = e.kind == InputEvent::kPress;
        queue.push_back(q);
        break;
      case InputEvent::kScroll:
        q.kind = QueuedEvent::kScroll;
        q.amount = e.amount;
        queue.push_back(q);
        break;
      case InputEvent::kKey:
        q.kind = QueuedEvent::kKey;
        q.key = e.key;
        q.mods = e.mods;
        q.action = GLFW_PRESS;
        queue.push_back(q);
        break;
      case InputEvent::kShot:
      case InputEvent::kDump:
        // Handled after drawing this frame (see the main loop).
        break;
      case InputEvent::kWaitIterations: {
        const auto s = view->snapshot();
        wait_until_iteration = (s ? s->iteration : 0) + uint64_t(e.amount) + 1;
        wait_started = Clock::now();
        return;
      }
      case InputEvent::kQuit:
        quit = true;
        break;
    }
  }
}

void App::handle_key(int key, int mods) {
  const bool shift = mods & GLFW_MOD_SHIFT, ctrl = mods & GLFW_MOD_CONTROL;
  if (interaction->choosing()) {
    if (key == GLFW_KEY_P || key == GLFW_KEY_ENTER) return interaction->choose_pin(), say("pinned");
    if (key == GLFW_KEY_ESCAPE || key == GLFW_KEY_BACKSPACE) return interaction->choose_release(), say("let go");
    if (key == GLFW_KEY_T && interaction->can_teach()) return interaction->choose_teach(), say("taught");
  }
  if (show_judgments && (key == GLFW_KEY_DELETE || (ctrl && (key == GLFW_KEY_UP || key == GLFW_KEY_DOWN)))) {
    if (key == GLFW_KEY_DELETE) judgments_panel->toggle_chosen();
    else judgments_panel->choose_step(key == GLFW_KEY_UP ? -1 : 1);
    return;
  }
  if (asking && !(key == GLFW_KEY_ESCAPE && show_help)) {
    const bool was = asking->desk().asking();
    if (asking->handle_key(key, mods)) {
      if (!was && asking->desk().asking()) {  // a clean shared screen: the map above the question band
        show_panels = false;
        asking->frame_map();
      } else if (was && !asking->desk().asking()) {
        show_panels = options.panels;
        view->fit_all(true);
      }
      if (!asking->message().empty()) say(asking->message());
      return;
    }
  }
  Camera& cam = view->camera();
  switch (key) {
    case GLFW_KEY_ESCAPE:
      if (show_help) show_help = false;
      else {
        view->selection().clear();
        view->selection_changed();
      }
      break;
    case GLFW_KEY_F: asking && asking->desk().asking() ? asking->frame_map() : view->fit_all(true); break;
    case GLFW_KEY_Z: view->focus_selection(); break;
    case GLFW_KEY_R:
      if (shift) {
        post(cmd::Restart{});
        say("restarted from the start map");
      } else {
        view->auto_rotate = !view->auto_rotate;
        say(view->auto_rotate ? "slow turn on" : "slow turn off");
      }
      break;
    case GLFW_KEY_SPACE: toggle_pause(); break;
    case GLFW_KEY_C: cycle_colour(); break;
    case GLFW_KEY_G: set_view([](ViewOptions& o) { o.grid = !o.grid; }); break;
    case GLFW_KEY_J: set_view([](ViewOptions& o) { o.lines = !o.lines; }); break;
    case GLFW_KEY_I: set_view([](ViewOptions& o) { o.cards = !o.cards; }); break;
    case GLFW_KEY_N:
      set_view([](ViewOptions& o) { o.dark = !o.dark; });
      apply_ui_style(view->options().dark);
      break;
    case GLFW_KEY_TAB: show_panels = !show_panels; break;
    case GLFW_KEY_S: show_structure = !show_structure, show_panels = true; break;
    case GLFW_KEY_L: show_judgments = !show_judgments, show_panels = true; break;
    case GLFW_KEY_H:
    case GLFW_KEY_F1: show_help = !show_help; break;
    case GLFW_KEY_SLASH:
      if (shift) show_help = !show_help;
      else show_panels = true, focus_search = true;
      break;
    case GLFW_KEY_F12: {
      char name[64];
      const std::time_t t = std::time(nullptr);
      std::strftime(name, sizeof name, "kith-map-%Y%m%d-%H%M%S.png", std::localtime(&t));
      save_picture(name);
      break;
    }
    case GLFW_KEY_P:
      interaction->pin_selection();
      say("pinned " + std::to_string(view->selection().size()) + " where they are");
      break;
    case GLFW_KEY_U:
      interaction->unpin_selection();
      say("unpinned the selection");
      break;
    case GLFW_KEY_A:
      if (ctrl) select_all();
      break;
    case GLFW_KEY_Q:
      if (ctrl) quit = true;
      break;
    case GLFW_KEY_LEFT: shift ? cam.pan(-20, 0) : cam.orbit(-15, 0); break;
    case GLFW_KEY_RIGHT: shift ? cam.pan(20, 0) : cam.orbit(15, 0); break;
    case GLFW_KEY_UP: shift ? cam.pan(0, -20) : cam.orbit(0, -15); break;
    case GLFW_KEY_DOWN: shift ? cam.pan(0, 20) : cam.orbit(0, 15); break;
    case GLFW_KEY_EQUAL:
    case GLFW_KEY_KP_ADD:
    case GLFW_KEY_PAGE_UP: cam.zoom(1.f); break;
    case GLFW_KEY_MINUS:
    case GLFW_KEY_KP_SUBTRACT:
    case GLFW_KEY_PAGE_DOWN: cam.zoom(-1.f); break;
    case GLFW_KEY_LEFT_BRACKET:
    case GLFW_KEY_RIGHT_BRACKET: {
      const float factor = key == GLFW_KEY_LEFT_BRACKET ? 1.f / 1.2f : 1.2f;
      set_view([&](ViewOptions& o) {
        const float now = o.point_size > 0 ? o.point_size : (collection.size() <= 2000 ? 10.f : 6.f);
        o.point_size = std::clamp(now * factor, 1.f, 64.f);
      });
      break;
    }
    default:
      if (hooks.on_key) {
        if (const std::string line = hooks.on_key(key, mods); !line.empty()) say(line);
      }
      break;
  }
}

// ============================================================================ [SECTION] panels

const char* kKeys[][2] = {
    {"left drag on an item", "move it (then P pin / Esc let go / T teach)"},
    {"left drag on empty space", "turn the map"},
    {"shift + left drag", "select with a box"},
    {"right or middle drag, shift + arrows", "slide the map"},
    {"wheel, + / -", "closer / farther"},
    {"click, shift + click", "select, add to the selection"},
    {"arrows", "turn the map"},
    {"F", "fit the whole map"},
    {"Z", "zoom to the selection"},
    {"R", "slow turn on/off"},
    {"Space", "pause / resume the optimization"},
    {"shift + R", "restart from the start map"},
    {"P / U", "pin / unpin the selection"},
    {"/", "search by id or tag (column=value for exact)"},
    {"ctrl + A, Esc", "select all, clear the selection"},
    {"C", "next colouring (tags, judgments, moved, plain)"},
    {"G / J / I", "floor grid / judgment lines / picture cards"},
    {"[ / ]", "smaller / larger discs"},
    {"N", "night or paper ground"},
    {"Tab", "hide or show the panels"},
    {"S", "structure: suspects, groups, neighbour comparison"},
    {"L", "judgments: list, agreement per person, CSV import / export"},
    {"ctrl + up / down, Delete", "(judgments open, panels shown or not) show the previous / next judgment; retract / restore it"},
    {"F12", "save the view as PNG"},
    {"A", "ask pair questions (again: grid questions), Esc stops"},
    {"left / right arrow, 1 / 2", "pair: the left / right one is closer"},
    {"1 .. 9", "grid: pick / unpick that place"},
    {"down arrow, 0", "can't tell (kept, not a judgment)"},
    {"Backspace", "undo the last answer"},
    {"W, shift + W", "next / previous person's turn"},
    {"O", "own judgment: click anchor, nearer, farther; Enter stores"},
    {"B", "big type for a shared screen"},
    {"H, F1, ?", "this help"},
};

void App::panels() {
  if (ImGui::BeginMainMenuBar()) {
    if (ImGui::BeginMenu("Collection")) {
      if (ImGui::MenuItem("Save picture of the view", "F12")) handle_key(GLFW_KEY_F12, 0);
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
      if (ImGui::MenuItem("Restart", "shift+R")) handle_key(GLFW_KEY_R, GLFW_MOD_SHIFT);
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
      changed |= ImGui::MenuItem("Picture cards", "I", &o.cards);
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
  ImGui::SetNextWindowPos(ImVec2(10, io.DisplaySize.y - 10), ImGuiCond_Always, ImVec2(0.f, 1.f));
  ImGui::SetNextWindowSizeConstraints(ImVec2(420, 0), ImVec2(420, io.DisplaySize.y * 0.5f));
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

void App::panel_map() {
  if (!ImGui::Begin("Map")) return ImGui::End();
  const auto s = view->snapshot();
  if (feed.live()) {
    if (ImGui::Button(paused() ? "Resume  [Space]" : "Pause  [Space]")) toggle_pause();
    ImGui::SameLine();
    if (ImGui::Button("Restart")) handle_key(GLFW_KEY_R, GLFW_MOD_SHIFT);
    ImGui::SetNextItemWidth(150);
    if (ImGui::SliderFloat("blend", &blend, 0.f, 20.f, "%.2f", ImGuiSliderFlags_Logarithmic)) post(cmd::SetBlend{blend});
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("weight of people's judgments against the features");
    ImGui::SetNextItemWidth(150);
    ImGui::SliderFloat("perplexity", &perplexity, 2.f, 100.f, "%.0f");
    if (ImGui::IsItemDeactivatedAfterEdit()) post(cmd::SetPerplexity{perplexity});
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("about how many neighbours each item listens to (rebuilt on release)");
    ImGui::SetNextItemWidth(150);
    if (ImGui::SliderFloat("theta", &theta, 0.f, 1.f, "%.2f")) post(cmd::SetTheta{theta});
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Barnes-Hut angle: 0 exact, larger is faster and rougher");
    if (s)
      ImGui::Text("iteration %llu   %.0f it/s", (unsigned long long)s->iteration, s->iterations_per_second);
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
      if (ImGui::Selectable(collection.tags[t].name.c_str())) o.colour_by = {ColourKind::kTag, int(t)}, changed = true;
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
  changed |= ImGui::Checkbox("cards", &o.cards);
  changed |= ImGui::Checkbox("night", &o.dark);
  ImGui::SameLine();
  ImGui::Checkbox("slow turn", &view->auto_rotate);
  if (changed) {
    view->set_options(o);
    apply_ui_style(o.dark);
  }
  ImGui::End();
}

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

void App::overlays() {
  ImDrawList* fg = ImGui::GetForegroundDrawList();
  const ImGuiIO& io = ImGui::GetIO();
  const float inv = 1.f / fb_scale;
  if (asking) asking->draw(show_panels ? ImGui::GetFrameHeight() : 0.f, inv);
  // Box selection.
  if (interaction->state() == MapInteraction::State::kBoxing) {
    const glm::vec2 a = interaction->box_start() * inv, b = interaction->pointer() * inv;
    fg->AddRectFilled(ImVec2(std::min(a.x, b.x), std::min(a.y, b.y)), ImVec2(std::max(a.x, b.x), std::max(a.y, b.y)),
                      IM_COL32(0, 114, 178, 40));
    fg->AddRect(ImVec2(std::min(a.x, b.x), std::min(a.y, b.y)), ImVec2(std::max(a.x, b.x), std::max(a.y, b.y)),
                IM_COL32(0, 114, 178, 200));
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
  for (size_t k = 0; k < sel.size() && k < 24; ++k) label(sel[k]);
  // Hover tooltip: id, tags, pinned.
  const int h = view->hovered();
  if (h >= 0 && !io.WantCaptureMouse && interaction->state() != MapInteraction::State::kDragging) {
    ImGui::BeginTooltip();
    ImGui::TextUnformatted(collection.ids[h].c_str());
    for (const auto& t : collection.tags)
      if (size_t(h) < t.values.size()) ImGui::TextDisabled("%s: %s", t.name.c_str(), t.values[h].c_str());
    if (view->pinned(h)) ImGui::TextDisabled("pinned (U unpins the selection)");
    if (!collection.pictures.empty()) ImGui::TextDisabled("picture: %s", std::filesystem::path(collection.pictures[h]).filename().c_str());
    ImGui::EndTooltip();
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
  // Help.
  if (show_help) {
    ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x * 0.5f, io.DisplaySize.y * 0.5f), ImGuiCond_Always, ImVec2(0.5f, 0.5f));
    ImGui::Begin("Keys and mouse", &show_help, ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings);
    if (ImGui::BeginTable("keys", 2, ImGuiTableFlags_RowBg)) {
      for (const auto& k : kKeys) {
        ImGui::TableNextColumn();
        ImGui::TextUnformatted(k[0]);
        ImGui::TableNextColumn();
        ImGui::TextDisabled("%s", k[1]);
      }
      ImGui::EndTable();
    }
    ImGui::End();
  }
  // A short message at the bottom centre.
  if (!toast.empty() && Clock::now() < toast_until) {
    const ImVec2 size = ImGui::CalcTextSize(toast.c_str());
    const float lift = asking ? asking->band_height() : 0.f;  // above the question band
    const ImVec2 at(io.DisplaySize.x * 0.5f - size.x * 0.5f, io.DisplaySize.y - size.y - 24 - lift);
    fg->AddRectFilled(ImVec2(at.x - 10, at.y - 6), ImVec2(at.x + size.x + 10, at.y + size.y + 6),
                      ImGui::GetColorU32(ImGuiCol_PopupBg), 6.f);
    fg->AddText(at, ImGui::GetColorU32(ImGuiCol_Text), toast.c_str());
  }
}

void App::update_title() {
  const auto s = view->snapshot();
  std::string name = options.title.empty() ? std::filesystem::path(collection.source).filename().string() : options.title;
  std::string state = !feed.live() ? "still map" : paused() ? "paused" : (s && s->settled) ? "settled" : "running";
  std::string title = "kith \xe2\x80\x94 " + name + " \xe2\x80\x94 " + std::to_string(collection.size()) + " items, " + state;
  if (s && feed.live()) title += ", iteration " + std::to_string(s->iteration);
  const std::string saving = hooks.title_state ? hooks.title_state() : options.session_state;
  if (!saving.empty()) title += " \xe2\x80\x94 " + saving;
  glfwSetWindowTitle(window, title.c_str());
}

// ============================================================================ [SECTION] state dump and pictures

void App::save_picture(const std::string& path) {
  int w = 0, h = 0;
  glfwGetFramebufferSize(window, &w, &h);
  glReadBuffer(GL_BACK);
  const Picture pic = renderer->read_pixels(w, h);
  const std::string e = write_png(path, pic);
  say(e.empty() ? "saved " + path : e);
  if (!e.empty()) std::fprintf(stderr, "kith open: %s\n", e.c_str());
}

void App::dump_state(const std::string& path) {
  using nlohmann::json;
  json j;
  j["frame"] = frame;
  j["width"] = view->camera().width();
  j["height"] = view->camera().height();
  j["camera"] = view->camera().str();
  j["live"] = feed.live();
  json items = json::array();
  const auto& pos = view->positions();
  for (size_t i = 0; i < pos.size() && i < 20000; ++i) {
    const Projected p = view->camera().project(pos[i]);
    items.push_back({{"id", collection.ids[i]}, {"x", p.screen.x}, {"y", p.screen.y}, {"depth", p.depth},
                     {"visible", p.visible}, {"world", {pos[i].x, pos[i].y, pos[i].z}}});
  }
  j["items"] = items;
  json sel = json::array();
  for (int i : view->selection().items()) sel.push_back(collection.ids[i]);
  j["selection"] = sel;
  j["hovered"] = view->hovered() >= 0 ? json(collection.ids[view->hovered()]) : json(nullptr);
  const auto s = view->snapshot();
  json pinned = json::array();
  if (s)
    for (size_t i = 0; i < s->pinned.size() && i < collection.size(); ++i)
      if (s->pinned[i]) pinned.push_back(collection.ids[i]);
  j["pinned"] = pinned;
  if (s) {
    j["snapshot"] = {{"generation", s->generation}, {"iteration", s->iteration}, {"last_command", s->last_command},
                     {"paused", s->paused}};
  }
  const auto& drop = interaction->last_drop();
  if (drop.item >= 0) {
    json d = {{"item", collection.ids[drop.item]},
              {"position", {drop.position.x, drop.position.y, drop.position.z}},
              {"seq", drop.seq},
              {"drag_targets", drop.drag_targets}};
    if (s && drop.item < s->positions.rows()) {
      std::vector<double> now;
      for (Eigen::Index c = 0; c < s->positions.cols(); ++c) now.push_back(s->positions(drop.item, c));
      d["snapshot_position"] = now;
      d["snapshot_applied"] = s->last_command >= drop.seq;
    }
    j["drop"] = d;
  }
  json log = json::array();
  for (const Command& c : feed.command_log())
    log.push_back({{"seq", c.seq}, {"iteration", c.iteration}, {"kind", command_name(c.body)}, {"item", command_item(c.body)}});
  j["log"] = log;
  if (asking) j["asking"] = asking->state();
  {
    const auto& rows = judgments_panel->rows();
    const size_t chosen = judgments_panel->chosen();
    j["judgments_panel"] = {{"open", show_judgments},
                            {"judgments", view->judgments().size()},
                            {"rows", rows.size()},
                            {"chosen", chosen < view->judgments().size() ? json(view->judgments()[chosen].id) : json(nullptr)},
                            {"problem", judgments_panel->last_problem()}};
  }
  j["bounds"] = {{view->bounds_lo().x, view->bounds_lo().y, view->bounds_lo().z},
                 {view->bounds_hi().x, view->bounds_hi().y, view->bounds_hi().z}};
  std::ofstream out(path);
  out << j.dump(1);
  if (!out) std::fprintf(stderr, "kith open: cannot write %s\n", path.c_str());
}

void glfw_error(int code, const char* text) { std::fprintf(stderr, "kith: window system error %d: %s\n", code, text); }

}  // namespace

// ============================================================================ [SECTION] main loop

int run_window(const Collection& collection, MapFeed& feed, const WindowOptions& options,
               std::vector<Judgment> judgments, WindowHooks hooks) {
  if (std::string e = options.IsValid(); !e.empty()) {
    std::fprintf(stderr, "kith open: %s\n", e.c_str());
    return kExitUsage;
  }
  App app(collection, feed, options, std::move(hooks));
  if (!options.script.empty()) {
    try {
      app.script = load_input_script(options.script);
      app.scripted = true;
    } catch (const std::exception& e) {
      std::fprintf(stderr, "kith open: %s\n", e.what());
      return kExitBadInput;
    }
  }
  for (size_t i = 0; i < collection.size(); ++i) app.index_of_id[collection.ids[i]] = int(i);

  // ---- set-up ------------------------------------------------------------------
  glfwSetErrorCallback(glfw_error);
  if (!glfwInit()) {
    std::fprintf(stderr, "kith open: no display to open a window on (try kith render, or run under xvfb-run)\n");
    return kExitInternal;
  }
  glfwWindowHint(GLFW_CONTEXT_VERSION_MAJOR, 3);
  glfwWindowHint(GLFW_CONTEXT_VERSION_MINOR, 3);
  glfwWindowHint(GLFW_OPENGL_PROFILE, GLFW_OPENGL_CORE_PROFILE);
  glfwWindowHint(GLFW_OPENGL_FORWARD_COMPAT, GLFW_TRUE);
  app.window = glfwCreateWindow(options.width, options.height, "kith", nullptr, nullptr);
  if (!app.window) {
    std::fprintf(stderr, "kith open: could not open an OpenGL 3.3 window\n");
    glfwTerminate();
    return kExitInternal;
  }
  glfwMakeContextCurrent(app.window);
  glfwSwapInterval(options.vsync ? 1 : 0);
  glfwSetWindowUserPointer(app.window, &app);
  glfwSetCursorPosCallback(app.window, on_cursor);
  glfwSetMouseButtonCallback(app.window, on_button);
  glfwSetScrollCallback(app.window, on_scroll);
  glfwSetKeyCallback(app.window, on_key);
  if (app.hooks.on_open) app.hooks.on_open();

  IMGUI_CHECKVERSION();
  ImGui::CreateContext();
  ImGuiIO& io = ImGui::GetIO();
  io.IniFilename = nullptr;  // panels start in the same place every time
  float xscale = 1.f, yscale = 1.f;
  glfwGetWindowContentScale(app.window, &xscale, &yscale);
  load_ui_font(15.f * std::max(1.f, yscale));
  AskingPanel::load_fonts(std::max(1.f, yscale));
  apply_ui_style(options.view.dark);
  ImGui_ImplGlfw_InitForOpenGL(app.window, true);  // chains to the callbacks above
  ImGui_ImplOpenGL3_Init("#version 330");

  int exit_code = kExitOk;
  try {
    app.renderer = std::make_unique<GlRenderer>();
    app.view = std::make_unique<MapView>(collection, *app.renderer);
    app.view->set_options(options.view);
    app.view->auto_rotate = options.auto_rotate;
    app.view->set_judgments(std::move(judgments));
    app.interaction = std::make_unique<MapInteraction>(*app.view, feed);
    app.structure = std::make_unique<StructurePanel>(collection, *app.view);
    {
      JudgmentsPanelLinks links;
      links.post = [&app](CommandBody& body) { return app.post_checked(body); };
      links.say = [&app](const std::string& text) { app.say(text); };
      links.person_colour = [&app](const std::string& person, Rgb* colour) {
        if (!app.asking) return false;
        for (const Person& p : app.asking->desk().flow().people())
          if (p.name == person) {
            *colour = Rgb{((p.colour >> 16) & 255) / 255.f, ((p.colour >> 8) & 255) / 255.f, (p.colour & 255) / 255.f};
            return true;
          }
        return false;
      };
      app.judgments_panel = std::make_unique<JudgmentsPanel>(collection, *app.view, std::move(links));
    }
    app.interaction->teach = app.hooks.teach;
    {
      DeskLinks links;
      links.post = [&app](CommandBody& body) {
        int64_t top = 0;
        for (const Judgment& j : app.view->judgments()) top = std::max(top, j.id);
        if (const std::string refused = app.post_checked(body); !refused.empty()) return refused;
        // Without a session the feed gives no id; the engine numbers it the same way (the next free one).
        if (auto* a = std::get_if<cmd::AddJudgment>(&body); a && a->judgment.id < 0) a->judgment.id = top + 1;
        std::vector<Judgment> all = app.view->judgments();  // the map's lines and counts follow at once
        if (auto* a = std::get_if<cmd::AddJudgment>(&body)) {
          all.push_back(a->judgment);
        } else if (auto* r = std::get_if<cmd::RetractJudgment>(&body)) {
          for (Judgment& j : all)
            if (j.id == r->judgment_id) j.retracted = r->retracted;
        }
        app.view->set_judgments(std::move(all));
        return std::string();
      };
      links.record_event = app.hooks.record_event;
      links.snapshot = [&app] { return app.view->snapshot(); };
      links.judgments = [&app] { return app.view->judgments(); };
      links.selection = [&app] { return app.view->selection().items(); };
      links.now = [] { return std::chrono::duration<double>(std::chrono::system_clock::now().time_since_epoch()).count(); };
      app.asking = std::make_unique<AskingPanel>(collection, *app.view, std::move(links), app.index_of_id);
      for (const std::string& name : options.people)
        if (const std::string e = app.asking->desk().add_person(name, Palette::person_colour(app.asking->desk().flow().people().size()));
            !e.empty())
          std::fprintf(stderr, "kith open: --people: %s\n", e.c_str());
    }
    app.interaction->on_post = [&app](const CommandBody& body, uint64_t seq) {
      if (auto* a = std::get_if<cmd::AddJudgment>(&body)) {
        std::vector<Judgment> all = app.view->judgments();
        all.push_back(a->judgment);
        app.view->set_judgments(std::move(all));
      }
      if (app.hooks.on_post) app.hooks.on_post(body, seq);
    };
    app.show_panels = options.panels;
    app.blend = float(options.blend);
    app.perplexity = float(options.perplexity);
    app.theta = float(options.theta);
    int fbw = 0, fbh = 0, ww = 0, wh = 0;
    glfwGetFramebufferSize(app.window, &fbw, &fbh);
    glfwGetWindowSize(app.window, &ww, &wh);
    app.fb_scale = ww > 0 ? float(fbw) / float(ww) : 1.f;
    app.view->camera().set_viewport(fbw, fbh);

    auto last = Clock::now();
    auto last_title = last - std::chrono::seconds(1);
    // ---- the loop: poll, new frame, panels, draw, swap ---------------------------
    while (!glfwWindowShouldClose(app.window) && !app.quit) {
      glfwPollEvents();
      const auto now = Clock::now();
      const float raw_dt = std::chrono::duration<float>(now - last).count();
      const float dt = std::min(raw_dt, 0.1f);  // a stall must not fling the camera
      last = now;
      app.frame_seconds.push_back(raw_dt);
      if (app.frame > 0) app.view->note_frame_time(raw_dt);
      if (app.frame % 15 == 0 && app.frame_seconds.size() > 1) {
        const size_t n = std::min<size_t>(60, app.frame_seconds.size() - 1);
        double sum = 0;
        for (size_t k = app.frame_seconds.size() - n; k < app.frame_seconds.size(); ++k) sum += app.frame_seconds[k];
        app.fps = sum > 0 ? float(n / sum) : 0.f;
      }

      // The newest map, uploaded only when it changed.
      if (auto s = feed.latest(); s && s->generation != app.last_generation) {
        app.last_generation = s->generation;
        app.view->set_snapshot(s);
        if (app.hooks.on_snapshot) app.hooks.on_snapshot(s);
        if (now - app.last_health > std::chrono::milliseconds(250)) {
          app.last_health = now;
          app.kl.add(float(s->health.kl));
          if (s->health.judgment_agreement >= 0) app.agreement.add(float(s->health.judgment_agreement));
          if (s->health.trustworthiness >= 0) app.trust.add(float(s->health.trustworthiness));
          if (s->health.neighbour_recall >= 0) app.recall.add(float(s->health.neighbour_recall));
        }
      }
      app.judgments_panel->tick(std::chrono::duration<double>(now - app.started).count());
      if (app.scripted) app.apply_script_events();

      ImGui_ImplOpenGL3_NewFrame();
      ImGui_ImplGlfw_NewFrame();
      if (app.scripted) {
        const glm::vec2 p = app.interaction->pointer() / app.fb_scale;
        io.MousePos = ImVec2(p.x, p.y);
        for (int b = 0; b < 3; ++b) io.MouseDown[b] = app.scripted_down[b];
      }
      ImGui::NewFrame();
      app.process_queue();
      app.interaction->per_frame();
      if (app.show_panels) app.panels();
      app.overlays();
      ImGui::Render();

      glfwGetFramebufferSize(app.window, &fbw, &fbh);
      // Centre the map in the part the right-hand panels (300 px and margins) leave free.
      if (io.DisplaySize.x > 0.f)
        app.view->set_centre_offset(app.show_panels ? -320.f / io.DisplaySize.x : 0.f);
      app.view->frame(dt, fbw, fbh);
      ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());

      // Scripted pictures and dumps of this frame, then the final screenshot.
      if (app.scripted) {
        for (size_t k = 0; k < app.script_next; ++k) {
          InputEvent& e = app.script[k];
          if (e.frame != -1 && (e.kind == InputEvent::kShot || e.kind == InputEvent::kDump)) {
            if (e.kind == InputEvent::kShot) app.save_picture(e.text);
            else app.dump_state(e.text);
            e.frame = -1;  // done
          }
        }
      }
      const bool last_frame = app.quit || (options.frames > 0 && app.script_frame + 1 >= options.frames);
      if (last_frame && !options.screenshot.empty()) app.save_picture(options.screenshot);
      glfwSwapBuffers(app.window);
      if (now - last_title > std::chrono::milliseconds(500)) {
        app.update_title();
        last_title = now;
      }
      ++app.frame;
      // A script's frame counter also holds while the camera glides (at most 2 s per glide), so
      // "dump" and "shot" see the same settled view however loaded the machine is.
      const bool gliding = app.scripted && app.view->camera().moving() &&
                           (app.glide_hold_started == Clock::time_point{} ||
                            now - app.glide_hold_started < std::chrono::seconds(2));
      if (gliding && app.glide_hold_started == Clock::time_point{}) app.glide_hold_started = now;
      if (!app.view->camera().moving()) app.glide_hold_started = Clock::time_point{};
      if (app.wait_until_iteration == 0 && !gliding) ++app.script_frame;
      if (options.frames > 0 && app.script_frame >= options.frames) break;
    }
    if (!options.fps_report.empty()) {
      std::vector<double> ft(app.frame_seconds.begin() + std::min<size_t>(app.frame_seconds.size(), 10),
                             app.frame_seconds.end());  // skip start-up frames
      std::sort(ft.begin(), ft.end());
      double sum = 0;
      for (double x : ft) sum += x;
      const auto s = feed.latest();
      nlohmann::json r = {{"frames", ft.size()},
                          {"mean_fps", sum > 0 ? ft.size() / sum : 0.0},
                          {"median_frame_ms", ft.empty() ? 0.0 : ft[ft.size() / 2] * 1000.0},
                          {"p90_frame_ms", ft.empty() ? 0.0 : ft[ft.size() * 9 / 10] * 1000.0},
                          {"items", collection.size()},
                          {"live", feed.live()},
                          {"iterations", s ? s->iteration : 0},
                          {"iterations_per_second", s ? s->iterations_per_second : 0.0}};
      std::ofstream(options.fps_report) << r.dump(1) << "\n";
    }
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith open: %s\n", e.what());
    exit_code = kExitInternal;
  }

  // ---- tear-down, in reverse ------------------------------------------------------
  app.asking.reset();
  app.judgments_panel.reset();
  app.structure.reset();
  app.interaction.reset();
  app.view.reset();
  app.renderer.reset();
  ImGui_ImplOpenGL3_Shutdown();
  ImGui_ImplGlfw_Shutdown();
  ImGui::DestroyContext();
  glfwDestroyWindow(app.window);
  glfwTerminate();
  return exit_code;
}

WindowHooks default_window_hooks() {
  WindowHooks h;
  h.teach = [](const Snapshot& s, int item, const glm::vec3& from, const glm::vec3& to) {
    const double f[3] = {from.x, from.y, from.z}, t[3] = {to.x, to.y, to.z};
    return teach_from_drag(s.positions, int32_t(item), f, t, "", double(std::time(nullptr)));
  };
  return h;
}

int run_window(const Collection& collection, const EngineOptions& engine, const WindowOptions& options,
               std::vector<Judgment> judgments, WindowHooks hooks) {
  std::unique_ptr<MapFeed> feed = make_engine_feed(collection, engine, judgments);
  if (!feed) feed = std::make_unique<StillFeed>(collection.ids, rough_positions(collection));
  if (!hooks.teach) hooks.teach = default_window_hooks().teach;
  WindowOptions o = options;
  o.blend = engine.blend;
  o.perplexity = engine.perplexity;
  o.theta = engine.theta;
  return run_window(collection, *feed, o, std::move(judgments), std::move(hooks));
}

}  // namespace kith
