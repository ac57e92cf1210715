// Colour by any column: the ramp for numbers (CIELAB path, equal CIEDE2000 steps, monotone
// lightness), the categorical code past twelve values (colours, then marks, and a note saying
// which values share a colour), units read from column names, and the same colours in
// `kith render` (pixels counted) and the HTML report (swatches read back).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <random>
#include <set>
#include <string>
#include <vector>

#include "solver/features/colour.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"
#include "viewer/scene/colour_code.h"
#include "viewer/scene/palette.h"

namespace {

using kith::ColourCode;
using kith::Mark;
using kith::Palette;
using kith::Rgb;
using kith::test::Image;

kith::Lab lab_of(const Rgb& c) { return kith::srgb_to_lab(c.r, c.g, c.b); }

// Steps along the ramp measured by CIEDE2000 (Sharma, Wu & Dalal 2005; solver/features/colour.h,
// itself checked against their published test pairs). Largest step over smallest, measured
// straight across: 1.025 at 8 steps, 1.008 at 16, 1.001 at 64 (the path bends evenly and is
// resampled at equal CIEDE2000 steps); 1.05 is the margin we hold. A path with a sharp bend
// measured 1.2 to 1.33 here.
constexpr double kEvenSteps = 1.05;
// Ends of the ramp far apart: a ramp reads as a scale only when its ends differ clearly; 50 is
// our floor (common practice puts a noticeable difference near 2 and a large one above 40).
constexpr double kEndsApart = 50.0;

std::vector<double> steps(const Palette& p, int count) {
  std::vector<double> d;
  for (int k = 0; k < count; ++k)
    d.push_back(kith::ciede2000(lab_of(p.ramp(float(k) / count)), lab_of(p.ramp(float(k + 1) / count))));
  return d;
}

std::string hex(const Rgb& c) {
  char s[8];
  auto b = [](float v) { return int(std::lround(std::clamp(v, 0.f, 1.f) * 255)); };
  std::snprintf(s, sizeof s, "#%02x%02x%02x", b(c.r), b(c.g), b(c.b));
  return s;
}

std::vector<std::string> names(size_t count) {
  std::vector<std::string> v;
  for (size_t k = 0; k < count; ++k) v.push_back("kind" + std::string(k < 10 ? "0" : "") + std::to_string(k));
  return v;
}

// Twelve kinds of 20 items, well apart in 10 features (invented; fixed seed).
std::string write_twelve_kinds(const std::string& dir) {
  std::mt19937 rng(12);
  std::normal_distribution<double> g(0.0, 1.0);
  std::vector<std::vector<double>> centre(12, std::vector<double>(10));
  for (auto& c : centre)
    for (double& v : c) v = 6 * g(rng);
  const std::vector<std::string> kind = names(12);
  std::ofstream out(dir + "/kinds.csv");
  out << "id,kind,weight_g";
  for (int f = 0; f < 10; ++f) out << ",f" << f;
  out << "\n";
  for (int i = 0; i < 240; ++i) {
    out << "item" << i << "," << kind[i % 12] << "," << (10 + i % 37);
    for (int f = 0; f < 10; ++f) out << "," << centre[i % 12][f] + g(rng);
    out << "\n";
  }
  return dir + "/kinds.csv";
}

// A translucent mark over the ground is the mix ground + a (colour - ground); the map draws far
// items with a < 1. How well `colour` explains a pixel: the L1 distance (0..765) from the pixel to
// the nearest such mix with a >= 0.5, or a large number when no such mix comes near.
int unmixed_distance(const unsigned char* q, const Rgb& colour, const Rgb& ground) {
  const double c[3] = {colour.r * 255.0, colour.g * 255.0, colour.b * 255.0};
  const double g[3] = {ground.r * 255.0, ground.g * 255.0, ground.b * 255.0};
  double num = 0, den = 0;
  for (int k = 0; k < 3; ++k) {
    num += (q[k] - g[k]) * (c[k] - g[k]);
    den += (c[k] - g[k]) * (c[k] - g[k]);
  }
  const double a = den > 0 ? std::clamp(num / den, 0.0, 1.0) : 1.0;
  if (a < 0.5) return 1000;
  double d = 0;
  for (int k = 0; k < 3; ++k) d += std::abs(g[k] + a * (c[k] - g[k]) - q[k]);
  return int(d);
}

// Pixels that `colour` explains within `near` and, when `rivals` are given, better than any of
// them (the pictures are drawn without their legend).
size_t pixels_of(const Image& p, const Rgb& colour, const std::vector<Rgb>& rivals, int near) {
  const Rgb ground = Palette::paper().ground;
  size_t n = 0;
  for (int y = 0; y < p.h; ++y)
    for (int x = 0; x < p.w; ++x) {
      const unsigned char* q = p.at(x, y);
      const int d = unmixed_distance(q, colour, ground);
      if (d > near) continue;
      bool best = true;
      for (const Rgb& r : rivals) best = best && (hex(r) == hex(colour) || unmixed_distance(q, r, ground) > d);
      n += best;
    }
  return n;
}

// An item's disc covers ~80 pixels at this size; its darker rim and overlaps change some of them,
// so a colour counts as drawn when at least this many pixels carry it (measured: each of the twelve
// kinds explains 300 pixels or more).
constexpr size_t kDrawn = 60;
// 8-bit rounding of the mix, three channels (common practice for counting flat colours).
constexpr int kNear = 12;

}  // namespace

