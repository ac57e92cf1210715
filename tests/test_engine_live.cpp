// The live engine with the real objective (t-SNE neighbour term + t-STE judgments): drags, pins,
// judgments and their retraction, inserted and removed items, replay, settling and idle CPU, and a
// multi-threaded stress run. Data: four Gaussian clusters in 10-D (invented, fixed seed).
#include <doctest/doctest.h>
#include <sys/resource.h>

#include <atomic>
#include <cmath>
#include <random>
#include <set>
#include <string>
#include <thread>
#include <variant>

#include "solver/live/engine.h"

namespace kith {
namespace {

using namespace std::chrono_literals;

constexpr int kClusters = 4;

Collection clusters(int per_cluster, uint64_t seed = 11, int features = 10) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> gauss;
  Collection c;
  c.features.resize(per_cluster * kClusters, features);
  for (int k = 0; k < kClusters; ++k)
    for (int i = 0; i < per_cluster; ++i) {
      const int row = k * per_cluster + i;
      for (int f = 0; f < features; ++f) c.features(row, f) = gauss(rng) + (f == k ? 8.0 : 0.0);
      c.ids.push_back("c" + std::to_string(k) + "-" + std::to_string(i));
    }
  return c;
}

EngineOptions test_options() {
  EngineOptions o;
  o.perplexity = 20;
  o.threads = 2;
  return o;
}

template <typename Pred>
std::shared_ptr<const Snapshot> wait_until(const Engine& e, Pred pred, std::chrono::milliseconds limit = 20s) {
  const auto end = std::chrono::steady_clock::now() + limit;
  auto s = e.latest();
  while (!pred(*s) && std::chrono::steady_clock::now() < end) {
    std::this_thread::sleep_for(1ms);
    s = e.latest();
  }
  return s;
}

double process_cpu_seconds() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return u.ru_utime.tv_sec + u.ru_stime.tv_sec + 1e-6 * (u.ru_utime.tv_usec + u.ru_stime.tv_usec);
}

Eigen::RowVectorXd centroid(const Points& y, int first, int count) {
  return y.middleRows(first, count).colwise().mean();
}

double radius(const Points& y) { return std::sqrt((y.rowwise() - y.colwise().mean()).squaredNorm() / double(y.rows())); }

}  // namespace

TEST_CASE("engine: bad options and bad commands are refused with a message") {
  Collection c = clusters(20);
  EngineOptions o = test_options();
  o.dims = 4;
  CHECK_THROWS_WITH_AS(Engine(c, o), doctest::Contains("dims"), std::invalid_argument);
  o = test_options();
  o.perplexity = 500;
  CHECK_THROWS_AS(Engine(c, o), std::invalid_argument);
  Engine e(c, test_options());
  e.start();
  const uint64_t a = e.post(cmd::Pin{1000, {}});
  const uint64_t b = e.post(cmd::DragTarget{3, {0.0, std::nan(""), 0.0}});
  const uint64_t d = e.post(cmd::SetBlend{-1});
  const uint64_t f = e.post(cmd::AddJudgment{Judgment{-1, 1, 1, 2}});
  auto s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= f; });
  e.stop();
  auto log = e.command_log();
  REQUIRE(log.size() == 4);
  CHECK(log[0].seq == a);
  CHECK(log[0].rejected.find("unknown") != std::string::npos);
  CHECK(log[1].seq == b);
  CHECK(log[1].rejected.find("finite") != std::string::npos);
  CHECK(log[2].seq == d);
  CHECK(!log[2].rejected.empty());
  CHECK(!log[3].rejected.empty());
  CHECK(e.latest()->positions.allFinite());
}

