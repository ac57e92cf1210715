// Planted maps: judgments alone recover a known 3-D arrangement; judgments blended with features
// that misplace a few items move those items where people put them, at a bounded cost to the
// features' neighbourhoods. Uses the noisy oracle of tests/judgments_planted.h.
#include <doctest/doctest.h>

#include <cstdio>
#include <set>

#include "solver/features/affinities.h"
#include "solver/measures/judgment_health.h"
#include "solver/objective/neighbour_term.h"
#include "solver/features/neighbours.h"
#include "tests/judgments_planted.h"

using kith::Judgment;
using kith::Points;

namespace {
constexpr double kOracleNoise = 0.02;  // logistic noise scale on distance differences (unit cube)
// t-STE degrees of freedom for a 3-D planted map: the t-STE paper suggests alpha = d - 1
// (from memory); alpha = 1, the t-SNE default, also works but needs more judgments.
constexpr double kAlpha = 2.0;
constexpr double kPull = 0.6;              // misplaced items' features: 60% of the way into the wrong group
constexpr double kBlendForTest = 4.0;      // judgments pull four times as hard as features (see README)
constexpr double kMisplacedMargin = 0.02;  // least rise of held-out agreement about the misplaced items
constexpr double kTrustDropBound = 0.005;  // most trustworthiness (k = 10) may drop against the features
}  // namespace

TEST_CASE("planted map: judgments alone recover 300 items at known 3-D positions") {
  const int n = 300;
  const size_t m = 12000;  // random questions answered by the oracle (40 per item)
  const Points truth = kith::test::planted_positions(n, 11);
  kith::test::Oracle oracle(truth, kOracleNoise, 12);
  std::mt19937_64 pick(13);
  const auto training = oracle.random_answers(n, m, pick);
  const auto held_out = oracle.random_answers(n, 5000, pick);  // never trained on

  const Points y = kith::test::fit_judgments_only(n, training, 14, 600, kAlpha);
  const double ceiling = kith::judgment_agreement(truth, held_out);  // the oracle against itself
  const double agreement = kith::judgment_agreement(y, held_out);
  // Spearman computed here from its definition (Pearson correlation of ranks).
  const double rho = kith::test::spearman(kith::test::pairwise_distances(y), kith::test::pairwise_distances(truth));
  MESSAGE("judgments-only, " << m << " judgments: held-out agreement " << agreement << " (the planted map scores "
                             << ceiling << "), Spearman of distances " << rho);
  CHECK(agreement >= 0.90);
  CHECK(rho >= 0.9);

  // k-fold held-out agreement over the training judgments themselves (3 folds to keep it short).
  kith::HeldOutOptions ho;
  ho.folds = 3;
  const auto kfold = kith::heldout_agreement(
      training, [&](const std::vector<Judgment>& train) { return kith::test::fit_judgments_only(n, train, 15, 500, kAlpha); }, ho);
  MESSAGE("3-fold held-out agreement " << kfold.agreement << " (training on " << (2 * m / 3) << " each)");
  CHECK(kfold.agreement >= 0.88);
}

