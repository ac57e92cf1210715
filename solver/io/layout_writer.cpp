// See layout_writer.h.
#include "solver/io/layout_writer.h"

#include <cctype>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "solver/io/npy_file.h"
#include "solver/io/text_fields.h"

namespace kith {
namespace {

const char* const kAxes[] = {"x", "y", "z"};

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.9g", v);
  return buf;
}

// The group as written: 1, 2, ... and 0 for none.
int64_t group_value(const Layout& l, size_t i) { return l.group[i] < 0 ? 0 : int64_t(l.group[i]) + 1; }

bool has_score(const Layout& l, size_t i) { return std::isfinite(l.suspect[i]); }

std::string lower_extension(const std::string& path) {
  std::string ext = std::filesystem::path(path).extension().string();
  for (auto& ch : ext) ch = char(std::tolower(static_cast<unsigned char>(ch)));
  return ext;
}

// The CSV with or without the coordinates.
std::string table(const Layout& l, const LayoutFormat& f, bool coordinates) {
  const Collection& c = *l.collection;
  const Points& map = *l.map;
  const Eigen::Index axes = coordinates ? map.cols() : 0;
  std::string s = "id";
  for (Eigen::Index d = 0; d < axes; ++d) s += std::string(",") + kAxes[d];
  for (const auto& t : c.tags) s += "," + csv_field(t.name, f.raw_csv);
  if (!l.group.empty()) s += ",group";
  if (!l.suspect.empty()) s += ",suspect_score";
  s += "\n";
  for (size_t i = 0; i < c.size(); ++i) {
    s += csv_field(c.ids[i], f.raw_csv);
    for (Eigen::Index d = 0; d < axes; ++d) s += "," + number(map(Eigen::Index(i), d));
    for (const auto& t : c.tags) s += "," + csv_field(t.values[i], f.raw_csv);
    if (!l.group.empty()) s += "," + std::to_string(group_value(l, i));
    if (!l.suspect.empty()) s += "," + (has_score(l, i) ? number(l.suspect[i]) : std::string());
    s += "\n";
  }
  return s;
}

std::string sidecar_name(const std::string& path) {
  const std::filesystem::path p(path);
  return (p.parent_path() / (p.stem().string() + ".ids.csv")).string();
}

}  // namespace

std::string layout_csv(const Layout& l, const LayoutFormat& f) { return table(l, f, true); }

std::string layout_json(const Layout& l, const LayoutFormat&) {
  using json = nlohmann::ordered_json;
  const Collection& c = *l.collection;
  const Points& map = *l.map;
  json items = json::array();
  for (size_t i = 0; i < c.size(); ++i) {
    json it;
    it["id"] = c.ids[i];
    for (Eigen::Index d = 0; d < map.cols(); ++d) it[kAxes[d]] = map(Eigen::Index(i), d);
    json tags = json::object();
    for (const auto& t : c.tags) tags[t.name] = t.values[i];
    it["tags"] = std::move(tags);
    if (!l.group.empty()) it["group"] = group_value(l, i);
    if (!l.suspect.empty()) it["suspect_score"] = has_score(l, i) ? json(l.suspect[i]) : json();
    items.push_back(std::move(it));
  }
  json doc;
  doc["dims"] = map.cols();
  for (const auto& field : l.header.items()) doc[field.key()] = field.value();
  doc["items"] = std::move(items);
  return doc.dump(1, ' ', false, json::error_handler_t::replace) + "\n";  // invalid UTF-8: U+FFFD
}

bool is_layout_name(const std::string& path) {
  const std::string ext = lower_extension(path);
  return ext == ".csv" || ext == ".json" || ext == ".npy";
}

std::vector<std::string> layout_files(const std::string& path) {
  if (lower_extension(path) == ".npy") return {path, sidecar_name(path)};
  return {path};
}

std::string write_layout(const std::string& path, const Layout& l, const LayoutFormat& f,
                         const SafeWriteOptions& options) {
  if (!l.collection || !l.map || size_t(l.map->rows()) != l.collection->size() || l.map->cols() < 2 ||
      l.map->cols() > 3)
    return path + ": the map and the collection differ in size";
  if ((!l.group.empty() && l.group.size() != l.collection->size()) ||
      (!l.suspect.empty() && l.suspect.size() != l.collection->size()))
    return path + ": the groups or suspect scores do not match the items";
  const std::string ext = lower_extension(path);
  if (ext == ".json") return write_file_safely(path, layout_json(l, f), options);
  if (ext != ".npy") return write_file_safely(path, layout_csv(l, f), options);
  const std::string ids = sidecar_name(path);
  for (const std::string& file : {path, ids})
    if (std::string problem = check_write_target(file, options); !problem.empty()) return problem;
  if (std::string problem = write_file_safely(ids, table(l, f, false), options); !problem.empty()) return problem;
  return write_file_safely(path, npy_bytes(*l.map), options);
}

}  // namespace kith
