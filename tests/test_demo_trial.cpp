// The demo's measured story (solver/demo/demo_trial.h): the simulated people answers 100 questions
// chosen by the most-informative picker, and the map's held-out agreement with the people's hidden
// perceptual distance is compared with the features-only map and with a control run that takes the
// same optimizer steps without the answers.
#include <doctest/doctest.h>
#include <sys/wait.h>

#include <cstdlib>
#include <string>

#include "solver/demo/demo_trial.h"
#include "solver/features/picture_descriptors.h"
#include "solver/demo/sample_library.h"

namespace {

// The library's features, computed in memory from the same drawings the PNG files hold (PNG is
// lossless, so these equal what `kith demo` reads from disk; test_demo_library checks the files).
kith::Points library_features(const std::vector<kith::Swatch>& swatches) {
  kith::Points f(Eigen::Index(swatches.size()), kith::descriptor_size());
  for (size_t i = 0; i < swatches.size(); ++i) {
    const auto px = kith::draw_swatch(swatches[i], 80, kith::SampleLibraryOptions{}.seed);
    const auto v = kith::describe_image(kith::image_from_srgb8(px.data(), 80, 80, 3));
    for (int c = 0; c < kith::descriptor_size(); ++c) f(Eigen::Index(i), c) = v[size_t(c)];
  }
  kith::weight_descriptor_blocks(f);
  return f;
}

}  // namespace

TEST_CASE("demo trial: 100 most-informative answers clearly raise held-out agreement over the features-only map") {
  const auto swatches = kith::make_swatches();
  const kith::Points features = library_features(swatches);
  kith::SimulatedPeople people(kith::perceptual_items(swatches));
  // The README's claim exactly: 100 answers, most informative picker, blend 5, block weights learned
  // from the answers (on by default), seed 42 (all of the run's seeds at their defaults).
  kith::DemoTrialOptions o;
  o.threads = 2;
  const auto r = kith::run_demo_trial(features, people, o);
  MESSAGE(r.BriefReport() << "; answers honoured " << r.answers_satisfied);
  REQUIRE(r.answers.size() == 100);
  REQUIRE(r.heldout == 3000);
  CHECK(r.first_question.anchor >= 0);
  // The map takes the people's answers in: about 85 % of them agree with the hidden distance (the
  // contrarian and the noise account for the rest), and the map honours at least that many.
  constexpr double kHonoured = 0.85;
  CHECK(r.answers_satisfied >= kHonoured);
  // The weights were learned for the five descriptor blocks and keep their sum (the number of blocks).
  REQUIRE(r.blocks.size() == 5);
  double sum = 0;
  for (double w : r.weights.weights) sum += w;
  CHECK(sum == doctest::Approx(5.0));
  CHECK(r.weights.loss_after < r.weights.loss_before);
  // Measured (seed 42; tests/bench/RESULTS-demo.md, README): 0.680 features only -> 0.713 after
  // the answers, control (the same stretches of steps without answers) 0.684; over seeds 42..46 the
  // median gain over the control is given there. Held-out triplets are drawn apart from the
  // questions (never asked). The test asserts a clear rise, below the measured one: 3000 held-out
  // triplets give a standard error of about 0.008 on an agreement near 0.7.
  constexpr double kClearRise = 0.02;
  CHECK(r.agreement_after >= r.agreement_before + kClearRise);
  CHECK(r.agreement_after >= r.agreement_control + kClearRise);
}

TEST_CASE("demo command: help, bad usage and an unwritable library folder") {
  auto run = [](const std::string& args) {
    const int status = std::system((std::string(KITH_BINARY) + " demo " + args + " >/dev/null 2>&1").c_str());
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  };
  CHECK(run("--help") == 0);
  CHECK(run("--answers -3") == 2);
  CHECK(run("--answers lots") == 2);
  CHECK(run("--frobnicate") == 2);
  CHECK(run("--weights maybe") == 2);
  CHECK(run("--seed -1") == 2);
  CHECK(run("--seed 1.5") == 2);
  CHECK(run("--no-window --library /proc/kith-cannot-write-here") == 3);
}
