// kith export SESSION --layout out.csv|out.json | --judgments out.csv | --picture out.png | --flat out.csv:
// writes what a session holds in formats other tools read. The session is opened read-only (so
// it may be open in a window meanwhile); each output is written to a temporary file and renamed,
// and an existing session file is never overwritten by an export. Main thread only.
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "solver/groups.h"
#include "solver/session_store.h"
#include "solver/suspects.h"
#include "viewer/commands.h"
#include "viewer/offscreen_render.h"
#include "viewer/session_cli.h"
#include "solver/judgment_io.h"

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
    "                        run in 2-D, started from the 3-D map; CSV like --layout without z\n"
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

bool ends_with(const std::string& s, const std::string& suffix) {
  return s.size() >= suffix.size() && s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
}

// Refuses to write over a session (or any SQLite file): exports never destroy user data.
std::string check_output(const std::string& out, const std::string& session) {
  namespace fs = std::filesystem;
  std::error_code ec;
  if (fs::exists(out, ec)) {
    if (fs::equivalent(out, session, ec)) return out + ": that is the session itself";
    std::ifstream in(out, std::ios::binary);
    char head[16] = {};
    in.read(head, 16);
    if (std::string(head, 15) == "SQLite format 3")
      return out + ": a SQLite database (a session?) is there; kith will not overwrite it with an export";
  }
  return "";
}

// Writes `text` to PATH through a temporary file and a rename. Returns "" or what went wrong.
std::string write_atomically(const std::string& path, const std::string& text) {
  const std::string tmp = path + ".writing-" + std::to_string(::getpid());
  {
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    if (!out) return path + ": cannot write (" + std::strerror(errno) + ")";
    out.write(text.data(), std::streamsize(text.size()));
    out.flush();
    if (!out) {
      std::remove(tmp.c_str());
      return path + ": writing failed (disk full?)";
    }
  }
  if (std::rename(tmp.c_str(), path.c_str()) != 0) {
    const std::string why = std::strerror(errno);
    std::remove(tmp.c_str());
    return path + ": cannot write (" + why + ")";
  }
  return "";
}

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.9g", v);
  return buf;
}

struct LayoutExtras {
  std::vector<int32_t> group;   // N, -1 = no group; empty if not computed
  std::vector<double> suspect;  // N, NaN = no score; empty if not computed
};

LayoutExtras analyse(const Collection& c, const Points& map, const std::string& tag_column) {
  LayoutExtras x;
  try {
    x.group = find_groups(map).label;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith export: no groups (%s)\n", e.what());
  }
  const TagColumn* tags = nullptr;
  for (const auto& t : c.tags)
    if (tag_column.empty() ? !tags : t.name == tag_column) tags = &t;
  if (tags) {
    try {
      SuspectOptions o;
      o.space = c.features.cols() > 0 ? SuspectSpace::kBoth : SuspectSpace::kMap;
      x.suspect = find_suspects(tags->values, c.features, map, o).score;
    } catch (const std::exception& e) {
      std::fprintf(stderr, "kith export: no suspect scores (%s)\n", e.what());
    }
  }
  return x;
}

std::string layout_csv(const Collection& c, const Points& map, const LayoutExtras& x) {
  std::string s = "id,x,y";
  if (map.cols() == 3) s += ",z";
  for (const auto& t : c.tags) s += "," + session_cli::csv_field(t.name);
  s += ",group,suspect_score\n";
  for (size_t i = 0; i < c.size(); ++i) {
    s += session_cli::csv_field(c.ids[i]);
    for (Eigen::Index d = 0; d < map.cols(); ++d) s += "," + number(map(Eigen::Index(i), d));
    for (const auto& t : c.tags) s += "," + session_cli::csv_field(t.values[i]);
    s += ",";
    if (!x.group.empty() && x.group[i] >= 0) s += std::to_string(x.group[i]);
    s += ",";
    if (!x.suspect.empty() && std::isfinite(x.suspect[i])) s += number(x.suspect[i]);
    s += "\n";
  }
  return s;
}

std::string layout_json(const Collection& c, const Points& map, const LayoutExtras& x, uint64_t iteration) {
  nlohmann::ordered_json items = nlohmann::ordered_json::array();
  for (size_t i = 0; i < c.size(); ++i) {
    nlohmann::ordered_json it;
    it["id"] = c.ids[i];
    it["x"] = map(Eigen::Index(i), 0);
    it["y"] = map(Eigen::Index(i), 1);
    if (map.cols() == 3) it["z"] = map(Eigen::Index(i), 2);
    nlohmann::ordered_json tags = nlohmann::ordered_json::object();
    for (const auto& t : c.tags) tags[t.name] = t.values[i];
    it["tags"] = tags;
    it["group"] = (!x.group.empty() && x.group[i] >= 0) ? nlohmann::ordered_json(x.group[i]) : nlohmann::ordered_json();
    it["suspect_score"] = (!x.suspect.empty() && std::isfinite(x.suspect[i])) ? nlohmann::ordered_json(x.suspect[i])
                                                                                : nlohmann::ordered_json();
    items.push_back(std::move(it));
  }
  nlohmann::ordered_json doc;
  doc["dims"] = map.cols();
  doc["iteration"] = iteration;
  doc["items"] = std::move(items);
  return doc.dump(1) + "\n";
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
  session_cli::PeopleInExport people = session_cli::PeopleInExport::kNames;
  if (p.has("--people") && !session_cli::people_from_string(p.value("--people"), &people))
    return usage_error("--people is names, codes or leave-out, got '" + p.value("--people") + "'");
  for (const char* option : {"--layout", "--judgments", "--picture", "--flat"}) {
    if (!p.has(option)) continue;
    const std::string problem = check_output(p.value(option), path);
    if (!problem.empty()) {
      std::fprintf(stderr, "kith export: %s\n", problem.c_str());
      return kExitBadInput;
    }
  }
  if (p.has("--flat")) return usage_error("--flat: not available in this build yet");

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
      const LayoutExtras extras = analyse(c, checkpoint->positions, p.value("--tag"));
      const std::string text = ends_with(out, ".json") ? layout_json(c, checkpoint->positions, extras,
                                                                     checkpoint->iteration)
                                                       : layout_csv(c, checkpoint->positions, extras);
      const std::string problem = write_atomically(out, text);
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
      std::vector<Judgment> judgments = store->judgments();
      session_cli::apply_people_rule(&judgments, people);
      JudgmentWriteOptions w;
      w.include_retracted = p.flags.count("--include-retracted") > 0;
      w.include_people = people != session_cli::PeopleInExport::kLeaveOut;
      const std::string out = p.value("--judgments");
      const std::string problem = write_judgments_csv(out, judgments, c.ids, w);
      if (!problem.empty()) {
        std::fprintf(stderr, "kith export: %s\n", problem.c_str());
        return kExitBadInput;
      }
      std::printf("%s: %zu judgments\n", out.c_str(), judgments.size());
    }
  } catch (const SessionError& e) {
    return session_cli::report("export", e);
  }
  return kExitOk;
}

}  // namespace kith
