// Teach, judgment health, the judgments CSV reader/writer and the pickers.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <random>
#include <set>
#include <sstream>

#include "solver/measures/judgment_health.h"
#include "solver/io/judgment_io.h"
#include "solver/asking/picker.h"
#include "solver/asking/teach.h"
#include "tests/approx.h"

using kith::Judgment;
using kith::Points;

namespace {
Judgment make(int32_t a, int32_t n, int32_t f, const std::string& person = "") {
  Judgment j;
  j.anchor = a, j.nearer = n, j.farther = f, j.person = person;
  return j;
}
std::vector<std::string> item_ids(int n) {
  std::vector<std::string> ids;
  for (int i = 0; i < n; ++i) ids.push_back("item-" + std::to_string(i));
  return ids;
}
std::string slurp(const std::string& path) {
  std::ifstream in(path);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}
}  // namespace

// ==== teach ===================================================================

TEST_CASE("teach: a move from one group to another says 'nearer the new group than the old'") {
  // Group A around (0,0,0): items 0..5; group B around (10,0,0): items 6..11; item 12 moves A -> B.
  Points y(13, 3);
  for (int i = 0; i < 6; ++i) y.row(i) << 0.1 * i, 0.2 * (i % 2), 0;
  for (int i = 6; i < 12; ++i) y.row(i) << 10 + 0.1 * i, 0.2 * (i % 2), 0;
  y.row(12) << 0.05, 0.05, 0;
  const double from[3] = {0.05, 0.05, 0}, to[3] = {10.6, 0.1, 0};
  kith::TeachOptions o;
  o.neighbours = 3;
  o.max_judgments = 9;
  const auto js = kith::teach_from_drag(y, 12, from, to, "Ada", 1234.5, o);
  REQUIRE(js.size() == 9);
  for (const auto& j : js) {
    CHECK(j.anchor == 12);
    CHECK(j.nearer >= 6);
    CHECK(j.nearer < 12);
    CHECK(j.farther < 6);
    CHECK(j.kind == kith::JudgmentKind::kDrag);
    CHECK(j.person == "Ada");
    CHECK(j.time == 1234.5);
  }
  o.max_judgments = 4;
  CHECK(kith::teach_from_drag(y, 12, from, to, "Ada", 0, o).size() == 4);

  // A nudge inside the group leaves no old neighbour behind that is now farther: no judgments
  // claim B-items are nearer, and every judgment made is true at the new place.
  const double nudge[3] = {0.07, 0.05, 0};
  for (const auto& j : kith::teach_from_drag(y, 12, from, nudge, "Ada", 0, o)) {
    const Eigen::RowVector3d p(nudge[0], nudge[1], nudge[2]);
    CHECK((y.row(j.nearer) - p).norm() < (y.row(j.farther) - p).norm());
  }
  CHECK_THROWS_AS(kith::teach_from_drag(y, 13, from, to, "Ada", 0, o), std::invalid_argument);
  o.neighbours = 0;
  CHECK_THROWS_AS(kith::teach_from_drag(y, 12, from, to, "Ada", 0, o), std::invalid_argument);
}

// ==== health ==================================================================

TEST_CASE("health: agreement, ties, retractions and per-person figures") {
  Points y(4, 2);
  y << 0, 0, 1, 0, 3, 0, 0, 1;  // d(0,1) = 1, d(0,2) = 3, d(0,3) = 1
  std::vector<Judgment> js = {make(0, 1, 2, "Bo"), make(0, 2, 1, "Bo"), make(0, 1, 3, "Cy"), make(0, 3, 2, "Cy")};
  // satisfied: yes, no, tie, yes -> (1 + 0 + 0.5 + 1) / 4
  CHECK(kith::judgment_agreement(y, js) == doctest::Approx(2.5 / 4));
  js[1].retracted = true;
  CHECK(kith::judgment_agreement(y, js) == doctest::Approx(2.5 / 3));
  const auto people = kith::per_person_agreement(y, js);
  REQUIRE(people.size() == 2);
  CHECK(people[0].person == "Bo");
  CHECK(people[0].judgments == 1);
  CHECK(people[0].agreement == doctest::Approx(1.0));
  CHECK(people[1].agreement == doctest::Approx(0.75));
  CHECK(kith::judgment_agreement(y, {}) == -1.0);
}

