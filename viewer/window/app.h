// The map window: a GLFW window with an OpenGL 3.3 core context (libepoxy), Dear ImGui panels
// and the live map (MapView over GlRenderer, MapInteraction for the mouse). run_window() owns the
// main loop: set-up, then per frame poll / new frame / panels / draw / swap, then tear-down.
// `kith open` and `kith demo` call it. Main thread only (GLFW requires it).
#pragma once
#include <functional>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/live/engine.h"
#include "solver/base/judgment.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/map_interaction.h"
#include "viewer/scene/map_view.h"
#include "viewer/scene/window_hooks.h"

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
  int caption_column = -1;       // the tag column the question cards show; -1: the id (default: -1)
  // Test and benchmark hooks (hidden options of kith open):
  int frames = 0;                // quit after this many frames; 0 = until the window closes (default: 0)
  std::string script;            // replayable input events (viewer/window/input_script.h) (default: none)
  std::string screenshot;        // PNG of the last frame (default: none)
  std::string fps_report;        // JSON with frame-time figures at the end (default: none)
  bool print_saved = false;      // with a session: print each judgment once saved (SessionLink::print_saved)
  std::string IsValid() const;
};

// The hooks every window gets unless told otherwise: teach through solver/asking/teach.h when built in.
WindowHooks default_window_hooks();

// Runs the window until closed (or options.frames). Returns a kith exit code; prints problems.
// The judgments, the settings in force and the refusals it shows come from the feed's snapshots.
int run_window(const Collection& collection, MapFeed& feed, const WindowOptions& options, WindowHooks hooks = {});

// Convenience: starts the live engine (or a still map when the build has none) and runs the window.
int run_window(const Collection& collection, const EngineOptions& engine, const WindowOptions& options,
               std::vector<Judgment> judgments = {}, WindowHooks hooks = {});

// Is there a display a window could open on? (DISPLAY or WAYLAND_DISPLAY set.)
bool display_available();

}  // namespace kith
