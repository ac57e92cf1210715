// kith open: the live map of a collection in a window.
#include <cstdio>
#include <filesystem>

#include "viewer/window/engine_feed.h"
#include "viewer/window/app.h"
#include "viewer/cli/cli_text.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/map_source.h"
#include "viewer/window/offscreen_render.h"
#include "viewer/session/session_link.h"
#include "viewer/window/session_menu.h"

namespace kith {

namespace {
const char* kHelp =
    "usage: kith open ITEMS [options]      (or just: kith ITEMS)\n"
    "Opens the live map of a collection in a window: the optimization runs while you look,\n"
    "select, drag and pin. Press H in the window for the keys.\n\n"
    "  --size WxH          window size (default: 1280x800)\n"
    "  --perplexity P      about how many neighbours each item listens to (default: 30)\n"
    "  --theta T           Barnes-Hut angle, 0 = exact (default: 0.5)\n"
    "  --blend B           weight of judgments against features (default: 1)\n"
    "  --seed S            random seed (default: 42)\n"
    "  --paused            start with the optimization paused\n"
    "  --colour COLUMN     colour by this tag column (default: the first)\n"
    "  --dark              the night ground instead of paper\n"
    "  --turn              start with the slow turn on (for a shared screen)\n"
    "  --no-panels         start with the panels hidden (Tab shows them)\n"
    "  --people A,B,C      list these people for asking, in turn order (A in the window asks;\n"
    "                      default for a session: the people who answered in it before)\n"
    "  --read-only         with a session: look without writing (e.g. while another kith has it open)\n"
    "A session file (.kith) opens with its own settings, judgments, pins and last map, and\n"
    "everything done in the window is written to it at once. On a plain collection, the first\n"
    "judgment or pin starts a session file next to it (ITEMS.kith, or ITEMS-2.kith and so on;\n"
    "an existing file is never touched). The Session menu saves as, exports and opens others.\n";
}  // namespace

bool choose_colour(const Collection& c, const std::string& colour, WindowOptions* wo) {
  if (colour.empty()) return true;
  for (size_t t = 0; t < c.tags.size(); ++t)
    if (c.tags[t].name == colour) {
      wo->view.colour_by = {ColourKind::kTag, int(t)};
      return true;
    }
  std::fprintf(stderr, "kith open: --colour: no tag column named '%s'\n", colour.c_str());
  return false;
}

// A session (or a plain collection through a SessionLink that starts a file when needed): every
// judgment, pin and event is recorded before the engine sees it; the Session menu is added.
int run_linked(SessionLink& link, WindowOptions wo, const EngineOptions& eo) {
  std::unique_ptr<MapFeed> feed = make_engine_feed(link.collection(), eo, link.judgments(), link.start());
  if (!feed) {
    Points start = link.start();
    if (start.rows() == 0) start = rough_positions(link.collection());
    feed = std::make_unique<StillFeed>(link.collection().ids, start, link.judgments(), eo);
  }
  link.post_pins(*feed);
  std::unique_ptr<MapFeed> recorded = link.recording(*feed);
  SessionMenu menu(link, *recorded);
  const int code = run_window(link.collection(), *recorded, wo, menu.hooks(link.hooks(default_window_hooks())));
  if (auto s = feed->latest()) link.final_checkpoint(*s);
  return code;
}

int open_session(const std::string& path, WindowOptions wo, const std::string& colour, bool read_only,
                 bool start_paused) {
  if (!display_available()) {
    std::fprintf(stderr, "kith open: no display (DISPLAY is not set). Use 'kith render %s -o map.png' for a picture,\n"
                 "or run the window under xvfb-run.\n", path.c_str());
    return kExitUsage;
  }
  std::unique_ptr<SessionLink> link;
  try {
    link = std::make_unique<SessionLink>(path, read_only);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith open: %s\n", e.what());
    return kExitBadInput;
  }
  if (!choose_colour(link->collection(), colour, &wo)) return kExitUsage;
  for (size_t item : link->store()->missing_pictures())
    std::fprintf(stderr, "kith open: %s: the picture of item %s was not found (%s)\n", path.c_str(),
                 link->collection().ids[item].c_str(), link->collection().pictures[item].c_str());
  wo.title = std::filesystem::path(path).filename().string();
  if (wo.people.empty())  // the people who answered before, in the order they first did
    for (const SessionPerson& p : link->store()->people()) wo.people.push_back(p.name);
  EngineOptions eo;
  static_cast<MapParameters&>(eo) = link->settings();  // the session's own settings
  eo.start_paused = start_paused;
  return run_linked(*link, wo, eo);
}

int cmd_open(const Args& args) {
  FlagReader flags(args, "open");
  if (flags.flag("--help") || flags.flag("-h")) {
    std::fputs(kHelp, stdout);
    return kExitOk;
  }
  WindowOptions wo;
  if (auto v = flags.value("--size"); v && !parse_size(*v, &wo.width, &wo.height)) {
    std::fprintf(stderr, "kith open: --size expects WxH, e.g. 1600x1000, got '%s'\n", v->c_str());
    return kExitUsage;
  }
  std::string colour;
  if (auto v = flags.value("--colour")) colour = *v;
  if (auto v = flags.value("--color")) colour = *v;
  wo.view.dark = flags.flag("--dark");
  wo.auto_rotate = flags.flag("--turn");
  wo.panels = !flags.flag("--no-panels");
  if (auto v = flags.value("--people")) wo.people = split_commas(*v);
  // Hidden options for tests and benchmarks.
  double generate = 0, frames = 0;
  if (auto v = flags.value("--generate"); v && (!parse_number(*v, &generate) || generate < 2)) {
    std::fprintf(stderr, "kith open: --generate expects a count >= 2\n");
    return kExitUsage;
  }
  if (auto v = flags.value("--frames"); v && (!parse_number(*v, &frames) || frames < 0)) {
    std::fprintf(stderr, "kith open: --frames expects a count >= 0\n");
    return kExitUsage;
  }
  wo.frames = int(frames);
  if (auto v = flags.value("--script")) wo.script = *v;
  if (auto v = flags.value("--screenshot")) wo.screenshot = *v;
  if (auto v = flags.value("--fps-report")) wo.fps_report = *v;
  if (flags.flag("--no-vsync")) wo.vsync = false;
  const bool read_only = flags.flag("--read-only");
  EngineOptions eo;
  if (!read_engine_flags(flags, "open", &eo)) return kExitUsage;
  std::vector<std::string> positional;
  if (!flags.finish(&positional)) {
    std::fprintf(stderr, "kith %s\n", flags.error().c_str());
    return kExitUsage;
  }
  if (positional.size() > 1) {
    std::fprintf(stderr, "kith open: one collection at a time, got %zu\n", positional.size());
    return kExitUsage;
  }
  if (std::string e; !eo.IsValid(&e)) {
    std::fprintf(stderr, "kith open: %s\n", e.c_str());
    return kExitUsage;
  }
  if (!positional.empty() && std::filesystem::path(positional[0]).extension() == ".kith")
    return open_session(positional[0], wo, colour, read_only, eo.start_paused);
  if (read_only) {
    std::fprintf(stderr, "kith open: --read-only is for session files (.kith)\n");
    return kExitUsage;
  }
  int code = kExitOk;
  auto collection = load_items_or_report("open", positional.empty() ? "" : positional[0], size_t(generate), &code);
  if (!collection) return code;
  if (!colour.empty()) {
    bool found = false;
    for (size_t t = 0; t < collection->tags.size() && !found; ++t)
      if (collection->tags[t].name == colour) wo.view.colour_by = {ColourKind::kTag, int(t)}, found = true;
    if (!found) {
      std::fprintf(stderr, "kith open: --colour: no tag column named '%s'\n", colour.c_str());
      return kExitUsage;
    }
  }
  if (!display_available()) {
    std::fprintf(stderr,
                 "kith open: no display (DISPLAY is not set). Use 'kith render %s -o map.png' for a picture,\n"
                 "or run the window under xvfb-run.\n",
                 positional.empty() ? "ITEMS" : positional[0].c_str());
    return kExitUsage;
  }
  // Judgments and pins made on a plain collection start a session file next to it (never over
  // an existing file); a generated collection stays in memory.
  SessionLink link(std::move(*collection), eo, positional.empty() ? "" : positional[0]);
  return run_linked(link, wo, eo);
}

}  // namespace kith
