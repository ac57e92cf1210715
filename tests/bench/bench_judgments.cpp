// Judgment benchmark: the planted map asked by the random and the most-informative picker.
// 300 items at known positions in the unit cube; a noisy oracle (logistic noise on the distance
// difference) answers. Both pickers start from the same warm-up of random answers (an adaptive
// picker needs a map to reason about); after each batch of questions the judgments-only map is
// refitted from where it was, and its agreement with 5,000 fresh oracle answers (held out, never
// trained on) is measured. Prints, per picker, the judgments needed to reach 0.85 and 0.90
// held-out agreement (warm-up included), median over the seeds; then the time one
// most-informative choice takes at N = 10,000.
//
//   build/tests/bench_judgments [seeds=5] [max_judgments=16000] [warm_up=2000] [key=value ...]
// keys: batch (questions between refits), refit (iterations per refit), near, feature, random,
// draws, anchors, share, samples, scored, local, spread (the PickerOptions of the same names),
// timing=0 to skip the choice-time measurement.
#include <algorithm>
#include <cstring>
#include <string>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "solver/asking/picker.h"
#include "tests/judgments_planted.h"

using namespace kith;

namespace {

constexpr int kItems = 300;
constexpr double kNoise = 0.02;      // oracle's logistic noise scale, in unit-cube lengths
constexpr double kAlpha = 2.0;       // t-STE dof for a 3-D planted map
size_t kStart = 2000;                // random judgments before the pickers take over (argument 3)
size_t kBatch = 100;                 // questions between refits (key batch)
int kRefitIterations = 150;          // (key refit)
bool gTrace = false;
int gOnly = -1;                      // run only this picker: 0 random, 1 most informative (key only)                 // print the agreement every 1,000 judgments (key trace)
PickerOptions gOptions;              // the most-informative picker's options (keys above)

constexpr int kInitialIterations = 600;  // a fit from scratch
double gRestart = 2.0;               // refit from scratch when the judgments grow this many times; 0 = never (key restart)

// The judgments-only fit (as test::fit_judgments_only) that also reports the final objective.
Points fit(const std::vector<Judgment>& judgments, uint64_t seed, int iterations, const Points* start, double* cost) {
  BlendedObjective objective(size_t(kItems), 3);
  objective.set_alpha(kAlpha);
  objective.set_judgments(judgments);
  Points y = start ? *start : random_start(size_t(kItems), 3, seed, 1e-2);
  BlendedFitOptions options;
  options.iterations = iterations;
  const BlendedFitSummary summary = fit_blended(objective, y, options);
  if (cost) *cost = summary.finite ? summary.cost : 1e300;
  return y;
}

struct Run {
  size_t reach85 = 0, reach90 = 0;  // 0 = not reached
  double final_agreement = 0;
  double seconds = 0, pick_seconds = 0, fit_seconds = 0;
  int restarts_kept = 0;
};

Run run(PickerRule rule, uint64_t seed, size_t max_judgments) {
  const Points truth = test::planted_positions(kItems, 1000 + seed);
  test::Oracle oracle(truth, kNoise, 2000 + seed);
  std::mt19937_64 pick(3000 + seed);
  const auto held_out = oracle.random_answers(kItems, 5000, pick);
  std::vector<Judgment> judgments = oracle.random_answers(kItems, kStart, pick);
  Points y = fit(judgments, seed, kInitialIterations, nullptr, nullptr);
  size_t last_restart = judgments.size();
  PickerOptions po = gOptions;
  po.rule = rule;
  po.alpha = kAlpha;
  po.seed = 4000 + seed;
  Picker picker(po);
  Run r;
  const auto t0 = std::chrono::steady_clock::now();
  while (judgments.size() < max_judgments) {
    const auto p0 = std::chrono::steady_clock::now();
    for (size_t q = 0; q < kBatch; ++q) {
      const Question question = picker.pair({&y, nullptr, &judgments});
      judgments.push_back(oracle.answer(question.anchor, question.candidates[0], question.candidates[1]));
    }
    const auto p1 = std::chrono::steady_clock::now();
    double cost = 0.0;
    y = fit(judgments, seed, kRefitIterations, &y, &cost);
    if (gRestart > 1.0 && double(judgments.size()) >= gRestart * double(last_restart)) {
      // A warm-started refit cannot undo a fold; each time the judgments double (key restart), also fit from
      // scratch and keep whichever map the judgments fit better (same rule for both pickers).
      double fresh_cost = 0.0;
      Points fresh = fit(judgments, seed + 100 * judgments.size(), kInitialIterations, nullptr, &fresh_cost);
      if (fresh_cost < cost) y = fresh, ++r.restarts_kept;
      last_restart = judgments.size();
    }
    r.pick_seconds += std::chrono::duration<double>(p1 - p0).count();
    r.fit_seconds += std::chrono::duration<double>(std::chrono::steady_clock::now() - p1).count();
    const double agreement = judgment_agreement(y, held_out);
    r.final_agreement = agreement;
    if (gTrace && judgments.size() % 1000 < kBatch)
      std::printf("  trace %s seed %d: %zu judgments, held-out agreement %.3f\n",
                  rule == PickerRule::kRandom ? "random" : "informative", int(seed), judgments.size(), agreement);
    if (!r.reach85 && agreement >= 0.85) r.reach85 = judgments.size();
    if (!r.reach90 && agreement >= 0.90) {
      r.reach90 = judgments.size();
      break;
    }
  }
  r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return r;
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const size_t m = v.size();
  return m == 0 ? 0 : (m % 2 ? v[m / 2] : 0.5 * (v[m / 2 - 1] + v[m / 2]));
}

}  // namespace