TEST_CASE("engine: a drag target moves the item there and holds it, a pin holds exactly") {
  Collection c = clusters(60);
  Engine e(c, test_options());
  e.start();
  auto s = wait_until(e, [](const Snapshot& s) { return s.iteration > 300; });
  REQUIRE(s->iteration > 300);
  const double r = radius(s->positions);
  // Drag item 0 (cluster 0) over to cluster 2's centre; pin item 70 (cluster 1) somewhere else.
  const Eigen::RowVectorXd target = centroid(s->positions, 120, 60);
  const std::vector<double> t(target.data(), target.data() + 3);
  const uint64_t drag = e.post(cmd::DragTarget{0, t});
  const std::vector<double> pin_at = {r, -r, 0.5 * r};
  e.post(cmd::Pin{70, pin_at});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command > drag; });
  const uint64_t it = s->iteration;
  s = wait_until(e, [&](const Snapshot& s) { return s.iteration > it + 200; });
  REQUIRE(s->iteration > it + 200);
  // Drag tolerance: a held drag is a temporary pin, so the item sits at the target to rounding.
  constexpr double kDragTolerance = 1e-12;
  CHECK((s->positions.row(0) - target).norm() <= kDragTolerance * (1 + target.norm()));
  CHECK(s->positions(70, 0) == pin_at[0]);  // exactly
  CHECK(s->positions(70, 1) == pin_at[1]);
  CHECK(s->positions(70, 2) == pin_at[2]);
  CHECK(s->pinned[70] == 1);
  CHECK(s->pinned[0] == 0);
  // Released, item 0 goes back towards its own cluster.
  const double away = (s->positions.row(0) - centroid(s->positions, 1, 59)).norm();
  const uint64_t clear = e.post(cmd::ClearDrag{0});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= clear; });
  const uint64_t it2 = s->iteration;
  s = wait_until(e, [&](const Snapshot& s) { return s.iteration > it2 + 300; });
  const double back = (s->positions.row(0) - centroid(s->positions, 1, 59)).norm();
  CHECK(back < 0.5 * away);
}

TEST_CASE("engine: a judgment bends the map, retracted, it stops acting") {
  Collection c = clusters(50);
  EngineOptions o = test_options();
  o.blend = 30;  // strong enough for one judgment to pull an item across (blend is normalized per touched item)
  Engine e(c, o);
  e.start();
  auto s = wait_until(e, [](const Snapshot& s) { return s.iteration > 400; });
  // Anchor 0 (cluster 0) "is more like" 60 (cluster 1) "than like" 1 (cluster 0): against the features.
  auto d2 = [](const Snapshot& s, int a, int b) { return (s.positions.row(a) - s.positions.row(b)).squaredNorm(); };
  REQUIRE(d2(*s, 0, 60) > d2(*s, 0, 1));
  Judgment j;
  j.id = 77;
  j.anchor = 0, j.nearer = 60, j.farther = 1;
  const uint64_t add = e.post(cmd::AddJudgment{j});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= add && s.health.judgment_agreement == 1.0; });
  CHECK(s->health.judgment_agreement == 1.0);
  CHECK(d2(*s, 0, 60) < d2(*s, 0, 1));
  CHECK(s->health.kl >= 0);  // exaggeration was not re-applied for the new judgment
  const uint64_t retract = e.post(cmd::RetractJudgment{77});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= retract; });
  CHECK(s->health.judgment_agreement == -1.0);  // no active judgment left
  const uint64_t it = s->iteration;
  s = wait_until(e, [&](const Snapshot& s) { return s.iteration > it + 400 || s.settled; }, 30s);
  CHECK(d2(*s, 0, 60) > d2(*s, 0, 1));  // back with its own cluster
  CHECK(s->judgment_cost == 0.0);
}

