// kith report on the command line: an items file (fits a map itself) and a session (its saved map
// against the judgment-free reference), usage and data errors with their exit codes.
#include <doctest/doctest.h>

#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <set>
#include <algorithm>
#include <sstream>

#include "solver/fit/fit.h"
#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "viewer/cli/report_page.h"

using namespace kith;

namespace {

int run_kith(const std::string& args, std::string* output = nullptr) {
  const std::string out = test::temp_dir("report-cli-out") + "/out.txt";
  const int status = std::system((std::string(KITH_BINARY) + " " + args + " >'" + out + "' 2>&1").c_str());
  if (output) {
    std::ifstream in(out);
    std::stringstream s;
    s << in.rdbuf();
    *output = s.str();
  }
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string slurp(const std::string& path) {
  std::ifstream in(path);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

// 120 items in three crowds of 6 features, tagged by crowd, two tagged wrongly.
std::string write_items(const std::string& dir) {
  std::mt19937 rng(9);
  std::normal_distribution<double> noise(0.0, 1.0);
  const std::string path = dir + "/swatches.csv";
  std::ofstream out(path);
  out << "id,fibre,f1,f2,f3,f4,f5,f6\n";
  const char* names[3] = {"linen", "wool", "jute"};
  for (int i = 0; i < 120; ++i) {
    const int c = i % 3;
    out << "sw" << i << "," << names[(i == 4 || i == 8) ? 0 : c];
    for (int f = 0; f < 6; ++f) out << "," << noise(rng) + (f % 3 == c ? 8.0 : 0.0);
    out << "\n";
  }
  return path;
}

}  // namespace

TEST_CASE("kith report ITEMS writes a self-contained page with the suspects and groups") {
  const std::string dir = test::temp_dir("report-cli");
  const std::string items = write_items(dir);
  std::string said;
  REQUIRE(run_kith("report " + items + " -o " + dir + "/r.html --iterations 300 --perplexity 10", &said) == 0);
  const std::string html = slurp(dir + "/r.html");
  CHECK(external_reference(html) == "");
  CHECK(html.find("<table id='suspects'>") != std::string::npos);
  CHECK(html.find("<table id='groups'>") != std::string::npos);
  CHECK(html.find("trustworthiness") != std::string::npos);
  // The two mistagged items (sw4, sw8) head the suspect list.
  const size_t table = html.find("<table id='suspects'>");
  const size_t first_rows = html.find("</tr>", html.find("</tr>", html.find("</tr>", table) + 1) + 1);
  const std::string top = html.substr(table, first_rows - table);
  CHECK(top.find(">sw4<") != std::string::npos);
  CHECK(top.find(">sw8<") != std::string::npos);
  CHECK(said.find("3 groups") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(dir + "/r.html.part"));
}

TEST_CASE("kith report SESSION adds what the judgments moved, from the saved map") {
  const std::string dir = test::temp_dir("report-session");
  const Collection c = load_collection(write_items(dir));
  const std::string session = dir + "/s.kith";
  {
    SessionSettings settings;
    settings.perplexity = 10;
    auto store = SessionStore::create(session, c, settings);
    Judgment j;
    j.anchor = 0;
    j.nearer = 1;
    j.farther = 3;  // in sw0's own crowd: pushing away from it pushes sw0 the way it went
    j.person = "Ines";
    store->add_judgment(j);
    // The saved map: the judgment-free fit (as the report fits it) with sw0 moved into sw1's crowd.
    FitOptions fo;
    fo.perplexity = 10;
    Points y = fit_map(c.features, fo).map;
    Eigen::RowVectorXd centre = Eigen::RowVectorXd::Zero(3);
    for (int i = 1; i < 120; i += 3) centre += y.row(i) / 40.0;
    y.row(0) = centre;
    store->write_checkpoint(y, 500);
  }
  std::string said;
  REQUIRE(run_kith("report " + session + " -o " + dir + "/r.html", &said) == 0);
  const std::string html = slurp(dir + "/r.html");
  CHECK(external_reference(html) == "");
  const size_t moved = html.find("<table id='moved'>");
  REQUIRE(moved != std::string::npos);
  CHECK(html.find("judgment agreement") != std::string::npos);
  CHECK(html.find("<tr><td>sw0</td>", moved) == html.find("<tr>", html.find("</tr>", moved)));  // moved most
  // The judgment naming sw0 is listed as pulling it the way it moved.
  CHECK(html.find("sw0 nearer sw1 than sw3 (Ines)", moved) != std::string::npos);
}

TEST_CASE("kith report: usage and data errors have their exit codes and touch nothing") {
  const std::string dir = test::temp_dir("report-errors");
  const std::string items = write_items(dir);
  CHECK(run_kith("report --help") == 0);
  CHECK(run_kith("report " + items) == 2);                                   // no -o
  CHECK(run_kith("report -o " + dir + "/r.html") == 2);                      // no input
  CHECK(run_kith("report " + items + " -o " + items) == 2);                  // would overwrite the input
  CHECK(run_kith("report " + items + " -o " + dir + "/r.html --space sideways") == 2);
  CHECK(run_kith("report " + items + " -o " + dir + "/r.html --tag nosuch") == 2);
  CHECK(run_kith("report " + items + " -o " + dir + "/r.html --perplexity 500") == 2);
  CHECK(run_kith("report " + dir + "/missing.csv -o " + dir + "/r.html") == 3);
  std::ofstream(dir + "/bad.csv") << "id,a,b\nx,1,2\ny,3\n";  // a short row
  CHECK(run_kith("report " + dir + "/bad.csv -o " + dir + "/r.html") == 3);
  std::ofstream(dir + "/bad.kith") << "not a session";
  CHECK(run_kith("report " + dir + "/bad.kith -o " + dir + "/r.html") == 3);
  CHECK_FALSE(std::filesystem::exists(dir + "/r.html"));
  CHECK(slurp(items).size() > 1000);  // the input is intact
}

TEST_CASE("kith fit --suspects --groups adds the score and group columns") {
  const std::string dir = test::temp_dir("fit-structure");
  const std::string items = write_items(dir);
  std::string said;
  REQUIRE(run_kith("fit " + items + " -o " + dir + "/l.csv --quiet --iterations 300 --perplexity 10 --suspects --groups",
                   &said) == 0);
  const Collection layout = load_collection(dir + "/l.csv");
  REQUIRE(layout.size() == 120);
  // suspect and group are numeric columns of the layout.
  const auto& names = layout.feature_names;
  const auto s = std::find(names.begin(), names.end(), "suspect_score"), g = std::find(names.begin(), names.end(), "group");
  REQUIRE(s != names.end());
  REQUIRE(g != names.end());
  const Eigen::Index sc = s - names.begin(), gc = g - names.begin();
  CHECK(layout.features(4, sc) > 0.5);   // sw4 is tagged linen among wool
  CHECK(layout.features(8, sc) > 0.5);
  CHECK(layout.features(1, sc) < 0.2);
  std::set<double> groups;
  for (Eigen::Index i = 0; i < 120; ++i) groups.insert(layout.features(i, gc));
  CHECK(groups.size() == 3);
  CHECK(layout.features(1, gc) == layout.features(4, gc));  // sw4 sits in sw1's crowd
  CHECK(said.find("groups: 3 groups") != std::string::npos);
  CHECK(run_kith("fit " + items + " -o " + dir + "/m.csv --quiet --iterations 50 --suspects --tag nosuch") == 2);
  CHECK_FALSE(std::filesystem::exists(dir + "/m.csv"));
}
