// kith export SESSION --layout out.csv|out.json | --judgments out.csv | --picture out.png | --flat out.csv:
// writes what a session holds in formats other tools read. The session is opened read-only (so
// it may be open in a window meanwhile); each output is written to a temporary file and renamed,
// and an existing session file is never overwritten by an export. Main thread only.
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <algorithm>

#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"
#include "viewer/window/offscreen_render.h"
#include "viewer/cli/session_cli.h"
#include "solver/measures/judgment_health.h"
#include "viewer/session/session_export.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith export SESSION [--layout out.csv|out.json] [--judgments out.csv] [--picture out.png]\n"
    "                           [--flat out.csv] [--people names|codes|leave-out] [--include-retracted]\n"
    "                           [--tag COLUMN] [--size WxH]\n"
    "\n"
    "Writes what a session holds for use elsewhere. Several exports may be given at once. The\n"
    "session is only read (it may be open in a window at the same time).\n"
    "\n"
    "exports:\n"
    "  --layout FILE         the map from the session's last checkpoint: id, x, y, z, the tag\n"
    "                        columns, group (clusters found in the map, empty = no group) and\n"
    "                        suspect score (0: the item's neighbours share its tag, 1: none do).\n"
    "                        CSV, or JSON when FILE ends in .json\n"
    "  --judgments FILE      every judgment as CSV: anchor,nearer,farther,person,time,kind,weight by id\n"
    "  --picture FILE        a PNG of the map from the last checkpoint, pins marked\n"
    "  --size WxH            size of --picture in pixels (default: 1280x800)\n"
    "  --flat FILE           a 2-D arrangement (for print or a slide): the same blended objective\n"
    "                        (features, judgments, pins) run in 2-D, started from the 3-D map seen\n"
    "                        along its flattest direction; CSV (or JSON) like --layout without z\n"
    "\n"
    "options:\n"
    "  --people RULE         in --judgments: names (default), codes (P1, P2, ... in order of first\n"
    "                        appearance) or leave-out (an empty person column)\n"
    "  --include-retracted   in --judgments: also withdrawn judgments (default: left out)\n"
    "  --tag COLUMN          the tag column for suspect scores (default: the first tag column)\n"
    "\n"
    "exit codes: 0 written, 2 bad usage, 3 the session cannot be read or has no map yet\n";

int usage_error(const std::string& message) {
  std::fprintf(stderr, "kith export: %s\n%s", message.c_str(), kUsage);
  return kExitUsage;
}

}  // namespace