TEST_CASE("health: k-fold held-out agreement trains without the fold it scores") {
  // The 'fit' memorizes: a map where exactly the training judgments hold is impossible in
  // general, so use a fit that records what it saw and returns a fixed map instead.
  Points truth(5, 1);
  truth << 0, 1, 2, 3, 4;
  std::vector<Judgment> js;
  for (int a = 0; a < 5; ++a)
    for (int n = 0; n < 5; ++n)
      for (int f = 0; f < 5; ++f)
        if (a != n && a != f && n != f && std::abs(a - n) < std::abs(a - f)) js.push_back(make(a, n, f));
  size_t calls = 0, trained = 0;
  kith::HeldOutOptions o;
  o.folds = 4;
  const auto r = kith::heldout_agreement(
      js,
      [&](const std::vector<Judgment>& train) {
        ++calls;
        trained += train.size();
        return truth;
      },
      o);
  CHECK(calls == 4);
  CHECK(trained == 3 * js.size());  // each judgment trains in 3 of 4 folds
  CHECK(r.agreement == doctest::Approx(1.0));
  CHECK(r.fold_agreement.size() == 4);
  Points scrambled(5, 1);
  scrambled << 3, 0, 4, 1, 2;
  const auto worse = kith::heldout_agreement(js, [&](const std::vector<Judgment>&) { return scrambled; }, o);
  CHECK(worse.agreement == doctest::Approx(kith::judgment_agreement(scrambled, js)));
  CHECK(worse.agreement < 0.8);
  o.folds = 1;
  CHECK_THROWS_AS(kith::heldout_agreement(js, [&](const std::vector<Judgment>&) { return truth; }, o),
                  std::invalid_argument);
}

// ==== CSV =====================================================================

TEST_CASE("judgments CSV: header in any order, positional rows, times and kinds") {
  const auto ids = item_ids(6);
  auto r = kith::parse_judgments_csv(
      "Farther,anchor,nearer,time,person,kind\n"
      "item-2,item-0,item-1,2026-12-01T21:54:23Z,Ada,pair\n"
      "\n"
      "item-5,item-3,item-4,1796162063.25,\"Lee, B.\",GRID\n",
      "j.csv", ids);
  REQUIRE(r.ok());
  REQUIRE(r.judgments.size() == 2);
  CHECK(r.judgments[0].anchor == 0);
  CHECK(r.judgments[0].nearer == 1);
  CHECK(r.judgments[0].farther == 2);
  CHECK(r.judgments[0].person == "Ada");
  CHECK(r.judgments[0].time == 1796162063.0);  // `date -u -d 2026-12-01T21:54:23Z +%s`
  CHECK(r.judgments[0].kind == kith::JudgmentKind::kPair);
  CHECK(r.judgments[1].person == "Lee, B.");
  CHECK(r.judgments[1].time == 1796162063.25);
  CHECK(r.judgments[1].kind == kith::JudgmentKind::kGrid);

  auto plain = kith::parse_judgments_csv("item-0,item-1,item-2\r\nitem-3,item-4,item-5,Bo\r\n", "p.csv", ids);
  REQUIRE(plain.ok());
  REQUIRE(plain.judgments.size() == 2);
  CHECK(plain.judgments[1].person == "Bo");
  CHECK(plain.judgments[1].kind == kith::JudgmentKind::kImport);
}

