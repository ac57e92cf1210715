// The default tag column (solver/io/collection.h, default_tag_column): the first column whose
// values group items, the same for the window's colours and every command's suspects.
#include <doctest/doctest.h>

#include <sstream>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"

TEST_CASE("default tag: the first column that groups items, unique labels are not tags") {
  const kith::Collection tea = kith::load_collection(std::string(KITH_SOURCE_DIR) + "/assets/tea_blends.csv");
  REQUIRE(tea.tags.size() >= 2);
  CHECK(tea.tags[0].name == "name");  // unique per blend: a label
  const int t = kith::default_tag_column(tea);
  REQUIRE(t >= 0);
  CHECK(tea.tags[size_t(t)].name == "family");
  CHECK(kith::find_tag_column(tea, "")->name == "family");
  CHECK(kith::find_tag_column(tea, "origin")->name == "origin");
  CHECK(kith::find_tag_column(tea, "nope") == nullptr);
  // Two items a value on average is enough; one value alone, or one item a value, is not.
  const kith::Collection c = kith::load_collection_from_memory(
      "id,label,same,pairs,w\na,x1,k,p,1\nb,x2,k,p,2\nc,x3,k,q,3\nd,x4,k,q,4\ne,x5,k,,5\n", "t.csv");
  REQUIRE(c.tags.size() == 3);
  CHECK(kith::default_tag_column(c) == 2);
  const kith::Collection none =
      kith::load_collection_from_memory("id,label,w\na,x1,1\nb,x2,2\nc,x3,3\n", "n.csv");
  CHECK(kith::default_tag_column(none) == -1);
  CHECK(kith::find_tag_column(none, "") == nullptr);
}

TEST_CASE("default tag: kith fit --suspects on the tea blends scores by family, not by the unique name") {
  const std::string dir = kith::test::temp_dir("default-tag");
  const std::string out = dir + "/tea.csv";
  const kith::test::KithRun r = kith::test::run_kith("fit " + std::string(KITH_SOURCE_DIR) +
                                                     "/assets/tea_blends.csv --suspects --quiet -o " + out);
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  std::istringstream csv(kith::test::file_bytes(out));
  std::string line;
  std::getline(csv, line);
  REQUIRE(line.substr(line.rfind(',') + 1) == "suspect_score");
  size_t rows = 0, all_differ = 0;
  while (std::getline(csv, line)) {
    ++rows;
    all_differ += std::stod(line.substr(line.rfind(',') + 1)) == 1.0;
  }
  CHECK(rows == 300);
  // By the unique name every item's neighbours all differ (score 1); by family most agree.
  CHECK(all_differ < rows / 4);
}
