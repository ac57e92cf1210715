#include "solver/io/text_fields.h"
#include "viewer/session/session_export.h"

#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "solver/measures/groups.h"
#include "solver/measures/judgment_health.h"
#include "solver/io/judgment_io.h"
#include "solver/measures/suspects.h"

namespace kith {
namespace {

bool ends_with(const std::string& s, const std::string& suffix) {
  return s.size() >= suffix.size() && s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
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
  for (const auto& t : c.tags) s += "," + csv_field(t.name);
  s += ",group,suspect_score\n";
  for (size_t i = 0; i < c.size(); ++i) {
    s += csv_field(c.ids[i]);
    for (Eigen::Index d = 0; d < map.cols(); ++d) s += "," + number(map(Eigen::Index(i), d));
    for (const auto& t : c.tags) s += "," + csv_field(t.values[i]);
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

std::string check_export_target(const std::string& out, const std::string& session) {
  namespace fs = std::filesystem;
  std::error_code ec;
  if (out.empty()) return "give a file name to write";
  if (fs::exists(out, ec)) {
    if (!session.empty() && fs::equivalent(out, session, ec)) return out + ": that is the session itself";
    std::ifstream in(out, std::ios::binary);
    char head[16] = {};
    in.read(head, 16);
    if (std::string(head, 15) == "SQLite format 3")
      return out + ": a SQLite database (a session?) is there; kith will not overwrite it with an export";
  }
  return "";
}

std::string export_layout(const Collection& collection, const Points& map, uint64_t iteration, const std::string& out,
                          const std::string& tag_column, const std::string& session) {
  if (const std::string problem = check_export_target(out, session); !problem.empty()) return problem;
  if (size_t(map.rows()) != collection.size()) return "the map and the collection differ in size";
  const LayoutExtras extras = analyse(collection, map, tag_column);
  const std::string text =
      ends_with(out, ".json") ? layout_json(collection, map, extras, iteration) : layout_csv(collection, map, extras);
  return write_atomically(out, text);
}

std::string export_judgments(std::vector<Judgment> judgments, const Collection& collection, const std::string& out,
                             PeopleInExport people, bool include_retracted, const std::string& session) {
  if (const std::string problem = check_export_target(out, session); !problem.empty()) return problem;
  apply_people_rule(&judgments, people);
  JudgmentWriteOptions w;
  w.include_retracted = include_retracted;
  w.include_people = people != PeopleInExport::kLeaveOut;
  return write_judgments_csv(out, judgments, collection.ids, w);
}

FlatMapOptions flat_options(const SessionSettings& settings, size_t items) {
  FlatMapOptions fo;
  const int64_t steps = fo.iterations;  // the flat map's own number of steps
  static_cast<MapParameters&>(fo) = settings;
  fo.iterations = steps;
  // A 2-D refinement of a settled map needs fewer neighbours than the 3-D one may use.
  fo.perplexity = std::min(settings.perplexity_for(items), std::max(1.0, double(items > 0 ? items - 1 : 0) / 3.0));
  return fo;
}

std::string export_flat(const Collection& collection, const Points& map, const std::vector<Judgment>& judgments,
                        const std::vector<int32_t>& pinned, const FlatMapOptions& options, const std::string& out,
                        const std::string& tag_column, const std::string& session, double* agreement) {
  if (const std::string problem = check_export_target(out, session); !problem.empty()) return problem;
  Points flat;
  try {
    flat = flatten_map(collection, map, judgments, pinned, options);
  } catch (const std::exception& e) {
    return std::string("the flat layout could not be made: ") + e.what();
  }
  if (agreement) *agreement = judgment_agreement(flat, judgments);
  return export_layout(collection, flat, uint64_t(options.iterations), out, tag_column, session);
}

}  // namespace kith
