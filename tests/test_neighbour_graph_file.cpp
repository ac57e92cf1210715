// Neighbour graph files (solver/io/neighbour_graph_file.h): good ones in both forms, every bad
// one with its message and place, and through the built kith: exit 3 and nothing written for a
// bad graph, a map from a graph alone, and a session made with --neighbours that reopens with it.
#include <doctest/doctest.h>

#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <string>

#include "solver/io/neighbour_graph_file.h"
#include "solver/io/npy_file.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"

namespace {

using kith::LoadError;
using kith::NeighbourGraph;
using kith::Problem;
using kith::test::run_kith;

// Five invented spice jars on a line at 0, 1, 3, 6, 10 (their features are that one number).
kith::Collection jars() {
  kith::Collection c;
  c.source = "jars.csv";
  const double at[5] = {0, 1, 3, 6, 10};
  c.features.resize(5, 1);
  for (int i = 0; i < 5; ++i) {
    c.ids.push_back("jar" + std::to_string(i));
    c.features(i, 0) = at[i];
  }
  c.build_index();
  return c;
}

// A graph file's text: the header, then the 2 nearest other jars of every jar, written farthest
// first (the reader sorts).
std::string good_csv() {
  return "id,neighbour,distance\n"
         "jar0,jar2,3\njar0,jar1,1\n"
         "jar1,jar2,2\njar1,jar0,1\n"
         "jar2,jar0,3\njar2,jar1,2\n"
         "jar3,jar1,5\njar3,jar2,3\n"
         "jar4,jar2,7\njar4,jar3,4\n";
}

Problem problem_of(const std::string& text) {
  try {
    kith::parse_neighbour_graph_csv(text, "g.csv", jars());
  } catch (const LoadError& e) {
    return e.problem();
  }
  FAIL("no error for: " << text);
  return {};
}

// An (rows, cols) little-endian int64 .npy, as numpy.save writes one.
std::string int64_npy(const std::vector<int64_t>& v, size_t rows, size_t cols) {
  std::string header = "{'descr': '<i8', 'fortran_order': False, 'shape': (" + std::to_string(rows) + ", " +
                       std::to_string(cols) + "), }";
  while ((10 + header.size() + 1) % 64) header += ' ';
  header += '\n';
  std::string out("\x93NUMPY\x01\x00", 8);
  out += char(header.size() & 0xff);
  out += char(header.size() >> 8);
  out += header;
  out.append(reinterpret_cast<const char*>(v.data()), v.size() * sizeof(int64_t));
  return out;
}

std::string distances_npy(const std::vector<double>& v, size_t rows, size_t cols) {
  kith::Points p(static_cast<Eigen::Index>(rows), static_cast<Eigen::Index>(cols));
  for (size_t i = 0; i < v.size(); ++i) p(Eigen::Index(i / cols), Eigen::Index(i % cols)) = v[i];
  return kith::npy_bytes(p);
}

const std::vector<int64_t> kIndex = {1, 2, 0, 2, 1, 0, 2, 1, 3, 2};
const std::vector<double> kDistance = {1, 3, 1, 2, 2, 3, 3, 5, 4, 7};

Problem npy_problem_of(const std::vector<int64_t>& index, const std::vector<double>& distance, size_t k = 2) {
  try {
    kith::parse_neighbour_graph_npy(int64_npy(index, index.size() / k, k), "g-indices.npy",
                                    distances_npy(distance, distance.size() / k, k), "g-distances.npy", jars());
  } catch (const LoadError& e) {
    return e.problem();
  }
  FAIL("no error");
  return {};
}

// DIR/names.csv: 60 swatch ids and no features; DIR/ring.csv: each swatch's 12 nearest by its
// place on a ring of 60 (an invented graph), so the map comes from the graph alone.
void write_ring(const std::string& dir) {
  std::ofstream names(dir + "/names.csv");
  names << "id\n";
  for (int i = 0; i < 60; ++i) names << "swatch-" << i << "\n";
  std::ofstream ring(dir + "/ring.csv");
  ring << "id,neighbour,distance\n";
  for (int i = 0; i < 60; ++i)
    for (int s = 1; s <= 6; ++s)
      for (int sign : {-1, 1}) ring << "swatch-" << i << ",swatch-" << (i + sign * s + 60) % 60 << "," << s << "\n";
}

}  // namespace

