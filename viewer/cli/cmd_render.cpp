// kith render: a PNG of a collection's map with no display at all (EGL surfaceless, llvmpipe).
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <thread>

#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/shared_flags.h"
#include "viewer/session/session_link.h"
#include "viewer/window/engine_feed.h"
#include "viewer/window/offscreen_render.h"

namespace kith {

namespace {
const char* const kUsage =
    "usage: kith render ITEMS|SESSION -o map.png [options]\n"
    "Draws the map of a collection to a PNG without any display or window (EGL, no X needed).\n"
    "For ITEMS the map is computed first (the live engine, for --iterations steps). A SESSION is\n"
    "drawn as its last saved map, pins marked; with --iterations, or when it has no map yet, the\n"
    "map is computed from its features, judgments and pins with its settings (the map settings\n"
    "below change them).\n";

const char* const kOptions =
    "  -o, --output FILE     the PNG to write (required)\n"
    "  --size WxH            picture size in pixels (default: 1280x800)\n"
    "  --camera Y,P,D[,X,Y,Z]\n"
    "                        yaw and pitch in radians, distance, optional target point\n"
    "                        (default: the whole map from a three-quarter view; without X,Y,Z\n"
    "                        the camera looks at the map's centre)\n"
    "  --iterations N        optimization steps before drawing, 0 = the start (default: 1000)\n"
    "  --select ID,ID,...    draw these items selected (framed)\n"
    "  --dark                the night ground instead of paper\n"
    "  --no-grid             no floor grid\n"
    "  --no-legend           no title and colour legend\n"
    "  --no-pictures         every item as a disc, also those with a picture\n";
}  // namespace

int cmd_render(const Args& args) {
  FlagReader flags(
      "render", kUsage,
      kOptions + colour_flag() + force_flag("FILE") + load_flags() + map_flags({"--perplexity", "--theta", "--blend", "--seed"}), "",
      "--generate N");  // a generated collection, for tests
  if (!flags.read(args)) return flags.stop();
  RenderOptions ro;
  EngineOptions eo;
  int64_t iterations = 1000;
  size_t generate = 0;
  std::vector<std::string> select;
  if (!flags.size("--size", &ro.width, &ro.height) || !flags.integer("--iterations", &iterations, 0, 10000000) ||
      !flags.count("--generate", &generate, 2, 100000000) || !flags.list("--select", &select) ||
      !read_map_flags(flags, &eo))
    return flags.usage_error();
  if (iterations == 0) eo.iterations = EngineOptions{}.iterations;  // "0 = the start": no engine runs
  if (const std::string problem = ro.IsValid(); !problem.empty()) return flags.usage_error(problem);
  if (flags.has("--camera")) {
    const std::string v = flags.text("--camera");
    std::string error;
    ro.camera = Camera::parse(v, &error);
    ro.camera_at_centre = std::count(v.begin(), v.end(), ',') == 2;
    if (!ro.camera) return flags.usage_error(error);
  }
  const std::string output = flags.text("--output"), colour = flags.text("--colour");
  ro.view.dark = flags.has("--dark");
  ro.view.grid = !flags.has("--no-grid");
  ro.legend = !flags.has("--no-legend");
  ro.view.pictures = !flags.has("--no-pictures");
  const std::vector<std::string>& positional = flags.positional();
  if (output.empty()) return flags.usage_error("where to? give -o map.png");
  if (positional.size() > 1)
    return flags.usage_error("one collection at a time, got " + std::to_string(positional.size()));
  const SafeWriteOptions rule = output_rule(flags, positional);
  if (const int refused = refuse_output(flags, output, rule)) return refused;
  int code = kExitOk;
  InputOptions io;
  io.generate = generate;
  std::optional<CollectionInput> in = read_input(flags, positional.empty() ? "" : positional[0], &code, io);
  if (!in) return code;
  const Collection* collection = &in->collection;
  std::vector<Judgment> judgments;
  std::optional<MapCheckpoint> saved;
  if (in->is_session()) {  // its settings, changed by the flags given; its judgments (the engine
                           // passes over retracted ones) and pins
    static_cast<MapParameters&>(eo) = in->session->settings();
    read_map_flags(flags, &eo);  // read once above already, so it cannot fail here
    judgments = in->session->judgments();
    ro.pinned = pinned_items(*in->session, collection->size());
    saved = in->session->last_checkpoint();
    if (saved && size_t(saved->positions.rows()) != collection->size()) saved.reset();
  }
  if (std::string e; !eo.IsValid(&e, collection->size())) return flags.usage_error(e);

  if (!choose_colour("render", *collection, colour, &ro.view)) return kExitUsage;
  for (const std::string& id : select) {
    int found = -1;
    for (size_t i = 0; i < collection->ids.size() && found < 0; ++i)
      if (collection->ids[i] == id) found = int(i);
    if (found < 0) {
      std::fprintf(stderr, "kith render: --select: no item with id '%s'\n", id.c_str());
      return kExitBadInput;
    }
    ro.selected.push_back(found);
  }

  Points positions;
  const bool draw_saved = saved && !flags.has("--iterations");
  auto feed = iterations > 0 && !draw_saved ? make_engine_feed(*collection, eo, judgments) : nullptr;
  if (feed && in->is_session()) post_pins(*in->session, *feed);
  if (draw_saved) {
    positions = saved->positions;
  } else if (feed) {
    std::fprintf(stderr, "kith render: computing the map (%lld iterations)...\n", static_cast<long long>(iterations));
    for (;;) {
      auto s = feed->latest();
      if (s && (s->iteration >= uint64_t(iterations) || s->settled)) {
        positions = s->positions;
        break;
      }
      std::this_thread::sleep_for(std::chrono::milliseconds(20));
    }
  } else {
    positions = rough_positions(*collection);
  }
  if (std::string e = render_map_png(*collection, positions, ro, output, rule); !e.empty())
    return write_failed(flags, e);
  std::printf("wrote %s (%dx%d, %zu items)\n", output.c_str(), ro.width, ro.height, collection->size());
  return kExitOk;
}

}  // namespace kith
