// SimulatedPeople: virtual people who answer "is the anchor more like b or like c?" from a hidden
// perceptual distance, for the demo and for benchmarks of pickers and the blend.
//
// Hidden distance between two swatches i, j (in CIEDE2000 units):
//   d(i, j) = dE00(base_i, base_j)                                  colour (solver/features/colour.h)
//           + pattern_weight * [pattern_i != pattern_j]             a different kind of pattern
//           + scale_weight * |log2(period_i / period_j)|            a different scale, when both
//                                                                   have a pattern
// Each member answers like a Thurstone observer: they perceive d(a, b) + e_b and d(a, c) + e_c,
// e ~ Normal(0, noise^2) (drawn by solver/base/portable_random.h, the same on every machine), and
// choose the nearer; in a grid they pick the K of N candidates they perceive nearest. The contrarian member perceives a distance of
// their own instead: lightness and pattern only (2 |dL*| + pattern term), blind to hue and chroma,
// so they disagree with the others systematically, not at random.
// One SimulatedPeople is used from one thread (it owns its random generator); distance() is const.
#pragma once
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "solver/features/colour.h"
#include "solver/base/judgment.h"
#include "solver/demo/sample_library.h"

namespace kith {

struct PerceptualItem {
  Lab colour;
  int pattern = 0;      // 0 = plain
  double period = 1.0;  // pattern repeat (any unit, used as a ratio)
};
std::vector<PerceptualItem> perceptual_items(const std::vector<Swatch>& swatches);

struct PerceptualDistanceOptions {
  double pattern_weight = 20.0;  // cost of a different pattern kind, in dE00 units (default: 20)
  double scale_weight = 8.0;     // per doubling of the pattern repeat (default: 8)
  Ciede2000Weights colour;       // CIEDE2000's kL, kC, kH; a large kH is blind to hue (default: 1, 1, 1)
};

struct SimulatedPerson {
  std::string name;
  double noise = 2.0;       // standard deviation of the perceived distances, dE00 units
  bool contrarian = false;  // judges by lightness and pattern only
};

struct SimulatedPeopleOptions {
  std::vector<SimulatedPerson> members = {
      {"Ines", 2.0, false}, {"Tomas", 5.0, false}, {"Wren", 9.0, false}, {"Odile", 3.0, true}};  // (default: these four)
  PerceptualDistanceOptions distance;
  uint64_t seed = 7;  // (default: 7)
  bool IsValid(std::string* error) const;
};

// Scenarios of hidden structure for choosing defaults (tests/bench/RESULTS-demo.md), each the
// default four people judging by another distance:
//   "demo"          the distance above;
//   "hue-blind"     colour without its hue term (kH = 1000): lightness, chroma, pattern and scale;
//   "scale-heavy"   pattern scale weighs 30 per doubling instead of 8;
//   "pattern-first" a different pattern kind costs 60 instead of 20, so pattern outweighs colour.
//   "light-first"   lightness counts 2.5 times (kL = 0.4), chroma 0.4 times (kC = 2.5) and a
//                   different pattern 10: people who sort by light and dark first.
// Returns false (options unchanged) for an unknown name.
bool people_scenario(const std::string& name, SimulatedPeopleOptions* options);

class SimulatedPeople {
 public:
  explicit SimulatedPeople(std::vector<PerceptualItem> items, SimulatedPeopleOptions options = {});

  size_t size() const { return items_.size(); }
  const std::vector<SimulatedPerson>& members() const { return options_.members; }
  // The hidden perceptual distance d(i, j) above.
  double distance(int32_t i, int32_t j) const;
  // The distance as member m perceives it before noise (the contrarian's own, else d).
  double perceived(int member, int32_t i, int32_t j) const;

  // Member `member` answers (anchor; b vs c); member < 0 takes turns. Returns a pair judgment
  // naming the member, weight 1, time 0 (the caller stamps it).
  Judgment answer(int32_t anchor, int32_t b, int32_t c, int member = -1);
  // A grid question: member `member` (< 0 takes turns) perceives the distance from the anchor to
  // each candidate (with its own noise on each) and picks the `choose` nearest; every picked c and
  // unpicked u give (anchor, c, u), as the window's grid does (solver/question_flow.h): choose x
  // (N - choose) grid judgments naming the member.
  std::vector<Judgment> answer_grid(int32_t anchor, const std::vector<int32_t>& candidates, int choose,
                                    int member = -1);

  // `count` triplets stated by the hidden distance itself (nearer first), for measuring a map's
  // agreement with it: anchor uniform; b and c drawn from the anchor's `neighbourhood` nearest
  // items by d (0 = from all items), with |d(a, b) - d(a, c)| >= min_gap so the truth is clear.
  std::vector<Judgment> truth_triplets(size_t count, size_t neighbourhood, double min_gap, uint64_t seed) const;

 private:
  std::vector<PerceptualItem> items_;
  SimulatedPeopleOptions options_;
  std::mt19937_64 rng_;
  size_t turn_ = 0;
};

}  // namespace kith
