// Block weights learned from triplets (solver/features/block_weights.h): the gradient against central
// differences, planted features where only some blocks matter, the reweighting itself, bad input.
#include <doctest/doctest.h>

#include <chrono>
#include <cmath>
#include <random>
#include <stdexcept>
#include <thread>

#include "solver/features/block_weights.h"
#include "tests/metric_planted.h"
#include "solver/live/engine.h"

namespace {

using kith::test::planted_agreement;
using kith::test::random_features;

// Triplets stated by a squared distance that uses the blocks with the given true weights.
std::vector<kith::Judgment> planted_triplets(const kith::Points& x, const std::vector<kith::ColumnBlock>& blocks,
                                             const std::vector<double>& truth, size_t count, uint64_t seed) {
  return kith::test::planted_triplets(kith::apply_block_weights(x, blocks, truth), count, seed);
}

const std::vector<kith::ColumnBlock> kBlocks = {{"hue", 0, 3}, {"texture", 3, 5}, {"layout", 8, 4}};

}  // namespace

TEST_CASE("block weights: the gradient matches central differences") {
  const kith::Points x = random_features(40, 12, 3);
  auto judgments = planted_triplets(x, kBlocks, {2.0, 0.5, 0.5}, 60, 4);
  judgments[5].weight = 3.0;        // weights count
  judgments[7].retracted = true;    // and retracted judgments do not
  for (double alpha : {1.0, 2.5}) {
    kith::BlockWeightOptions o;
    o.alpha = alpha;
    o.lambda = 0.05;
    const std::vector<double> u = {0.3, -0.7, 0.2};
    std::vector<double> grad;
    kith::block_weight_loss(x, kBlocks, judgments, u, o, &grad);
    constexpr double kStep = 1e-5, kTolerance = 1e-7;  // central differences of a smooth 3-parameter loss
    for (size_t b = 0; b < u.size(); ++b) {
      auto up = u, down = u;
      up[b] += kStep;
      down[b] -= kStep;
      const double fd = (kith::block_weight_loss(x, kBlocks, judgments, up, o) -
                         kith::block_weight_loss(x, kBlocks, judgments, down, o)) /
                        (2 * kStep);
      CHECK(std::abs(grad[b] - fd) < kTolerance);
    }
  }
}

TEST_CASE("block weights: planted features where only one block matters") {
  const kith::Points x = random_features(300, 12, 11);
  // People judge by the first block only (a tiny share of the others, so ties are broken).
  const std::vector<double> truth = {2.96, 0.02, 0.02};
  const auto asked = planted_triplets(x, kBlocks, truth, 100, 12);
  const auto fresh = planted_triplets(x, kBlocks, truth, 2000, 13);  // never used for learning
  const auto r = kith::learn_block_weights(x, kBlocks, asked);
  MESSAGE("learned " << r.report(kBlocks) << " in " << r.steps << " steps");
  REQUIRE(r.weights.size() == 3);
  CHECK(r.judgments == 100);
  CHECK(r.loss_after < r.loss_before);
  CHECK(r.weights[0] + r.weights[1] + r.weights[2] == doctest::Approx(3.0));
  // The block that matters gains most of the weight; the others lose theirs.
  constexpr double kMattersAtLeast = 2.0, kOthersAtMost = 0.5;
  CHECK(r.weights[0] > kMattersAtLeast);
  CHECK(r.weights[1] < kOthersAtMost);
  CHECK(r.weights[2] < kOthersAtMost);
  // And distances in the reweighted features agree with fresh triplets much better than before.
  const double before = planted_agreement(x, fresh), after = planted_agreement(kith::apply_block_weights(x, kBlocks, r.weights), fresh);
  MESSAGE("fresh triplets agreeing: " << before << " -> " << after);
  constexpr double kClearGain = 0.15;
  CHECK(after > before + kClearGain);

  // Two blocks that matter equally, one that does not.
  const auto asked2 = planted_triplets(x, kBlocks, {0.05, 1.475, 1.475}, 150, 14);
  const auto r2 = kith::learn_block_weights(x, kBlocks, asked2);
  MESSAGE("learned " << r2.report(kBlocks));
  CHECK(r2.weights[0] < kOthersAtMost);
  CHECK(r2.weights[1] > 1.0);
  CHECK(r2.weights[2] > 1.0);
}

TEST_CASE("block weights: no judgments keep the features, the penalty pulls toward them") {
  const kith::Points x = random_features(50, 12, 21);
  const auto none = kith::learn_block_weights(x, kBlocks, {});
  for (double w : none.weights) CHECK(w == 1.0);
  const auto asked = planted_triplets(x, kBlocks, {2.96, 0.02, 0.02}, 60, 22);
  kith::BlockWeightOptions loose, tight;
  loose.lambda = 0.0;
  tight.lambda = 10.0;
  const auto a = kith::learn_block_weights(x, kBlocks, asked, loose);
  const auto b = kith::learn_block_weights(x, kBlocks, asked, tight);
  CHECK(a.weights[0] > b.weights[0]);
  CHECK(b.weights[0] > 1.0);
  CHECK(b.weights[0] < 1.5);
}

