// The demo's measured claim over several seeds (solver/demo/demo_trial.h): held-out agreement with
// the simulated people's hidden distance, features only / after N answers / control without them,
// with and without learned block weights. Prints a table and the medians.
//   build/tests/bench_demo [--answers N] [--seeds S] [--lambda L] [--random-share R] [--rule informative|random]
//                          [--blend B] [--settle N] [--weights on|off|both] [--regroup N]
//                          [--regroup-exaggeration E] [--count SWATCHES]
// Not built by default: cmake --build build --target bench_demo
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "solver/fit/fit.h"
#include "solver/demo/demo_trial.h"
#include "solver/features/picture_descriptors.h"
#include "solver/demo/sample_library.h"

namespace {
double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const size_t m = v.size() / 2;
  return v.size() % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}
}  // namespace

int main(int argc, char** argv) {
  int answers = 100, seeds = 5, settle = 300, count = kith::SampleLibraryOptions{}.count, regroup = kith::DemoTrialOptions{}.regroup_iterations;
  double regroup_exaggeration = kith::DemoTrialOptions{}.regroup_exaggeration;
  double lambda = kith::BlockWeightOptions{}.lambda, share = 0.0, blend = 5.0;
  std::string rule = "informative", weights = "both";
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string k = argv[i], v = argv[i + 1];
    if (k == "--answers") answers = std::atoi(v.c_str());
    else if (k == "--seeds") seeds = std::atoi(v.c_str());
    else if (k == "--lambda") lambda = std::atof(v.c_str());
    else if (k == "--random-share") share = std::atof(v.c_str());
    else if (k == "--rule") rule = v;
    else if (k == "--blend") blend = std::atof(v.c_str());
    else if (k == "--settle") settle = std::atoi(v.c_str());
    else if (k == "--weights") weights = v;  // on, off, both
    else if (k == "--count") count = std::atoi(v.c_str());
    else if (k == "--regroup") regroup = std::atoi(v.c_str());
    else if (k == "--regroup-exaggeration") regroup_exaggeration = std::atof(v.c_str());
    else { std::fprintf(stderr, "bench_demo: unknown option %s\n", k.c_str()); return 2; }
  }
  kith::SampleLibraryOptions lo;
  lo.count = count;
  const auto swatches = kith::make_swatches(lo);
  kith::Points f(Eigen::Index(swatches.size()), kith::descriptor_size());
  for (size_t i = 0; i < swatches.size(); ++i) {
    const auto px = kith::draw_swatch(swatches[i], 80, kith::SampleLibraryOptions{}.seed);
    const auto v = kith::describe_image(kith::image_from_srgb8(px.data(), 80, 80, 3));
    for (int c = 0; c < kith::descriptor_size(); ++c) f(Eigen::Index(i), c) = v[size_t(c)];
  }
  kith::weight_descriptor_blocks(f);
  std::printf("swatches %d, ", count);
  std::printf("answers %d, rule %s, random share %.2f, blend %.1f, lambda %.3g, settle %d, regroup %d x %.1f\n",
              answers, rule.c_str(), share, blend, lambda, settle, regroup, regroup_exaggeration);
  std::printf("| seed | weights | features only | after | control | after - control | honoured | block weights |\n");
  std::printf("|---|---|---|---|---|---|---|---|\n");
  for (const bool learn : {false, true}) {
    if ((weights == "on" && !learn) || (weights == "off" && learn)) continue;
    std::vector<double> before, after, control;
    for (int s = 0; s < seeds; ++s) {
      kith::DemoTrialOptions o;
      kith::SimulatedPeopleOptions po;
      kith::set_trial_seed(uint64_t(42 + s), &o, &po);
      o.answers = answers;
      o.blend = blend;
      o.settle_iterations = settle;
      o.learn_weights = learn;
      o.weights.lambda = lambda;
      o.regroup_iterations = regroup;
      o.regroup_exaggeration = regroup_exaggeration;
      o.picker.random_share = share;
      o.picker.rule = rule == "random" ? kith::PickerRule::kRandom : kith::PickerRule::kInformative;
      o.threads = 2;
      kith::SimulatedPeople people(kith::perceptual_items(swatches), po);
      const auto r = kith::run_demo_trial(f, people, o);
      double fresh = -1;  // a new features-only map of the reweighted features, for comparison
      if (std::getenv("BENCH_DEMO_FRESH") && !r.blocks.empty()) {
        kith::FitOptions fo;
        fo.iterations = o.fit_iterations;
        fo.threads = 2;
        const auto fit = kith::fit_map(kith::apply_block_weights(f, r.blocks, r.weights.weights), fo);
        fresh = kith::triplet_agreement(fit.map, people.truth_triplets(o.heldout_triplets, 0, o.heldout_gap, o.heldout_seed));
        std::printf("  (seed %d: a fresh map of the reweighted features agrees %.3f)\n", 42 + s, fresh);
      }
      before.push_back(r.agreement_before);
      after.push_back(r.agreement_after);
      control.push_back(r.agreement_control);
      std::printf("| %d | %s | %.3f | %.3f | %.3f | %+.3f | %.2f | %s |\n", 42 + s, learn ? "on" : "off",
                  r.agreement_before, r.agreement_after, r.agreement_control, r.agreement_after - r.agreement_control,
                  r.answers_satisfied, r.blocks.empty() ? "-" : r.weights.report(r.blocks).c_str());
      std::fflush(stdout);
    }
    std::vector<double> gain(after.size());
    for (size_t i = 0; i < gain.size(); ++i) gain[i] = after[i] - control[i];
    std::printf("| median | %s | %.3f | %.3f | %.3f | %+.3f | | |\n", learn ? "on" : "off", median(before),
                median(after), median(control), median(gain));
  }
  return 0;
}
