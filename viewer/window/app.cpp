// The map window: set-up, the loop and tear-down (run_window), and the App's small helpers.
// The rest of the window is in input.cpp, panels.cpp and state_dump.cpp (see app_state.h). Index:
//   [SECTION] options and helpers
//   [SECTION] App: posting commands, small actions
//   [SECTION] main loop: set-up, poll / new frame / panels / draw / swap, tear-down
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
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <fstream>
#include <nlohmann/json.hpp>

#include "solver/asking/teach.h"
#include "solver/io/safe_file.h"
#include "viewer/panels/ui_style.h"
#include "viewer/scene/exit_code.h"
#include "viewer/window/app_state.h"
#include "viewer/window/engine_feed.h"

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

// ============================================================================ [SECTION] App: posting commands, small actions

App::App(const Collection& c, MapFeed& f, const WindowOptions& o, WindowHooks h)
    : collection(c),
      feed(f),
      options(o),
      hooks(std::move(h)),
      settings(c.features.cols() > 0, [this](CommandBody& body, uint64_t* seq) {
        return post_checked(body, seq, false);  // the notice says it
      }) {}

void App::say(const std::string& text) {
  toast = text;
  toast_until = Clock::now() + std::chrono::milliseconds(2500);
}

std::string App::post_checked(CommandBody& body, uint64_t* seq, bool say_refusal) {
  if (const std::string refused = feed.prepare(body); !refused.empty()) {
    if (say_refusal) say(refused);
    return refused;
  }
  const uint64_t s = feed.post(body);
  if (seq) *seq = s;
  if (hooks.on_post) hooks.on_post(body, s);
  return "";
}

uint64_t App::post(CommandBody body) {
  uint64_t seq = 0;
  post_checked(body, &seq);
  return seq;
}

void App::undo(bool redo) {
  if (!undo_feed) return;
  std::string refused;
  const std::string what = redo ? undo_feed->redo(&refused) : undo_feed->undo(&refused);
  if (what.empty()) return say(redo ? "nothing to redo" : "nothing to undo");
  // The commands that were taken are recorded already; the event says why they happened.
  if (hooks.record_event) hooks.record_event(event::Undone{redo, what});
  if (!refused.empty()) return say(std::string(redo ? "redo" : "undo") + " of " + what + ", in part: " + refused);
  say(std::string(redo ? "redid: " : "undid: ") + what);
}

void App::toggle_pause() {
  if (paused()) {
    post(cmd::Resume{});
    say("running");
  } else {
    post(cmd::Pause{});
    say("held");
  }
}

void App::set_view(const std::function<void(ViewOptions&)>& change) {
  ViewOptions o = view->options();
  change(o);
  view->set_options(o);
}

void App::cycle_colour() {
  set_view([&](ViewOptions& o) {
    // tag columns in order, then the numeric columns, judgments, moved, plain
    auto& by = o.colour_by;
    const int tags = int(collection.tags.size()), numbers = int(collection.feature_names.size());
    if (by.kind == ColourKind::kTag && by.tag_column + 1 < tags) {
      ++by.tag_column;
    } else if (by.kind == ColourKind::kTag && numbers > 0) {
      by = {ColourKind::kColumn, -1, 0};
    } else if (by.kind == ColourKind::kColumn && by.feature_column + 1 < numbers) {
      ++by.feature_column;
    } else if (by.kind == ColourKind::kTag || by.kind == ColourKind::kColumn) {
      by.kind = ColourKind::kJudgments;
    } else if (by.kind == ColourKind::kJudgments) {
      by.kind = ColourKind::kDisplacement;
    } else if (by.kind == ColourKind::kDisplacement) {
      by.kind = ColourKind::kPlain;
    } else {
      by = tags > 0 ? ColourBy{ColourKind::kTag, 0, -1} : numbers > 0 ? ColourBy{ColourKind::kColumn, -1, 0}
                                                                       : ColourBy{ColourKind::kPlain, -1, -1};
    }
  });
  say("colour: " + view->colour_title());
}

void App::select_all() {
  std::vector<int> all(view->positions().size());
  for (size_t i = 0; i < all.size(); ++i) all[i] = int(i);
  view->selection().set(all);
  view->selection_changed();
}

namespace {
void glfw_error(int code, const char* text) { std::fprintf(stderr, "kith: window system error %d: %s\n", code, text); }
}  // namespace

// ============================================================================ [SECTION] main loop

