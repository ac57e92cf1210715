// Picker: chooses the next question (solver/asking/question_flow.h's Question) from the current map.
//   random:            anchor and candidates uniformly at random;
//   most informative:  (adaptive triplets in the spirit of Tamuz et al. 2011) `anchors_scored`
//                      anchors are tried, each the least-judged of a few random items; the one
//                      whose best question gains most is asked. Where an anchor belongs is
//                      uncertain: its posterior is taken over S candidate places x_s (its own map
//                      position; `local_share` of them drawn around it, Gaussian with a spread
//                      of `local_spread` x the distance to its 3rd nearest map item; the rest at
//                      the map positions of random items, which catches an anchor folded into the
//                      wrong region), uniform prior, weighted by the likelihood of every judgment
//                      naming the anchor were it at x_s, the other items fixed. Pairs are scored on
//                      `scored_places` places drawn from that posterior (systematic resampling).
//                      Candidates are mostly random items (the middle and long range, where most
//                      pairs of a collection are) plus the anchor's nearest items in the map (and
//                      in feature space when features are given). The pair asked maximizes the
//                      expected information gain
//                        I(b,c) = H(sum_s w_s p_s) - sum_s w_s H(p_s),  H(p) = -p log p - (1-p) log(1-p),
//                        p_s = sigma(g(x_s,b) - g(x_s,c)).
//                      The response g: calibrated (default) g(x,b) = -beta |x - b|, a logistic in
//                      the distance difference whose beta is fitted (maximum likelihood) to how the
//                      judgments so far agree with the current map; or t-STE, g = log K with the
//                      kernel's dof alpha. Why calibrated: the t-STE probability of a pair at
//                      middle range depends only on the ratio of the distances, so it calls nearly
//                      every such question a coin toss and steers the picker to the anchor's
//                      nearest items (fine detail), while people (and the planted oracle) answer
//                      them with confidence; the calibrated response asks where answers actually
//                      settle the map (tests/bench/RESULTS-judgments.md).
//                      A question whose answer the model can already predict, or whose answer is
//                      a coin toss wherever the anchor stands, gains little; one that splits the
//                      anchor's plausible places in two gains most.
//   warm-up:           with no features, random questions (anchor the least judged of a few
//                      random items) until every item is named by warm_up_judgments judgments;
//                      before that the map carries no information to score questions on.
//   grid:              anchor + N candidates grown greedily, each new candidate adding the most
//                      information over pairs with those already chosen;
//   selection:         either rule, with the anchor restricted to a set of items.
// A Picker owns its random generator; use it from one thread. Cost per choice, per anchor scored:
// O(N d) to find map neighbours, O(samples * judgments naming the anchor) for the posterior (plus
// one pass over the judgments to find them), O(scored_places * candidates^2) for the pairs; and
// once per choice O(judgments) to count them and calibrate beta (on at most 1,000 of them).
#pragma once
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"
#include "solver/asking/question_flow.h"

namespace kith {

enum class PickerRule : int { kRandom = 0, kInformative = 1 };
// How the most-informative picker predicts an answer (see the header comment).
enum class PickerResponse : int { kTSTE = 0, kCalibrated = 1 };
struct Response;

struct PickerOptions {
  PickerRule rule = PickerRule::kInformative;  // (default: most informative)
  int near_candidates = 4;     // nearest items in the map considered (default: 4)
  int feature_candidates = 8;  // nearest items in feature space, when features are given (default: 8)
  int random_candidates = 44;  // random items, the long and middle range (default: 44)
  int anchor_draws = 8;        // anchor = least-judged of this many random items (default: 8)
  int anchors_scored = 3;      // anchors tried; the one whose best question gains most wins (default: 3)
  double random_share = 0.0;   // share of questions asked at random, to keep the map honest globally (default: 0)
  // With no features (none given, or zero columns): random questions, anchored at the least judged
  // of anchor_draws random items, until every item is named by this many judgments; 0 = never.
  // The asking desk sets kWarmUpJudgments for a collection without features. (default: 0)
  int warm_up_judgments = 0;
  static constexpr int kWarmUpJudgments = 2;
  int samples = 256;           // candidate places for the anchor's posterior (default: 256)
  int scored_places = 48;      // places drawn from the posterior to score pairs; 0 = all (default: 48)
  double local_share = 0.5;    // share of the places drawn around the anchor's own position (default: 0.5)
  double local_spread = 1.0;   // their spread, times the distance to its 3rd nearest map item (default: 1)
  PickerResponse response = PickerResponse::kCalibrated;  // (default: calibrated to the answers)
  double alpha = 1.0;          // t-STE kernel dof, for the t-STE response (default: 1)
  uint64_t seed = 1;           // (default: 1)
  bool IsValid(std::string* error) const;
};

// What the picker reads: the current map, optional features (same rows, or empty), the judgments.
struct PickerInput {
  const Points* map = nullptr;
  const Points* features = nullptr;               // may be null or empty
  const std::vector<Judgment>* judgments = nullptr;  // may be null
};

class Picker {
 public:
  explicit Picker(PickerOptions options = {});
  // Anchors are drawn from these items only ("about the selection"); empty = all items.
  void set_selection(std::vector<int32_t> items);
  const std::vector<int32_t>& selection() const { return selection_; }
  void set_rule(PickerRule rule) { options_.rule = rule; }
  const PickerOptions& options() const { return options_; }

  // A pair question: anchor + 2 candidates. Anchor -1 if the map has fewer than 3 items.
  Question pair(const PickerInput& input);
  // A grid question: anchor + grid_size candidates, choose grid_choose.
  Question grid(const PickerInput& input, int grid_size, int grid_choose);
  // Either, as QuestionFlow's QuestionSource wants it.
  Question next(const PickerInput& input, QuestionKind kind, int grid_size, int grid_choose);

  // Expected information gain of asking (anchor; b vs c) on this map (same model as above), for
  // tests and for showing why a question was asked.
  double information(const PickerInput& input, int32_t anchor, int32_t b, int32_t c);
  // beta of the calibrated response on this map and these judgments (see the header comment).
  double calibrated_beta(const PickerInput& input);

 private:
  Response make_response(const PickerInput& input);
  int32_t choose_anchor(const PickerInput& input, const std::vector<int>& counts);
  std::vector<int32_t> candidates(const PickerInput& input, int32_t anchor, int want, double* local_scale);
  PickerOptions options_;
  std::vector<int32_t> selection_;
  std::mt19937_64 rng_;
};

}  // namespace kith
