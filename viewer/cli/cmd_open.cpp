// kith open: the live map of a collection in a window.
#include <cstdio>
#include <filesystem>

#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/shared_flags.h"
#include "viewer/session/session_link.h"
#include "viewer/window/app.h"
#include "viewer/window/engine_feed.h"
#include "viewer/window/offscreen_render.h"
#include "viewer/window/session_menu.h"

namespace kith {

namespace {
const char* const kUsage =
    "usage: kith open ITEMS|SESSION [options]      (or just: kith ITEMS)\n"
    "Opens the live map of a collection in a window: the optimization runs while you look,\n"
    "select, drag and pin. Press H in the window for the keys.\n";

const char* const kFooter =
    "A session file (.kith) opens with its own settings, judgments, pins and last map, and\n"
    "everything done in the window is written to it at once. On a plain collection, the first\n"
    "judgment or pin starts a session file next to it (ITEMS.kith, or ITEMS-2.kith and so on;\n"
    "an existing file is never touched). Opening the collection again continues that session\n"
    "when it was made from the same content (the title bar says so; --fresh starts anew); a\n"
    "session of the same name made from other content is left alone. The Session menu saves as,\n"
    "exports and opens others.\n";

const char* const kOptions =
    "  --size WxH            window size (default: 1280x800)\n"
    "  --paused              start with the optimization paused\n"
    "  --caption COLUMN      the text column the question cards show, e.g. a name (default: id)\n"
    "  --dark                the night ground instead of paper\n"
    "  --turn                start with the slow turn on (for a shared screen)\n"
    "  --no-panels           start with the panels hidden (Tab shows them)\n"
    "  --no-pictures         start with every item as a disc, also those with a picture (I toggles)\n"
    "  --people A,B,C        list these people for asking, in turn order (A in the window asks;\n"
    "                        default for a session: the people who answered in it before)\n"
    "  --read-only           with a session: look without writing (e.g. while another kith has it open)\n"
    "  --fresh               with ITEMS: do not continue the session made from it before\n";
const char* const kHidden =
    // Test hooks, not in the help.
    "--generate N, --frames N, --script FILE, --screenshot FILE, --fps-report FILE, --no-vsync, --full-detail, --print-saved";

}  // namespace

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
  link.print_saved(wo.print_saved);
  std::unique_ptr<MapFeed> recorded = link.recording(*feed);
  SessionMenu menu(link, *recorded);
  const int code = run_window(link.collection(), *recorded, wo, menu.hooks(link.hooks(default_window_hooks())));
  if (auto s = feed->latest()) link.final_checkpoint(*s);
  return code;
}

int open_session(const std::string& path, WindowOptions wo, const std::string& colour, const std::string& caption,
                 bool read_only, bool start_paused, const std::string& continued_from = "") {
  if (!display_available()) {
    std::fprintf(stderr,
                 "kith open: no display (DISPLAY is not set). Use 'kith render %s -o map.png' for a picture,\n"
                 "or run the window under xvfb-run.\n",
                 path.c_str());
    return kExitUsage;
  }
  std::unique_ptr<SessionLink> link;
  try {
    link = std::make_unique<SessionLink>(path, read_only);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith open: %s\n", e.what());
    return kExitBadInput;
  }
  if (!choose_colour("open", link->collection(), colour, &wo.view) ||
      !choose_caption("open", link->collection(), caption, &wo.caption_column))
    return kExitUsage;
  for (size_t item : link->store()->missing_pictures())
    std::fprintf(stderr, "kith open: %s: the picture of item %s was not found (%s)\n", path.c_str(),
                 link->collection().ids[item].c_str(), link->collection().pictures[item].c_str());
  wo.title = std::filesystem::path(path).filename().string();
  if (!continued_from.empty())
    wo.title += " (continued: made from " + std::filesystem::path(continued_from).filename().string() + ")";
  if (wo.people.empty())  // the people who answered before, in the order they first did
    for (const SessionPerson& p : link->store()->people()) wo.people.push_back(p.name);
  EngineOptions eo;
  static_cast<MapParameters&>(eo) = link->settings();  // the session's own settings
  eo.start_paused = start_paused;
  return run_linked(*link, wo, eo);
}

