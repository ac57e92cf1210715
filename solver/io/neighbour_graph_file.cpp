// Neighbour graph files (see neighbour_graph_file.h). Both forms are read into per-item edge
// lists with the self-edges counted and left out, then finished by one function (k, sorting).
#include "solver/io/neighbour_graph_file.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <unordered_map>

#include "solver/io/csv_table.h"
#include "solver/io/mapped_file.h"
#include "solver/io/npy_file.h"

namespace kith {
namespace {

struct Edge {
  double d2;
  int32_t j;
  bool operator<(const Edge& o) const { return d2 < o.d2 || (d2 == o.d2 && j < o.j); }
};

struct Edges {
  std::vector<std::vector<Edge>> of;  // per item, self-edges left out
  size_t given_k = 0;                 // edges per item as given, self-edges counted
  size_t self_edges = 0;
};

[[noreturn]] void fail(const std::string& file, long line, long column, std::string message) {
  throw LoadError(Problem{file, line, column, std::move(message)});
}

bool ends_with(const std::string& s, const std::string& tail) {
  if (s.size() < tail.size()) return false;
  return std::equal(tail.rbegin(), tail.rend(), s.rbegin(),
                    [](char a, char b) { return std::tolower((unsigned char)a) == std::tolower((unsigned char)b); });
}

// What is wrong with DISTANCE, or "" when it is a usable distance.
std::string distance_problem(double distance) {
  if (!std::isfinite(distance)) return "a finite distance";
  if (distance < 0) return "a distance of 0 or more";
  if (distance > kMaxFeatureMagnitude) return "a distance of at most 1e100";
  return "";
}

std::string number_text(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

NeighbourGraph finish(Edges& e, const std::string& source, const Collection& c, std::vector<Problem>* warnings) {
  const size_t n = e.of.size();
  const size_t k = e.self_edges > 0 ? e.given_k - 1 : e.given_k;
  if (k == 0)
    fail(source, 0, 0,
         "expected at least one neighbour per item besides the item itself, found only self-edges (an item listed as "
         "its own neighbour)");
  if (k > n - 1)
    fail(source, 0, 0, "expected at most " + std::to_string(n - 1) + " neighbours per item (there are " +
                           std::to_string(n) + " items), found " + std::to_string(k));
  NeighbourGraph g;
  g.n = n;
  g.k = k;
  g.index.resize(n * k);
  g.distance2.resize(n * k);
  for (size_t i = 0; i < n; ++i) {
    std::vector<Edge>& row = e.of[i];
    if (row.size() < k)
      fail(source, 0, 0, "item '" + c.ids[i] + "' lists itself more than once; expected " + std::to_string(k) +
                             " neighbours besides itself, found " + std::to_string(row.size()));
    std::sort(row.begin(), row.end());
    for (size_t c = 0; c < k; ++c) {
      g.index[i * k + c] = row[c].j;
      g.distance2[i * k + c] = row[c].d2;
    }
  }
  if (e.self_edges > 0 && warnings)
    warnings->push_back(Problem{source, 0, 0,
                                "dropped " + std::to_string(e.self_edges) +
                                    " self-edges (an item listed as its own neighbour); each item keeps its " +
                                    std::to_string(k) + " nearest others"});
  return g;
}

// The members of a .npz file (a ZIP archive as numpy.savez writes it: each member stored, not
// compressed, with ZIP64 sizes in the local header's extra field), by name.
std::unordered_map<std::string, std::string_view> npz_members(std::string_view z, const std::string& source) {
  auto u16 = [&](size_t at) { return uint32_t(uint8_t(z[at])) | uint32_t(uint8_t(z[at + 1])) << 8; };
  auto u32 = [&](size_t at) { return u16(at) | u16(at + 2) << 16; };
  auto u64 = [&](size_t at) { return uint64_t(u32(at)) | uint64_t(u32(at + 4)) << 32; };
  std::unordered_map<std::string, std::string_view> out;
  size_t at = 0;
  while (at + 30 <= z.size() && u32(at) == 0x04034b50) {
    const uint32_t flags = u16(at + 6), method = u16(at + 8);
    uint64_t size = u32(at + 18);
    const size_t name_len = u16(at + 26), extra_len = u16(at + 28);
    if (at + 30 + name_len + extra_len > z.size()) break;
    const std::string name(z.substr(at + 30, name_len));
    if (method != 0)
      fail(source, 0, long(at), "expected the members stored as numpy.savez writes them, found '" + name +
                                    "' compressed (numpy.savez_compressed); write it with numpy.savez or as two .npy");
    if (flags & 8) fail(source, 0, long(at), "expected member sizes in the local headers, found a data descriptor");
    for (size_t e = at + 30 + name_len; size == 0xFFFFFFFFu && e + 4 <= at + 30 + name_len + extra_len;
         e += 4 + u16(e + 2))
      if (u16(e) == 1 && e + 4 + 16 <= z.size()) size = u64(e + 4);  // ZIP64: original size, then compressed
    const size_t data = at + 30 + name_len + extra_len;
    if (data + size > z.size()) fail(source, 0, long(at), "expected member '" + name + "' whole, found it cut short");
    out[name] = z.substr(data, size_t(size));
    at = data + size_t(size);
  }
  return out;
}

}  // namespace

std::string graph_distances_path(const std::string& indices_path) {
  const std::string tail = "-indices.npy";
  if (!ends_with(indices_path, tail)) return "";
  return indices_path.substr(0, indices_path.size() - tail.size()) + "-distances.npy";
}

NeighbourGraph parse_neighbour_graph_csv(std::string text, const std::string& source, const Collection& c,
                                         std::vector<Problem>* warnings) {
  const CsvTable t = parse_csv(std::move(text), source);
  size_t col[3] = {t.columns(), t.columns(), t.columns()};
  const char* const names[3] = {"id", "neighbour", "distance"};
  for (size_t h = 0; h < t.columns(); ++h)
    for (int w = 0; w < 3; ++w) {
      std::string name = t.header[h];
      std::transform(name.begin(), name.end(), name.begin(), [](unsigned char ch) { return std::tolower(ch); });
      if (name == names[w]) col[w] = h;
    }
  for (int w = 0; w < 3; ++w)
    if (col[w] == t.columns())
      fail(source, t.header_line, 0,
           std::string("expected a header naming the columns id, neighbour, distance; found no column '") + names[w] +
               "'");
  const size_t n = c.size();
  Edges e;
  e.of.resize(n);
  std::vector<size_t> given(n, 0);
  std::vector<long> first_line(n, 0);
  std::vector<std::unordered_map<int32_t, long>> seen(n);  // neighbour -> line, for repeats
  auto item = [&](size_t row, int w) {
    const std::string id(t.field(row, col[w]));
    const std::optional<size_t> i = c.index_of(id);
    if (!i)
      fail(source, t.line(row), long(col[w] + 1),
           std::string("unknown ") + (w == 0 ? "id" : "neighbour") + " '" + id + "': expected an id of " + c.source);
    return *i;
  };
  for (size_t row = 0; row < t.rows(); ++row) {
    const size_t i = item(row, 0), j = item(row, 1);
    const std::string_view field = t.field(row, col[2]);
    double d = 0;
    const auto [end, ec] = std::from_chars(field.data(), field.data() + field.size(), d);
    if (ec != std::errc() || end != field.data() + field.size() || field.empty())
      fail(source, t.line(row), long(col[2] + 1),
           "expected a distance (a number), found '" + std::string(field) + "'");
    if (const std::string want = distance_problem(d); !want.empty())
      fail(source, t.line(row), long(col[2] + 1), "expected " + want + ", found " + std::string(field));
    if (!first_line[i]) first_line[i] = t.line(row);
    ++given[i];
    if (i == j) {
      ++e.self_edges;
      continue;
    }
    if (const auto [at, fresh] = seen[i].emplace(int32_t(j), t.line(row)); !fresh)
      fail(source, t.line(row), long(col[1] + 1),
           "'" + c.ids[i] + "' lists '" + c.ids[j] + "' as a neighbour twice (first on line " +
               std::to_string(at->second) + ")");
    e.of[i].push_back(Edge{d * d, int32_t(j)});
  }
  // Every item the same number of edges: the first item listed sets k.
  size_t first = n;
  for (size_t i = 0; i < n; ++i)
    if (given[i] && (first == n || first_line[i] < first_line[first])) first = i;
  if (first == n) fail(source, t.end_line, 0, "expected edges id,neighbour,distance after the header, found none");
  e.given_k = given[first];
  for (size_t i = 0; i < n; ++i) {
    if (given[i] == 0)
      fail(source, 0, 0, "item '" + c.ids[i] + "' has no neighbours; expected " + std::to_string(e.given_k) +
                             " for every item, as '" + c.ids[first] + "' has (line " +
                             std::to_string(first_line[first]) + ")");
    if (given[i] != e.given_k)
      fail(source, first_line[i], 0,
           "item '" + c.ids[i] + "' has " + std::to_string(given[i]) + " neighbours, but '" + c.ids[first] + "' (line " +
               std::to_string(first_line[first]) + ") has " + std::to_string(e.given_k) +
               ": expected the same number k for every item");
  }
  return finish(e, source, c, warnings);
}

NeighbourGraph parse_neighbour_graph_npy(std::string_view indices_bytes, const std::string& indices_source,
                                         std::string_view distances_bytes, const std::string& distances_source,
                                         const Collection& c, std::vector<Problem>* warnings) {
  NpyReadOptions whole;
  whole.allow_integers = true;
  const Points index = parse_npy(indices_bytes, indices_source, whole);
  const Points distance = parse_npy(distances_bytes, distances_source);
  const size_t n = c.size();
  auto shape = [](const Points& a) {
    return "(" + std::to_string(a.rows()) + ", " + std::to_string(a.cols()) + ")";
  };
  if (size_t(index.rows()) != n)
    fail(indices_source, 0, 0, "expected one row per item (" + std::to_string(n) + " rows, as " + c.source +
                                   " has), found an array of shape " + shape(index));
  if (distance.rows() != index.rows() || distance.cols() != index.cols())
    fail(distances_source, 0, 0, "expected the shape of " + indices_source + ", " + shape(index) + ", found " +
                                     shape(distance));
  const size_t k = size_t(index.cols());
  auto at = [](size_t r, size_t col) { return "[" + std::to_string(r) + ", " + std::to_string(col) + "]"; };
  Edges e;
  e.of.resize(n);
  e.given_k = k;
  std::vector<size_t> column_of(n, k);  // row being read: where each neighbour was seen
  for (size_t r = 0; r < n; ++r) {
    for (size_t col = 0; col < k; ++col) {
      const double v = index(Eigen::Index(r), Eigen::Index(col));
      if (v != std::floor(v) || v < 0 || v >= double(n))
        fail(indices_source, 0, 0, "expected a row number 0 .. " + std::to_string(n - 1) + " at " + at(r, col) +
                                       ", found " + number_text(v));
      const double d = distance(Eigen::Index(r), Eigen::Index(col));
      if (const std::string want = distance_problem(d); !want.empty())
        fail(distances_source, 0, 0, "expected " + want + " at " + at(r, col) + ", found " + number_text(d));
      const size_t j = size_t(v);
      if (j == r) {
        ++e.self_edges;
        continue;
      }
      if (column_of[j] != k)
        fail(indices_source, 0, 0, "row " + std::to_string(r) + " lists row " + std::to_string(j) + " twice, at " +
                                       at(r, column_of[j]) + " and " + at(r, col));
      column_of[j] = col;
      e.of[r].push_back(Edge{d * d, int32_t(j)});
    }
    for (const Edge& edge : e.of[r]) column_of[size_t(edge.j)] = k;
  }
  return finish(e, indices_source, c, warnings);
}

NeighbourGraph read_neighbour_graph(const std::string& path, const Collection& c, std::vector<Problem>* warnings) {
  if (ends_with(path, ".csv") || ends_with(path, ".tsv")) return parse_neighbour_graph_csv(read_file(path), path, c, warnings);
  if (ends_with(path, ".npz")) {
    const std::string bytes = read_file(path);
    const auto members = npz_members(bytes, path);
    const auto index = members.find("indices.npy"), distance = members.find("distances.npy");
    if (index == members.end() || distance == members.end())
      fail(path, 0, 0, "expected two arrays named indices and distances (numpy.savez(PATH, indices=..., "
                       "distances=...)), found " + std::to_string(members.size()) + " others");
    return parse_neighbour_graph_npy(index->second, path + ":indices", distance->second, path + ":distances", c,
                                     warnings);
  }
  const std::string distances = graph_distances_path(path);
  if (distances.empty())
    fail(path, 0, 0,
         "expected a neighbour graph: a CSV file id,neighbour,distance (.csv), GRAPH.npz with arrays indices and "
         "distances, or NAME-indices.npy with NAME-distances.npy beside it");
  const MappedFile index_file(path), distance_file(distances);
  return parse_neighbour_graph_npy(index_file.bytes(), path, distance_file.bytes(), distances, c, warnings);
}

}  // namespace kith
