// A collection of names alone (ids, no numeric column) through the commands: kith check accepts
// it with a note, kith fit places it from --judgments alone (held-out agreement on a planted 3-D
// map), and refuses it without judgments or with judgments naming unknown ids.
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <sys/wait.h>

#include "solver/io/collection.h"
#include "tests/approx.h"
#include "tests/judgments_planted.h"

namespace {

constexpr int kItems = 60;
constexpr size_t kTraining = 2000, kHeldOut = 500;
constexpr double kOracleNoise = 0.02;      // logistic noise on distance differences, as test_judgments_planted.cpp
constexpr double kLeastAgreement = 0.85;   // the median over the seeds must reach this
constexpr double kLeastPerSeed = 0.82;     // and no seed may fall below this

std::string slurp(const std::string& path) {
  std::ifstream in(path);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

int run_kith(const std::string& args, std::string* out, std::string* err, const std::string& dir) {
  const std::string o = dir + "/stdout.txt", e = dir + "/stderr.txt";
  const int status = std::system((std::string(KITH_BINARY) + " " + args + " >" + o + " 2>" + e).c_str());
  *out = slurp(o);
  *err = slurp(e);
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string card(int i) {
  char name[16];
  std::snprintf(name, sizeof name, "card%02d", i);
  return name;
}

void write_ids(const std::string& path) {
  std::ofstream out(path);
  out << "name\n";
  for (int i = 0; i < kItems; ++i) out << card(i) << '\n';
}

void write_judgments(const std::string& path, const std::vector<kith::Judgment>& judgments) {
  std::ofstream out(path);
  out << "anchor,nearer,farther\n";
  for (const kith::Judgment& j : judgments)
    out << card(j.anchor) << ',' << card(j.nearer) << ',' << card(j.farther) << '\n';
}

// The map kith fit wrote as CSV (id,x,y,z), rows in the collection's order.
kith::Points read_map(const std::string& path) {
  const kith::Collection c = kith::load_collection(path);
  REQUIRE(c.size() == size_t(kItems));
  REQUIRE(c.feature_names == std::vector<std::string>{"x", "y", "z"});
  for (int i = 0; i < kItems; ++i) REQUIRE(c.ids[size_t(i)] == card(i));
  return c.features;
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v[v.size() / 2];
}

}  // namespace

TEST_CASE("names alone: kith fit --judgments places 60 cards from 2,000 judgments of a planted 3-D map") {
  const std::string dir = kith::test::temp_dir("judgments_alone_cli");
  write_ids(dir + "/ids.csv");
  std::string out, err;
  std::vector<double> chosen, dof1, ceiling;
  for (uint64_t seed : {1, 2, 3}) {
    const kith::Points truth = kith::test::planted_positions(kItems, 100 + seed);
    kith::test::Oracle oracle(truth, kOracleNoise, 200 + seed);
    std::mt19937_64 pick(300 + seed);
    const auto training = oracle.random_answers(kItems, kTraining, pick);
    const auto held_out = oracle.random_answers(kItems, kHeldOut, pick);  // never trained on
    write_judgments(dir + "/j.csv", training);
    const std::string base = "fit " + dir + "/ids.csv --judgments " + dir + "/j.csv --quiet --force --seed " +
                             std::to_string(seed) + " -o " + dir;
    REQUIRE(run_kith(base + "/map.csv", &out, &err, dir) == 0);
    chosen.push_back(kith::judgment_agreement(read_map(dir + "/map.csv"), held_out));
    REQUIRE(run_kith(base + "/map1.csv --dof 1", &out, &err, dir) == 0);
    dof1.push_back(kith::judgment_agreement(read_map(dir + "/map1.csv"), held_out));
    ceiling.push_back(kith::judgment_agreement(truth, held_out));  // the oracle against itself
    MESSAGE("seed " << seed << ": held-out agreement " << chosen.back() << " (dof 1: " << dof1.back()
                    << "; the planted map: " << ceiling.back() << ")");
  }
  MESSAGE("median held-out agreement " << median(chosen) << " (dof 1: " << median(dof1) << ", planted map "
                                       << median(ceiling) << ")");
  CHECK(median(chosen) >= kLeastAgreement);
  CHECK(*std::min_element(chosen.begin(), chosen.end()) >= kLeastPerSeed);
  CHECK(out.find("judgments: 2000") != std::string::npos);
}

TEST_CASE("names alone: kith check accepts them with a note, kith fit refuses no judgments and unknown ids") {
  const std::string dir = kith::test::temp_dir("judgments_alone_bad");
  write_ids(dir + "/ids.csv");
  std::string out, err;
  REQUIRE(run_kith("check " + dir + "/ids.csv", &out, &err, dir) == 0);
  CHECK(out.find("feature columns: 0") != std::string::npos);
  CHECK(out.find("placed from judgments alone") != std::string::npos);

  CHECK(run_kith("fit " + dir + "/ids.csv -o " + dir + "/none.csv", &out, &err, dir) == 2);
  CHECK(err.find("has no feature columns (numbers), so its map comes from judgments alone: give --judgments") !=
        std::string::npos);
  CHECK(!std::ifstream(dir + "/none.csv").good());

  {
    std::ofstream j(dir + "/bad.csv");
    j << "anchor,nearer,farther\ncard00,card01,card02\ncard00,card99,card02\n";
  }
  CHECK(run_kith("fit " + dir + "/ids.csv --judgments " + dir + "/bad.csv -o " + dir + "/bad_map.csv", &out, &err,
                 dir) == 3);
  CHECK(err.find("bad.csv:3:2: nearer 'card99' is not an item of the collection") != std::string::npos);
  CHECK(!std::ifstream(dir + "/bad_map.csv").good());
}