TEST_CASE("judgments CSV: every bad row is reported with its line and cause, a bad file imports nothing") {
  const auto ids = item_ids(4);
  const std::string text =
      "anchor,nearer,farther,time,kind\n"
      "item-0,item-1,item-2,,\n"          // 2: fine
      "item-0,item-9,item-2,,\n"          // 3: unknown id
      "item-0,item-0,item-2,,\n"          // 4: same item twice
      "item-0,item-1,item-2,yesterday,\n" // 5: bad time
      "item-0,item-1,item-2,,sideways\n"  // 6: bad kind
      "item-0,item-1\n"                   // 7: too few fields
      "item-1,item-2,item-3,,,extra\n";   // 8: too many fields
  auto r = kith::parse_judgments_csv(text, "bad.csv", ids);
  CHECK(r.judgments.empty());
  CHECK(r.rows == 7);
  CHECK(r.bad_rows == 6);
  REQUIRE(r.problems.size() == 6);
  const long lines[] = {3, 4, 5, 6, 7, 8};
  for (size_t i = 0; i < 6; ++i) CHECK(r.problems[i].line == lines[i]);
  CHECK(kith::describe(r.problems[0]) == "bad.csv:3:2: nearer 'item-9' is not an item of the collection");
  CHECK(r.problems[1].message.find("same item twice ('item-0')") != std::string::npos);
  CHECK(r.problems[2].message.find("time 'yesterday'") != std::string::npos);
  CHECK(r.problems[3].message.find("kind 'sideways'") != std::string::npos);
  CHECK(r.problems[4].message.find("at least 3 fields") != std::string::npos);

  kith::JudgmentReadOptions skip;
  skip.skip_bad_rows = true;
  auto s = kith::parse_judgments_csv(text, "bad.csv", ids, skip);
  CHECK(s.judgments.size() == 1);
  CHECK(s.problems.size() == 6);

  auto header = kith::parse_judgments_csv("anchor,nearer,colour\nitem-0,item-1,item-2\n", "h.csv", ids);
  CHECK(header.judgments.empty());
  CHECK(header.problems.size() == 2);  // unknown column, missing farther
  auto quote = kith::parse_judgments_csv("item-0,item-1,\"item-2\n", "q.csv", ids);
  CHECK_FALSE(quote.ok());
  auto missing = kith::read_judgments_csv("/nonexistent/j.csv", ids);
  REQUIRE(missing.problems.size() == 1);
  CHECK(missing.problems[0].message == "cannot open the judgments file");
}

TEST_CASE("judgments CSV: what is written reads back the same") {
  std::vector<std::string> ids = {"plain", "with,comma", "with \"quote\"", "d"};
  std::vector<Judgment> js = {make(0, 1, 2, "Ada"), make(3, 2, 1, ""), make(1, 0, 3, "Lee")};
  js[0].time = 1796162063.5;
  js[0].kind = kith::JudgmentKind::kDrag;
  js[1].weight = 2.5;
  js[2].retracted = true;
  const std::string dir = kith::test::temp_dir("judgments_csv");
  const std::string path = dir + "/j.csv";
  REQUIRE(kith::write_judgments_csv(path, js, ids) == "");
  auto back = kith::read_judgments_csv(path, ids);
  REQUIRE(back.ok());
  REQUIRE(back.judgments.size() == 2);  // retracted one left out
  for (size_t t = 0; t < 2; ++t) {
    CHECK(back.judgments[t].anchor == js[t].anchor);
    CHECK(back.judgments[t].nearer == js[t].nearer);
    CHECK(back.judgments[t].farther == js[t].farther);
    CHECK(back.judgments[t].person == js[t].person);
    CHECK(back.judgments[t].time == js[t].time);
    CHECK(back.judgments[t].kind == js[t].kind);
    CHECK(back.judgments[t].weight == js[t].weight);
  }
  kith::JudgmentWriteOptions anonymous;
  anonymous.include_people = false;
  REQUIRE(kith::write_judgments_csv(path, js, ids, anonymous) == "");
  CHECK(slurp(path).find("Ada") == std::string::npos);
  // A failed write leaves the existing file as it was.
  const std::string before = slurp(path);
  std::vector<Judgment> bad = {make(0, 1, 7)};
  CHECK(kith::write_judgments_csv(path, bad, ids) != "");
  CHECK(slurp(path) == before);
}

