// The picker with features: how many grid answers the most informative picker and random questions
// need to reach 90 % of the 100-answer gain in held-out agreement, on the demo (solver/demo/demo_trial.h,
// the map bent by the answers and the features reweighted by them, at the demo's defaults) and on
// scenarios of hidden structure (solver/demo/simulated_people.h people_scenario). The judgments-only
// benchmark with a planted map is bench_judgments (tests/bench/RESULTS-judgments.md).
//   build/tests/bench_picker_features [--seeds S] [--scenario NAME] [--checkpoints 10,20,30,50,70,100]
//                                     [--threads T]
// For each seed both pickers run the same trial (same map, people and held-out triplets; the
// control is not run). The gain at N answers is agreement(N) - agreement(features only). Two
// targets per seed: 90 % of the picker's own 100-answer gain, and 90 % of the larger of the two
// pickers' 100-answer gains (the common target, which compares them on one scale). "Answers to
// reach" interpolates linearly between checkpoints (0 answers = the features-only map) at the first
// checkpoint at or above the target; a picker that never reaches it counts as "> 100" (101 in the
// medians). Prints a markdown table per seed and the medians.
// Not built by default: cmake --build build --target bench_picker_features
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "solver/demo/demo_trial.h"
#include "solver/demo/sample_library.h"
#include "tests/bench/bench_common.h"

namespace {

constexpr double kNever = 101.0;  // "not reached within the last checkpoint", for the medians

// Answers at which the curve (xs, ys; xs[0] = 0) first reaches target, linearly interpolated.
double answers_to_reach(const std::vector<double>& xs, const std::vector<double>& ys, double target) {
  for (size_t i = 1; i < xs.size(); ++i)
    if (ys[i] >= target) {
      const double dy = ys[i] - ys[i - 1];
      return dy > 0 ? xs[i - 1] + (xs[i] - xs[i - 1]) * (target - ys[i - 1]) / dy : xs[i];
    }
  return kNever;
}

std::string shown(double answers) {
  if (answers >= kNever) return "> 100";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f", answers);
  return buf;
}

}  // namespace

int main(int argc, char** argv) {
  int seeds = 5, threads = 2;
  std::string scenario = "demo";
  std::vector<int> checkpoints = {10, 20, 30, 50, 70, 100};
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string k = argv[i], v = argv[i + 1];
    if (k == "--seeds") seeds = std::atoi(v.c_str());
    else if (k == "--scenario") scenario = v;
    else if (k == "--threads") threads = std::atoi(v.c_str());
    else if (k == "--checkpoints") checkpoints = kith::bench::int_list(v);
    else {
      std::fprintf(stderr, "bench_picker_features: unknown option %s\n", k.c_str());
      return 2;
    }
  }
  if (checkpoints.empty() || checkpoints.back() != 100) {
    std::fprintf(stderr, "bench_picker_features: the last checkpoint must be 100 answers\n");
    return 2;
  }
  const auto swatches = kith::make_swatches();
  const kith::Points features = kith::swatch_features(swatches);
  const char* names[2] = {"informative", "random"};
  std::printf("scenario %s, %zu swatches, grid questions, demo defaults, checkpoints", scenario.c_str(), swatches.size());
  for (int c : checkpoints) std::printf(" %d", c);
  std::printf("\n\n| seed | picker | features only | gain at 20 | gain at 50 | gain at 100 | answers to 90 %% of own gain "
              "| answers to 90 %% of the better gain |\n|---|---|---|---|---|---|---|---|\n");
  std::vector<double> own[2], common[2], gain100[2], gain20[2], gain50[2];
  for (int s = 0; s < seeds; ++s) {
    std::vector<double> xs = {0.0}, ys[2];
    for (int c : checkpoints) xs.push_back(c);
    double before = 0.0;
    for (int p = 0; p < 2; ++p) {
      kith::DemoTrialOptions o;
      kith::SimulatedPeopleOptions po;
      if (!kith::bench::seeded_scenario(uint64_t(42 + s), scenario, &o, &po))
        return std::fprintf(stderr, "bench_picker_features: unknown scenario %s\n", scenario.c_str()), 2;
      o.answers = 100;
      o.checkpoints = checkpoints;
      o.control = false;
      o.threads = threads;
      if (p == 1) o.picker.rule = kith::PickerRule::kRandom;
      kith::SimulatedPeople people(kith::perceptual_items(swatches), po);
      const auto r = kith::run_demo_trial(features, people, o);
      before = r.agreement_before;
      ys[p] = {before};
      for (const auto& point : r.curve) ys[p].push_back(point.agreement);
    }
    auto at = [&](int p, int answers) {
      for (size_t i = 0; i < xs.size(); ++i)
        if (xs[i] == answers) return ys[p][i] - before;
      return -1.0;
    };
    const double better = std::max(at(0, 100), at(1, 100));
    for (int p = 0; p < 2; ++p) {
      const double g = at(p, 100);
      const double to_own = g > 0 ? answers_to_reach(xs, ys[p], before + 0.9 * g) : kNever;
      const double to_common = better > 0 ? answers_to_reach(xs, ys[p], before + 0.9 * better) : kNever;
      own[p].push_back(to_own);
      common[p].push_back(to_common);
      gain100[p].push_back(g);
      gain20[p].push_back(at(p, 20));
      gain50[p].push_back(at(p, 50));
      std::printf("| %d | %s | %.3f | %+.3f | %+.3f | %+.3f | %s | %s |\n", 42 + s, names[p], before, at(p, 20),
                  at(p, 50), g, shown(to_own).c_str(), shown(to_common).c_str());
    }
    std::fflush(stdout);
  }
  using kith::bench::median;
  for (int p = 0; p < 2; ++p)
    std::printf("| median | %s | | %+.3f | %+.3f | %+.3f | %s | %s |\n", names[p], median(gain20[p]), median(gain50[p]),
                median(gain100[p]), shown(median(own[p])).c_str(), shown(median(common[p])).c_str());
  std::printf("summary | %s | informative %s / %s answers | random %s / %s answers | gain at 100: %+.3f / %+.3f |\n",
              scenario.c_str(), shown(median(own[0])).c_str(), shown(median(common[0])).c_str(),
              shown(median(own[1])).c_str(), shown(median(common[1])).c_str(), median(gain100[0]), median(gain100[1]));
  return 0;
}
