// Collections from NumPy .npy files: arrays written by NumPy itself, the ids/tags CSV beside
// them, and robustness against cut or damaged files.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>

#include "solver/io/collection.h"
#include "solver/io/csv_table.h"
#include "solver/io/npy_file.h"
#include "tests/approx.h"

using kith::Collection;
using kith::LoadError;
using kith::LoadOptions;

namespace {
const std::string kGood = std::string(KITH_TEST_DATA) + "/good/";
}

TEST_CASE("npy arrays written by NumPy load with the exact values") {
  // Outside source: numpy.lib.format.write_array (NumPy 1.24, Debian 12) writes versions 1.0,
  // 2.0 and 3.0, float32 and float64; tests/reference/write_npy.py prints the values it wrote.
  const std::string dir = kith::test::temp_dir("npy-reference");
  std::istringstream lines(kith::test::run_reference("write_npy.py", dir));
  std::string line;
  int loaded = 0, refused = 0;
  while (std::getline(lines, line)) {
    std::istringstream in(line);
    std::string name, first;
    in >> name >> first;
    CAPTURE(name);
    if (first == "refused") {
      CHECK_THROWS_AS(kith::load_collection(dir + "/" + name), LoadError);
      ++refused;
      continue;
    }
    const long rows = std::stol(first);
    long cols = 0;
    in >> cols;
    kith::Points expected(rows, cols);
    for (long k = 0; k < rows * cols; ++k) {
      std::string v;
      in >> v;
      expected(k / cols, k % cols) = std::strtod(v.c_str(), nullptr);
    }
    const Collection c = kith::load_collection(dir + "/" + name);
    kith::test::assert_near(c.features, expected, 0.0, 0.0, name.c_str());  // exact: no rounding on the way
    CHECK(c.ids.front() == "0");
    CHECK(c.ids.back() == std::to_string(rows - 1));
    CHECK(c.feature_names.front() == "f0");
    ++loaded;
  }
  CHECK(loaded == 5);
  CHECK(refused == 5);
}

TEST_CASE("npy with a CSV of ids and tags") {
  LoadOptions options;
  options.tags_csv = kGood + "small_tags.csv";
  const Collection c = kith::load_collection(kGood + "small_v1.npy", options);
  CHECK(c.ids == std::vector<std::string>{"fern", "moss", "slate"});
  CHECK(c.id_column == "id");
  REQUIRE(c.tags.size() == 1);
  CHECK(c.tags[0].name == "family");
  CHECK(c.tags[0].values == std::vector<std::string>{"plant", "plant", "stone"});
  kith::Points expected(3, 2);
  expected << 1, 2, 3, 4, 5, 6;
  kith::test::assert_near(c.features, expected, 0.0);

  const Collection f4 = kith::load_collection(kGood + "small_v2_f4.npy");
  kith::test::assert_near(f4.features, expected, 0.0);
  const Collection one_d = kith::load_collection(kGood + "small_v3_1d.npy");
  CHECK(one_d.features.cols() == 1);
  CHECK(one_d.features(2, 0) == 3.0);
}

TEST_CASE("every cut of a valid npy file is refused cleanly") {
  const std::string bytes = kith::read_file(kGood + "small_v1.npy");
  for (size_t n = 0; n < bytes.size(); ++n) {
    CAPTURE(n);
    CHECK_THROWS_AS(kith::parse_npy(std::string_view(bytes).substr(0, n), "cut.npy"), LoadError);
  }
  CHECK(kith::parse_npy(bytes, "whole.npy").rows() == 3);
}

TEST_CASE("damaged npy headers either load or throw LoadError, nothing else") {
  const std::string bytes = kith::read_file(kGood + "small_v1.npy");
  std::mt19937 rng(11);
  std::uniform_int_distribution<size_t> where(0, 127);
  std::uniform_int_distribution<int> what(0, 255);
  int refused = 0;
  for (int trial = 0; trial < 3000; ++trial) {
    std::string damaged = bytes;
    for (int k = 0; k < 2; ++k) damaged[where(rng)] = char(what(rng));
    try {
      const kith::Points p = kith::parse_npy(damaged, "damaged.npy");
      CHECK(p.size() <= 12);  // at most 48 data bytes of float32
    } catch (const LoadError&) {
      ++refused;
    }
  }
  CHECK(refused > 0);
}

TEST_CASE("npy files are read from a mapping: the same values as from memory, and clear refusals") {
  const std::string dir = kith::test::temp_dir("npy-mapped");
  kith::Points p(4, 3);
  for (int i = 0; i < 4; ++i)
    for (int j = 0; j < 3; ++j) p(i, j) = 0.25 * i - j;
  {
    std::ofstream out(dir + "/x.npy", std::ios::binary);
    out << kith::npy_bytes(p);
  }
  const kith::Collection c = kith::load_collection(dir + "/x.npy");
  CHECK(c.features == p);
  CHECK(c.ids.size() == 4);
  // A folder named like an array, and an empty file, are refused with the path and what is wrong.
  std::filesystem::create_directory(dir + "/folder.npy");
  try {
    kith::load_collection(dir + "/folder.npy");
    FAIL("a folder loaded");
  } catch (const kith::LoadError& e) {
    CHECK(std::string(e.what()).find("folder.npy") != std::string::npos);
    CHECK(std::string(e.what()).find("a folder") != std::string::npos);
  }
  { std::ofstream out(dir + "/empty.npy"); }
  CHECK_THROWS_AS(kith::load_collection(dir + "/empty.npy"), kith::LoadError);
}