// ==== pickers =================================================================

namespace {
Points cloud(int n, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0.0, 1.0);
  Points y(n, 3);
  for (int i = 0; i < n; ++i)
    for (int c = 0; c < 3; ++c) y(i, c) = g(rng);
  return y;
}
void check_question(const kith::Question& q, int n, int size) {
  REQUIRE(q.anchor >= 0);
  CHECK(q.anchor < n);
  REQUIRE(int(q.candidates.size()) == size);
  std::set<int32_t> seen(q.candidates.begin(), q.candidates.end());
  CHECK(seen.size() == q.candidates.size());
  CHECK(seen.count(q.anchor) == 0);
  for (int32_t c : q.candidates) CHECK((c >= 0 && c < n));
}
}  // namespace

TEST_CASE("pickers: random and most informative give valid pair and grid questions, selection limits anchors") {
  const Points y = cloud(200, 3);
  std::vector<Judgment> js;
  kith::PickerInput in{&y, nullptr, &js};
  for (auto rule : {kith::PickerRule::kRandom, kith::PickerRule::kInformative}) {
    kith::PickerOptions o;
    o.rule = rule;
    kith::Picker picker(o);
    for (int t = 0; t < 20; ++t) {
      check_question(picker.pair(in), 200, 2);
      const auto g = picker.grid(in, 8, 2);
      check_question(g, 200, 8);
      CHECK(g.kind == kith::QuestionKind::kGrid);
      CHECK(g.choose == 2);
    }
    picker.set_selection({5, 17, 17, 40});
    for (int t = 0; t < 30; ++t) {
      const auto q = picker.pair(in);
      CHECK((q.anchor == 5 || q.anchor == 17 || q.anchor == 40));
    }
  }
  Points tiny = cloud(2, 1);
  kith::PickerInput small{&tiny, nullptr, nullptr};
  CHECK(kith::Picker().pair(small).anchor == -1);
  CHECK_THROWS_AS(kith::Picker().grid(in, 4, 4), std::invalid_argument);
}

TEST_CASE("pickers: information gain is high while the anchor's place is open, low once judgments settle it") {
  // Items on a line; the anchor 0 has no judgments, so it could stand at any item's place: the
  // question "1 or 2?" splits those places in two and gains much. After fifty answers "0 is
  // nearer 1 than 2" the places near 2 are ruled out and the same question gains little.
  Points y(6, 3);
  y << 0, 0, 0, 0.5, 0, 0, 6, 0, 0, 6.5, 0, 0, 0.2, 0.3, 0, 6.2, 0.1, 0;
  std::vector<Judgment> none;
  kith::PickerInput in{&y, nullptr, &none};
  kith::PickerOptions o;
  o.near_candidates = 4;
  kith::Picker picker(o);
  const double open = picker.information(in, 0, 1, 2);
  std::vector<Judgment> many;
  for (int t = 0; t < 50; ++t) many.push_back(make(0, 1, 2));
  kith::PickerInput judged{&y, nullptr, &many};
  const double settled = picker.information(judged, 0, 1, 2);
  MESSAGE("information: open " << open << ", settled " << settled);
  CHECK(open > 0.3);  // of at most log 2 = 0.69
  CHECK(settled < 0.25 * open);
  // A question between two items at the same place is a coin toss wherever the anchor stands.
  Points twins = y;
  twins.row(2) = twins.row(1);
  twins(2, 2) = 1e-9;
  kith::PickerInput tw{&twins, nullptr, &none};
  CHECK(picker.information(tw, 0, 1, 2) < 0.01);

  // The informative picker's pairs carry more information than random pairs on the same map.
  const Points c = cloud(300, 8);
  std::vector<Judgment> no_judgments;
  kith::PickerInput cin{&c, nullptr, &no_judgments};
  kith::PickerOptions ro;
  ro.rule = kith::PickerRule::kRandom;
  kith::Picker random(ro), informative, judge;
  double gain_random = 0.0, gain_informative = 0.0;
  for (int t = 0; t < 50; ++t) {
    const auto qr = random.pair(cin);
    const auto qi = informative.pair(cin);
    gain_random += judge.information(cin, qr.anchor, qr.candidates[0], qr.candidates[1]);
    gain_informative += judge.information(cin, qi.anchor, qi.candidates[0], qi.candidates[1]);
  }
  MESSAGE("information of 50 questions: informative " << gain_informative << ", random " << gain_random);
  CHECK(gain_informative > 1.2 * gain_random);
}