int main(int argc, char** argv) {
  const int seeds = argc > 1 ? std::atoi(argv[1]) : 5;
  const size_t max_judgments = argc > 2 ? size_t(std::atol(argv[2])) : 16000;
  if (argc > 3) kStart = size_t(std::atol(argv[3]));
  bool timing = true;
  for (int a = 4; a < argc; ++a) {
    const char* eq = std::strchr(argv[a], '=');
    if (!eq) {
      std::fprintf(stderr, "bench_judgments: expected key=value, got '%s'\n", argv[a]);
      return 2;
    }
    const std::string key(argv[a], size_t(eq - argv[a]));
    const double v = std::atof(eq + 1);
    if (key == "batch") kBatch = size_t(v);
    else if (key == "refit") kRefitIterations = int(v);
    else if (key == "near") gOptions.near_candidates = int(v);
    else if (key == "feature") gOptions.feature_candidates = int(v);
    else if (key == "random") gOptions.random_candidates = int(v);
    else if (key == "draws") gOptions.anchor_draws = int(v);
    else if (key == "anchors") gOptions.anchors_scored = int(v);
    else if (key == "share") gOptions.random_share = v;
    else if (key == "samples") gOptions.samples = int(v);
    else if (key == "scored") gOptions.scored_places = int(v);
    else if (key == "local") gOptions.local_share = v;
    else if (key == "spread") gOptions.local_spread = v;
    else if (key == "tste") gOptions.response = v != 0 ? PickerResponse::kTSTE : PickerResponse::kCalibrated;
    else if (key == "restart") gRestart = v;
    else if (key == "timing") timing = v != 0;
    else if (key == "trace") gTrace = v != 0;
    else if (key == "only") gOnly = int(v);
    else {
      std::fprintf(stderr, "bench_judgments: unknown key '%s'\n", key.c_str());
      return 2;
    }
  }
  std::string error;
  if (!gOptions.IsValid(&error) || kBatch < 1 || kRefitIterations < 1) {
    std::fprintf(stderr, "bench_judgments: %s\n", error.empty() ? "batch and refit must be at least 1" : error.c_str());
    return 2;
  }
  std::printf("planted map: %d items, oracle noise %.2f, alpha %.0f, %zu random to start, batches of %zu, refit %d "
              "iterations, %d seeds\n", kItems, kNoise, kAlpha, kStart, kBatch, kRefitIterations, seeds);
  std::printf("informative picker: near %d, random %d, anchor draws %d, anchors scored %d, random share %.2f, "
              "places %d (local share %.2f, spread %.2f), scored places %d\n",
              gOptions.near_candidates, gOptions.random_candidates, gOptions.anchor_draws, gOptions.anchors_scored,
              gOptions.random_share, gOptions.samples, gOptions.local_share, gOptions.local_spread,
              gOptions.scored_places);
  std::printf("%-18s %6s %10s %10s %10s %10s %10s %10s %9s\n", "picker", "seed", "to 0.85", "to 0.90", "final",
              "seconds", "picking", "fitting", "restarts");
  std::vector<double> med[2][2];
  for (int rule = 0; rule < 2; ++rule)
    for (int s = 0; s < seeds; ++s) {
      if (gOnly >= 0 && rule != gOnly) continue;
      const Run r = run(PickerRule(rule), uint64_t(s), max_judgments);
      const char* name = rule == 0 ? "random" : "most informative";
      std::printf("%-18s %6d %10zu %10zu %10.3f %10.1f %10.1f %10.1f %9d\n", name, s, r.reach85, r.reach90,
                  r.final_agreement, r.seconds, r.pick_seconds, r.fit_seconds, r.restarts_kept);
      std::fflush(stdout);
      med[rule][0].push_back(r.reach85 ? double(r.reach85) : double(max_judgments) * 2);
      med[rule][1].push_back(r.reach90 ? double(r.reach90) : double(max_judgments) * 2);
    }
  std::printf("\n%-18s %12s %12s\n", "median judgments", "to 0.85", "to 0.90");
  std::printf("%-18s %12.0f %12.0f\n", "random", median(med[0][0]), median(med[0][1]));
  std::printf("%-18s %12.0f %12.0f\n", "most informative", median(med[1][0]), median(med[1][1]));
  std::printf("%-18s %12.2f %12.2f\n", "ratio", median(med[1][0]) / median(med[0][0]), median(med[1][1]) / median(med[0][1]));
  const double w = double(kStart);
  std::printf("%-18s %12.2f %12.2f\n", "ratio after warm-up", (median(med[1][0]) - w) / (median(med[0][0]) - w),
              (median(med[1][1]) - w) / (median(med[0][1]) - w));
  std::printf("(not reached counts as twice the cap, %zu)\n", max_judgments);

  // ---- time per choice at N = 10,000 --------------------------------------------
  if (timing) {
    const int n = 10000;
    const Points map = test::planted_positions(n, 7, 20, 0.05);
    std::mt19937_64 rng(8);
    std::normal_distribution<double> g(0, 1);
    Points features(n, 50);
    for (Eigen::Index i = 0; i < features.size(); ++i) features.data()[i] = g(rng);
    test::Oracle oracle(map, kNoise, 9);
    std::vector<Judgment> judgments = oracle.random_answers(n, 50000, rng);
    std::vector<double> pair_ms, grid_ms, random_ms;
    PickerOptions po = gOptions;
    Picker informative(po);
    po.rule = PickerRule::kRandom;
    Picker random(po);
    for (int t = 0; t < 200; ++t) {
      auto t0 = std::chrono::steady_clock::now();
      informative.pair({&map, &features, &judgments});
      auto t1 = std::chrono::steady_clock::now();
      informative.grid({&map, &features, &judgments}, 8, 2);
      auto t2 = std::chrono::steady_clock::now();
      random.pair({&map, &features, &judgments});
      auto t3 = std::chrono::steady_clock::now();
      pair_ms.push_back(std::chrono::duration<double, std::milli>(t1 - t0).count());
      grid_ms.push_back(std::chrono::duration<double, std::milli>(t2 - t1).count());
      random_ms.push_back(std::chrono::duration<double, std::milli>(t3 - t2).count());
    }
    std::printf("\nchoice time at N = %d (50-D features, 50,000 judgments), 200 choices:\n", n);
    std::printf("%-28s %10s %10s\n", "", "median ms", "max ms");
    std::printf("%-28s %10.2f %10.2f\n", "most informative pair", median(pair_ms), *std::max_element(pair_ms.begin(), pair_ms.end()));
    std::printf("%-28s %10.2f %10.2f\n", "most informative grid 8", median(grid_ms), *std::max_element(grid_ms.begin(), grid_ms.end()));
    std::printf("%-28s %10.2f %10.2f\n", "random pair", median(random_ms), *std::max_element(random_ms.begin(), random_ms.end()));
  }
  return 0;
}