TEST_CASE("block weights: reweighted features give the weighted squared distance, bad input") {
  const kith::Points x = random_features(10, 14, 31);  // columns 12, 13 belong to no block
  const std::vector<double> w = {0.5, 2.0, 0.5};
  const kith::Points xw = kith::apply_block_weights(x, kBlocks, w);
  for (int i = 1; i < 10; ++i) {
    double slow = 0;
    for (size_t b = 0; b < kBlocks.size(); ++b)
      for (int c = kBlocks[b].begin; c < kBlocks[b].begin + kBlocks[b].size; ++c)
        slow += w[b] * (x(0, c) - x(i, c)) * (x(0, c) - x(i, c));
    for (int c = 12; c < 14; ++c) slow += (x(0, c) - x(i, c)) * (x(0, c) - x(i, c));
    CHECK((xw.row(0) - xw.row(i)).squaredNorm() == doctest::Approx(slow).epsilon(1e-12));
  }
  const std::vector<kith::ColumnBlock> outside = {{"colour", 0, 6}, {"texture", 6, 10}};
  CHECK_THROWS_WITH_AS(kith::learn_block_weights(x, outside, {}),
                       "block weights: block 'texture' (columns 7..16) lies outside the 14 feature columns",
                       std::invalid_argument);
  CHECK_THROWS_AS(kith::apply_block_weights(x, kBlocks, {1.0, NAN, 1.0}), std::invalid_argument);
  kith::BlockWeightOptions bad;
  bad.alpha = 0;
  std::string error;
  CHECK_FALSE(bad.IsValid(&error));
  CHECK(error == "block weights: alpha must be > 0");
}

TEST_CASE("block weights: the live engine takes reweighted features (SetFeatures) and refuses a wrong shape") {
  // Two blocks: block 0 separates the items into two groups, block 1 into two other groups.
  std::mt19937_64 rng(41);
  std::normal_distribution<double> g(0.0, 1.0);
  kith::Collection c;
  const int n = 120;
  c.features.resize(n, 4);
  for (int i = 0; i < n; ++i) {
    c.features(i, 0) = g(rng) * 0.3 + ((i % 2) ? 5.0 : 0.0);
    c.features(i, 1) = g(rng) * 0.3;
    c.features(i, 2) = g(rng) * 0.3 + ((i / 60) ? 5.0 : 0.0);
    c.features(i, 3) = g(rng) * 0.3;
    c.ids.push_back("i" + std::to_string(i));
  }
  kith::EngineOptions o;
  o.perplexity = 15;
  o.threads = 2;
  kith::Engine e(c, o);
  e.start();
  auto wait = [&](auto pred) {
    const auto end = std::chrono::steady_clock::now() + std::chrono::seconds(20);
    auto s = e.latest();
    while (!pred(*s) && std::chrono::steady_clock::now() < end) {
      std::this_thread::sleep_for(std::chrono::milliseconds(1));
      s = e.latest();
    }
    return s;
  };
  wait([](const kith::Snapshot& s) { return s.iteration > 400; });
  const uint64_t bad = e.post(kith::cmd::SetFeatures{kith::Points::Zero(n, 3), 50, 12.0});
  auto s = wait([&](const kith::Snapshot& s) { return s.last_command >= bad; });
  CHECK(s->last_rejected == "features: the map has 120 x 4 features, got 120 x 3");
  // Only block 1 (the i / 60 groups) matters now.
  const std::vector<kith::ColumnBlock> blocks = {{"a", 0, 2}, {"b", 2, 2}};
  const uint64_t good =
      e.post(kith::cmd::SetFeatures{kith::apply_block_weights(c.features, blocks, {0.0, 2.0}), 100, 12.0});
  s = wait([&](const kith::Snapshot& s) { return s.last_command >= good && !s.rebuilding && s.iteration > 1200; });
  e.stop();
  for (const auto& cmd : e.command_log())
    if (cmd.seq == good) CHECK_MESSAGE(cmd.rejected.empty(), cmd.rejected);
  // The map now separates the i / 60 groups and mixes the i % 2 ones.
  const auto& y = s->positions;
  double same = 0, other = 0, parity_same = 0, parity_other = 0;
  int a = 0, b = 0, pa = 0, pb = 0;
  for (int i = 0; i < n; ++i)
    for (int j = i + 1; j < n; ++j) {
      const double d = (y.row(i) - y.row(j)).norm();
      if (i / 60 == j / 60) same += d, ++a; else other += d, ++b;
      if (i % 2 == j % 2) parity_same += d, ++pa; else parity_other += d, ++pb;
    }
  MESSAGE("mean distance within / across the taught groups: " << same / a << " / " << other / b
          << "; within / across the old ones: " << parity_same / pa << " / " << parity_other / pb);
  constexpr double kSeparated = 2.0, kMixed = 1.2;  // ratios of mean distances across / within
  CHECK(other / b > kSeparated * same / a);
  CHECK(parity_other / pb < kMixed * parity_same / pa);
}
