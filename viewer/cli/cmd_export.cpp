// kith export SESSION --layout out.csv|out.json | --judgments out.csv | --picture out.png | --flat out.csv |
// --poster out.png|out.pdf|out.svg:
// writes what a session holds in formats other tools read. The session is opened read-only (so
// it may be open in a window meanwhile); each output is written to a temporary file and renamed,
// and an existing session file is never overwritten by an export. Main thread only.
#include <algorithm>
#include <cstdio>
#include <filesystem>

#include "solver/io/layout_writer.h"
#include "solver/measures/judgment_health.h"
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/session_cli.h"
#include "viewer/cli/shared_flags.h"
#include "viewer/session/session_export.h"
#include "viewer/session/poster.h"
#include "viewer/session/session_link.h"
#include "viewer/window/offscreen_render.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith export SESSION [--layout out.csv|out.json] [--judgments out.csv] [--picture out.png]\n"
    "                           [--flat out.csv] [--people names|codes|leave-out] [--include-retracted]\n"
    "                           [--poster out.png|out.pdf|out.svg] [--caption COLUMN] [--contact-sheets]\n"
    "                           [--tag COLUMN] [--size WxH|A3|A2|A4] [--colour COLUMN]\n"
    "\n"
    "Writes what a session holds for use elsewhere. Several exports may be given at once. The\n"
    "session is only read (it may be open in a window at the same time). It keeps its collection\n"
    "as it was read (README, 'Reading a collection'), so no reading options go with it.\n";

const char* const kFooter =
    "exit codes: 0 written, 1 a write failed (disk full, ...), 2 bad usage (also an export file that\n"
    "exists without --force, or a session there), 3 the session cannot be read or has no map yet\n";

const char* const kOptions =
    "  --layout FILE         the map from the session's last checkpoint as a layout (README,\n"
    "                        'Layout files'): id, x, y, z, the tag columns, group (clusters found\n"
    "                        in the map, 1, 2, ...; 0 = no group) and suspect_score (0: the item's\n"
    "                        neighbours share its tag, 1: none do). CSV, JSON (.json) or .npy\n"
    "                        positions with STEM.ids.csv beside them\n"
    "  --judgments FILE      every judgment as CSV: anchor,nearer,farther,person,time,kind,weight by id\n"
    "  --picture FILE        a PNG of the map from the last checkpoint, every item with a picture\n"
    "                        drawn as it, pins marked\n"
    "  --no-pictures         on --picture: every item as a disc\n"
    "  --poster FILE         a poster of the flat layout (.png, .pdf or .svg): every item's picture\n"
    "                        at its place, moved apart just enough that none overlap, the groups\n"
    "                        outlined and named; items without a picture are plain cards with their\n"
    "                        caption. It prints how many of each item's 10 nearest neighbours the\n"
    "                        poster keeps (README, 'Posters')\n"
    "  --size SIZE           of --picture: WxH in pixels (default: 1280x800); of --poster: A3, A2 or\n"
    "                        A4 paper, turned to suit the arrangement (a PNG at 150 pixels per inch),\n"
    "                        or WxH in pixels (default: A3)\n"
    "  --caption COLUMN      on --poster: a text column printed under each picture ('id' for the ids;\n"
    "                        default: no captions, except on cards without a picture, which show ids)\n"
    "  --contact-sheets      with --poster: one sheet per group listing its items with their captions;\n"
    "                        pages after the poster in a PDF, else files beside it: NAME-group-1.png,\n"
    "                        ..., NAME-no-group.png\n"
    "  --flat FILE           a 2-D arrangement (for print or a slide): the same blended objective\n"
    "                        (features, judgments, pins) run in 2-D, started from the 3-D map seen\n"
    "                        along its flattest direction; CSV (or JSON) like --layout without z;\n"
    "                        the map settings below change it\n"
    "  --people RULE         in --judgments: names (default), codes (P1, P2, ... in order of first\n"
    "                        appearance) or leave-out (an empty person column)\n"
    "  --include-retracted   in --judgments: also withdrawn judgments (default: left out)\n"
    "  --tag COLUMN          the tag column for suspect scores and for naming the poster's groups\n"
    "                        (default: the first that groups items)\n"
    "  --force               replace the export files if they exist (never a session or a folder)\n"
    "  --raw-csv             CSV text fields exactly as they are: without it, a field that a\n"
    "                        spreadsheet would run as a formula (starting with = + - @, tab or CR,\n"
    "                        and not a number) is written with a leading apostrophe\n";

}  // namespace

