// The HTML report: escaping, base64 (RFC 4648 test vectors), the no-external-resources check, and
// the page opened in a headless browser (Debian's chromium) without errors.
#include <doctest/doctest.h>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <random>
#include <sstream>

#include "solver/measures/groups.h"
#include "solver/measures/neighbour_compare.h"
#include "solver/measures/suspects.h"
#include "tests/analysis_support.h"
#include "tests/approx.h"
#include "viewer/cli/report_page.h"

using namespace kith;

namespace {

// Three tagged clumps in 2-D with two items tagged wrongly; a reference map that differs a little.
struct Sample {
  std::vector<std::string> ids, tags;
  Points map, reference;
};
Sample sample() {
  Sample s;
  std::mt19937 rng(5);
  std::normal_distribution<double> noise(0.0, 0.6);
  const double centres[3][2] = {{0, 0}, {8, 1}, {3, 9}};
  const char* names[3] = {"linen", "wool <fine> & \"soft\"", "jute"};
  s.map.resize(150, 2);
  for (int i = 0; i < 150; ++i) {
    const int c = i % 3;
    s.map(i, 0) = centres[c][0] + noise(rng);
    s.map(i, 1) = centres[c][1] + noise(rng);
    s.ids.push_back("swatch-" + std::to_string(i));
    s.tags.push_back(names[c]);
  }
  s.tags[4] = names[0];  // item 4 sits in clump 1
  s.tags[8] = names[0];  // item 8 sits in clump 2
  s.reference = s.map;
  s.reference(7, 0) -= 3.0;
  return s;
}

std::string run(const std::string& command, int* status) {
  std::string out;
  FILE* pipe = popen(command.c_str(), "r");
  REQUIRE(pipe != nullptr);
  char buf[4096];
  for (size_t got; (got = fread(buf, 1, sizeof buf, pipe)) > 0;) out.append(buf, got);
  *status = pclose(pipe);
  return out;
}

}  // namespace

TEST_CASE("report helpers: escaping, base64 (RFC 4648 section 10 vectors), external references") {
  CHECK(html_escape("a<b>&\"'") == "a&lt;b&gt;&amp;&quot;&#39;");
  CHECK(base64_encode("") == "");
  CHECK(base64_encode("f") == "Zg==");
  CHECK(base64_encode("fo") == "Zm8=");
  CHECK(base64_encode("foo") == "Zm9v");
  CHECK(base64_encode("foob") == "Zm9vYg==");
  CHECK(base64_encode("fooba") == "Zm9vYmE=");
  CHECK(base64_encode("foobar") == "Zm9vYmFy");
  CHECK(external_reference("<img src='data:image/png;base64,AA'><a href='#x'>") == "");
  CHECK(external_reference("<img src=\"pic.png\">") != "");
  CHECK(external_reference("<link rel=stylesheet href='a.css'>") != "");
  CHECK(external_reference("<style>@import 'x.css';</style>") != "");
  CHECK(external_reference("<script>1</script>") != "");
  CHECK(external_reference("<div style=\"background:url(https://x/y.png)\">") != "");
}

TEST_CASE("the report is self-contained and opens in headless chromium without errors") {
  const Sample s = sample();
  const NeighbourGraph g = test::brute_neighbours(s.map, 10);
  SuspectOptions so;
  so.space = SuspectSpace::kMap;
  const SuspectScores suspects = score_suspects(s.tags, nullptr, &g, so);
  Grouping groups = find_groups(s.map, g);
  describe_groups(&groups, s.tags);
  const Displacement moved = measure_displacement(s.reference, s.map);
  ReportContent c;
  c.title = "test swatches";
  c.source = "memory";
  c.ids = s.ids;
  c.tag_name = "fibre";
  c.tags = s.tags;
  c.view = s.map;
  c.figures = {{"KL divergence", "0.812"}, {"neighbour recall", "0.75"}};
  c.suspects = &suspects;
  c.groups = &groups;
  c.kept = neighbourhood_kept(g, g);
  c.displacement = &moved;
  c.list_rows = 10;
  const std::string html = report_html(c);

  CHECK(external_reference(html) == "");
  CHECK(html.find("http://") == std::string::npos);
  CHECK(html.find("https://") == std::string::npos);
  CHECK(html.find("wool &lt;fine&gt; &amp; &quot;soft&quot;") != std::string::npos);  // tags escaped
  CHECK(html.find("<table id='suspects'>") != std::string::npos);
  CHECK(html.find("<table id='groups'>") != std::string::npos);
  CHECK(html.find("data:image/png;base64,iVBORw0KGgo") != std::string::npos);  // PNG signature in base64
  // The two mistagged items lead the suspect list.
  REQUIRE(suspects.ranking.size() >= 2);
  CHECK(((suspects.ranking[0] == 4 || suspects.ranking[0] == 8) && (suspects.ranking[1] == 4 || suspects.ranking[1] == 8)));
  CHECK(groups.groups.size() == 3);
  CHECK(moved.ranking[0] == 7);

  const std::string dir = test::temp_dir("report");
  const std::string path = dir + "/report.html";
  std::ofstream(path) << html;
  if (std::system("command -v chromium >/dev/null 2>&1") != 0) {
    MESSAGE("skipped the browser check: chromium is not installed (scripts/quick.sh installs it)");
    return;
  }
  // Headless chromium with network features off; --enable-logging=stderr shows console and load errors.
  const std::string chromium =
      "timeout 90 chromium --headless --no-sandbox --disable-gpu --disable-background-networking "
      "--disable-component-update --disable-sync --no-first-run --enable-logging=stderr --v=0 --user-data-dir=" +
      dir + "/profile ";
  int status = 0;
  const std::string dom = run(chromium + "--dump-dom file://" + path + " 2>" + dir + "/stderr.txt", &status);
  std::ifstream err_in(dir + "/stderr.txt");
  std::stringstream err;
  err << err_in.rdbuf();
  INFO("chromium stderr: " << err.str());
  CHECK(status == 0);
  CHECK(dom.find("id=\"kith-report\"") != std::string::npos);
  CHECK(dom.find("id=\"suspects\"") != std::string::npos);
  for (const char* bad : {"Uncaught", "Failed to load resource", "net::ERR_", "Refused to"})
    CHECK_MESSAGE(err.str().find(bad) == std::string::npos, "chromium reported: " << bad);
  // A screenshot shows the page rendered (a PNG file appears and is not tiny).
  run(chromium + "--window-size=1300,1600 --screenshot=" + dir + "/shot.png file://" + path + " >/dev/null 2>&1",
      &status);
  std::ifstream shot(dir + "/shot.png", std::ios::binary | std::ios::ate);
  CHECK(shot.good());
  CHECK(long(shot.tellg()) > 10000);
}