TEST_CASE("engine: every command alternative has a distinct, non-empty name") {
  std::set<std::string> names;
  for (const char* name : kCommandNames) {
    REQUIRE(name != nullptr);
    CHECK(std::string(name).size() > 0);
    names.insert(name);
  }
  CHECK(names.size() == std::variant_size_v<CommandBody>);  // distinct, one per alternative
  // command_name() reads the same table for a value of any alternative.
  CHECK(std::string(command_name(cmd::SetTheta{})) == "set-theta");
  CHECK(std::string(command_name(cmd::SetFeatures{})) == kCommandNames.back());
  CommandBody b = cmd::Pin{};
  CHECK(std::string(command_name(b)) == kCommandNames[b.index()]);
}

TEST_CASE("engine: the snapshot carries the judgment set and the parameters in force, and what it refused") {
  Collection c = clusters(20);  // 80 items
  Judgment j;
  j.id = 5, j.anchor = 3, j.nearer = 50, j.farther = 4;
  Engine e(c, test_options(), {j});
  e.start();
  auto s = wait_until(e, [](const Snapshot& s) { return s.iteration > 5; });
  REQUIRE(s->judgments != nullptr);
  REQUIRE(s->judgments->size() == 1);
  CHECK(s->judgments->find(5) != nullptr);
  CHECK(s->parameters.perplexity == 20.0);
  CHECK(s->parameters.blend == 1.0);
  CHECK(s->refusals.empty());
  // Unchanged judgments: the very same set in the next snapshots (publishing copies a pointer).
  const auto first_set = s->judgments;
  const uint64_t v0 = first_set->version();
  s = wait_until(e, [&](const Snapshot& t) { return t.iteration > s->iteration + 20; });
  CHECK(s->judgments.get() == first_set.get());

  // Added without an id: the next free one; a new set with a larger version.
  Judgment k;
  k.anchor = 70, k.nearer = 1, k.farther = 71;
  uint64_t seq = e.post(cmd::AddJudgment{k});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= seq; });
  REQUIRE(s->judgments->size() == 2);
  CHECK(s->judgments->all()[1].id == 6);
  CHECK(s->judgments->version() > v0);
  CHECK(first_set->size() == 1);  // an earlier set is never changed
  const uint64_t v1 = s->judgments->version();
  // Retracted, then restored: a new version each time.
  seq = e.post(cmd::RetractJudgment{5, true});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= seq; });
  CHECK(s->judgments->find(5)->retracted);
  CHECK(s->judgments->active() == 1);
  const uint64_t v2 = s->judgments->version();
  CHECK(v2 > v1);
  seq = e.post(cmd::RetractJudgment{5, false});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= seq; });
  CHECK_FALSE(s->judgments->find(5)->retracted);
  CHECK(s->judgments->active() == 2);
  CHECK(s->judgments->version() > v2);

  // Settings: each one in force as soon as it is taken; the perplexity once its rebuild is in.
  e.post(cmd::SetBlend{3.0});
  e.post(cmd::SetTheta{0.8});
  e.post(cmd::SetLearningRate{50.0});
  seq = e.post(cmd::SetExaggeration{2.0});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= seq; });
  CHECK(s->parameters.blend == 3.0);
  CHECK(s->parameters.theta == 0.8);
  CHECK(s->parameters.learning_rate == 50.0);
  CHECK(s->parameters.exaggeration == 2.0);
  seq = e.post(cmd::SetPerplexity{10.0});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= seq && !t.rebuilding; });
  CHECK(s->parameters.perplexity == 10.0);
  CHECK(s->refusals.empty());

  // Refused: listed with the command's name and MapParameters' reason; nothing changes.
  const uint64_t bad_theta = e.post(cmd::SetTheta{9.99});
  const uint64_t bad_perplexity = e.post(cmd::SetPerplexity{80.0});  // not below the 80 items
  const uint64_t bad_retract = e.post(cmd::RetractJudgment{999});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= bad_retract && !t.rebuilding; });
  REQUIRE(s->refusals.size() == 3);
  CHECK(s->refusals[0].seq == bad_theta);
  CHECK(s->refusals[0].command == "set-theta");
  CHECK(s->refusals[0].reason == MapParameters::check_theta(9.99));
  CHECK(s->refusals[1].seq == bad_perplexity);
  CHECK(s->refusals[1].command == "set-perplexity");
  CHECK(s->refusals[1].reason == MapParameters::check_perplexity(80.0, 80));
  CHECK(s->refusals[2].command == "retract-judgment");
  CHECK(s->refusals[2].reason == "judgment 999 is unknown");
  CHECK(s->last_rejected == s->refusals[2].reason);
  CHECK(s->parameters.theta == 0.8);
  CHECK(s->parameters.perplexity == 10.0);
  CHECK(s->judgments->active() == 2);
  // Only the last few are kept, oldest first.
  uint64_t last = 0;
  for (int r = 0; r < 10; ++r) last = e.post(cmd::SetBlend{-1.0 - r});
  s = wait_until(e, [&](const Snapshot& t) { return t.last_command >= last; });
  REQUIRE(s->refusals.size() == Snapshot::kMaxRefusals);
  CHECK(s->refusals.back().seq == last);
  CHECK(s->refusals.front().seq == last - Snapshot::kMaxRefusals + 1);
  CHECK(s->parameters.blend == 3.0);
  e.stop();
}

