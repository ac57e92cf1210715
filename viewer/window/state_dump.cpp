// The window's state file and pictures: what the window tests read (input script `dump` and
// `shot`, kith open --screenshot). See app_state.h.
#include <epoxy/gl.h>
// epoxy first: GLFW must not pull in the system GL header.
#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>

#include <cstdio>
#include <ctime>
#include <nlohmann/json.hpp>

#include "solver/io/safe_file.h"
#include "viewer/window/app_state.h"
#include "viewer/window/offscreen_render.h"

namespace kith {

void App::save_picture(const std::string& path) {
  int w = 0, h = 0;
  glfwGetFramebufferSize(window, &w, &h);
  glReadBuffer(GL_BACK);
  const Picture pic = renderer->read_pixels(w, h);
  // A picture never writes over a file: a name in use gives the next free "NAME-2.png", and says so.
  const std::string name = fresh_name(path);
  SafeWriteOptions file;
  file.replace = false;
  const std::string e = write_png(name, pic, file);
  const std::string note = name == path ? "" : " (" + path + " is already there)";
  say(e.empty() ? "saved " + name + note : e);
  if (!e.empty()) std::fprintf(stderr, "kith open: %s\n", e.c_str());
  else if (!note.empty())
    std::fprintf(stderr, "kith open: saved %s%s\n", name.c_str(), note.c_str());
}

void App::save_picture_now() {
  char name[64];
  const std::time_t t = std::time(nullptr);
  std::strftime(name, sizeof name, "kith-map-%Y%m%d-%H%M%S.png", std::localtime(&t));
  save_picture(name);
}

void App::dump_state(const std::string& path) {
  using nlohmann::json;
  json j;
  j["frame"] = frame;
  j["width"] = view->camera().width();
  j["height"] = view->camera().height();
  j["camera"] = view->camera().str();
  j["live"] = feed.live();
  j["title"] = title_text();
  j["undo_steps"] = undo_feed ? undo_feed->undo_depth() : 0;
  j["redo_steps"] = undo_feed ? undo_feed->redo_depth() : 0;
  j["said"] = Clock::now() < toast_until ? toast : "";
  json items = json::array();
  const auto& pos = view->positions();
  for (size_t i = 0; i < pos.size() && i < 20000; ++i) {
    const Projected p = view->camera().project(pos[i]);
    items.push_back({{"id", collection.ids[i]}, {"x", p.screen.x}, {"y", p.screen.y}, {"depth", p.depth},
                     {"visible", p.visible}, {"world", {pos[i].x, pos[i].y, pos[i].z}}});
  }
  j["items"] = items;
  const PictureAtlas* atlas = view->atlas();
  j["pictures"] = {{"shown", atlas != nullptr},
                   {"ready", atlas ? atlas->ready_count() : 0},
                   {"failed", atlas ? atlas->failed_count() : 0},
                   {"loading", atlas && atlas->loading()},
                   {"size", view->picture_size()},
                   {"min_pixels", view->detail().pixels()}};
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
  j["commands"] = kCommandNames;  // every command the window may send, by name
  if (s) {
    const MapParameters& p = s->parameters;
    j["parameters"] = {{"perplexity", p.perplexity}, {"theta", p.theta},   {"blend", p.blend},
                       {"learning_rate", p.learning_rate}, {"exaggeration", p.exaggeration}, {"dof", p.dof}};
    json refusals = json::array();
    for (const Refusal& r : s->refusals)
      refusals.push_back({{"seq", r.seq}, {"command", r.command}, {"reason", r.reason}});
    j["refusals"] = refusals;
    j["judgment_set"] = {{"version", s->judgments->version()}, {"size", s->judgments->size()},
                         {"active", s->judgments->active()}};
  }
  json controls = json::array();
  for (const SettingControl& c : settings.controls(s ? s->ids.size() : collection.size())) {
    const float* r = control_rects[size_t(c.setting)];
    controls.push_back({{"name", c.name},
                        {"value", settings.shown(c.setting, s.get())},
                        {"lo", c.lo},
                        {"hi", c.hi},
                        {"enabled", c.enabled},
                        {"pending", settings.pending(c.setting)},
                        {"rect", {r[0], r[1], r[2], r[3]}}});
  }
  j["controls"] = controls;
  // The docks as laid out this frame (window pixels): the free map area, the strip, each panel
  // shown (with its place) or left out.
  auto rect = [](const DockRect& r) { return json{r.x0, r.y0, r.x1, r.y1}; };
  j["map_area"] = rect(dock.map_area);
  j["strip"] = dock.strip.empty() ? json(nullptr) : rect(dock.strip);
  json panels = json::array();
  for (size_t k = 0; k < dock.panels.size(); ++k)
    panels.push_back({{"name", kDockNames[k]},
                      {"shown", !dock.panels[k].empty()},
                      {"squeezed", bool(dock.squeezed[k])},
                      {"rect", rect(dock.panels[k])}});
  j["panels"] = panels;
  if (s)
    j["engine"] = {{"progress", engine_progress(s.get())},
                   {"quiet", s->quiet},
                   {"steps_to_settle", s->steps_to_settle},
                   {"history", s->history->samples.size()}};
  j["notice"] = settings.notice_showing(seconds()) ? json(settings.notice()) : json(nullptr);
  j["bounds"] = {{view->bounds_lo().x, view->bounds_lo().y, view->bounds_lo().z},
                 {view->bounds_hi().x, view->bounds_hi().y, view->bounds_hi().z}};
  // The script's own state file: each dump to the same name replaces the last (never a session).
  if (const std::string e = write_file_safely(path, j.dump(1, ' ', false, json::error_handler_t::replace)); !e.empty())
    std::fprintf(stderr, "kith open: %s\n", e.c_str());
}

void glfw_error(int code, const char* text) { std::fprintf(stderr, "kith: window system error %d: %s\n", code, text); }

}  // namespace kith
