// kith render: a PNG of a collection's map with no display at all (EGL surfaceless, llvmpipe).
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <thread>

#include "viewer/window/engine_feed.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/map_source.h"
#include "viewer/window/offscreen_render.h"

namespace kith {

namespace {
const char* kHelp =
    "usage: kith render ITEMS -o map.png [options]\n"
    "Draws the map of a collection to a PNG without any display or window (EGL, no X needed).\n"
    "The map is computed first (the live engine, for --iterations steps).\n\n"
    "  -o, --output FILE      the PNG to write (required)\n"
    "  --size WxH             picture size in pixels (default: 1280x800)\n"
    "  --camera Y,P,D[,X,Y,Z] yaw and pitch in radians, distance, optional target point\n"
    "                         (default: the whole map from a three-quarter view; without X,Y,Z\n"
    "                         the camera looks at the map's centre)\n"
    "  --colour COLUMN        colour by this tag column, or 'plain' (default: the first tag column)\n"
    "  --iterations N         optimization steps before drawing (default: 1000)\n"
    "  --select ID,ID,...     draw these items selected, with their picture cards\n"
    "  --dark                 the night ground instead of paper\n"
    "  --no-grid, --no-legend, --no-cards\n"
    "  --perplexity P, --theta T, --blend B, --seed S   engine options (see kith open --help)\n";
}  // namespace

int cmd_render(const Args& args) {
  FlagReader flags(args, "render");
  if (flags.flag("--help") || flags.flag("-h")) {
    std::fputs(kHelp, stdout);
    return kExitOk;
  }
  RenderOptions ro;
  std::string output;
  if (auto v = flags.value("-o")) output = *v;
  if (auto v = flags.value("--output")) output = *v;
  if (auto v = flags.value("--size"); v && !parse_size(*v, &ro.width, &ro.height)) {
    std::fprintf(stderr, "kith render: --size expects WxH, e.g. 1600x1000, got '%s'\n", v->c_str());
    return kExitUsage;
  }
  if (auto v = flags.value("--camera")) {
    std::string error;
    ro.camera = Camera::parse(*v, &error);
    ro.camera_at_centre = std::count(v->begin(), v->end(), ',') == 2;
    if (!ro.camera) {
      std::fprintf(stderr, "kith render: %s\n", error.c_str());
      return kExitUsage;
    }
  }
  std::string colour = "", select;
  if (auto v = flags.value("--colour")) colour = *v;
  if (auto v = flags.value("--color")) colour = *v;
  if (auto v = flags.value("--select")) select = *v;
  double iterations = 1000, generate = 0;
  if (auto v = flags.value("--iterations"); v && (!parse_number(*v, &iterations) || iterations < 0)) {
    std::fprintf(stderr, "kith render: --iterations expects a whole number >= 0, got '%s'\n", v->c_str());
    return kExitUsage;
  }
  if (auto v = flags.value("--generate"); v && (!parse_number(*v, &generate) || generate < 2)) {
    std::fprintf(stderr, "kith render: --generate expects a count >= 2\n");
    return kExitUsage;
  }
  ro.view.dark = flags.flag("--dark");
  ro.view.grid = !flags.flag("--no-grid");
  ro.legend = !flags.flag("--no-legend");
  ro.view.cards = !flags.flag("--no-cards");
  EngineOptions eo;
  if (!read_engine_flags(flags, "render", &eo)) return kExitUsage;
  std::vector<std::string> positional;
  if (!flags.finish(&positional)) {
    std::fprintf(stderr, "kith %s\n", flags.error().c_str());
    return kExitUsage;
  }
  if (output.empty()) {
    std::fprintf(stderr, "kith render: where to? give -o map.png\n");
    return kExitUsage;
  }
  if (positional.size() > 1) {
    std::fprintf(stderr, "kith render: one collection at a time, got %zu\n", positional.size());
    return kExitUsage;
  }
  int code = kExitOk;
  auto collection = load_items_or_report("render", positional.empty() ? "" : positional[0], size_t(generate), &code);
  if (!collection) return code;

  if (!colour.empty()) {
    bool found = colour == "plain";
    for (size_t t = 0; t < collection->tags.size() && !found; ++t)
      if (collection->tags[t].name == colour) {
        ro.view.colour_by = {ColourKind::kTag, int(t)};
        found = true;
      }
    if (colour == "plain") ro.view.colour_by.kind = ColourKind::kPlain;
    if (!found) {
      std::fprintf(stderr, "kith render: --colour: no tag column named '%s'\n", colour.c_str());
      return kExitUsage;
    }
  }
  if (!select.empty()) {
    size_t start = 0;
    while (start <= select.size()) {
      const size_t comma = std::min(select.find(',', start), select.size());
      const std::string id = select.substr(start, comma - start);
      int found = -1;
      for (size_t i = 0; i < collection->ids.size() && found < 0; ++i)
        if (collection->ids[i] == id) found = int(i);
      if (found < 0) {
        std::fprintf(stderr, "kith render: --select: no item with id '%s'\n", id.c_str());
        return kExitBadInput;
      }
      ro.selected.push_back(found);
      start = comma + 1;
    }
  }

  Points positions;
  auto feed = iterations > 0 ? make_engine_feed(*collection, eo) : nullptr;
  if (feed) {
    std::fprintf(stderr, "kith render: computing the map (%g iterations)...\n", iterations);
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
  if (std::string e = render_map_png(*collection, positions, ro, output); !e.empty()) {
    std::fprintf(stderr, "kith render: %s\n", e.c_str());
    return kExitInternal;
  }
  std::printf("wrote %s (%dx%d, %zu items)\n", output.c_str(), ro.width, ro.height, collection->size());
  return kExitOk;
}

}  // namespace kith