TEST_CASE("colour code: the ramp has monotone lightness and equal CIEDE2000 steps, on paper and at night") {
  for (const Palette& p : {Palette::paper(), Palette::night()}) {
    for (const int count : {8, 16, 64}) {
      const std::vector<double> d = steps(p, count);
      const auto [lo, hi] = std::minmax_element(d.begin(), d.end());
      CHECK_MESSAGE(*hi / *lo < kEvenSteps, count << " steps from " << *lo << " to " << *hi);
      MESSAGE(count << " steps: " << *lo << " to " << *hi);
    }
    double previous = lab_of(p.ramp(0.f)).L;
    const double direction = lab_of(p.ramp(1.f)).L - previous;
    for (int k = 1; k <= 64; ++k) {
      const double l = lab_of(p.ramp(k / 64.f)).L;
      CHECK((l - previous) * direction > 0);  // lightness keeps one direction
      previous = l;
    }
    CHECK(kith::ciede2000(lab_of(p.ramp(0.f)), lab_of(p.ramp(1.f))) > kEndsApart);
    // Inside the sRGB gamut: the conversion clips a colour outside it to 0 or 1 in some channel.
    for (int k = 0; k <= 64; ++k) {
      const Rgb c = p.ramp(k / 64.f);
      for (const float v : {c.r, c.g, c.b}) CHECK((v > 0.01f && v < 0.99f));
    }
  }
  // Night reverses the ramp: the low end is dark on paper's light ground's opposite.
  CHECK(lab_of(Palette::paper().ramp(0.f)).L > lab_of(Palette::paper().ramp(1.f)).L);
  CHECK(lab_of(Palette::night().ramp(0.f)).L < lab_of(Palette::night().ramp(1.f)).L);
}

TEST_CASE("colour code: twelve values take twelve colours, past twelve marks, past 48 other") {
  const Palette paper = Palette::paper();
  auto spread = [](size_t kinds, size_t each) {
    std::vector<std::string> v;
    const std::vector<std::string> k = names(kinds);
    for (size_t i = 0; i < kinds * each; ++i) v.push_back(k[i % kinds]);
    return v;
  };
  {
    const ColourCode c = kith::categorical_code("kind", spread(12, 5), paper);
    std::set<std::string> colours;
    for (size_t i = 0; i < c.colour.size(); ++i) {
      colours.insert(hex(c.colour[i]));
      CHECK(c.mark[i] == Mark::kDisc);
    }
    CHECK(colours.size() == 12);
    CHECK(c.entries.size() == 12);
    CHECK(c.notes.empty());
  }
  {
    const ColourCode c = kith::categorical_code("kind", spread(24, 3), paper);
    std::set<std::pair<std::string, int>> codes;
    std::set<std::string> colours;
    for (size_t i = 0; i < c.colour.size(); ++i) {
      codes.insert({hex(c.colour[i]), int(c.mark[i])});
      colours.insert(hex(c.colour[i]));
    }
    CHECK(codes.size() == 24);
    CHECK(colours.size() == 12);
    REQUIRE(!c.notes.empty());  // says which values share a colour
    CHECK(c.notes[0].find("ring") != std::string::npos);
  }
  {
    const ColourCode c = kith::categorical_code("kind", spread(60, 2), paper);
    std::set<std::pair<std::string, int>> codes;
    for (size_t i = 0; i < c.colour.size(); ++i) codes.insert({hex(c.colour[i]), int(c.mark[i])});
    CHECK(codes.size() == kith::kCodedValues + 1);  // 48 codes and the muted "other"
    CHECK(c.entries.back().label.find("other") != std::string::npos);
  }
  {
    // Most common value first: it takes the first colour.
    std::vector<std::string> v = {"b", "a", "a", ""};
    const ColourCode c = kith::categorical_code("kind", v, paper);
    CHECK(hex(c.colour[1]) == hex(kith::rgb_hex(Palette::kCategorical[0])));
    CHECK(c.entries.back().label == "no value");
  }
}