TEST_CASE("engine: snapshots carry trustworthiness and neighbour recall, measured now and then") {
  Collection c = clusters(40);
  Engine e(c, test_options());
  e.start();
  // Generous limits: on a loaded machine the first figures may take a while; none is a timing.
  auto s = wait_until(e, [](const Snapshot& s) { return s.health.trustworthiness >= 0.0; }, 120s);
  REQUIRE(s->health.trustworthiness >= 0.0);
  // Four well-separated clusters: once past early exaggeration, the map keeps most neighbours.
  // (0.9 and 0.3 are common-practice floors for such data, not figures from a source.)
  s = wait_until(e, [](const Snapshot& s) { return s.settled || s.iteration > 600; }, 120s);
  const double first = s->health.trustworthiness;
  const auto measured_after = std::chrono::steady_clock::now();
  // A measurement made after that point: the figures are refreshed every few seconds.
  s = wait_until(
      e, [&](const Snapshot& x) {
        return x.settled || (std::chrono::steady_clock::now() - measured_after > 5s &&
                             x.health.trustworthiness != first);
      },
      60s);
  CHECK(s->health.trustworthiness > 0.9);
  CHECK(s->health.trustworthiness <= 1.0);
  CHECK(s->health.neighbour_recall > 0.3);
  CHECK(s->health.neighbour_recall <= 1.0);
}

TEST_CASE("engine: a converged engine settles and idles under 5% of a core, a command wakes it") {
  Collection c = clusters(40);
  EngineOptions o = test_options();
  o.settle_cap = 1500;
  Engine e(c, o);
  e.start();
  auto s = wait_until(e, [](const Snapshot& s) { return s.settled; }, 60s);
  REQUIRE(s->settled);
  const uint64_t it = s->iteration;
  const double cpu0 = process_cpu_seconds();
  const auto t0 = std::chrono::steady_clock::now();
  std::this_thread::sleep_for(2s);
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  const double share = (process_cpu_seconds() - cpu0) / wall;
  MESSAGE("idle engine: " << 100 * share << "% of a core after settling at iteration " << it);
  CHECK(share < 0.05);  // the target
  CHECK(e.latest()->iteration == it);
  const uint64_t seq = e.post(cmd::SetBlend{2.0});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= seq && s.iteration > it; });
  CHECK(s->iteration > it);
}