int cmd_export(const Args& args) {
  FlagReader flags(
      "export", kUsage,
      kOptions + colour_flag() + session_map_flags({"--perplexity", "--theta", "--dof", "--blend", "--learning-rate", "--seed"}),
      kFooter);
  if (!flags.read(args)) return flags.stop();
  if (flags.positional().size() != 1)
    return flags.usage_error(flags.positional().empty() ? "which session? give SESSION" : "one SESSION only");
  const std::string path = flags.positional()[0];
  if (!flags.has("--layout") && !flags.has("--judgments") && !flags.has("--picture") && !flags.has("--flat") &&
      !flags.has("--poster"))
    return flags.usage_error("nothing to export: give --layout, --judgments, --picture, --flat or --poster");
  PeopleInExport people = PeopleInExport::kNames;
  if (flags.has("--people") && !people_from_string(flags.text("--people"), &people))
    return flags.usage_error("--people is names, codes or leave-out, got '" + flags.text("--people") + "'");
  RenderOptions picture;
  MapParameters typed;  // the map settings' values are read again over the session's below
  PosterOptions poster;
  if (std::string e; !parse_poster_page(flags.text("--size", "A3"), &poster.page, &e)) {
    if (flags.has("--poster") || !flags.has("--picture")) return flags.usage_error("--size: " + e);
  }
  if (flags.has("--picture") && poster.page.paper && flags.has("--size"))
    return flags.usage_error("--size: --picture takes WxH in pixels; A3, A2 and A4 are paper sizes for --poster");
  if ((flags.has("--picture") && !flags.size("--size", &picture.width, &picture.height)) ||
      !read_map_flags(flags, &typed))
    return flags.usage_error();
  if (const std::string problem = picture.IsValid(); !problem.empty()) return flags.usage_error("--size: " + problem);
  if (PosterFormat f; flags.has("--poster") && !poster_format_for(flags.text("--poster"), &f))
    return flags.usage_error("--poster: " + flags.text("--poster") + " is not a .png, .pdf or .svg file");
  for (const char* option : {"--caption", "--contact-sheets"})
    if (flags.has(option) && !flags.has("--poster"))
      return flags.usage_error(std::string(option) + " goes with --poster");
  const SafeWriteOptions rule = output_rule(flags, {path});
  std::vector<std::string> outputs;
  for (const char* option : {"--layout", "--judgments", "--picture", "--flat", "--poster"}) {
    if (!flags.has(option)) continue;
    if (std::find(outputs.begin(), outputs.end(), flags.text(option)) != outputs.end())
      return flags.usage_error(std::string(option) + ": " + flags.text(option) + " is named by another export too");
    outputs.push_back(flags.text(option));
    if (flags.text(option).empty()) return flags.usage_error(std::string(option) + ": give a file name to write");
    const bool layout = std::string(option) == "--layout" || std::string(option) == "--flat";
    for (const std::string& file : layout ? layout_files(flags.text(option)) : std::vector{flags.text(option)})
      if (const int refused = refuse_output(flags, file, rule)) return refused;
  }
  const std::string tag = flags.text("--tag");

  try {
    SessionOpenOptions ro;
    ro.read_only = true;
    auto store = SessionStore::open(path, ro);
    const Collection c = store->collection();
    if (!tag.empty()) {
      bool found = false;
      for (const auto& t : c.tags) found = found || t.name == tag;
      if (!found) return flags.usage_error("--tag: the session has no tag column '" + tag + "'");
    }
    // The flat map's settings: the session's, changed by the flags, checked before anything is written.
    SessionSettings flat_settings = store->settings();
    read_map_flags(flags, &flat_settings);
    const bool flat_wanted = flags.has("--flat") || flags.has("--poster");
    if (std::string e; flat_wanted && !flat_settings.IsValid(&e, c.size())) return flags.usage_error(e);
    if (flags.has("--caption") && !choose_caption("export", c, flags.text("--caption"), &poster.caption_column))
      return kExitUsage;
    const auto checkpoint = store->last_checkpoint();
    if (!checkpoint && (flags.has("--layout") || flags.has("--picture") || flat_wanted)) {
      std::fprintf(stderr, "kith export: %s has no map yet: open it (kith open %s) and let the map settle first\n",
                   path.c_str(), path.c_str());
      return kExitBadInput;
    }
    auto report = [&](const char* what, const std::string& problem) { return write_failed(flags, what + problem); };

    if (flags.has("--layout")) {
      const std::string out = flags.text("--layout");
      const std::string problem =
          export_layout(c, checkpoint->positions, checkpoint->iteration, out, tag, rule, flags.has("--raw-csv"));
      if (!problem.empty()) return report("", problem);
      std::printf("%s: %zu items, map of iteration %llu\n", out.c_str(), c.size(),
                  static_cast<unsigned long long>(checkpoint->iteration));
    }

    if (flags.has("--picture")) {
      if (!choose_colour("export", c, flags.text("--colour"), &picture.view)) return kExitUsage;
      picture.view.pictures = !flags.has("--no-pictures");
      for (const Judgment& j : store->judgments())
        if (!j.retracted) picture.judgments.push_back(j);  // for colour by judgments per item
      picture.pinned = pinned_items(*store, c.size());
      picture.title = std::filesystem::path(path).filename().string();
      const std::string out = flags.text("--picture");
      const std::string problem = render_map_png(c, checkpoint->positions, picture, out, rule);
      if (!problem.empty()) return report("--picture: ", problem);
      std::printf("%s: %dx%d picture of the map\n", out.c_str(), picture.width, picture.height);
    }

    if (flags.has("--judgments")) {
      const std::vector<Judgment> judgments = store->judgments();
      const bool retracted_too = flags.has("--include-retracted");
      const std::string out = flags.text("--judgments");
      const std::string problem =
          export_judgments(judgments, c, out, people, retracted_too, rule, flags.has("--raw-csv"));
      if (!problem.empty()) return report("", problem);
      size_t written = 0;
      for (const Judgment& j : judgments) written += (retracted_too || !j.retracted) ? 1 : 0;
      std::printf("%s: %zu judgments\n", out.c_str(), written);
    }

    if (flags.has("--flat")) {
      const FlatMapOptions fo = flat_options(flat_settings, c.size());
      std::vector<int32_t> pinned;
      for (const auto& pin : store->pins()) pinned.push_back(pin.item);
      const std::vector<Judgment> judgments = store->judgments();
      const std::string out = flags.text("--flat");
      double flat_agreement = 0.0;
      const std::string problem =
          export_flat(c, checkpoint->positions, judgments, pinned, fo, out, tag, rule, &flat_agreement,
                      flags.has("--raw-csv"));
      if (!problem.empty()) return report("--flat: ", problem);
      size_t active = 0;
      for (const Judgment& j : judgments) active += j.retracted ? 0 : 1;
      std::printf("%s: %zu items in 2-D", out.c_str(), c.size());
      if (active > 0)
        std::printf("; judgments honoured: %.1f%% in the 3-D map, %.1f%% flat",
                    100.0 * judgment_agreement(checkpoint->positions, judgments), 100.0 * flat_agreement);
      std::printf("\n");
    }

    if (flags.has("--poster")) {
      std::vector<int32_t> pinned;
      for (const auto& pin : store->pins()) pinned.push_back(pin.item);
      Points flat;
      try {
        flat = flatten_map(c, checkpoint->positions, store->judgments(), pinned, flat_options(flat_settings, c.size()));
      } catch (const std::exception& e) {
        return report("--poster: ", std::string("the flat layout could not be made: ") + e.what());
      }
      poster.group_tag = tag;
      poster.contact_sheets = flags.has("--contact-sheets");
      poster.title = std::filesystem::path(path).stem().string();
      PosterSummary made;
      const std::string out = flags.text("--poster");
      const std::string problem = write_poster(c, flat, out, poster, rule, &made);
      if (!made.refused.empty()) return refuse_output(flags, made.refused, rule);
      if (!problem.empty()) return report("--poster: ", problem);
      std::printf("%s: poster (%s) of %zu items, %zu as pictures, %zu group(s), cards %.1f mm across\n", out.c_str(),
                  poster.page.name.c_str(), made.items, made.pictures, made.groups, made.card_mm);
      std::printf("  of each item's 10 nearest neighbours, the poster keeps %.1f%% of the flat layout's; the flat "
                  "layout keeps %.1f%% of the 3-D map's, the poster %.1f%%\n",
                  100.0 * made.kept, 100.0 * neighbours_kept(checkpoint->positions, flat),
                  100.0 * neighbours_kept(checkpoint->positions, made.centres));
      if (made.captions_too_small)
        std::printf("  captions left out: they need cards of about %.1f mm (a larger --size, or fewer items); the "
                    "contact sheets (--contact-sheets) always have them\n",
                    made.caption_mm);
      for (size_t f = 1; f < made.files.size(); ++f) std::printf("%s: contact sheet\n", made.files[f].c_str());
    }
  } catch (const SessionError& e) {
    return session_cli::report("export", e);
  }
  return kExitOk;
}

}  // namespace kith