TEST_CASE("colour code: a ramp gives its range, its unit and a muted colour for a missing value") {
  const Palette paper = Palette::paper();
  const ColourCode c = kith::ramp_code("caffeine", "mg", {5.0, 25.0, std::nan(""), 45.0}, false, paper);
  CHECK(c.ramp);
  CHECK(c.lo == 5.0);
  CHECK(c.hi == 45.0);
  CHECK(c.unit == "mg");
  CHECK(hex(c.colour[0]) == hex(paper.ramp(0.f)));
  CHECK(hex(c.colour[1]) == hex(paper.ramp(0.5f)));
  CHECK(hex(c.colour[3]) == hex(paper.ramp(1.f)));
  CHECK(hex(c.colour[2]) != hex(paper.ramp(0.f)));
  CHECK(kith::ramp_code("judgments", "judgments", {2.0, 4.0}, true, paper).lo == 0.0);
  CHECK(kith::ramp_label(12.5, "mg") == "12.5 mg");

  CHECK(kith::unit_in_name("caffeine (mg)") == "mg");
  CHECK(kith::unit_in_name("length [cm]") == "cm");
  CHECK(kith::unit_in_name("caffeine_mg") == "mg");
  CHECK(kith::unit_in_name("share_pct") == "%");
  CHECK(kith::unit_in_name("steep_minutes") == "minutes");
  CHECK(kith::unit_in_name("bitterness") == "");
  CHECK(kith::unit_in_name("f_x") == "");
}

TEST_CASE("colour code: kith render shows a numeric column as a ramp and twelve kinds in twelve colours, "
          "and the report uses the same colours") {
  const std::string dir = kith::test::temp_dir("colour-code");
  const std::string items = write_twelve_kinds(dir);
  const std::string render = std::string("env -u DISPLAY ") + KITH_BINARY + " render " + items +
                             " --iterations 400 --size 960x600 --no-legend ";
  REQUIRE(kith::test::run_shell(render + "--colour kind -o " + dir + "/kinds.png").code == 0);
  const Image kinds = kith::test::load_png(dir + "/kinds.png");
  std::vector<Rgb> twelve;
  for (const uint32_t c : Palette::kCategorical) twelve.push_back(kith::rgb_hex(c));
  for (const Rgb& c : twelve) CHECK_MESSAGE(pixels_of(kinds, c, twelve, kNear) >= kDrawn, hex(c) << " drawn");

  // A numeric column: pixels of the ramp's low, middle and high colours, none of the
  // categorical colours that are far from the ramp.
  const kith::test::KithRun ramp = kith::test::run_shell(render + "--colour weight_g -o " + dir + "/weight.png");
  REQUIRE(ramp.code == 0);
  const Image weight = kith::test::load_png(dir + "/weight.png");
  const Palette paper = Palette::paper();
  for (const float t : {0.05f, 0.5f, 0.95f})
    CHECK_MESSAGE(pixels_of(weight, paper.ramp(t), {}, kNear) >= kDrawn, "ramp at " << t);
  CHECK(pixels_of(weight, kith::rgb_hex(Palette::kCategorical[9]), {}, kNear) < kDrawn);  // pure blue is not on it

  // Unknown column: exit 2 and the choices listed.
  const kith::test::KithRun wrong = kith::test::run_shell(render + "--colour sweetness -o " + dir + "/no.png 2>&1");
  CHECK(wrong.code == 2);
  CHECK(wrong.output.find("weight_g") != std::string::npos);
  CHECK(!std::filesystem::exists(dir + "/no.png"));

  // The report: the same colour for each kind (the legend's swatches, in the code's order).
  REQUIRE(kith::test::run_kith("report " + items + " --iterations 300 --colour kind -o " + dir +
                               "/report.html > /dev/null 2>&1")
              .code == 0);
  const std::string page = kith::test::file_bytes(dir + "/report.html");
  const ColourCode code = kith::categorical_code("kind", names(12), paper);
  for (const kith::CodeEntry& e : code.entries) {
    const std::string swatch = "background:" + hex(e.colour) + ";border-color:" + hex(e.colour) + "'></span>" + e.label;
    CHECK_MESSAGE(page.find(swatch) != std::string::npos, e.label << " as " << hex(e.colour));
  }
}
