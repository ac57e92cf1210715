// Collections from CSV/TSV: the RFC 4180 reader against Python's csv module, the column rules,
// number parsing against strtod, pictures and warnings.
#include <doctest/doctest.h>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <set>
#include <algorithm>

#include "solver/io/collection.h"
#include "solver/io/csv_table.h"
#include "tests/approx.h"

using kith::Collection;
using kith::LoadError;
using kith::LoadOptions;

namespace {

const std::string kGood = std::string(KITH_TEST_DATA) + "/good/";

kith::Points matrix(std::initializer_list<std::initializer_list<double>> rows) {
  kith::Points m(Eigen::Index(rows.size()), Eigen::Index(rows.begin()->size()));
  Eigen::Index i = 0;
  for (const auto& r : rows) {
    Eigen::Index j = 0;
    for (double v : r) m(i, j++) = v;
    ++i;
  }
  return m;
}

// The message a load must fail with (file, line, column, what), or "" if it loads.
std::string failure(const std::string& text, const std::string& name, const LoadOptions& options = {}) {
  try {
    kith::load_collection_from_memory(text, name, options);
  } catch (const LoadError& e) {
    return e.problem().str();
  }
  return "";
}

const kith::TagColumn* tag(const Collection& c, const std::string& name) {
  for (const auto& t : c.tags)
    if (t.name == name) return &t;
  return nullptr;
}

}  // namespace

TEST_CASE("csv reader gives the same fields as Python's csv module") {
  // Outside source: Python's standard csv module writes the tables (tests/reference/write_csv.py)
  // with RFC 4180 minimal quoting; kith must read back exactly the fields it was given.
  const std::string dir = kith::test::temp_dir("csv-reference");
  for (const char* sep : {"comma", "tab"})
    for (const char* end : {"lf", "crlf"})
      for (int seed = 1; seed <= 8; ++seed) {
        CAPTURE(sep);
        CAPTURE(end);
        CAPTURE(seed);
        // By extension: a one-column table has no separator in its header to sniff.
        const std::string path = dir + (std::string(sep) == "comma" ? "/t.csv" : "/t.tsv");
        const auto expected = nlohmann::json::parse(kith::test::run_reference(
            "write_csv.py", path + " " + sep + " " + end + " " + std::to_string(seed)));
        const kith::CsvTable t = kith::parse_csv(kith::read_file(path), path);
        CHECK(t.separator == (std::string(sep) == "comma" ? ',' : '\t'));
        REQUIRE(t.columns() == expected[0].size());
        REQUIRE(t.rows() + 1 == expected.size());
        for (size_t j = 0; j < t.columns(); ++j) CHECK(t.header[j] == expected[0][j].get<std::string>());
        for (size_t r = 0; r < t.rows(); ++r)
          for (size_t j = 0; j < t.columns(); ++j) {
            CAPTURE(r);
            CAPTURE(j);
            CHECK(std::string(t.field(r, j)) == expected[r + 1][j].get<std::string>());
          }
      }
}

TEST_CASE("quoted fields hold commas, doubled quotes and line breaks") {
  const Collection c = kith::load_collection(kGood + "quoting.csv");
  CHECK(c.ids == std::vector<std::string>{"fern, large", "moss", "sage"});
  CHECK(c.id_column == "id");
  REQUIRE(c.feature_names == std::vector<std::string>{"width", "height"});
  // " 6 " and "+5" are numbers: spaces around a number and a leading '+' are accepted.
  kith::test::assert_near(c.features, matrix({{1.5, 2}, {3, 0.4}, {5, 6}}), 0.0);
  const auto* note = tag(c, "note");
  REQUIRE(note != nullptr);
  CHECK(note->values == std::vector<std::string>{"says \"soft\"", "two\nlines", ""});
  CHECK(c.warnings.empty());
}

TEST_CASE("CRLF line ends, a byte order mark and a last line without a line end") {
  const Collection c = kith::load_collection(kGood + "crlf_bom.csv");
  CHECK(c.id_column == "id");  // the BOM is not part of the first column name
  CHECK(c.ids == std::vector<std::string>{"fern", "moss", "sage"});
  kith::test::assert_near(c.features, matrix({{1, 2}, {3, 4}, {5, 6}}), 0.0);
}

TEST_CASE("TSV by extension and by sniffing, the first unique text column is the id") {
  for (const std::string& name : {std::string("tabs.tsv"), std::string("tabs.txt")}) {
    CAPTURE(name);
    const Collection c = kith::load_collection_from_memory(kith::read_file(kGood + "tabs.tsv"), name);
    CHECK(c.id_column == "name");  // 'family' repeats 'plant', so it is a tag, not an id
    CHECK(c.ids == std::vector<std::string>{"fern", "moss", "slate"});
    REQUIRE(tag(c, "family") != nullptr);
    CHECK(tag(c, "family")->values == std::vector<std::string>{"plant", "plant", "stone"});
    kith::test::assert_near(c.features, matrix({{1, 2}, {3, 4}, {5, 6}}), 0.0);
  }
}