int cmd_open(const Args& args) {
  FlagReader flags("open", kUsage,
                   kOptions + colour_flag() + load_flags(true) + map_flags({"--perplexity", "--theta", "--blend", "--seed", "--metric"}), kFooter,
                   kHidden);
  if (!flags.read(args)) return flags.stop();
  WindowOptions wo;
  EngineOptions eo;
  size_t generate = 0;
  if (!flags.size("--size", &wo.width, &wo.height) || !flags.list("--people", &wo.people) ||
      !flags.count("--generate", &generate, 2, 100000000) || !flags.integer("--frames", &wo.frames, 0) ||
      !read_map_flags(flags, &eo))
    return flags.usage_error();
  const std::string colour = flags.text("--colour");
  const std::string caption = flags.text("--caption");
  wo.view.dark = flags.has("--dark");
  wo.auto_rotate = flags.has("--turn");
  wo.panels = !flags.has("--no-panels");
  wo.view.pictures = !flags.has("--no-pictures");
  wo.script = flags.text("--script");
  wo.screenshot = flags.text("--screenshot");
  wo.fps_report = flags.text("--fps-report");
  if (flags.has("--no-vsync")) wo.vsync = false;
  if (flags.has("--full-detail")) wo.view.moving_budget = 0;  // benchmarks: no level of detail
  wo.print_saved = flags.has("--print-saved");
  eo.start_paused = flags.has("--paused");
  const bool read_only = flags.has("--read-only");
  const std::vector<std::string>& positional = flags.positional();
  if (positional.size() > 1)
    return flags.usage_error("one collection at a time, got " + std::to_string(positional.size()));
  // A session opens with its own settings; the flags' values are still checked as the engine would.
  if (std::string e; !eo.IsValid(&e)) return flags.usage_error(e);
  if (!positional.empty() && is_session_path(positional[0])) {
    if (const int refused = refuse_reading_flags(flags, positional[0])) return refused;
    if (flags.has("--fresh")) return flags.usage_error("--fresh goes with ITEMS; a session always continues");
    return open_session(positional[0], wo, colour, caption, read_only, eo.start_paused);
  }
  if (read_only) return flags.usage_error("--read-only is for session files (.kith)");
  int code = kExitOk;
  InputOptions io;
  io.generate = generate;
  std::optional<CollectionInput> in = read_input(flags, positional.empty() ? "" : positional[0], &code, io);
  if (!in) return code;
  Collection* collection = &in->collection;
  if (std::string e; !eo.IsValid(&e, collection->size())) return flags.usage_error(e);
  if (const int refused = refuse_graph_perplexity(flags, *collection, eo)) return refused;
  if (const int bad = refuse_rows_without_direction("open", *collection, eo.metric)) return bad;
  if (!choose_colour("open", *collection, colour, &wo.view) ||
      !choose_caption("open", *collection, caption, &wo.caption_column))
    return kExitUsage;
  // The session this collection started before, made from the same content: continue it.
  if (!in->path.empty() && !flags.has("--fresh")) {
    const std::string earlier = SessionLink::earlier_session(in->path, content_hash(*collection));
    if (!earlier.empty()) {
      std::fprintf(stderr, "kith open: continuing %s, the session made from this collection (--fresh starts anew)\n",
                   earlier.c_str());
      return open_session(earlier, wo, colour, caption, false, eo.start_paused, in->path);
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
  SessionLink link(std::move(*collection), eo, positional.empty() ? "" : positional[0], reading_flags(in->reading));
  return run_linked(link, wo, eo);
}

}  // namespace kith