namespace {
// Slow, obvious expected information gain: every item's place (the anchor's own first) as a
// candidate place for the anchor, uniform prior, t-STE or logistic likelihood of the anchor's
// judgments, then I = H(sum w p) - sum w H(p) with H written out.
double slow_information(const Points& y, const std::vector<Judgment>& js, int32_t a, int32_t b, int32_t c,
                        bool calibrated, double alpha, double beta) {
  auto g = [&](const Eigen::RowVectorXd& x, int32_t i) {
    const double d = (x - y.row(i)).norm();
    return calibrated ? -beta * d : -0.5 * (alpha + 1) * std::log(1 + d * d / alpha);
  };
  auto H = [](double p) { return -p * std::log(p) - (1 - p) * std::log(1 - p); };
  std::vector<Eigen::RowVectorXd> places = {y.row(a)};
  for (int32_t i = 0; i < int32_t(y.rows()); ++i)
    if (i != a) places.push_back(y.row(i));
  std::vector<double> logw;
  for (const auto& x : places) {
    double l = 0;
    for (const Judgment& j : js) {
      if (j.anchor != a && j.nearer != a && j.farther != a) continue;
      auto pos = [&](int32_t i) -> Eigen::RowVectorXd { return i == a ? x : Eigen::RowVectorXd(y.row(i)); };
      auto gg = [&](int32_t i, int32_t k) {
        const double d = (pos(i) - pos(k)).norm();
        return calibrated ? -beta * d : -0.5 * (alpha + 1) * std::log(1 + d * d / alpha);
      };
      l += std::log(1.0 / (1.0 + std::exp(gg(j.anchor, j.farther) - gg(j.anchor, j.nearer))));
    }
    logw.push_back(l);
  }
  const double top = *std::max_element(logw.begin(), logw.end());
  double total = 0, pbar = 0, hbar = 0;
  for (double l : logw) total += std::exp(l - top);
  for (size_t s = 0; s < places.size(); ++s) {
    const double w = std::exp(logw[s] - top) / total;
    if (w <= 1e-6) continue;  // the picker skips places this light (their share is below 1e-6 each)
    const double p = 1.0 / (1.0 + std::exp(g(places[s], c) - g(places[s], b)));
    pbar += w * p;
    hbar += w * H(p);
  }
  return H(pbar) - hbar;
}
}  // namespace

