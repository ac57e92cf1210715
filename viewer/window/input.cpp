// The map window's input. Index:
//   [SECTION] keys.h against GLFW
//   [SECTION] GLFW callbacks and the event queue
//   [SECTION] scripted events
//   [SECTION] the key table and handle_key
#include <epoxy/gl.h>
// epoxy first: GLFW must not pull in the system GL header.
#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>
#include <imgui.h>

#include <algorithm>
#include <cstdio>

#include "viewer/scene/keys.h"
#include "viewer/scene/picking.h"
#include "viewer/panels/ui_style.h"
#include "viewer/window/app_state.h"
#include "viewer/window/key_table.h"

namespace kith {

// ============================================================================ [SECTION] keys.h against GLFW

// The logic without a window system (asking desk, key table) uses viewer/scene/keys.h; its values
// must be the ones GLFW reports.
static_assert(keys::k0 == GLFW_KEY_0 && keys::k9 == GLFW_KEY_9, "keys.h digits");
static_assert(keys::kA == GLFW_KEY_A && keys::kZ == GLFW_KEY_Z, "keys.h letters");
static_assert(keys::letter('p') == GLFW_KEY_P && keys::letter('w') == GLFW_KEY_W, "keys.h letter()");
static_assert(keys::kSpace == GLFW_KEY_SPACE && keys::kSlash == GLFW_KEY_SLASH && keys::kMinus == GLFW_KEY_MINUS &&
                  keys::kEqual == GLFW_KEY_EQUAL && keys::kComma == GLFW_KEY_COMMA && keys::kPeriod == GLFW_KEY_PERIOD,
              "keys.h punctuation");
static_assert(keys::kLeftBracket == GLFW_KEY_LEFT_BRACKET && keys::kRightBracket == GLFW_KEY_RIGHT_BRACKET,
              "keys.h brackets");
static_assert(keys::kEscape == GLFW_KEY_ESCAPE && keys::kEnter == GLFW_KEY_ENTER && keys::kTab == GLFW_KEY_TAB &&
                  keys::kBackspace == GLFW_KEY_BACKSPACE && keys::kDelete == GLFW_KEY_DELETE,
              "keys.h editing keys");
static_assert(keys::kRight == GLFW_KEY_RIGHT && keys::kLeft == GLFW_KEY_LEFT && keys::kDown == GLFW_KEY_DOWN &&
                  keys::kUp == GLFW_KEY_UP && keys::kPageUp == GLFW_KEY_PAGE_UP &&
                  keys::kPageDown == GLFW_KEY_PAGE_DOWN && keys::kHome == GLFW_KEY_HOME && keys::kEnd == GLFW_KEY_END,
              "keys.h moving keys");
static_assert(keys::kF1 == GLFW_KEY_F1 && keys::kF12 == GLFW_KEY_F12, "keys.h function keys");
static_assert(keys::kKp0 == GLFW_KEY_KP_0 && keys::kKp9 == GLFW_KEY_KP_9 && keys::kKpSubtract == GLFW_KEY_KP_SUBTRACT &&
                  keys::kKpAdd == GLFW_KEY_KP_ADD && keys::kKpEnter == GLFW_KEY_KP_ENTER,
              "keys.h keypad");
static_assert(keys::kShift == GLFW_MOD_SHIFT && keys::kControl == GLFW_MOD_CONTROL && keys::kAlt == GLFW_MOD_ALT &&
                  keys::kSuper == GLFW_MOD_SUPER,
              "keys.h modifier bits");

// ============================================================================ [SECTION] GLFW callbacks and the event queue

namespace {

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

}  // namespace

void install_input_callbacks(GLFWwindow* window) {
  glfwSetCursorPosCallback(window, on_cursor);
  glfwSetMouseButtonCallback(window, on_button);
  glfwSetScrollCallback(window, on_scroll);
  glfwSetKeyCallback(window, on_key);
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
          if (!io.WantCaptureMouse || scripted) interaction->button_down(e.button, (e.mods & GLFW_MOD_SHIFT) != 0,
                                                                         (e.mods & GLFW_MOD_CONTROL) != 0);
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

// ============================================================================ [SECTION] scripted events

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
        q.mods = e.mods;
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
      case InputEvent::kSet: {
        // As if the setting's slider were let go at this value (or at the end of its range).
        Setting setting;
        if (!MapSettings::from_name(e.text, &setting)) {
          std::fprintf(stderr, "kith open: script: no setting '%s' (blend, perplexity, theta)\n", e.text.c_str());
          break;
        }
        const auto s = view->snapshot();
        const SettingControl c = settings.controls(s ? s->ids.size() : collection.size())[size_t(setting)];
        if (!c.enabled) {
          say(std::string(c.name) + " cannot be set: " + c.why_disabled);
          break;
        }
        const double value = e.extreme < 0 ? c.lo : e.extreme > 0 ? c.hi : double(e.amount);
        settings.release(setting, value, seconds());
        break;
      }
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

// ============================================================================ [SECTION] the key table and handle_key

// Keys, the band's buttons, the Ask menu and the Map panel's button all come here.
bool App::ask(KeyAction action) {
  const bool was = asking->desk().asking();
  const AskingMode before = asking->desk().mode();
  if (!asking->run(action)) return false;
  if (!was && asking->desk().asking()) {  // a clean shared screen: the map above the question band
    show_panels = false;
    asking->frame_map();
  } else if (asking->desk().asking() && asking->desk().mode() != before) {
    asking->frame_map();  // pair and grid bands differ in height
  } else if (was && !asking->desk().asking()) {
    show_panels = options.panels;
    view->fit_all(true);
  }
  if (!asking->message().empty()) say(asking->message());
  return true;
}

namespace {

using K = KeyChord;
constexpr int kShift = keys::kShift, kCtrl = keys::kControl;
// Any modifiers; shift not held; shift held; ctrl held.
K any(int key) { return K{key, 0, 0}; }
K plain(int key) { return K{key, 0, kShift}; }
K shifted(int key) { return K{key, kShift, kShift}; }
K ctrl(int key) { return K{key, kCtrl, kCtrl}; }
std::vector<K> any_of(std::initializer_list<int> ks) {
  std::vector<K> out;
  for (int k : ks) out.push_back(any(k));
  return out;
}

// A row the help lists and nothing runs: the mouse, or keys another screen reads itself.
KeyRow about(const char* keys, const char* what) {
  KeyRow r;
  r.keys = keys;
  r.what = what;
  return r;
}

bool choosing(const App& a, int) { return a.interaction->choosing(); }
bool judgments_open(const App& a, int) { return a.show_judgments; }
bool asking_on(const App& a, int key) { return a.asking && !(key == keys::kEscape && a.show_help); }

// The asking screens read their own keys (asking_key_action, viewer/scene/asking_desk.h).
bool ask(App& a, int key, int mods) {
  return a.ask(asking_key_action(a.asking->desk().mode(), key, mods, a.asking->desk().flow_options().grid_size));
}

bool arrow_orbit(App& a, int key, int) {
  const float dx = key == keys::kLeft ? -15.f : key == keys::kRight ? 15.f : 0.f;
  const float dy = key == keys::kUp ? -15.f : key == keys::kDown ? 15.f : 0.f;
  a.view->camera().orbit(dx, dy);
  return true;
}
bool arrow_pan(App& a, int key, int) {
  const float dx = key == keys::kLeft ? -20.f : key == keys::kRight ? 20.f : 0.f;
  const float dy = key == keys::kUp ? -20.f : key == keys::kDown ? 20.f : 0.f;
  a.view->camera().pan(dx, dy);
  return true;
}
bool disc_size(App& a, int key, int) {
  const float factor = key == keys::kLeftBracket ? 1.f / 1.2f : 1.2f;
  const size_t items = a.collection.size();
  a.set_view([&](ViewOptions& o) {
    const float now = o.point_size > 0 ? o.point_size : (items <= 2000 ? 10.f : 6.f);
    o.point_size = std::clamp(now * factor, 1.f, 64.f);
  });
  return true;
}
bool toggle_view(App& a, int key, int) {
  a.set_view([&](ViewOptions& o) {
    if (key == keys::letter('g')) o.grid = !o.grid;
    if (key == keys::letter('j')) o.lines = !o.lines;
    if (key == keys::letter('i')) o.pictures = !o.pictures;
  });
  return true;
}

const std::vector<KeyRow> kTable = {
    // ---- the mouse, and the keys that do the same ----
    about("left drag on an item", "move it (then P pin / Esc let go / T teach)"),
    {"left drag on empty space, arrows", "turn the map",
     {plain(keys::kLeft), plain(keys::kRight), plain(keys::kUp), plain(keys::kDown)}, nullptr, arrow_orbit},
    {"right or middle drag, shift + arrows", "slide the map",
     {shifted(keys::kLeft), shifted(keys::kRight), shifted(keys::kUp), shifted(keys::kDown)}, nullptr, arrow_pan},
    {"wheel, + / -, Page Up / Page Down", "closer / farther",
     any_of({keys::kEqual, keys::kKpAdd, keys::kPageUp, keys::kMinus, keys::kKpSubtract, keys::kPageDown}), nullptr,
     [](App& a, int key, int) {
       const bool closer = key == keys::kEqual || key == keys::kKpAdd || key == keys::kPageUp;
       return a.view->camera().zoom(closer ? 1.f : -1.f), true;
     }},
    about("shift + left drag", "select with a box"),
    about("ctrl + left drag", "select with a lasso (ctrl + shift: add to the selection)"),
    about("click, shift + click", "select, add to the selection"),
    // ---- after a drag: the release choice ----
    {"P or Enter / Esc / T (after a drag)", "pin it where it was dropped / let it go / teach (the move as judgments)",
     {any(keys::letter('p')), any(keys::kEnter), any(keys::kEscape), any(keys::kBackspace), any(keys::letter('t'))},
     choosing,
     [](App& a, int key, int) {
       if (key == keys::letter('p') || key == keys::kEnter) return a.interaction->choose_pin(), a.say("pinned"), true;
       if (key == keys::kEscape || key == keys::kBackspace)
         return a.interaction->choose_release(), a.say("let go"), true;
       if (!a.interaction->can_teach()) return false;
       return a.interaction->choose_teach(), a.say("taught"), true;
     }},
    // ---- the judgments panel, open (panels shown or not) ----
    {"ctrl + up / down, Delete", "(judgments open) show the previous / next judgment; retract / restore it",
     {ctrl(keys::kUp), ctrl(keys::kDown), any(keys::kDelete)}, judgments_open,
     [](App& a, int key, int) {
       if (key == keys::kDelete) a.judgments_panel->toggle_chosen();
       else a.judgments_panel->choose_step(key == keys::kUp ? -1 : 1);
       return true;
     }},
    // ---- the asking screens: they read their keys themselves; these rows describe them ----
    {nullptr, "", {any(KeyChord::kAnyKey)}, asking_on, ask},
    about("A", "ask pair questions (again: grid questions), Esc stops"),
    about("left / right arrow, 1 / 2", "pair: the left / right one is closer"),
    about("1 .. 9", "grid: pick / unpick that place"),
    about("down arrow, 0", "can't tell (kept, not a judgment)"),
    about("Backspace", "undo the last answer"),
    about("W, shift + W", "next / previous person's turn"),
    about("O", "own judgment: click anchor, nearer, farther; Enter stores"),
    about("B", "big type for a shared screen"),
    // ---- the map ----
    {"F", "frame the whole map", {any(keys::letter('f'))}, nullptr,
     [](App& a, int, int) {
       a.asking && a.asking->desk().asking() ? a.asking->frame_map() : a.view->fit_all(true);
       return true;
     }},
    {"ctrl + Z / ctrl + shift + Z, ctrl + Y", "undo / redo a pin, unpin, teach, judgment or retraction",
     {K{keys::letter('z'), kCtrl, kCtrl | kShift}, K{keys::letter('z'), kCtrl | kShift, kCtrl | kShift},
      ctrl(keys::letter('y'))},
     nullptr,
     [](App& a, int key, int mods) { return a.undo(key == keys::letter('y') || (mods & kShift)), true; }},
    {"Z", "frame the selection", {any(keys::letter('z'))}, nullptr,
     [](App& a, int, int) { return a.view->focus_selection(), true; }},
    {"R", "slow turn on/off", {plain(keys::letter('r'))}, nullptr,
     [](App& a, int, int) {
       a.view->auto_rotate = !a.view->auto_rotate;
       return a.say(a.view->auto_rotate ? "slow turn on" : "slow turn off"), true;
     }},
    {"Space", "hold / run the engine", {any(keys::kSpace)}, nullptr,
     [](App& a, int, int) { return a.toggle_pause(), true; }},
    {"shift + R", "start over from the start map", {shifted(keys::letter('r'))}, nullptr,
     [](App& a, int, int) { return a.post(cmd::Restart{}), a.say("started over from the start map"), true; }},
    {"P / U", "pin / unpin the selection", {any(keys::letter('p')), any(keys::letter('u'))}, nullptr,
     [](App& a, int key, int) {
       if (key == keys::letter('u')) return a.interaction->unpin_selection(), a.say("unpinned the selection"), true;
       a.interaction->pin_selection();
       return a.say("pinned " + std::to_string(a.view->selection().size()) + " where they are"), true;
     }},
    {"/", "find by id or tag (column=value for exact)", {plain(keys::kSlash)}, nullptr,
     [](App& a, int, int) { return a.show_panels = a.show_selected = true, a.focus_search = true, true; }},
    {"ctrl + A, Esc", "select all, clear the selection (Esc: first closes this help)",
     {ctrl(keys::kA), any(keys::kEscape)}, nullptr,
     [](App& a, int key, int) {
       if (key == keys::kA) {
         a.select_all();
       } else if (a.show_help) {
         a.show_help = false;
       } else {
         a.view->selection().clear();
         a.view->selection_changed();
       }
       return true;
     }},
    // ---- the view ----
    {"C", "next colouring (tags, numeric columns, judgments, moved, plain)", {any(keys::letter('c'))}, nullptr,
     [](App& a, int, int) { return a.cycle_colour(), true; }},
    {"G / J / I", "floor grid / judgment lines / pictures or discs",
     any_of({keys::letter('g'), keys::letter('j'), keys::letter('i')}), nullptr, toggle_view},
    {"[ / ]", "smaller / larger discs", any_of({keys::kLeftBracket, keys::kRightBracket}), nullptr, disc_size},
    {"N", "ground: paper or night", {any(keys::letter('n'))}, nullptr,
     [](App& a, int, int) {
       a.set_view([](ViewOptions& o) { o.dark = !o.dark; });
       return apply_ui_style(a.view->options().dark), true;
     }},
    {"Tab", "hide or show all panels", {any(keys::kTab)}, nullptr,
     [](App& a, int, int) { return a.show_panels = !a.show_panels, true; }},
    {"S", "structure: suspects, groups, neighbour comparison", {any(keys::letter('s'))}, nullptr,
     [](App& a, int, int) { return a.show_structure = !a.show_structure, a.show_panels = true, true; }},
    {"L", "judgments: list, agreement per person, CSV import / export", {any(keys::letter('l'))}, nullptr,
     [](App& a, int, int) { return a.show_judgments = !a.show_judgments, a.show_panels = true, true; }},
    {"F12", "save the view as PNG", {any(keys::kF12)}, nullptr,
     [](App& a, int, int) { return a.save_picture_now(), true; }},
    {"H, F1, ?", "this help", {any(keys::letter('h')), any(keys::kF1), shifted(keys::kSlash)}, nullptr,
     [](App& a, int, int) { return a.show_help = !a.show_help, true; }},
    {"ctrl + Q", "quit", {ctrl(keys::letter('q'))}, nullptr, [](App& a, int, int) { return a.quit = true, true; }},
};

bool run_row(App& app, const KeyRow& row, int key, int mods) {
  if (!row.act) return false;
  for (const KeyChord& c : row.chords)
    if (c.matches(key, mods)) return row.act(app, key, mods);
  return false;
}

}  // namespace

const std::vector<KeyRow>& key_table() { return kTable; }

void App::handle_key(int key, int mods) {
  for (const KeyRow& row : kTable)  // rows that apply in a state first, in table order
    if (row.when && row.when(*this, key) && run_row(*this, row, key, mods)) return;
  for (const KeyRow& row : kTable)
    if (!row.when && run_row(*this, row, key, mods)) return;
  if (hooks.on_key) {
    if (const std::string line = hooks.on_key(key, mods); !line.empty()) say(line);
  }
}

}  // namespace kith