int run_window(const Collection& collection, MapFeed& given, const WindowOptions& options, WindowHooks hooks) {
  UndoFeed undo_feed(given);  // every command the window sends passes it (ctrl+Z, ctrl+shift+Z)
  MapFeed& feed = undo_feed;
  if (std::string e = options.IsValid(); !e.empty()) {
    std::fprintf(stderr, "kith open: %s\n", e.c_str());
    return kExitUsage;
  }
  App app(collection, feed, options, std::move(hooks));
  app.undo_feed = &undo_feed;
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
  install_input_callbacks(app.window);
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
      links.post = [&app](CommandBody& body) { return app.post_checked(body); };
      links.record_event = app.hooks.record_event;
      links.snapshot = [&app] { return app.view->snapshot(); };
      links.judgments = [&app] { return app.view->judgments(); };
      links.selection = [&app] { return app.view->selection().items(); };
      links.now = [] { return std::chrono::duration<double>(std::chrono::system_clock::now().time_since_epoch()).count(); };
      app.asking = std::make_unique<AskingPanel>(collection, *app.view, std::move(links), app.index_of_id);
      app.asking->on_action = [&app](KeyAction a) { app.ask(a); };
      app.asking->set_caption(options.caption_column);
      for (const std::string& name : options.people)
        if (const std::string e = app.asking->desk().add_person(name, Palette::person_colour(app.asking->desk().flow().people().size()));
            !e.empty())
          std::fprintf(stderr, "kith open: --people: %s\n", e.c_str());
    }
    app.interaction->on_post = app.hooks.on_post;
    app.show_panels = options.panels;
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
        app.settings.update(*s, app.seconds());
        if (app.hooks.on_snapshot) app.hooks.on_snapshot(s);
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
      app.lay_out_docks();
      // The camera frames the free map area (framebuffer pixels), so fitting and flying to an item
      // centre it there and not under a panel. A question screen frames the map itself, between
      // its banner and its band (AskingPanel::frame_map), on the whole window.
      {
        const DockRect& m = app.dock.map_area;
        glfwGetFramebufferSize(app.window, &fbw, &fbh);
        app.view->camera().set_viewport(fbw, fbh);
        if (app.asking && app.asking->desk().asking())
          app.view->set_free_area(0.f, 0.f, float(fbw), float(fbh));
        else
          app.view->set_free_area(m.x0 * app.fb_scale, m.y0 * app.fb_scale, m.x1 * app.fb_scale, m.y1 * app.fb_scale);
      }
      app.process_queue();
      app.interaction->per_frame();
      if (app.show_panels) app.panels();
      app.overlays();
      ImGui::Render();

      glfwGetFramebufferSize(app.window, &fbw, &fbh);
      app.view->frame(dt, fbw, fbh);
      if (app.pictures_in_at == 0 && app.view->atlas() && !app.view->atlas()->loading())
        app.pictures_in_at = app.frame_seconds.size();
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
      undo_feed.end_step();  // what this frame sent is one step
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
      // The frames once every picture was in (the same figure without loading).
      if (app.pictures_in_at > 0) {
        std::vector<double> after(app.frame_seconds.begin() + std::min(app.frame_seconds.size(), app.pictures_in_at + 1),
                                  app.frame_seconds.end());
        std::sort(after.begin(), after.end());
        double total = 0;
        for (double x : after) total += x;
        r["frames_with_pictures"] = after.size();
        r["mean_fps_with_pictures"] = total > 0 ? after.size() / total : 0.0;
        r["median_frame_ms_with_pictures"] = after.empty() ? 0.0 : after[after.size() / 2] * 1000.0;
      }
      r["pictures"] = app.view->atlas() ? app.view->atlas()->ready_count() : 0;
      r["picture_min_pixels"] = app.view->detail().pixels();
      SafeWriteOptions file;
      file.replace = false;
      const std::string name = fresh_name(options.fps_report);
      if (const std::string e = write_file_safely(name, r.dump(1) + "\n", file); !e.empty())
        std::fprintf(stderr, "kith open: %s\n", e.c_str());
      else if (name != options.fps_report)
        std::fprintf(stderr, "kith open: wrote %s (%s is already there)\n", name.c_str(), options.fps_report.c_str());
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
  if (!feed) feed = std::make_unique<StillFeed>(collection.ids, rough_positions(collection), judgments, engine);
  if (!hooks.teach) hooks.teach = default_window_hooks().teach;
  return run_window(collection, *feed, options, std::move(hooks));
}

}  // namespace kith
