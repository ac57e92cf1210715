// Collection loading: CSV/TSV tables (solver/io/csv_table.h) and .npy arrays (solver/io/npy_file.h)
// turned into ids, features, tags and pictures, with the column rules of solver/io/collection.h.
//
// Index:
//   [SECTION] Problem, LoadError, Collection
//   [SECTION] Cells: numbers and text
//   [SECTION] Columns: names, roles
//   [SECTION] Ids, pictures, warnings
//   [SECTION] Loaders
#include "solver/io/collection.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string_view>
#include <unordered_set>

#include "solver/io/csv_table.h"
#include "solver/io/mapped_file.h"
#include "solver/io/neighbour_graph_file.h"
#include "solver/io/npy_file.h"
#include "solver/io/text_fields.h"

namespace kith {

// ==== [SECTION] Problem, LoadError, Collection ==============================================

std::string Problem::str() const {
  std::string s = file;
  if (line > 0) {
    s += ":" + std::to_string(line);
    if (column > 0) s += ":" + std::to_string(column);
  } else if (column > 0) {
    s += ": byte " + std::to_string(column);
  }
  s += ": ";
  s += message;
  return s;
}

LoadError::LoadError(Problem problem) : std::runtime_error(problem.str()), problem_(std::move(problem)) {}

std::optional<size_t> Collection::index_of(const std::string& id) const {
  if (index_.size() == ids.size()) {
    const auto it = index_.find(id);
    if (it == index_.end()) return std::nullopt;
    return it->second;
  }
  for (size_t i = 0; i < ids.size(); ++i)
    if (ids[i] == id) return i;
  return std::nullopt;
}

void Collection::build_index() {
  index_.clear();
  index_.reserve(ids.size());
  for (size_t i = 0; i < ids.size(); ++i) index_.emplace(ids[i], i);
}

bool LoadOptions::is_valid(std::string* error) const {
  if (min_items >= 1) return true;
  if (error) *error = "min_items must be at least 1";
  return false;
}

namespace {

[[noreturn]] void fail(const std::string& file, long line, long column, std::string message) {
  throw LoadError(Problem{file, line, column, std::move(message)});
}

std::string in_quotes(std::string_view s) {
  constexpr size_t kMaxShown = 40;
  std::string out = "'";
  out.append(s.substr(0, kMaxShown));
  if (s.size() > kMaxShown) out += "...";
  out += "'";
  return out;
}

std::string join(const std::vector<std::string>& names, size_t max_shown = 12) {
  std::string s;
  for (size_t i = 0; i < names.size() && i < max_shown; ++i) s += (i ? ", " : "") + names[i];
  if (names.size() > max_shown) s += ", ... (" + std::to_string(names.size() - max_shown) + " more)";
  return s.empty() ? "none" : s;
}

bool ends_with_ci(std::string_view s, std::string_view suffix) {
  if (s.size() < suffix.size()) return false;
  for (size_t i = 0; i < suffix.size(); ++i)
    if (std::tolower(static_cast<unsigned char>(s[s.size() - suffix.size() + i])) != suffix[i]) return false;
  return true;
}

// ==== [SECTION] Cells: numbers and text =====================================================

enum Cell : unsigned char { kNumber, kNonFinite, kText, kEmpty, kTooLarge };

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

// A number as written in a table: optional spaces around, optional '+', decimal or exponent
// notation; "nan", "inf" and values beyond double's range count as numbers that are not finite.
Cell parse_cell(std::string_view raw, double* value) {
  const std::string_view s = trim(raw);
  if (s.empty()) return kEmpty;
  const char* b = s.data();
  const char* e = b + s.size();
  if (*b == '+' && e - b > 1 && b[1] != '-' && b[1] != '+') ++b;
  const auto [ptr, ec] = std::from_chars(b, e, *value);
  if (ptr != e) return kText;
  if (ec == std::errc::result_out_of_range) {
    // from_chars reports both overflow and underflow this way; strtod tells them apart.
    const std::string copy(b, e);
    *value = std::strtod(copy.c_str(), nullptr);
    return std::isfinite(*value) ? kNumber : kNonFinite;
  }
  if (ec != std::errc()) return kText;
  if (!std::isfinite(*value)) return kNonFinite;
  return std::abs(*value) <= kMaxFeatureMagnitude ? kNumber : kTooLarge;
}

struct ColumnStats {
  size_t numbers = 0, text = 0, empty = 0;  // numbers includes nan/inf
  bool numeric() const { return numbers > text; }
};

struct Cells {
  std::vector<double> values;  // rows x columns, row-major; meaningful where kind is kNumber/kNonFinite
  std::vector<unsigned char> kinds;
  std::vector<ColumnStats> stats;
};

Cells read_cells(const CsvTable& t) {
  const size_t rows = t.rows(), cols = t.columns();
  Cells c;
  c.values.resize(rows * cols);
  c.kinds.resize(rows * cols);
  c.stats.resize(cols);
  for (size_t r = 0; r < rows; ++r) {
    for (size_t j = 0; j < cols; ++j) {
      const size_t k = r * cols + j;
      const Cell kind = parse_cell(t.field(r, j), &c.values[k]);
      c.kinds[k] = kind;
      ColumnStats& s = c.stats[j];
      if (kind == kEmpty) ++s.empty;
      else if (kind == kText) ++s.text;
      else ++s.numbers;
    }
  }
  return c;
}

// ==== [SECTION] Columns: names, roles =======================================================

std::vector<std::string> column_names(const CsvTable& t, std::vector<Problem>* warnings) {
  std::vector<std::string> names = t.header;
  for (size_t j = 0; j < names.size(); ++j) {
    if (trim(names[j]).empty()) {
      names[j] = "column " + std::to_string(j + 1);
      warnings->push_back(Problem{t.source, t.header_line, long(j + 1),
                                  "column " + std::to_string(j + 1) + " has no name; calling it '" + names[j] + "'"});
    }
  }
  std::unordered_map<std::string_view, size_t> seen;
  for (size_t j = 0; j < names.size(); ++j) {
    const auto [it, fresh] = seen.emplace(names[j], j);
    if (!fresh) {
      fail(t.source, t.header_line, long(j + 1),
           "expected unique column names, found " + in_quotes(names[j]) + " again (first in column " +
               std::to_string(it->second + 1) + ")");
    }
  }
  return names;
}

size_t find_column(const CsvTable& t, const std::vector<std::string>& names, const std::string& name,
                   const char* purpose) {
  const auto it = std::find(names.begin(), names.end(), name);
  if (it == names.end()) {
    fail(t.source, t.header_line, 0,
         "expected a column named " + in_quotes(name) + " " + purpose + ", found none (columns: " + join(names) + ")");
  }
  return size_t(it - names.begin());
}

constexpr size_t kNone = size_t(-1);

bool is_picture_column(const CsvTable& t, size_t j) {
  static const char* const kExtensions[] = {".png", ".jpg", ".jpeg", ".bmp", ".gif", ".tga"};
  size_t present = 0;
  for (size_t r = 0; r < t.rows(); ++r) {
    const std::string_view v = trim(t.field(r, j));
    if (v.empty()) continue;
    ++present;
    bool image = false;
    for (const char* ext : kExtensions) image = image || ends_with_ci(v, ext);
    if (!image) return false;
  }
  return present > 0;
}

bool is_unique_text_column(const CsvTable& t, const Cells& cells, size_t j) {
  const ColumnStats& s = cells.stats[j];
  if (s.numeric() || s.empty > 0 || s.text == 0) return false;
  std::unordered_set<std::string_view> seen;
  seen.reserve(t.rows());
  for (size_t r = 0; r < t.rows(); ++r)
    if (!seen.insert(t.field(r, j)).second) return false;
  return true;
}

struct Roles {
  size_t id = kNone, picture = kNone;
  std::vector<size_t> features, tags;
};

// `with_features` false: a tags CSV beside a .npy file, where every other column is a tag.
Roles choose_roles(const CsvTable& t, const std::vector<std::string>& names, const Cells& cells,
                   const LoadOptions& options, bool with_features) {
  Roles roles;
  if (!options.id_column.empty()) roles.id = find_column(t, names, options.id_column, "for the ids");
  if (!options.picture_column.empty()) {
    roles.picture = find_column(t, names, options.picture_column, "for the pictures");
  }
  std::vector<bool> excluded(names.size(), false);
  if (with_features)
    for (const std::string& name : options.exclude) excluded[find_column(t, names, name, "to exclude")] = true;

  if (roles.picture == kNone) {
    for (size_t j = 0; j < names.size() && roles.picture == kNone; ++j)
      if (j != roles.id && !cells.stats[j].numeric() && is_picture_column(t, j)) roles.picture = j;
  }
  if (roles.id == kNone) {
    for (size_t j = 0; j < names.size() && roles.id == kNone; ++j) {
      std::string lower = names[j];
      for (char& ch : lower) ch = char(std::tolower(static_cast<unsigned char>(ch)));
      if (lower == "id") roles.id = j;
    }
  }
  if (roles.id == kNone) {
    for (size_t j = 0; j < names.size() && roles.id == kNone; ++j)
      if (j != roles.picture && is_unique_text_column(t, cells, j)) roles.id = j;
  }
  for (size_t j = 0; j < names.size(); ++j) {
    if (j == roles.id || j == roles.picture) continue;
    if (with_features && cells.stats[j].numeric() && !excluded[j]) roles.features.push_back(j);
    else roles.tags.push_back(j);
  }
  return roles;
}

// ==== [SECTION] Ids, pictures, warnings ====================================================

void check_too_few(const std::string& file, long line, size_t found, const LoadOptions& options, const char* what) {
  if (found < options.min_items) {
    fail(file, line, 0,
         "expected at least " + std::to_string(options.min_items) + " items (" + what + "), found " +
             std::to_string(found));
  }
}

std::vector<std::string> read_ids(const CsvTable& t, const std::vector<std::string>& names, size_t id, size_t rows) {
  std::vector<std::string> ids;
  ids.reserve(rows);
  if (id == kNone) return ids;
  std::unordered_map<std::string_view, size_t> seen;
  seen.reserve(rows);
  for (size_t r = 0; r < rows; ++r) {
    const std::string_view raw_id = t.field(r, id);
    if (trim(raw_id).empty()) {
      fail(t.source, t.line(r), long(id + 1), "expected an id in column " + in_quotes(names[id]) + ", found an empty field");
    }
    // kith's CSV writer puts an apostrophe before an id a spreadsheet would run as a formula
    // (solver/io/text_fields.h); reading it back takes it away, as the judgments reader does.
    const std::string_view v = is_neutralized(raw_id) ? raw_id.substr(1) : raw_id;
    const auto [it, fresh] = seen.emplace(v, r);
    if (!fresh) {
      fail(t.source, t.line(r), long(id + 1),
           "expected unique ids in column " + in_quotes(names[id]) + ", found " + in_quotes(v) + " again (first on line " +
               std::to_string(t.line(it->second)) + ")");
    }
    ids.emplace_back(v);
  }
  return ids;
}

void read_tags(const CsvTable& t, const std::vector<std::string>& names, const std::vector<size_t>& columns,
               size_t rows, Collection* out) {
  for (size_t j : columns) {
    TagColumn tag;
    tag.name = names[j];
    tag.values.reserve(rows);
    for (size_t r = 0; r < rows; ++r) tag.values.emplace_back(t.field(r, j));
    out->tags.push_back(std::move(tag));
  }
}

void read_pictures(const CsvTable& t, const std::vector<std::string>& names, size_t column, size_t rows,
                   const std::string& table_path, Collection* out) {
  namespace fs = std::filesystem;
  constexpr size_t kMaxListed = 5;
  if (column == kNone) return;
  out->picture_column = names[column];
  out->pictures.reserve(rows);
  const fs::path folder = fs::path(table_path).parent_path();
  size_t present = 0, missing = 0;
  for (size_t r = 0; r < rows; ++r) {
    const std::string_view v = trim(t.field(r, column));
    if (v.empty()) {
      out->pictures.emplace_back();
      continue;
    }
    ++present;
    const fs::path given{std::string(v)};
    const std::string resolved = (given.is_absolute() ? given : folder / given).lexically_normal().string();
    std::error_code ec;
    if (!fs::is_regular_file(resolved, ec)) {
      if (++missing <= kMaxListed) {
        out->warnings.push_back(Problem{t.source, t.line(r), long(column + 1),
                                        "picture file " + in_quotes(v) + " not found (looked for " + resolved + ")"});
      }
    }
    out->pictures.push_back(resolved);
  }
  if (missing > kMaxListed) {
    out->warnings.push_back(Problem{t.source, 0, 0,
                                    std::to_string(missing) + " of " + std::to_string(present) +
                                        " picture files are missing (the first " + std::to_string(kMaxListed) +
                                        " are listed above)"});
  }
}

void warn_constant_columns(Collection* c, long header_line, const std::vector<long>& column_numbers) {
  const Points& f = c->features;
  if (f.rows() < 2) return;
  for (Eigen::Index j = 0; j < f.cols(); ++j) {
    const double first = f(0, j);
    bool constant = true;
    for (Eigen::Index i = 1; i < f.rows() && constant; ++i) constant = f(i, j) == first;
    if (constant) {
      char value[32];
      std::snprintf(value, sizeof value, "%g", first);
      c->warnings.push_back(Problem{c->source, header_line, column_numbers[size_t(j)],
                                    "feature column " + in_quotes(c->feature_names[size_t(j)]) +
                                        " has the same value (" + value + ") for every item; it adds nothing"});
    }
  }
}

// ==== [SECTION] Loaders =====================================================================

// One warning, with the line, for a table that is not UTF-8 (a Latin-1 export, say): its text is
// kept byte for byte, and JSON outputs show such bytes as U+FFFD (text_fields.h).
void warn_if_not_utf8(std::string_view data, const std::string& name, std::vector<Problem>* warnings) {
  const size_t bad = first_invalid_utf8(data);
  if (bad == std::string_view::npos) return;
  long line = 1;
  for (size_t i = 0; i < bad; ++i)
    if (data[i] == '\n' || (data[i] == '\r' && (i + 1 >= data.size() || data[i + 1] != '\n'))) ++line;
  char byte[8];
  std::snprintf(byte, sizeof byte, "0x%02X", unsigned(static_cast<unsigned char>(data[bad])));
  warnings->push_back(Problem{name, line, 0,
                              std::string("the file is not UTF-8 text (byte ") + byte +
                                  " is the first that is not); its text is kept as it is, and JSON outputs show "
                                  "such bytes as U+FFFD"});
}

void check_options(const LoadOptions& options, const std::string& name) {
  std::string error;
  if (!options.is_valid(&error)) fail(name, 0, 0, error);
}

Collection load_table(std::string data, const std::string& name, const LoadOptions& options) {
  Collection c;
  c.source = name;
  warn_if_not_utf8(data, name, &c.warnings);
  const CsvTable t = parse_csv(std::move(data), name);
  const std::vector<std::string> names = column_names(t, &c.warnings);
  const Cells cells = read_cells(t);
  const Roles roles = choose_roles(t, names, cells, options, true);
  const size_t rows = t.rows(), cols = t.columns();
  check_too_few(name, t.end_line, rows, options, "rows below the header");

  // Names alone (an id column, perhaps tags or pictures, no numeric column at all) are a
  // collection without features, embedded from its judgments; numbers all excluded, or no ids
  // to name the items by, are still a mistake.
  if (roles.features.empty()) {
    std::vector<std::string> text, excluded;
    for (size_t j : roles.tags) (cells.stats[j].numeric() ? excluded : text).push_back(names[j]);
    const bool names_alone = roles.id != kNone && excluded.empty();
    if (!names_alone && !options.allow_no_features) {
      std::string message = "expected at least one numeric feature column, found none (text columns: " + join(text);
      if (!excluded.empty()) message += "; excluded: " + join(excluded);
      if (roles.id == kNone && excluded.empty()) message += "; nor an id column of unique names to judge them by";
      fail(name, t.header_line, 0, message + ")");
    }
    if (names_alone && options.neighbours.empty())  // with a graph the map needs no features
      c.warnings.push_back(Problem{name, t.header_line, 0,
                                   "no numeric feature columns: the items are placed from judgments alone "
                                   "(kith fit --judgments FILE, or ask in kith open)"});
  }
  // Feature values, row by row so the first problem in the file is the one reported.
  const size_t nf = roles.features.size();
  c.features.resize(Eigen::Index(rows), Eigen::Index(nf));
  for (size_t r = 0; r < rows; ++r) {
    for (size_t f = 0; f < nf; ++f) {
      const size_t j = roles.features[f], k = r * cols + j;
      const Cell kind = Cell(cells.kinds[k]);
      if (kind != kNumber) {
        const std::string& col = names[j];
        const std::string_view raw = t.field(r, j);
        std::string what =
            kind == kEmpty      ? "expected a number in feature column " + in_quotes(col) + ", found an empty field"
            : kind == kText     ? "expected a number in feature column " + in_quotes(col) + ", found " + in_quotes(raw)
            : kind == kTooLarge ? "expected a number of at most 1e100 in size in feature column " + in_quotes(col) +
                                      ", found " + in_quotes(trim(raw)) + " (distances between such numbers overflow)"
                                : "expected a finite number in feature column " + in_quotes(col) + ", found " +
                                      in_quotes(trim(raw));
        fail(name, t.line(r), long(j + 1), what);
      }
      c.features(Eigen::Index(r), Eigen::Index(f)) = cells.values[k];
    }
  }
  for (size_t j : roles.features) c.feature_names.push_back(names[j]);
  for (size_t r = 0; r < rows; ++r) c.lines.push_back(t.line(r));

  if (roles.id != kNone) {
    c.id_column = names[roles.id];
    c.ids = read_ids(t, names, roles.id, rows);
  } else {
    for (size_t r = 0; r < rows; ++r) c.ids.push_back(std::to_string(r + 1));
  }
  read_tags(t, names, roles.tags, rows, &c);
  read_pictures(t, names, roles.picture, rows, name, &c);
  std::vector<long> column_numbers;
  for (size_t j : roles.features) column_numbers.push_back(long(j + 1));
  warn_constant_columns(&c, t.header_line, column_numbers);
  c.build_index();
  return c;
}

Collection load_npy(std::string_view bytes, const std::string& name, const LoadOptions& options) {
  Collection c;
  c.source = name;
  c.features = parse_npy(bytes, name);
  const size_t rows = size_t(c.features.rows()), cols = size_t(c.features.cols());
  check_too_few(name, 0, rows, options, "rows of the array");
  if (cols == 0 && !options.allow_no_features) {
    fail(name, 0, 0, "expected at least one feature column, found an array of shape (" + std::to_string(rows) + ", 0)");
  }
  for (size_t j = 0; j < cols; ++j) c.feature_names.push_back("f" + std::to_string(j));

  if (!options.tags_csv.empty()) {
    std::string tag_data = read_file(options.tags_csv);
    warn_if_not_utf8(tag_data, options.tags_csv, &c.warnings);
    const CsvTable t = parse_csv(std::move(tag_data), options.tags_csv);
    const std::vector<std::string> names = column_names(t, &c.warnings);
    const Cells cells = read_cells(t);
    const Roles roles = choose_roles(t, names, cells, options, false);
    if (t.rows() != rows) {
      fail(options.tags_csv, t.rows() < rows ? t.end_line : t.line(rows), 0,
           "expected " + std::to_string(rows) + " rows to match the " + std::to_string(rows) + " items in " + name +
               ", found " + std::to_string(t.rows()));
    }
    if (roles.id != kNone) {
      c.id_column = names[roles.id];
      c.ids = read_ids(t, names, roles.id, rows);
    }
    read_tags(t, names, roles.tags, rows, &c);
    read_pictures(t, names, roles.picture, rows, options.tags_csv, &c);
  }
  if (c.ids.empty())
    for (size_t r = 0; r < rows; ++r) c.ids.push_back(std::to_string(r));
  std::vector<long> column_numbers(cols, 0);
  warn_constant_columns(&c, 0, column_numbers);
  c.build_index();
  return c;
}

bool is_npy_name(const std::string& name) { return ends_with_ci(name, ".npy"); }

// The given neighbour graph (--neighbours), read against the loaded items.
Collection with_graph(Collection c, const LoadOptions& options) {
  if (!options.neighbours.empty()) c.neighbours = read_neighbour_graph(options.neighbours, c, &c.warnings);
  return c;
}

}  // namespace

Collection load_collection_from_memory(std::string data, const std::string& name, const LoadOptions& options) {
  check_options(options, name);
  return with_graph(looks_like_npy(data) || is_npy_name(name) ? load_npy(data, name, options)
                                                               : load_table(std::move(data), name, options),
                    options);
}

Collection load_collection(const std::string& path, const LoadOptions& options) {
  check_options(options, path);
  if (!is_npy_name(path)) return load_collection_from_memory(read_file(path), path, options);
  // An array is parsed straight from the mapped file (solver/io/mapped_file.h), never copied whole;
  // the mapping is gone before the graph is read.
  Collection c = load_npy(MappedFile(path).bytes(), path, options);
  return with_graph(std::move(c), options);
}

int default_tag_column(const Collection& collection) {
  for (size_t t = 0; t < collection.tags.size(); ++t) {
    std::unordered_set<std::string_view> distinct;
    size_t tagged = 0;
    for (const std::string& v : collection.tags[t].values)
      if (!v.empty()) distinct.insert(v), ++tagged;
    if (distinct.size() >= 2 && tagged >= 2 * distinct.size()) return int(t);
  }
  return -1;
}

const TagColumn* find_tag_column(const Collection& collection, const std::string& name) {
  if (name.empty()) {
    const int t = default_tag_column(collection);
    return t >= 0 ? &collection.tags[size_t(t)] : nullptr;
  }
  for (const TagColumn& t : collection.tags)
    if (t.name == name) return &t;
  return nullptr;
}

namespace {

// FNV-1a, 64 bits (offset basis and prime as published by Fowler, Noll and Vo).
struct Fnv1a {
  uint64_t h = 14695981039346656037ull;
  void bytes(const void* data, size_t n) {
    const auto* p = static_cast<const unsigned char*>(data);
    for (size_t i = 0; i < n; ++i) h = (h ^ p[i]) * 1099511628211ull;
  }
  void text(const std::string& s) {  // length first, so "ab","c" differs from "a","bc"
    const uint64_t n = s.size();
    bytes(&n, sizeof n);
    bytes(s.data(), s.size());
  }
};

}  // namespace

std::string content_hash(const Collection& c) {
  Fnv1a f;
  const uint64_t n = c.size(), cols = uint64_t(c.features.cols());
  f.bytes(&n, sizeof n);
  for (const std::string& id : c.ids) f.text(id);
  f.bytes(&cols, sizeof cols);
  for (const std::string& name : c.feature_names) f.text(name);
  for (Eigen::Index i = 0; i < c.features.rows(); ++i)
    for (Eigen::Index j = 0; j < c.features.cols(); ++j) {
      const double v = c.features(i, j);
      f.bytes(&v, sizeof v);
    }
  for (const TagColumn& t : c.tags) {
    f.text(t.name);
    for (const std::string& v : t.values) f.text(v);
  }
  f.text(c.picture_column);
  for (const std::string& p : c.pictures) f.text(std::filesystem::path(p).filename().string());
  if (!c.neighbours.empty()) {  // a collection without a graph hashes as it did before graphs
    const uint64_t k = c.neighbours.k;
    f.text("neighbours");
    f.bytes(&k, sizeof k);
    f.bytes(c.neighbours.index.data(), c.neighbours.index.size() * sizeof(int32_t));
    f.bytes(c.neighbours.distance2.data(), c.neighbours.distance2.size() * sizeof(double));
  }
  char buf[32];
  std::snprintf(buf, sizeof buf, "fnv1a64:%016llx", static_cast<unsigned long long>(f.h));
  return buf;
}

std::string reading_flags(const LoadOptions& o) {
  std::string s;
  auto add = [&](const char* flag, const std::string& value) {
    if (!value.empty()) s += (s.empty() ? "" : " ") + std::string(flag) + " " + value;
  };
  add("--id", o.id_column);
  std::string excluded;
  for (const std::string& e : o.exclude) excluded += (excluded.empty() ? "" : ",") + e;
  add("--exclude", excluded);
  add("--pictures", o.picture_column);
  add("--tags", o.tags_csv);
  add("--neighbours", o.neighbours);
  return s;
}

}  // namespace kith