int cmd_export(const Args& args) {
  session_cli::Parsed p;
  const std::string error = session_cli::parse(
      args, {"--layout", "--judgments", "--picture", "--flat", "--people", "--tag", "--size"}, {"--include-retracted"}, &p);
  if (p.help) {
    std::fputs(kUsage, stdout);
    return kExitOk;
  }
  if (!error.empty()) return usage_error(error);
  if (p.positional.size() != 1)
    return usage_error(p.positional.empty() ? "which session? give SESSION" : "one SESSION only");
  const std::string path = p.positional[0];
  if (!p.has("--layout") && !p.has("--judgments") && !p.has("--picture") && !p.has("--flat"))
    return usage_error("nothing to export: give --layout, --judgments, --picture or --flat");
  PeopleInExport people = PeopleInExport::kNames;
  if (p.has("--people") && !people_from_string(p.value("--people"), &people))
    return usage_error("--people is names, codes or leave-out, got '" + p.value("--people") + "'");
  for (const char* option : {"--layout", "--judgments", "--picture", "--flat"}) {
    if (!p.has(option)) continue;
    const std::string problem = check_export_target(p.value(option), path);
    if (!problem.empty()) {
      std::fprintf(stderr, "kith export: %s\n", problem.c_str());
      return kExitBadInput;
    }
  }

  try {
    SessionOpenOptions ro;
    ro.read_only = true;
    auto store = SessionStore::open(path, ro);
    const Collection c = store->collection();
    if (!p.value("--tag").empty()) {
      bool found = false;
      for (const auto& t : c.tags) found = found || t.name == p.value("--tag");
      if (!found) return usage_error("--tag: the session has no tag column '" + p.value("--tag") + "'");
    }

    if (p.has("--layout")) {
      const auto checkpoint = store->last_checkpoint();
      if (!checkpoint) {
        std::fprintf(stderr, "kith export: %s has no map yet: open it (kith open %s) and let the map settle first\n",
                     path.c_str(), path.c_str());
        return kExitBadInput;
      }
      const std::string out = p.value("--layout");
      const std::string problem =
          export_layout(c, checkpoint->positions, checkpoint->iteration, out, p.value("--tag"), path);
      if (!problem.empty()) {
        std::fprintf(stderr, "kith export: %s\n", problem.c_str());
        return kExitBadInput;
      }
      std::printf("%s: %zu items, map of iteration %llu\n", out.c_str(), c.size(),
                  static_cast<unsigned long long>(checkpoint->iteration));
    }

    if (p.has("--picture")) {
      const auto checkpoint = store->last_checkpoint();
      if (!checkpoint) {
        std::fprintf(stderr, "kith export: %s has no map yet: open it (kith open %s) and let the map settle first\n",
                     path.c_str(), path.c_str());
        return kExitBadInput;
      }
      RenderOptions r;
      if (p.has("--size")) {
        int w = 0, h = 0;
        if (std::sscanf(p.value("--size").c_str(), "%dx%d", &w, &h) != 2 || w < 16 || h < 16 || w > 8192 || h > 8192)
          return usage_error("--size expects WxH between 16 and 8192, e.g. 1600x1000");
        r.width = w;
        r.height = h;
      }
      r.pinned.assign(c.size(), 0);
      for (const auto& pin : store->pins()) r.pinned[size_t(pin.item)] = 1;
      r.title = std::filesystem::path(path).filename().string();
      const std::string out = p.value("--picture");
      const std::string problem = render_map_png(c, checkpoint->positions, r, out);
      if (!problem.empty()) {
        std::fprintf(stderr, "kith export: --picture: %s\n", problem.c_str());
        return kExitBadInput;
      }
      std::printf("%s: %dx%d picture of the map\n", out.c_str(), r.width, r.height);
    }

    if (p.has("--judgments")) {
      const std::vector<Judgment> judgments = store->judgments();
      const bool retracted_too = p.flags.count("--include-retracted") > 0;
      const std::string out = p.value("--judgments");
      const std::string problem = export_judgments(judgments, c, out, people, retracted_too, path);
      if (!problem.empty()) {
        std::fprintf(stderr, "kith export: %s\n", problem.c_str());
        return kExitBadInput;
      }
      size_t written = 0;
      for (const Judgment& j : judgments) written += (retracted_too || !j.retracted) ? 1 : 0;
      std::printf("%s: %zu judgments\n", out.c_str(), written);
    }

    if (p.has("--flat")) {
      const auto checkpoint = store->last_checkpoint();
      if (!checkpoint) {
        std::fprintf(stderr, "kith export: %s has no map yet: open it (kith open %s) and let the map settle first\n",
                     path.c_str(), path.c_str());
        return kExitBadInput;
      }
      const FlatMapOptions fo = flat_options(store->settings(), c.size());
      std::vector<int32_t> pinned;
      for (const auto& pin : store->pins()) pinned.push_back(pin.item);
      const std::vector<Judgment> judgments = store->judgments();
      const std::string out = p.value("--flat");
      double flat_agreement = 0.0;
      const std::string problem =
          export_flat(c, checkpoint->positions, judgments, pinned, fo, out, p.value("--tag"), path, &flat_agreement);
      if (!problem.empty()) {
        std::fprintf(stderr, "kith export: --flat: %s\n", problem.c_str());
        return kExitBadInput;
      }
      size_t active = 0;
      for (const Judgment& j : judgments) active += j.retracted ? 0 : 1;
      std::printf("%s: %zu items in 2-D", out.c_str(), c.size());
      if (active > 0)
        std::printf("; judgments honoured: %.1f%% in the 3-D map, %.1f%% flat", 100.0 * judgment_agreement(checkpoint->positions, judgments),
                    100.0 * flat_agreement);
      std::printf("\n");
    }
  } catch (const SessionError& e) {
    return session_cli::report("export", e);
  }
  return kExitOk;
}

}  // namespace kith