TEST_CASE("without an id column items are numbered from 1") {
  const Collection c = kith::load_collection(kGood + "no_id.csv");
  CHECK(c.id_column.empty());
  CHECK(c.ids == std::vector<std::string>{"1", "2", "3"});
  CHECK(c.index_of("2") == std::optional<size_t>(1));
  CHECK_FALSE(c.index_of("4").has_value());
}

TEST_CASE("options choose the id column and exclude numeric columns, which become tags") {
  const std::string text = "code,class,width,height\n101,1,0.5,7\n102,2,0.25,8\n103,1,1,9\n";
  LoadOptions options;
  options.id_column = "code";
  options.exclude = {"class"};
  const Collection c = kith::load_collection_from_memory(text, "x.csv", options);
  CHECK(c.ids == std::vector<std::string>{"101", "102", "103"});
  CHECK(c.feature_names == std::vector<std::string>{"width", "height"});
  REQUIRE(tag(c, "class") != nullptr);
  CHECK(tag(c, "class")->values == std::vector<std::string>{"1", "2", "1"});
  // Without options the numeric code and class columns are features and items are numbered.
  const Collection plain = kith::load_collection_from_memory(text, "x.csv");
  CHECK(plain.feature_names == std::vector<std::string>{"code", "class", "width", "height"});
  CHECK(plain.ids == std::vector<std::string>{"1", "2", "3"});
  CHECK(failure(text, "x.csv", [] {
          LoadOptions o;
          o.exclude = {"depth"};
          return o;
        }()) == "x.csv:1: expected a column named 'depth' to exclude, found none (columns: code, class, width, height)");
}

TEST_CASE("a column is numeric when most of its values are numbers") {
  // Mostly text with one number: a tag column.
  const Collection c = kith::load_collection_from_memory("id,colour,w\na,red,1\nb,12,2\nc,blue,3\n", "x.csv");
  CHECK(c.feature_names == std::vector<std::string>{"w"});
  REQUIRE(tag(c, "colour") != nullptr);
  // Mostly numbers with one text value: a feature column with a bad value.
  CHECK(failure("id,w\na,1\nb,n/a\nc,3\n", "x.csv") ==
        "x.csv:3:2: expected a number in feature column 'w', found 'n/a'");
}

TEST_CASE("line numbers count physical lines, blank lines and lone CR ends included") {
  CHECK(failure("id,w\r\r\na,1\r\rb,x\rc,3\r", "x.csv") == "x.csv:5:2: expected a number in feature column 'w', found 'x'");
  CHECK(failure("id,w\n\n\na,1\n\nb,2,3\n", "x.csv") == "x.csv:6:3: expected 2 fields as in the header (line 1), found 3");
  // A quoted field spanning lines moves the following rows down.
  CHECK(failure("id,note,w\na,\"x\n\ny\",1\nb,z,q\nc,k,3\n", "x.csv") ==
        "x.csv:5:3: expected a number in feature column 'w', found 'q'");
}

TEST_CASE("numbers are read exactly as strtod reads them") {
  // Fast path (std::from_chars) against the slow obvious one (strtod), on numbers written in
  // many styles.
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> mantissa(-1.0, 1.0);
  // Magnitudes stay within 1e100: larger features are refused (see below).
  std::uniform_int_distribution<int> exponent(-300, 99), style(0, 4);
  const int rows = 300, cols = 4;
  std::string text = "id,a,b,c,d\n";
  std::vector<double> expected;
  for (int r = 0; r < rows; ++r) {
    text += "item" + std::to_string(r);
    for (int j = 0; j < cols; ++j) {
      const double v = mantissa(rng) * std::pow(10.0, exponent(rng) / (j + 1));
      char buf[64];
      switch (style(rng)) {
        case 0: std::snprintf(buf, sizeof buf, "%.17g", v); break;
        case 1: std::snprintf(buf, sizeof buf, "%g", v); break;
        case 2: std::snprintf(buf, sizeof buf, "%.3e", v); break;
        case 3: std::snprintf(buf, sizeof buf, " %.10E ", v); break;
        default: std::snprintf(buf, sizeof buf, "%+.6f", v); break;
      }
      text += std::string(",") + buf;
      expected.push_back(std::strtod(buf, nullptr));
    }
    text += "\n";
  }
  const Collection c = kith::load_collection_from_memory(text, "numbers.csv");
  REQUIRE(c.features.rows() == rows);
  for (int r = 0; r < rows; ++r)
    for (int j = 0; j < cols; ++j) {
      CAPTURE(r);
      CAPTURE(j);
      CHECK(c.features(r, j) == expected[size_t(r * cols + j)]);
    }
  // Values below double's range are numbers (they round towards 0), not errors.
  const Collection tiny = kith::load_collection_from_memory("id,w\na,1e-400\nb,2\n", "x.csv");
  CHECK(tiny.features(0, 0) == std::strtod("1e-400", nullptr));
  // Above 1e100 in size, squared distances between items overflow: refused, with where.
  CHECK(failure("id,w\na,1\nb,-5e200\n", "x.csv") ==
        "x.csv:3:2: expected a number of at most 1e100 in size in feature column 'w', found '-5e200' "
        "(distances between such numbers overflow)");
}

