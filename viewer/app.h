// The map window: a GLFW window with an OpenGL 3.3 core context (libepoxy), Dear ImGui panels
// and the live map (MapView over GlRenderer, MapInteraction for the mouse). run_window() owns the
// main loop: set-up, then per frame poll / new frame / panels / draw / swap, then tear-down.
// `kith open` and `kith demo` call it. Main thread only (GLFW requires it).
#pragma once
#include <functional>
#include <string>
#include <vector>

#include "solver/collection.h"
#include "solver/engine.h"
#include "solver/judgment.h"
#include "viewer/map_feed.h"
#include "viewer/map_interaction.h"
#include "viewer/map_view.h"

namespace kith {

struct WindowOptions {
  int width = 1280;              // window size in screen pixels (default: 1280)
  int height = 800;              // (default: 800)
  std::string title;             // collection name for the title bar (default: the file name)
  std::string session_state;     // e.g. "saved", "not saved" for the title bar (default: "")
  ViewOptions view;              // (default: ViewOptions{})
  bool vsync = true;             // (default: on; benchmarks turn it off)
  bool panels = true;            // (default: on; Tab toggles)
  bool auto_rotate = false;      // (default: off)
  std::vector<std::string> people;  // people listed for asking at the start, in turn order (default: none)
  // What the controls show at first; the engine's own options decide (run_window(engine) copies them).
  double blend = 1.0, perplexity = 30.0, theta = 0.5;
  // Test and benchmark hooks (hidden options of kith open):
  int frames = 0;                // quit after this many frames; 0 = until the window closes (default: 0)
  std::string script;            // replayable input events (viewer/input_script.h) (default: none)
  std::string screenshot;        // PNG of the last frame (default: none)
  std::string fps_report;        // JSON with frame-time figures at the end (default: none)
  std::string IsValid() const;
};

// Optional links to other features; each may be left empty.
struct WindowHooks {
  TeachHook teach;                                                 // drag -> judgments
  std::function<void(const CommandBody&, uint64_t seq)> on_post;   // every command the window posts
  // Used by `kith demo` (all main thread):
  std::function<void()> on_open;                                   // the window opened (before the first frame)
  std::function<std::string(int key, int mods)> on_key;            // keys the window leaves unused; returns a
                                                                   // line to show briefly ("" for none)
  std::function<bool(std::vector<int>* items)> take_selection;     // once per frame: true = select *items
  std::string panel_title;                                         // an extra panel, shown when
  std::function<std::vector<std::string>()> panel_lines;           // panel_lines is set: its text lines
  std::function<void(const std::shared_ptr<const Snapshot>&)> on_snapshot;  // each new snapshot shown
  // Records something that is not a command to the engine (a "can't tell" answer, a person
  // added, renamed or given a colour, a re-asked question) in the session, committed before it
  // returns. `kind` is a short word ("cant_tell", "person", ...), `detail` a JSON object as text.
  // Returns "" when written (or when there is no session to write to), else why it was not.
  // Judgments, retractions and pins are not events: they go through MapFeed::prepare/post.
  std::function<std::string(const std::string& kind, const std::string& detail)> record_event;
  // Sessions (viewer/session_link.h, viewer/session_menu.h):
  std::function<std::string()> title_state;  // the saving state for the title bar (polled each second)
  std::function<void()> menus;               // more menus, drawn inside the main menu bar
  std::function<void()> windows;             // more windows, drawn once per frame
};

// The hooks every window gets unless told otherwise: teach through solver/teach.h when built in.
WindowHooks default_window_hooks();

// Runs the window until closed (or options.frames). Returns a kith exit code; prints problems.
int run_window(const Collection& collection, MapFeed& feed, const WindowOptions& options,
               std::vector<Judgment> judgments = {}, WindowHooks hooks = {});

// Convenience: starts the live engine (or a still map when the build has none) and runs the window.
int run_window(const Collection& collection, const EngineOptions& engine, const WindowOptions& options,
               std::vector<Judgment> judgments = {}, WindowHooks hooks = {});

// Is there a display a window could open on? (DISPLAY or WAYLAND_DISPLAY set.)
bool display_available();

}  // namespace kith
