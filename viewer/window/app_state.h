// App: the state of one map window, shared by the files that make the window up:
//   app.cpp          run_window(): set-up, the loop (poll / new frame / panels / draw / swap), tear-down
//   input.cpp        GLFW callbacks, scripted events, keys (through the key table, key_table.h)
//   panels.cpp       menu, the docked panels, the engine strip, tooltip, release choice, help, notice
//   state_dump.cpp   the JSON state file and pictures the window tests read
// Only viewer/window includes this. Main (window) thread only.
#pragma once
#include <chrono>
#include <deque>
#include <functional>
#include <memory>
#include <string>
#include <unordered_map>
#include <vector>

#include "viewer/gl/gl_renderer.h"
#include "viewer/panels/panel_asking.h"
#include "viewer/panels/panel_judgments.h"
#include "viewer/panels/panel_structure.h"
#include "viewer/scene/dock_layout.h"
#include "viewer/scene/map_settings.h"
#include "viewer/scene/undo_feed.h"
#include "viewer/window/app.h"
#include "viewer/window/input_script.h"

struct GLFWwindow;

namespace kith {

using Clock = std::chrono::steady_clock;

// The docked panels (viewer/scene/dock_layout.h), left column first, then the right.
enum DockId {
  kDockColours, kDockSelected, kDockStructure,                   // left
  kDockMap, kDockMore, kDockJudgments, kDockAgreement, kDockCount  // right
};
constexpr int kDockRightFirst = kDockMap;
constexpr const char* kDockNames[kDockCount] = {"Colours", "Selected items", "Structure", "Map",
                                                "More", "Judgments", "Agreement"};
constexpr float kStripHeight = 54.f;        // the engine strip along the bottom
constexpr float kLeftColumnWidth = 320.f;   // the columns' widths when the window has room
constexpr float kRightColumnWidth = 320.f;
// The right column while the Judgments panel is in it: its list has seven columns (id, anchor,
// nearer, farther, person, time, kind) that 320 pixels cut to single letters.
constexpr float kJudgmentsColumnWidth = 460.f;

// An input event from GLFW or the script, handled after ImGui has seen the frame's input.
struct QueuedEvent {
  enum Kind { kMove, kButton, kScroll, kKey } kind;
  glm::vec2 pos{0.f};
  int button = 0, action = 0, key = 0, mods = 0;
  float amount = 0.f;
};

struct App {
  App(const Collection& c, MapFeed& f, const WindowOptions& o, WindowHooks h);

  const Collection& collection;
  MapFeed& feed;
  UndoFeed* undo_feed = nullptr;  // the same feed: undo and redo (viewer/scene/undo_feed.h)
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
  MapSettings settings;                       // the sliders and the refusal notice
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
  bool show_colours = true, show_selected = true, show_map = true, show_more = true, show_strip = true;
  bool show_advanced = false, show_all_selected = false;  // the folds in Map and Selected items
  DockLayout dock;                       // this frame's places (lay_out_docks), in window pixels
  float dock_wanted[kDockCount] = {};    // the height each panel's content took last frame
  char search_text[128] = "";
  std::vector<int> search_hits;
  int tag_column_choice = 0;
  int editing = -1;            // the Setting whose slider is held, -1 for none
  float editing_value = 0.f;   // its value while held (posted on release)
  float control_rects[kSettingCount][4] = {};  // each slider's x0, y0, x1, y1 in window pixels (state dump)
  std::string toast;
  Clock::time_point toast_until;

  // Figures.
  uint64_t last_generation = 0;
  std::vector<double> frame_seconds;
  size_t pictures_in_at = 0;  // frame_seconds.size() when the last picture reached the atlas (0: not yet)
  float fps = 0.f;
  int frame = 0;
  Clock::time_point started = Clock::now();

  double seconds() const { return std::chrono::duration<double>(Clock::now() - started).count(); }
  void say(const std::string& text);
  // The window's path for every command: MapFeed::prepare (checked, recorded, numbered), then
  // post, then the on_post hook. Returns "" and fills *seq (if given) when posted, else why not
  // (also said). `body` is left as the feed completed it (a new judgment's id).
  std::string post_checked(CommandBody& body, uint64_t* seq = nullptr, bool say_refusal = true);
  uint64_t post(CommandBody body);  // the same; 0 when refused
  bool paused() const { return view->snapshot() && view->snapshot()->paused; }
  void toggle_pause();
  void undo(bool redo);  // ctrl+Z / ctrl+shift+Z: says what it did, and records it in the session
  void set_view(const std::function<void(ViewOptions&)>& change);
  void cycle_colour();
  void select_all();
  void save_picture(const std::string& path);
  void save_picture_now();  // F12: a time-stamped file in the current folder
  void dump_state(const std::string& path);

  // input.cpp
  void handle_key(int key, int mods);
  bool ask(KeyAction action);  // an asking action from a key, a button or the Ask menu
  void apply_script_events();
  void process_queue();
  // panels.cpp
  void lay_out_docks();  // before the frame's panels and the camera's free area
  void panels();
  void menu_bar();
  void panel_colours();
  void panel_map();
  void setting_sliders(bool blend);  // the blend's balance, or the advanced ones
  void panel_selection();
  void engine_strip(const DockRect& rect);
  std::string engine_progress(const Snapshot* s) const;  // "140 steps per second, about 3 s to go"

  void overlays();
  void help_overlay();
  void notice_line();
  void update_title();
  std::string title_text() const;  // what update_title shows (also in the state dump)
};

// input.cpp: routes the window's mouse, wheel and key events into app->queue.
void install_input_callbacks(GLFWwindow* window);

}  // namespace kith
