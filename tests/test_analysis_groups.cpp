// Groups (DBSCAN with an automatic radius): the knee rule by hand, blobs scored with scikit-learn's
// adjusted_rand_score (tests/reference/groups_reference.py), uniform noise, descriptions.
#include <doctest/doctest.h>

#include <fstream>
#include <set>

#include "solver/measures/groups.h"
#include "tests/analysis_support.h"
#include "tests/approx.h"

using namespace kith;

namespace {

Grouping group_file(const std::string& path, test::SimpleTable* table) {
  *table = test::read_simple_csv(path, 2);
  const size_t k = group_min_points({}, int(table->numbers.cols())) - 1;
  return find_groups(table->numbers, test::brute_neighbours(table->numbers, k));
}

void write_labels(const std::string& path, const std::vector<int>& labels) {
  std::ofstream out(path);
  for (int v : labels) out << v << "\n";
}

}  // namespace

TEST_CASE("knee of an ascending curve: the point farthest below the chord") {
  // Flat then a jump: the knee is the last flat point.
  CHECK(knee_index({1, 1, 1, 1, 1, 1, 1, 10}) == 6);
  CHECK(knee_index({0, 1, 2, 3, 20, 40}) == 3);
  CHECK(knee_index({5, 5}) == 0);
}

TEST_CASE("groups: two hand-placed clumps and a straggler") {
  Points y(11, 2);
  y << 0, 0, 0.1, 0, 0, 0.1, 0.1, 0.1, 0.05, 0.05,  //
      5, 5, 5.1, 5, 5, 5.1, 5.1, 5.1, 5.05, 5.05,    //
      20, 20;
  GroupOptions o;
  o.min_points = 4;
  o.eps = 0.2;
  o.min_group_size = 2;
  Grouping gr = find_groups(y, test::brute_neighbours(y, 3), o);
  REQUIRE(gr.groups.size() == 2);
  CHECK(gr.label[10] == -1);
  CHECK(gr.ungrouped == 1);
  CHECK(gr.label[0] == gr.label[4]);
  CHECK(gr.label[5] == gr.label[9]);
  CHECK(gr.label[0] != gr.label[5]);
  CHECK(gr.groups[0].size == 5);
  // The centre item of each clump is its first representative.
  CHECK(gr.groups[size_t(gr.label[0])].representatives[0] == 4);
  CHECK(gr.groups[size_t(gr.label[5])].representatives[0] == 9);
  describe_groups(&gr, {"x", "x", "x", "y", "", "z", "z", "z", "z", "z", "x"});
  const Group& a = gr.groups[size_t(gr.label[0])];
  REQUIRE(a.tags.size() == 2);
  CHECK(a.tags[0].tag == "x");
  CHECK(a.tags[0].count == 3);
  CHECK(a.purity == doctest::Approx(0.75));  // 3 of the 4 tagged members
  CHECK(gr.groups[size_t(gr.label[5])].purity == 1.0);
  GroupOptions bad;
  bad.min_points = 1;
  CHECK_THROWS_AS(find_groups(y, test::brute_neighbours(y, 3), bad), std::invalid_argument);
}

// Outside check: make_blobs data and adjusted_rand_score from scikit-learn (groups_reference.py).
TEST_CASE("groups recover well-separated Gaussian blobs (ARI >= 0.95) and make at most one of noise") {
  if (!test::reference_python_available()) {
    MESSAGE("skipped: /usr/bin/python3 with scikit-learn is not available");
    return;
  }
  const std::string dir = test::temp_dir("groups-blobs");
  for (int dims : {2, 3}) {
    for (int seed : {1, 2}) {
      const std::string csv = dir + "/blobs.csv";
      test::run_reference("groups_reference.py", "blobs " + csv + " " + std::to_string(dims) + " " + std::to_string(seed));
      test::SimpleTable t;
      const Grouping gr = group_file(csv, &t);
      std::vector<int> truth, pred;
      for (size_t i = 0; i < t.ids.size(); ++i) {
        truth.push_back(std::stoi(t.text[0][i].substr(1)));
        pred.push_back(gr.label[i]);
      }
      write_labels(dir + "/truth.txt", truth);
      write_labels(dir + "/pred.txt", pred);
      const double ari = std::stod(test::run_reference("groups_reference.py", "ari " + dir + "/truth.txt " + dir + "/pred.txt"));
      MESSAGE("blobs " << dims << "-D seed " << seed << ": " << gr.summary() << "; ARI " << ari);
      CHECK(ari >= 0.95);

      test::run_reference("groups_reference.py", "noise " + csv + " " + std::to_string(dims) + " " + std::to_string(seed));
      const Grouping noise = group_file(csv, &t);
      MESSAGE("uniform noise " << dims << "-D seed " << seed << ": " << noise.summary());
      CHECK(noise.groups.size() <= 1);
    }
  }
}