TEST_CASE("engine: inserted items start among their neighbours and settle without disturbing the rest") {
  Collection c = clusters(50);
  Engine e(c, test_options());
  e.start();
  auto s = wait_until(e, [](const Snapshot& s) { return s.iteration > 400; });
  // Three new items whose features lie in cluster 2.
  std::mt19937_64 rng(5);
  std::normal_distribution<double> gauss;
  Points extra(3, 10);
  for (int i = 0; i < 3; ++i)
    for (int f = 0; f < 10; ++f) extra(i, f) = gauss(rng) + (f == 2 ? 8.0 : 0.0);
  const uint64_t pause = e.post(cmd::Pause{});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= pause; });
  const Points before = s->positions;
  const uint64_t ins = e.post(cmd::InsertItems{{"new-a", "new-b", "new-c"}, extra});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= ins && !s.rebuilding; });
  REQUIRE(s->positions.rows() == 203);
  CHECK(s->ids[201] == "new-b");
  const Eigen::RowVectorXd home = centroid(s->positions, 100, 50);
  const double cluster_radius = std::sqrt((s->positions.middleRows(100, 50).rowwise() - home).squaredNorm() / 50.0);
  for (int i = 200; i < 203; ++i) CHECK((s->positions.row(i) - home).norm() < 2.0 * cluster_radius);
  e.post(cmd::Resume{});
  const uint64_t it = s->iteration;
  s = wait_until(e, [&](const Snapshot& s) { return s.iteration >= it + 60; });
  REQUIRE(s->iteration >= it + 60);
  if (s->iteration < it + 100) CHECK(s->positions.topRows(200) == before);  // the rest held while they settle
  for (int i = 200; i < 203; ++i) CHECK((s->positions.row(i) - home).norm() < 2.0 * cluster_radius);
  // Removing items renumbers the rest.
  const uint64_t rm = e.post(cmd::RemoveItems{{0, 201}});
  s = wait_until(e, [&](const Snapshot& s) { return s.last_command >= rm; });
  CHECK(s->positions.rows() == 201);
  CHECK(s->ids[0] == "c0-1");
  CHECK(s->ids[199] == "new-a");
  CHECK(s->ids[200] == "new-c");
  CHECK(s->positions.allFinite());
}

TEST_CASE("engine: replay of the recorded command log gives the identical map") {
  Collection c = clusters(40);
  EngineOptions o = test_options();
  Judgment j;
  j.id = 5, j.anchor = 3, j.nearer = 50, j.farther = 4;
  Engine live(c, o, {j});
  live.start();
  auto s = wait_until(live, [](const Snapshot& s) { return s.iteration > 100; });
  live.post(cmd::DragTarget{7, {1.0, 2.0, 3.0}});
  live.post(cmd::DragTarget{7, {2.0, 2.0, 3.0}});
  live.post(cmd::Pin{9, {}});
  live.post(cmd::SetBlend{3.0});
  s = wait_until(live, [](const Snapshot& s) { return s.iteration > 300; });
  live.post(cmd::SetPerplexity{10});
  live.post(cmd::ClearDrag{7});
  Judgment k;
  k.anchor = 80, k.nearer = 1, k.farther = 81;
  live.post(cmd::AddJudgment{k});
  live.post(cmd::RetractJudgment{5});
  Points extra = c.features.topRows(2).array() + 0.1;
  live.post(cmd::InsertItems{{"x1", "x2"}, extra});
  const uint64_t last = live.post(cmd::RemoveItems{{2}});
  s = wait_until(live, [&](const Snapshot& s) { return s.last_command >= last && !s.rebuilding; });
  s = wait_until(live, [&](const Snapshot& s) { return s.iteration > 700; });
  live.stop();
  const auto final_snapshot = live.latest();
  const auto log = live.command_log();
  REQUIRE(log.size() == 10);
  for (const Command& cmd : log) CHECK_MESSAGE(cmd.rejected.empty(), cmd.seq << ": " << cmd.rejected);

  Engine again(c, o, {j});
  again.replay(log, final_snapshot->iteration);
  const auto replayed = again.latest();
  CHECK(replayed->iteration == final_snapshot->iteration);
  REQUIRE(replayed->ids == final_snapshot->ids);
  CHECK(replayed->positions == final_snapshot->positions);  // bit for bit
  CHECK(replayed->pinned == final_snapshot->pinned);
}