TEST_CASE("neighbour graph file: CSV and .npy forms read the same graph, nearest first, squared distances") {
  const NeighbourGraph a = kith::parse_neighbour_graph_csv(good_csv(), "g.csv", jars());
  const NeighbourGraph b = kith::parse_neighbour_graph_npy(int64_npy(kIndex, 5, 2), "g-indices.npy",
                                                           distances_npy(kDistance, 5, 2), "g-distances.npy", jars());
  CHECK(a.n == 5);
  CHECK(a.k == 2);
  CHECK(a.index == std::vector<int32_t>{1, 2, 0, 2, 1, 0, 2, 1, 3, 2});
  CHECK(a.distance2 == std::vector<double>{1, 9, 1, 4, 4, 9, 9, 25, 16, 49});
  CHECK(b.index == a.index);
  CHECK(b.distance2 == a.distance2);
  CHECK(kith::graph_distances_path("/x/run-7-indices.npy") == "/x/run-7-distances.npy");
  CHECK(kith::graph_distances_path("/x/run.npy").empty());
}

TEST_CASE("neighbour graph file: self-edges are dropped with a warning and every item keeps k - 1 others") {
  std::string text = "id,neighbour,distance\n";
  for (int i = 0; i < 5; ++i) text += "jar" + std::to_string(i) + ",jar" + std::to_string(i) + ",0\n";
  text += good_csv().substr(std::strlen("id,neighbour,distance\n"));
  std::vector<Problem> warnings;
  const NeighbourGraph g = kith::parse_neighbour_graph_csv(text, "g.csv", jars(), &warnings);
  CHECK(g.k == 2);
  REQUIRE(warnings.size() == 1);
  CHECK(warnings[0].message ==
        "dropped 5 self-edges (an item listed as its own neighbour); each item keeps its 2 "
        "nearest others");
}

TEST_CASE("neighbour graph file: every bad CSV names its line and what was expected") {
  struct Case {
    std::string text;
    long line;
    std::string message;
  };
  const std::string head = "id,neighbour,distance\n";
  const std::string rest = good_csv().substr(head.size());
  const Case cases[] = {
      {"id,near,distance\n" + rest, 1,
       "expected a header naming the columns id, neighbour, distance; found no column 'neighbour'"},
      {head + "jar0,jarX,1\n" + rest, 2, "unknown neighbour 'jarX': expected an id of jars.csv"},
      {head + "jarY,jar1,1\n" + rest, 2, "unknown id 'jarY': expected an id of jars.csv"},
      {head + rest + "jar4,jar1,-9\n", 12, "expected a distance of 0 or more, found -9"},
      {head + rest + "jar4,jar1,nan\n", 12, "expected a finite distance, found nan"},
      {head + rest + "jar4,jar1,inf\n", 12, "expected a finite distance, found inf"},
      {head + rest + "jar4,jar1,far\n", 12, "expected a distance (a number), found 'far'"},
      {head + rest + "jar4,jar1,9\n", 10,
       "item 'jar4' has 3 neighbours, but 'jar0' (line 2) has 2: expected the same number k for every item"},
      {head + rest + "jar4,jar3,4\n", 12, "'jar4' lists 'jar3' as a neighbour twice (first on line 11)"},
      {head + "jar0,jar1,1\n", 0, "item 'jar1' has no neighbours; expected 1 for every item, as 'jar0' has (line 2)"},
      {head, 2, "expected edges id,neighbour,distance after the header, found none"},
  };
  for (const Case& c : cases) {
    CAPTURE(c.text);
    const Problem p = problem_of(c.text);
    CHECK(p.file == "g.csv");
    CHECK(p.line == c.line);
    CHECK(p.message == c.message);
  }
}

TEST_CASE("neighbour graph file: every bad .npy pair names the array, the place and what was expected") {
  std::vector<int64_t> outside = kIndex;
  outside[3] = 5;
  CHECK(npy_problem_of(outside, kDistance).message == "expected a row number 0 .. 4 at [1, 1], found 5");
  std::vector<double> negative = kDistance;
  negative[7] = -0.5;
  const Problem n = npy_problem_of(kIndex, negative);
  CHECK(n.file == "g-distances.npy");
  CHECK(n.message == "expected a distance of 0 or more at [3, 1], found -0.5");
  std::vector<double> infinite = kDistance;
  infinite[0] = INFINITY;
  CHECK(npy_problem_of(kIndex, infinite).message ==
        "expected a finite number at [0, 0], found inf");  // the .npy reader's own check
  std::vector<int64_t> twice = kIndex;
  twice[1] = 1;
  CHECK(npy_problem_of(twice, kDistance).message == "row 0 lists row 1 twice, at [0, 0] and [0, 1]");
  // Inconsistent k: the distances have another shape than the indices.
  try {
    kith::parse_neighbour_graph_npy(int64_npy(kIndex, 5, 2), "g-indices.npy", distances_npy({1, 2, 3, 4, 5}, 5, 1),
                                    "g-distances.npy", jars());
    FAIL("no error");
  } catch (const LoadError& e) {
    CHECK(e.problem().message == "expected the shape of g-indices.npy, (5, 2), found (5, 1)");
  }
  // One row per item.
  const Problem rows = npy_problem_of({1, 2, 0, 2}, {1, 3, 1, 2});
  CHECK(rows.message == "expected one row per item (5 rows, as jars.csv has), found an array of shape (2, 2)");
}

