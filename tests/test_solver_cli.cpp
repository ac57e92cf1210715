// kith fit from the command line: outputs, exit codes, messages.
#include <doctest/doctest.h>

#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>
#include <sys/wait.h>

#include "tests/approx.h"

namespace {

int run(const std::string& args, std::string* err = nullptr, const std::string& dir = "/tmp") {
  const std::string errfile = dir + "/stderr.txt";
  const int status = std::system((std::string(KITH_BINARY) + " fit " + args + " >/dev/null 2>" + errfile).c_str());
  if (err) {
    std::ifstream in(errfile);
    std::stringstream ss;
    ss << in.rdbuf();
    *err = ss.str();
  }
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string items_csv(const std::string& dir, int n, bool with_nan = false) {
  const std::string path = dir + "/items.csv";
  std::ofstream out(path);
  out << "id,a,b,c,d,kind\n";
  std::mt19937_64 rng(5);
  std::normal_distribution<double> g;
  for (int i = 0; i < n; ++i) {
    const int cls = i % 3;
    out << "item" << i;
    for (int c = 0; c < 4; ++c) out << ',' << (with_nan && i == 7 && c == 2 ? std::string("nan") : std::to_string(g(rng) + 3 * cls * (c == cls)));
    out << ",class" << cls << '\n';
  }
  return path;
}

}  // namespace

TEST_CASE("solver cli: kith fit writes a CSV and a JSON layout with ids and tags") {
  const std::string dir = kith::test::temp_dir("fit-cli");
  const std::string items = items_csv(dir, 90);
  std::string err;
  REQUIRE(run(items + " -o " + dir + "/map.csv --iterations 300 --perplexity 10", &err, dir) == 0);
  CHECK(err.find("step 300 of 300") != std::string::npos);
  std::ifstream in(dir + "/map.csv");
  std::string header, line;
  std::getline(in, header);
  CHECK(header == "id,x,y,z,kind");
  int rows = 0;
  while (std::getline(in, line)) ++rows;
  CHECK(rows == 90);

  REQUIRE(run(items + " -o " + dir + "/map.json --dims 2 --iterations 300 --perplexity 10 --quiet", &err, dir) == 0);
  std::ifstream js(dir + "/map.json");
  const auto j = nlohmann::json::parse(js);
  CHECK(j["dims"] == 2);
  CHECK(j["items"].size() == 90);
  CHECK(j["items"][0]["id"] == "item0");
  CHECK(j["items"][0]["tags"]["kind"] == "class0");
  CHECK(!j["items"][0].contains("z"));
  CHECK(j["health"]["trustworthiness"].get<double>() > 0.8);

  // Same seed, same map: the CSV is byte-identical on a second run.
  REQUIRE(run(items + " -o " + dir + "/again.csv --iterations 300 --perplexity 10 --threads 1", &err, dir) == 0);
  std::ifstream a(dir + "/map.csv"), b(dir + "/again.csv");
  std::stringstream sa, sb;
  sa << a.rdbuf();
  sb << b.rdbuf();
  CHECK(sa.str() == sb.str());

  // --stages: one line for each stage of the pipeline, with its time and peak memory.
  REQUIRE(run(items + " -o " + dir + "/staged.csv --iterations 50 --perplexity 10 --quiet --stages", &err, dir) == 0);
  for (const char* stage : {"read items", "prepare features", "neighbours (exact)", "affinities", "start (PCA)",
                            "optimize", "measures", "write"})
    CHECK_MESSAGE(err.find(stage) != std::string::npos, stage, " missing from:\n", err);
  CHECK(err.find("peak") != std::string::npos);
}

TEST_CASE("solver cli: kith fit rejects bad options with 2 and bad data with 3") {
  const std::string dir = kith::test::temp_dir("fit-cli-bad");
  const std::string items = items_csv(dir, 30);
  std::string err;
  CHECK(run(items + " -o " + dir + "/m.csv --dims 4", &err, dir) == 2);
  CHECK(err.find("dims must be 2 or 3") != std::string::npos);
  CHECK(run(items + " -o " + dir + "/m.csv --theta abc", &err, dir) == 2);
  CHECK(err.find("expects a number") != std::string::npos);
  CHECK(run(items + " -o " + dir + "/m.txt", &err, dir) == 2);
  CHECK(run(items + " -o " + dir + "/m.csv --perplexity 40", &err, dir) == 2);
  CHECK(err.find("smaller than the number of items") != std::string::npos);
  CHECK(run(items + " -o " + dir + "/m.csv --bogus", &err, dir) == 2);
  CHECK(run(items, &err, dir) == 2);
  CHECK(run(dir + "/missing.csv -o " + dir + "/m.csv", &err, dir) == 3);
  {
    std::ofstream(dir + "/keep.csv") << "precious\n";
    CHECK(run(items + " -o " + dir + "/keep.csv --perplexity 5", &err, dir) == 2);
    std::ifstream in(dir + "/keep.csv");
    std::string s;
    std::getline(in, s);
    CHECK(s == "precious");
  }
  const std::string nan_dir = kith::test::temp_dir("fit-cli-nan");
  const std::string nan_items = items_csv(nan_dir, 30, true);
  const int code = run(nan_items + " -o " + nan_dir + "/m.csv --perplexity 5", &err, nan_dir);
  CHECK(code == 3);
  MESSAGE("NaN input message: " << err);
}

TEST_CASE("solver cli: a diverging fit is reported and nothing is written") {
  const std::string dir = kith::test::temp_dir("fit-cli-div");
  const std::string items = items_csv(dir, 60);
  std::string err;
  CHECK(run(items + " -o " + dir + "/m.csv --perplexity 5 --learning-rate 1e12 --iterations 300", &err, dir) == 1);
  CHECK(err.find("diverged") != std::string::npos);
  std::ifstream in(dir + "/m.csv");
  CHECK_FALSE(in.good());
}