TEST_CASE("engine: stress with the real objective: random commands from several threads, readers check snapshots") {
  Collection c = clusters(40);
  Engine e(c, test_options());
  e.start();
  std::atomic<bool> done{false};
  std::atomic<uint64_t> posted{0};
  std::atomic<int> bad{0};
  std::vector<std::thread> threads;
  for (int w = 0; w < 3; ++w)
    threads.emplace_back([&, w] {
      std::mt19937_64 rng(w + 1);
      std::uniform_real_distribution<double> u(-20, 20);
      int made = 0;
      while (!done) {
        // Keep the backlog bounded (the worker is much slower under ThreadSanitizer).
        if (e.latest()->last_command + 100 < posted) {
          std::this_thread::sleep_for(1ms);
          continue;
        }
        const int n = int(e.latest()->ids.size());
        const int32_t item = int32_t(rng() % size_t(n));
        switch (rng() % 10) {
          case 0: case 1: case 2: e.post(cmd::DragTarget{item, {u(rng), u(rng), u(rng)}}); break;
          case 3: e.post(cmd::ClearDrag{item}); break;
          case 4: e.post(rng() % 2 ? CommandBody(cmd::Pin{item, {}}) : CommandBody(cmd::Unpin{item})); break;
          case 5: {
            Judgment j;
            j.anchor = item, j.nearer = int32_t(rng() % size_t(n)), j.farther = int32_t(rng() % size_t(n));
            e.post(cmd::AddJudgment{j});  // sometimes invalid (repeated item): rejected
            break;
          }
          case 6: e.post(cmd::SetBlend{std::abs(u(rng)) / 4}); break;
          case 7: e.post(cmd::SetPerplexity{5 + std::abs(u(rng)) / 2}); break;
          case 8:
            if (n < 200) e.post(cmd::InsertItems{{"s" + std::to_string(w) + "-" + std::to_string(made++)}, c.features.row(item % 160)});
            else e.post(cmd::RemoveItems{{item}});
            break;
          default: e.post(cmd::SetTheta{0.3 + 0.1 * double(rng() % 5)});
        }
        ++posted;
        std::this_thread::sleep_for(std::chrono::microseconds(500 + rng() % 3000));
      }
    });
  for (int r = 0; r < 2; ++r)
    threads.emplace_back([&] {
      uint64_t gen = 0;
      while (!done) {
        auto s = e.latest();
        const bool ok = size_t(s->positions.rows()) == s->ids.size() && s->pinned.size() == s->ids.size() &&
                        s->positions.cols() == 3 && s->positions.allFinite() && s->generation >= gen &&
                        std::isfinite(s->neighbour_cost) && std::isfinite(s->judgment_cost);
        if (!ok) ++bad;
        gen = s->generation;
        std::this_thread::sleep_for(200us);
      }
    });
  std::this_thread::sleep_for(3s);
  done = true;
  for (auto& t : threads) t.join();
  const uint64_t total = posted;
  const auto end = std::chrono::steady_clock::now() + 60s;
  while (e.command_log().size() < total && std::chrono::steady_clock::now() < end) std::this_thread::sleep_for(5ms);
  e.stop();
  CHECK(bad == 0);
  const auto log = e.command_log();
  REQUIRE(log.size() == total);
  std::set<uint64_t> seqs;
  size_t rejected = 0;
  for (const Command& c : log) {
    seqs.insert(c.seq);
    rejected += !c.rejected.empty();
  }
  CHECK(seqs.size() == total);
  CHECK(*seqs.rbegin() == total);
  MESSAGE("real-engine stress: " << total << " commands, " << rejected << " rejected, " << e.latest()->iteration
                                 << " iterations");
  CHECK(e.latest()->positions.allFinite());
}

}  // namespace kith