TEST_CASE("constant columns and missing pictures are warnings, not errors") {
  const Collection c = kith::load_collection(kGood + "constant_column.csv");
  REQUIRE(c.warnings.size() == 1);
  CHECK(c.warnings[0].line == 1);
  CHECK(c.warnings[0].column == 3);
  CHECK(c.warnings[0].message == "feature column 'height' has the same value (7) for every item; it adds nothing");

  const Collection p = kith::load_collection(kGood + "pictures.csv");
  CHECK(p.picture_column == "picture");
  CHECK(p.tags.empty());
  REQUIRE(p.pictures.size() == 3);
  CHECK(p.pictures[0] == kGood + "pics/fern.png");
  CHECK(p.pictures[2] == kGood + "pics/missing.png");
  REQUIRE(p.warnings.size() == 1);
  CHECK(p.warnings[0].str() == kGood + "pictures.csv:4:2: picture file 'pics/missing.png' not found (looked for " +
                                   kGood + "pics/missing.png)");
}

TEST_CASE("many missing pictures: the first five are listed, then a count") {
  std::string text = "id,pic,w\n";
  for (int i = 0; i < 9; ++i) text += "i" + std::to_string(i) + ",nowhere/p" + std::to_string(i) + ".JPG," + std::to_string(i) + "\n";
  const Collection c = kith::load_collection_from_memory(text, "/nonexistent-folder/x.csv");
  CHECK(c.picture_column == "pic");
  REQUIRE(c.warnings.size() == 6);
  CHECK(c.warnings[5].str() == "/nonexistent-folder/x.csv: 9 of 9 picture files are missing (the first 5 are listed above)");
}

TEST_CASE("an empty column name gets a name and a warning") {
  const Collection c = kith::load_collection_from_memory(",w\n0,1\n1,3\n", "x.csv");
  CHECK(c.feature_names == std::vector<std::string>{"column 1", "w"});
  REQUIRE(c.warnings.size() == 1);
  CHECK(c.warnings[0].str() == "x.csv:1:1: column 1 has no name; calling it 'column 1'");
}

TEST_CASE("min_items, allow_no_features and option checks") {
  LoadOptions options;
  options.min_items = 4;
  CHECK(failure("id,w\na,1\nb,2\nc,3\n", "x.csv", options) ==
        "x.csv:5: expected at least 4 items (rows below the header), found 3");
  LoadOptions judgments_only;
  judgments_only.allow_no_features = true;
  const Collection c = kith::load_collection_from_memory("id,family\na,x\nb,y\n", "x.csv", judgments_only);
  CHECK(c.features.rows() == 2);
  CHECK(c.features.cols() == 0);
  LoadOptions impossible;
  impossible.min_items = 0;
  std::string error;
  CHECK_FALSE(impossible.is_valid(&error));
  CHECK(error == "min_items must be at least 1");
  CHECK(LoadOptions{}.is_valid(&error));
}

TEST_CASE("index_of after changing ids by hand") {
  Collection c = kith::load_collection(kGood + "crlf_bom.csv");
  CHECK(c.index_of("moss") == std::optional<size_t>(1));
  c.ids.push_back("clay");  // the loader's table no longer matches: linear search
  CHECK(c.index_of("clay") == std::optional<size_t>(3));
  c.build_index();
  CHECK(c.index_of("clay") == std::optional<size_t>(3));
  CHECK_FALSE(c.index_of("slate").has_value());
}

TEST_CASE("missing and unreadable files") {
  CHECK_THROWS_WITH_AS(kith::load_collection("/nonexistent/items.csv"),
                       "/nonexistent/items.csv: cannot open: No such file or directory", LoadError);
  CHECK_THROWS_WITH_AS(kith::load_collection(KITH_TEST_DATA), (std::string(KITH_TEST_DATA) + ": expected a regular file, found a folder").c_str(),
                       LoadError);
}

TEST_CASE("the bundled sample collection loads") {
  const Collection c = kith::load_collection(std::string(KITH_SOURCE_DIR) + "/assets/tea_blends.csv");
  CHECK(c.size() == 300);
  CHECK(c.id_column == "id");
  CHECK(c.features.cols() == 12);
  CHECK(c.warnings.empty());
  const auto* family = tag(c, "family");
  REQUIRE(family != nullptr);
  CHECK(std::set<std::string>(family->values.begin(), family->values.end()).size() == 6);
  const auto* name = tag(c, "name");
  REQUIRE(name != nullptr);
  // Some names hold commas and quotes, written with RFC 4180 quoting by Python's csv module.
  CHECK(std::any_of(name->values.begin(), name->values.end(),
                    [](const std::string& s) { return s.find(", late harvest") != std::string::npos; }));
  CHECK(std::any_of(name->values.begin(), name->values.end(),
                    [](const std::string& s) { return s.rfind("The \"", 0) == 0; }));
}