TEST_CASE("planted map: a few judgments fix items the features misplace") {
  // 600 items in 6 groups. Features: the planted position plus small noise in 7 more
  // dimensions, except for 8 items of group 0 whose features put them 60% of the way towards
  // members of group 1.
  // Judgments touch 12 items (2%): each misplaced item is nearer two items of group 0 than two
  // items of group 1, as the oracle says.
  const int n = 600, groups = 6;
  std::vector<int> group;
  const Points truth = kith::test::planted_positions(n, 21, groups, 0.05, &group);
  std::mt19937_64 rng(22);
  std::normal_distribution<double> noise(0.0, 0.01);
  Points features(n, 10);
  for (int i = 0; i < n; ++i)
    for (int c = 0; c < 10; ++c) features(i, c) = (c < 3 ? truth(i, c) : 0.0) + noise(rng);
  std::vector<int32_t> in0, in1;
  for (int i = 0; i < n; ++i) {
    if (group[size_t(i)] == 0) in0.push_back(i);
    if (group[size_t(i)] == 1) in1.push_back(i);
  }
  const std::vector<int32_t> misplaced(in0.begin(), in0.begin() + 8);
  const std::vector<int32_t> refs0 = {in0[20], in0[21]}, refs1 = {in1[20], in1[21]};
  for (size_t t = 0; t < misplaced.size(); ++t)
    for (int c = 0; c < 3; ++c)
      features(misplaced[t], c) = kPull * truth(in1[30 + t], c) + (1 - kPull) * truth(misplaced[t], c) + noise(rng);

  kith::test::Oracle oracle(truth, kOracleNoise, 23);
  std::vector<Judgment> judgments;
  for (int32_t a : misplaced)
    for (int32_t b : refs0)
      for (int32_t c : refs1) judgments.push_back(oracle.answer(a, b, c));
  std::set<int32_t> touched;
  for (const auto& j : judgments) touched.insert({j.anchor, j.nearer, j.farther});
  REQUIRE(touched.size() <= size_t(n / 50));

  // Held out: fresh oracle answers about the misplaced items (anchor misplaced, the other two
  // drawn from groups 0 and 1 but not the reference items the judgments name), and about
  // everything (random anchors and others).
  std::mt19937_64 pick(24);
  std::vector<int32_t> others;
  for (int32_t i : in0)
    if (!touched.count(i)) others.push_back(i);
  for (int32_t i : in1)
    if (!touched.count(i)) others.push_back(i);
  std::vector<Judgment> about_misplaced;
  std::uniform_int_distribution<size_t> other(0, others.size() - 1), anchor(0, misplaced.size() - 1);
  while (about_misplaced.size() < 2000) {
    const int32_t b = others[other(pick)], c = others[other(pick)];
    if (b != c) about_misplaced.push_back(oracle.answer(misplaced[anchor(pick)], b, c));
  }
  const auto about_all = oracle.random_answers(n, 4000, pick);

  auto p = std::make_shared<kith::SparseAffinities>(
      kith::joint_affinities(kith::find_neighbours(features, 90), kith::AffinityOptions{}));
  auto fit = [&](double blend) {
    kith::BlendedObjective objective(n, 3);
    objective.set_neighbour_term(std::make_shared<kith::NeighbourTerm>(p, kith::NeighbourTermOptions{}));
    objective.set_alpha(1.0);
    objective.set_blend(blend);
    if (blend > 0) objective.set_judgments(judgments);
    Points y = kith::random_start(n, 3, 25);
    kith::BlendedFitOptions o;
    o.iterations = 750;
    kith::fit_blended(objective, y, o);
    return y;
  };
  const Points plain = fit(0.0), blended = fit(kBlendForTest);
  const double before = kith::judgment_agreement(plain, about_misplaced);
  const double after = kith::judgment_agreement(blended, about_misplaced);
  const double before_all = kith::judgment_agreement(plain, about_all);
  const double after_all = kith::judgment_agreement(blended, about_all);
  const double trust_plain = kith::test::trustworthiness(features, plain, 10);
  const double trust_blended = kith::test::trustworthiness(features, blended, 10);
  int moved = 0;  // misplaced items whose 10 nearest map neighbours are mostly of group 0
  for (int32_t a : misplaced) {
    std::vector<std::pair<double, int32_t>> d;
    for (int i = 0; i < n; ++i)
      if (i != a) d.push_back({(blended.row(a) - blended.row(i)).squaredNorm(), i});
    std::partial_sort(d.begin(), d.begin() + 10, d.end());
    int home = 0;
    for (int t = 0; t < 10; ++t) home += group[size_t(d[size_t(t)].second)] == 0;
    moved += home > 5;
  }
  MESSAGE(moved << " of " << misplaced.size() << " misplaced items now among their own group");
  MESSAGE("held-out agreement about the misplaced items: " << before << " -> " << after << "; about everything: "
                                                           << before_all << " -> " << after_all
                                                           << "; trustworthiness vs features (k=10): " << trust_plain
                                                           << " -> " << trust_blended);
  CHECK(after >= before + kMisplacedMargin);
  CHECK(trust_blended >= trust_plain - kTrustDropBound);
}
