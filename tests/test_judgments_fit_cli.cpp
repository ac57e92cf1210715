// kith fit --judgments / --blend: judgments read by id, agreement reported, bad files refused.
#include <doctest/doctest.h>

#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>
#include <sys/wait.h>

#include "tests/approx.h"

namespace {

int run_fit(const std::string& args, std::string* out, std::string* err, const std::string& dir) {
  const std::string o = dir + "/stdout.txt", e = dir + "/stderr.txt";
  const int status = std::system((std::string(KITH_BINARY) + " fit " + args + " >" + o + " 2>" + e).c_str());
  auto slurp = [](const std::string& p) {
    std::ifstream in(p);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
  };
  *out = slurp(o);
  *err = slurp(e);
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace

TEST_CASE("kith fit --judgments: blends, reports agreement, refuses a bad file") {
  const std::string dir = kith::test::temp_dir("judgments_fit_cli");
  {
    std::ofstream items(dir + "/items.csv");
    items << "id,a,b,c\n";
    std::mt19937_64 rng(3);
    std::normal_distribution<double> g;
    for (int i = 0; i < 60; ++i) items << "lamp" << i << ',' << g(rng) + 4 * (i % 2) << ',' << g(rng) << ',' << g(rng) << '\n';
    std::ofstream j(dir + "/j.csv");
    j << "anchor,nearer,farther,person\n";
    for (int i = 0; i < 10; ++i) j << "lamp" << 2 * i << ",lamp" << 2 * i + 20 << ",lamp" << 2 * i + 1 << ",Ada\n";
    std::ofstream bad(dir + "/bad.csv");
    bad << "anchor,nearer,farther\nlamp0,lamp2,lamp1\nlamp0,lamp99,lamp1\nlamp3,lamp3,lamp1\n";
  }
  std::string out, err;
  const std::string base = dir + "/items.csv --iterations 300 --perplexity 10 --quiet --force -o " + dir;
  REQUIRE(run_fit(base + "/map.json --judgments " + dir + "/j.csv --blend 2", &out, &err, dir) == 0);
  CHECK(out.find("judgments: 10, the map agrees with") != std::string::npos);
  CHECK(out.find("Ada: 10 judgments") != std::string::npos);
  std::ifstream in(dir + "/map.json");
  const auto json = nlohmann::json::parse(in);
  CHECK(json["options"]["blend"].get<double>() == 2.0);
  // Same-class judgments agree with the features: the map should honour nearly all of them.
  CHECK(json["health"]["judgment_agreement"].get<double>() >= 0.9);

  CHECK(run_fit(base + "/bad.json --judgments " + dir + "/bad.csv", &out, &err, dir) == 3);
  CHECK(err.find("bad.csv:3:2: nearer 'lamp99' is not an item of the collection") != std::string::npos);
  CHECK(err.find("bad.csv:4") != std::string::npos);
  CHECK(err.find("nothing imported") != std::string::npos);
  std::ifstream none(dir + "/bad.json");
  CHECK_FALSE(none.good());  // nothing written
  CHECK(run_fit(base + "/skip.json --judgments " + dir + "/bad.csv --skip-bad-judgments", &out, &err, dir) == 0);
  CHECK(out.find("judgments: 1,") != std::string::npos);
  CHECK(run_fit(base + "/neg.json --blend -1", &out, &err, dir) == 2);
}