TEST_CASE("pickers: information and the calibrated response equal slow, obvious computations") {
  // 40 items, 60 judgments from a noisy rule on the map itself; the picker's places are every
  // item when samples >= N - 1 and local_share = 0, so both sides use the same places.
  const Points y = cloud(40, 21);
  std::mt19937_64 rng(22);
  std::uniform_int_distribution<int32_t> item(0, 39);
  std::uniform_real_distribution<double> u(0, 1);
  std::vector<Judgment> js;
  while (js.size() < 60) {
    const int32_t a = item(rng), b = item(rng), c = item(rng);
    if (a == b || a == c || b == c) continue;
    const double db = (y.row(a) - y.row(b)).norm(), dc = (y.row(a) - y.row(c)).norm();
    const bool says_b = u(rng) < 1.0 / (1.0 + std::exp(-(dc - db) / 0.3));
    js.push_back(says_b ? make(a, b, c) : make(a, c, b));
  }
  js.push_back(make(3, 4, 5));  // make sure the anchor below is judged
  kith::PickerInput in{&y, nullptr, &js};

  // beta: the maximum of sum log sigma(beta delta) (plus one agreeing and one disagreeing
  // pseudo-answer at the median |delta|), found here by a plain golden-section search.
  std::vector<double> delta, mag;
  for (const Judgment& j : js) {
    delta.push_back((y.row(j.anchor) - y.row(j.farther)).norm() - (y.row(j.anchor) - y.row(j.nearer)).norm());
    mag.push_back(std::abs(delta.back()));
  }
  std::sort(mag.begin(), mag.end());
  const double med = mag[mag.size() / 2];
  delta.push_back(med);
  delta.push_back(-med);
  auto loglik = [&](double beta) {
    double l = 0;
    for (double x : delta) l -= std::log1p(std::exp(-beta * x));
    return l;
  };
  double lo = 1e-3, hi = 100.0 / med;
  const double phi = 0.5 * (std::sqrt(5.0) - 1);
  for (int it = 0; it < 200; ++it) {
    const double m1 = hi - phi * (hi - lo), m2 = lo + phi * (hi - lo);
    (loglik(m1) < loglik(m2) ? lo : hi) = (loglik(m1) < loglik(m2) ? m1 : m2);
  }
  const double beta_slow = 0.5 * (lo + hi);
  kith::PickerOptions o;
  o.samples = 64;  // >= N - 1: every item is a place
  o.local_share = 0.0;
  kith::Picker picker(o);
  const double beta = picker.calibrated_beta(in);
  MESSAGE("beta " << beta << ", golden section " << beta_slow);
  constexpr double kBetaTol = 1e-4;  // relative; golden section stops at 1e-4 of the bracket or better
  CHECK(std::abs(beta - beta_slow) <= kBetaTol * beta_slow);

  constexpr double kInfoTol = 1e-9;  // the same sums in another order
  for (auto [b, c] : {std::pair<int32_t, int32_t>{4, 5}, {7, 30}, {12, 13}}) {
    const double calibrated = picker.information(in, 3, b, c);
    CHECK(std::abs(calibrated - slow_information(y, js, 3, b, c, true, 1.0, beta)) <= kInfoTol);
    kith::PickerOptions t = o;
    t.response = kith::PickerResponse::kTSTE;
    t.alpha = 2.0;
    kith::Picker tste(t);
    CHECK(std::abs(tste.information(in, 3, b, c) - slow_information(y, js, 3, b, c, false, 2.0, 1.0)) <= kInfoTol);
  }
}

TEST_CASE("pickers: scoring pairs on places resampled from the posterior keeps the questions informative") {
  // Fast path (48 places drawn from the posterior) against the slow one (every place): the
  // questions each asks carry, on average, nearly the same information, judged by the exact
  // (unthinned) information on the same map and judgments.
  const Points y = cloud(300, 31);
  std::mt19937_64 rng(32);
  std::uniform_int_distribution<int32_t> item(0, 299);
  std::vector<Judgment> js;
  while (js.size() < 900) {
    const int32_t a = item(rng), b = item(rng), c = item(rng);
    if (a == b || a == c || b == c) continue;
    const bool says_b = (y.row(a) - y.row(b)).norm() < (y.row(a) - y.row(c)).norm();
    js.push_back(says_b ? make(a, b, c) : make(a, c, b));
  }
  kith::PickerInput in{&y, nullptr, &js};
  kith::PickerOptions fast, slow;
  slow.scored_places = 0;
  kith::Picker pf(fast), ps(slow), judge;
  double info_fast = 0, info_slow = 0;
  for (int t = 0; t < 30; ++t) {
    const auto qf = pf.pair(in), qs = ps.pair(in);
    info_fast += judge.information(in, qf.anchor, qf.candidates[0], qf.candidates[1]);
    info_slow += judge.information(in, qs.anchor, qs.candidates[0], qs.candidates[1]);
  }
  MESSAGE("information of 30 questions: resampled places " << info_fast << ", all places " << info_slow);
  constexpr double kKeep = 0.85;  // rule of thumb: resampling may cost a little, not most, of the gain
  CHECK(info_fast >= kKeep * info_slow);
}