TEST_CASE(
    "neighbour graph file: kith refuses a bad graph with exit 3 and writes nothing, and a graph alone makes a map") {
  const std::string dir = kith::test::temp_dir("kith-graph-cli");
  write_ring(dir);
  {
    std::ofstream f(dir + "/bad.csv");
    f << "id,neighbour,distance\nswatch-0,swatch-1,-2\n";
  }
  const kith::test::KithRun bad =
      run_kith("fit " + dir + "/names.csv --neighbours " + dir + "/bad.csv -o " + dir + "/bad-map.csv --quiet");
  CHECK(bad.code == 3);
  CHECK(bad.output.find("bad.csv:2:") != std::string::npos);
  CHECK(bad.output.find("expected a distance of 0 or more, found -2") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(dir + "/bad-map.csv"));

  const kith::test::KithRun ring = run_kith("fit " + dir + "/names.csv --neighbours " + dir + "/ring.csv -o " + dir +
                                            "/ring-map.csv --perplexity 4 --iterations 400 --quiet");
  CAPTURE(ring.output);
  REQUIRE(ring.code == 0);
  CHECK(std::filesystem::exists(dir + "/ring-map.csv"));
  // The graph holds 12 neighbours an item; a perplexity it cannot hold is a usage error.
  CHECK(run_kith("fit " + dir + "/names.csv --neighbours " + dir + "/ring.csv -o " + dir +
                 "/too.csv --perplexity 20 --quiet")
            .code == 2);
  CHECK_FALSE(std::filesystem::exists(dir + "/too.csv"));
}

TEST_CASE("neighbour graph file: a session made with --neighbours reopens with the graph, and gives its map") {
  const std::string dir = kith::test::temp_dir("kith-graph-session-cli");
  write_ring(dir);
  const std::string session = dir + "/ring.kith";
  const kith::test::KithRun made =
      run_kith("new " + dir + "/names.csv --neighbours " + dir + "/ring.csv -o " + session + " --perplexity 4");
  CAPTURE(made.output);
  REQUIRE(made.code == 0);
  std::filesystem::rename(dir + "/ring.csv", dir + "/ring-kept.csv");  // the session holds the graph itself
  const kith::test::KithRun check = run_kith("check " + session);
  CAPTURE(check.output);
  CHECK(check.code == 0);
  CHECK(check.output.find("neighbours:      12 an item, given (kept in the session)") != std::string::npos);
  // kith fit of the session: the same map as kith fit of the names with the graph (same seed).
  const kith::test::KithRun from_session =
      run_kith("fit " + session + " -o " + dir + "/s.npy --iterations 300 --seed 5 --quiet");
  CAPTURE(from_session.output);
  REQUIRE(from_session.code == 0);
  CHECK(from_session.output.find("neighbours from the given graph (12 an item)") != std::string::npos);
  REQUIRE(run_kith("fit " + dir + "/names.csv --neighbours " + dir + "/ring-kept.csv -o " + dir +
                   "/g.npy --perplexity 4 --iterations 300 --seed 5 --quiet")
              .code == 0);
  CHECK(kith::test::file_bytes(dir + "/s.npy") == kith::test::file_bytes(dir + "/g.npy"));
}

TEST_CASE(
    "neighbour graph file: a .npz written by numpy.savez reads as the two .npy files, a compressed one is refused") {
  if (!kith::test::reference_python_available()) return;
  const std::string dir = kith::test::temp_dir("kith-graph-npz");
  // NumPy 1.24 (Debian's python3-numpy) writes the archives: the same arrays as kIndex, kDistance.
  const std::string arrays =
      "i=np.array([[1,2],[0,2],[1,0],[2,1],[3,2]]); d=np.array([[1.,3],[1,2],[2,3],[3,5],[4,7]]); ";
  REQUIRE(kith::test::run_shell("/usr/bin/python3 -c 'import numpy as np; " + arrays + "np.savez(\"" + dir +
                                "/g.npz\", indices=i, distances=d); np.savez_compressed(\"" + dir +
                                "/c.npz\", indices=i, distances=d)'")
              .code == 0);
  const NeighbourGraph g = kith::read_neighbour_graph(dir + "/g.npz", jars());
  const NeighbourGraph csv = kith::parse_neighbour_graph_csv(good_csv(), "g.csv", jars());
  CHECK(g.index == csv.index);
  CHECK(g.distance2 == csv.distance2);
  try {
    kith::read_neighbour_graph(dir + "/c.npz", jars());
    FAIL("a compressed archive was read");
  } catch (const LoadError& e) {
    CHECK(e.problem().message.find("compressed (numpy.savez_compressed)") != std::string::npos);
  }
}
