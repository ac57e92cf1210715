// See layout_writer.h.
#include "solver/io/layout_writer.h"

#include <cctype>
#include <cmath>
#include <cstdio>

#include "solver/io/text_fields.h"

namespace kith {
namespace {

const char* const kAxes[] = {"x", "y", "z"};

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.9g", v);
  return buf;
}

// The group as written: -1 (none) becomes 0 or nothing, others count from 0 or 1.
bool group_value(const Layout& l, const LayoutFormat& f, size_t i, int64_t* out) {
  const int32_t g = l.group[i];
  if (g < 0 && !f.groups_from_one) return false;
  *out = f.groups_from_one ? int64_t(g < 0 ? 0 : g + 1) : int64_t(g);
  return true;
}

bool has_score(const Layout& l, size_t i) { return std::isfinite(l.suspect[i]); }

}  // namespace

std::string layout_csv(const Layout& l, const LayoutFormat& f) {
  const Collection& c = *l.collection;
  const Points& map = *l.map;
  std::string s = "id";
  for (Eigen::Index d = 0; d < map.cols(); ++d) s += std::string(",") + kAxes[d];
  for (const auto& t : c.tags) s += "," + csv_field(t.name, f.raw_csv);
  if (!l.group.empty()) s += ",group";
  if (!l.suspect.empty()) s += "," + csv_field(f.suspect_column, f.raw_csv);
  s += "\n";
  for (size_t i = 0; i < c.size(); ++i) {
    s += csv_field(c.ids[i], f.raw_csv);
    for (Eigen::Index d = 0; d < map.cols(); ++d) s += "," + number(map(Eigen::Index(i), d));
    for (const auto& t : c.tags) s += "," + csv_field(t.values[i], f.raw_csv);
    int64_t g = 0;
    if (!l.group.empty()) s += "," + (group_value(l, f, i, &g) ? std::to_string(g) : std::string());
    if (!l.suspect.empty()) s += "," + (has_score(l, i) ? number(l.suspect[i]) : std::string());
    s += "\n";
  }
  return s;
}

std::string layout_json(const Layout& l, const LayoutFormat& f) {
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
    int64_t g = 0;
    if (!l.group.empty()) it["group"] = group_value(l, f, i, &g) ? json(g) : json();
    if (!l.suspect.empty()) it[f.suspect_column] = has_score(l, i) ? json(l.suspect[i]) : json();
    items.push_back(std::move(it));
  }
  json doc;
  doc["dims"] = map.cols();
  for (const auto& field : l.header.items()) doc[field.key()] = field.value();
  doc["items"] = std::move(items);
  return doc.dump(1, ' ', false, json::error_handler_t::replace) + "\n";  // invalid UTF-8: U+FFFD
}

std::string write_layout(const std::string& path, const Layout& l, const LayoutFormat& f,
                         const SafeWriteOptions& options) {
  if (!l.collection || !l.map || size_t(l.map->rows()) != l.collection->size() || l.map->cols() < 2 ||
      l.map->cols() > 3)
    return path + ": the map and the collection differ in size";
  if ((!l.group.empty() && l.group.size() != l.collection->size()) ||
      (!l.suspect.empty() && l.suspect.size() != l.collection->size()))
    return path + ": the groups or suspect scores do not match the items";
  std::string ext = path.size() >= 5 ? path.substr(path.size() - 5) : "";
  for (auto& ch : ext) ch = char(std::tolower(static_cast<unsigned char>(ch)));
  return write_file_safely(path, ext == ".json" ? layout_json(l, f) : layout_csv(l, f), options);
}

}  // namespace kith
