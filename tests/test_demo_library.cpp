// Checks of the demo's sample library (solver/demo/sample_library.h).
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "solver/features/colour.h"
#include "solver/features/picture_descriptors.h"
#include "solver/demo/sample_library.h"
#include "tests/approx.h"

namespace {
std::string slurp(const std::string& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}
}  // namespace

TEST_CASE("demo library: deterministic, written once, regenerated when incomplete") {
  const std::string dir = kith::test::temp_dir("sample-library");
  kith::SampleLibraryOptions o;
  o.count = 60;
  o.folder = dir + "/lib";
  const auto a = kith::ensure_sample_library(o);
  CHECK(a.generated);
  REQUIRE(a.swatches.size() == 60);
  const std::string items = slurp(a.items_csv);
  const std::string pic = slurp(o.folder + "/pictures/" + a.swatches[7].id + ".png");
  CHECK(!pic.empty());
  const auto b = kith::ensure_sample_library(o);
  CHECK_FALSE(b.generated);  // already there
  std::filesystem::remove(o.folder + "/pictures/" + a.swatches[7].id + ".png");
  const auto c = kith::ensure_sample_library(o);
  CHECK(c.generated);  // a missing picture is redrawn
  CHECK(slurp(o.folder + "/pictures/" + a.swatches[7].id + ".png") == pic);
  CHECK(slurp(c.items_csv) == items);
  // Same options elsewhere give the same bytes.
  o.folder = dir + "/again";
  kith::ensure_sample_library(o);
  CHECK(slurp(o.folder + "/items.csv") == items);
  CHECK(slurp(o.folder + "/pictures/" + a.swatches[7].id + ".png") == pic);
}

TEST_CASE("demo library: every line and pattern appears, colours are in gamut, descriptors see the pattern") {
  const auto swatches = kith::make_swatches();
  CHECK(swatches.size() == 600);
  std::map<std::string, int> per_line, per_pattern;
  for (const auto& s : swatches) {
    ++per_line[s.line];
    ++per_pattern[kith::to_string(s.pattern)];
    double r, g, b;
    bool ok = false;
    kith::lab_to_srgb(s.base, &r, &g, &b, &ok);
    CHECK(ok);
  }
  CHECK(per_line.size() == 6);
  for (const auto& [line, n] : per_line) CHECK(n == 100);
  CHECK(per_pattern.size() == 6);
  for (const auto& [pattern, n] : per_pattern) CHECK(n >= 30);

  // A plain swatch has far less texture energy than a patterned one, and its mean colour is its
  // base colour (within a couple of CIELAB units: grain and 8-bit rounding).
  const kith::Swatch* plain = nullptr;
  const kith::Swatch* striped = nullptr;
  for (const auto& s : swatches) {
    if (!plain && s.pattern == kith::SwatchPattern::kPlain) plain = &s;
    if (!striped && s.pattern == kith::SwatchPattern::kStripes && s.contrast > 0.4) striped = &s;
  }
  REQUIRE(plain);
  REQUIRE(striped);
  auto describe = [](const kith::Swatch& s) {
    const auto px = kith::draw_swatch(s, 80, 1);
    return kith::describe_image(kith::image_from_srgb8(px.data(), 80, 80, 3));
  };
  const auto fp = describe(*plain), fs = describe(*striped);
  const int energy = kith::descriptor_blocks()[2].begin;
  CHECK(fs[energy] > 4 * fp[energy]);
  CHECK(std::abs(fp[0] - plain->base.L) < 2.0);
  CHECK(std::abs(fp[1] - plain->base.a) < 2.0);
  CHECK(std::abs(fp[2] - plain->base.b) < 2.0);
}
