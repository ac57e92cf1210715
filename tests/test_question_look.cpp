// The question screens' colours, label placement and shortened text, without a window.
//
// Contrast: WCAG 2.1 success criterion 1.4.3 (Contrast, Minimum, level AA) asks for a contrast
// ratio of at least 4.5:1 between text and its background; 1.4.11 (Non-text Contrast) asks 3:1
// for the parts of controls. The ratio is (L1 + 0.05) / (L2 + 0.05), L1 the lighter colour's
// relative luminance; WCAG 2.1 defines relative luminance for sRGB as
//   L = 0.2126 R + 0.7152 G + 0.0722 B, each of R, G, B = c / 12.92 if c <= 0.03928, else
//   ((c + 0.055) / 1.055) ^ 2.4, with c the 8-bit component divided by 255.
// It is written out here on its own, not taken from kith's colour code.
#include <doctest/doctest.h>

#include <cmath>
#include <ios>
#include <string>

#include "viewer/scene/label_placement.h"
#include "viewer/scene/question_look.h"
#include "viewer/scene/text_fit.h"

namespace {

double channel(uint32_t rgb, int shift) {
  const double c = double((rgb >> shift) & 0xFF) / 255.0;
  return c <= 0.03928 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}
double relative_luminance(uint32_t rgb) {
  return 0.2126 * channel(rgb, 16) + 0.7152 * channel(rgb, 8) + 0.0722 * channel(rgb, 0);
}
double contrast_ratio(uint32_t a, uint32_t b) {
  const double la = relative_luminance(a), lb = relative_luminance(b);
  return (std::max(la, lb) + 0.05) / (std::min(la, lb) + 0.05);
}

constexpr double kTextMinimum = 4.5;     // WCAG 2.1 SC 1.4.3, normal-size text
constexpr double kNonTextMinimum = 3.0;  // WCAG 2.1 SC 1.4.11

}  // namespace

TEST_CASE("question look: the contrast formula gives the known ratios") {
  CHECK(contrast_ratio(0x000000, 0xFFFFFF) == doctest::Approx(21.0));
  CHECK(contrast_ratio(0x777777, 0x777777) == doctest::Approx(1.0));
  // From memory (commonly quoted): #767676 on white is about 4.54:1, the lightest such grey that
  // passes 4.5:1, while #777777 is just under it (about 4.48:1).
  CHECK(contrast_ratio(0x767676, 0xFFFFFF) == doctest::Approx(4.54).epsilon(0.005));
  CHECK(contrast_ratio(0x777777, 0xFFFFFF) < kTextMinimum);
}

TEST_CASE("question look: every text on the question screens has at least 4.5 to 1 on both grounds") {
  for (const bool dark : {false, true}) {
    const kith::QuestionLook look = kith::QuestionLook::for_ground(dark);
    const auto pairs = kith::text_pairs(look);
    REQUIRE(pairs.size() >= 20);
    for (const kith::TextPair& p : pairs) {
      INFO((dark ? "night" : "paper") << ": " << p.what << std::hex << " text #" << p.text << " on #" << p.ground);
      CHECK(contrast_ratio(p.text, p.ground) >= kTextMinimum);
    }
    for (const kith::TextPair& p : kith::edge_pairs(look)) {
      INFO((dark ? "night" : "paper") << ": " << p.what);
      CHECK(contrast_ratio(p.text, p.ground) >= kNonTextMinimum);
    }
  }
  // The two grounds really differ (a night table that copied paper would pass the loop above).
  CHECK(relative_luminance(kith::QuestionLook::paper().band) > 0.8);
  CHECK(relative_luminance(kith::QuestionLook::night().band) < 0.05);
}

TEST_CASE("question look: labels around one crowded point overlap neither each other nor the obstacles") {
  const kith::ScreenRect area{0, 0, 400, 300};
  const std::vector<kith::ScreenRect> obstacles = {{150, 0, 400, 60}, {0, 200, 400, 300}};  // a banner, a band
  std::vector<kith::LabelRequest> requests;
  for (int k = 0; k < 9; ++k) requests.push_back({200.f + k * 2.f, 120.f, 11.f, 26.f + 8.f * (k % 3), 18.f});
  const auto placed = kith::place_labels(requests, area, obstacles);
  REQUIRE(placed.size() == requests.size());
  for (size_t a = 0; a < placed.size(); ++a) {
    CHECK(placed[a].clear);
    CHECK(placed[a].rect.inside(area));
    for (const auto& o : obstacles) CHECK_FALSE(placed[a].rect.overlaps(o));
    for (size_t b = a + 1; b < placed.size(); ++b) CHECK_FALSE(placed[a].rect.overlaps(placed[b].rect));
    CHECK(placed[a].rect.width() == doctest::Approx(requests[a].width));
  }
  CHECK_FALSE(placed[0].moved);  // the first label takes the nearest spot
}

TEST_CASE("question look: a label with no free spot is marked not clear") {
  const kith::ScreenRect area{0, 0, 60, 40};
  std::vector<kith::LabelRequest> requests(6, kith::LabelRequest{30.f, 20.f, 5.f, 40.f, 16.f});
  const auto placed = kith::place_labels(requests, area, {});
  size_t not_clear = 0;
  for (const auto& p : placed) not_clear += p.clear ? 0 : 1;
  CHECK(not_clear > 0);
}

TEST_CASE("question look: text that does not fit ends in an ellipsis and never splits a character") {
  // Every code point 10 px wide.
  auto measure = [](const std::string& t) {
    float w = 0;
    for (unsigned char c : t) w += (c & 0xC0) != 0x80 ? 10.f : 0.f;
    return w;
  };
  CHECK(kith::fit_text("family: smoked", 140, measure) == "family: smoked");
  CHECK(kith::fit_text("family: smoked", 139, measure) == std::string("family: smok") + kith::kEllipsis);
  // A space before the cut is dropped: "family:" then the ellipsis, not "family: ...".
  CHECK(kith::fit_text("family: smoked", 85, measure) == std::string("family:") + kith::kEllipsis);
  CHECK(kith::fit_text("\xc3\xa9t\xc3\xa9 long", 45, measure) == std::string("\xc3\xa9t\xc3\xa9") + kith::kEllipsis);
  CHECK(kith::fit_text("abc", 5, measure).empty());
  for (float w = 10; w < 140; w += 5) CHECK(measure(kith::fit_text("family: smoked", w, measure)) <= w);
}
