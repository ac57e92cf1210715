// The live loop's threading (inbox, mailbox, worker, settling, heavy jobs, replay), checked with a
// stand-in model: a spring objective (each item pulled towards its own anchor point) and plain
// gradient descent, so that the threading is tested on its own, independent of the t-SNE solver.
#include <doctest/doctest.h>
#include <sys/resource.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <map>
#include <random>
#include <set>
#include <thread>

#include "solver/live/inbox.h"
#include "solver/live/live_loop.h"
#include "solver/live/mailbox.h"
#include "solver/objective/objective_term.h"

namespace kith {
namespace {

using namespace std::chrono_literals;

// E(Y) = 1/2 sum_i |y_i - a_i|^2 + 1/2 sum_{dragged i} |y_i - t_i|^2
class SpringTerm : public ObjectiveTerm {
 public:
  Points anchors;
  std::map<int32_t, Eigen::RowVector3d> drags;
  double evaluate(const Points& y, Points* g) override {
    Points d = y - anchors;
    double cost = 0.5 * d.squaredNorm();
    for (const auto& [i, t] : drags) {
      const Eigen::RowVector3d e = y.row(i) - t;
      cost += 0.5 * e.squaredNorm();
      d.row(i) += e;
    }
    if (g) *g = d;
    return cost;
  }
};

class StandInModel : public LiveModel {
 public:
  explicit StandInModel(int n, uint64_t seed = 7) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> gauss;
    term.anchors.resize(n, 3);
    y.resize(n, 3);
    for (int i = 0; i < n; ++i) {
      for (int c = 0; c < 3; ++c) {
        term.anchors(i, c) = 5 * gauss(rng);
        y(i, c) = gauss(rng);
      }
      ids.push_back("item" + std::to_string(next_id++));
    }
    pinned.assign(n, 0);
  }

  bool heavy(const CommandBody& b) const override {
    return std::holds_alternative<cmd::SetPerplexity>(b) || std::holds_alternative<cmd::InsertItems>(b);
  }
  bool reindexes(const CommandBody& b) const override {
    return std::holds_alternative<cmd::InsertItems>(b) || std::holds_alternative<cmd::RemoveItems>(b);
  }
  bool known(int32_t i) const { return i >= 0 && i < y.rows(); }

  std::string apply(const CommandBody& b) override {
    std::string error;
    std::visit(
        [&](const auto& c) {
          using T = std::decay_t<decltype(c)>;
          if constexpr (std::is_same_v<T, cmd::DragTarget>) {
            if (!known(c.item) || c.position.size() != 3) { error = "unknown item"; return; }
            term.drags[c.item] = Eigen::RowVector3d(c.position[0], c.position[1], c.position[2]);
          } else if constexpr (std::is_same_v<T, cmd::ClearDrag>) {
            if (!known(c.item)) { error = "unknown item"; return; }
            term.drags.erase(c.item);
          } else if constexpr (std::is_same_v<T, cmd::Pin>) {
            if (!known(c.item)) { error = "unknown item"; return; }
            if (c.position.size() == 3) y.row(c.item) << c.position[0], c.position[1], c.position[2];
            pinned[c.item] = 1;
          } else if constexpr (std::is_same_v<T, cmd::Unpin>) {
            if (!known(c.item)) { error = "unknown item"; return; }
            pinned[c.item] = 0;
          } else if constexpr (std::is_same_v<T, cmd::SetBlend>) {
            if (!(c.blend >= 0)) { error = "bad blend"; return; }
            blend = c.blend;
          } else if constexpr (std::is_same_v<T, cmd::RemoveItems>) {
            std::set<int32_t> gone(c.items.begin(), c.items.end());
            for (int32_t i : gone)
              if (!known(i)) { error = "unknown item"; return; }
            std::vector<int32_t> remap(y.rows(), -1);
            int32_t m = 0;
            for (int32_t i = 0; i < y.rows(); ++i)
              if (!gone.count(i)) remap[i] = m++;
            Points ny(m, 3), na(m, 3);
            std::vector<std::string> nids;
            std::vector<uint8_t> np;
            for (int32_t i = 0; i < y.rows(); ++i)
              if (remap[i] >= 0) {
                ny.row(remap[i]) = y.row(i);
                na.row(remap[i]) = term.anchors.row(i);
                nids.push_back(ids[i]);
                np.push_back(pinned[i]);
              }
            std::map<int32_t, Eigen::RowVector3d> nd;
            for (const auto& [i, t] : term.drags)
              if (remap[i] >= 0) nd[remap[i]] = t;
            y = ny, term.anchors = na, ids = nids, pinned = np, term.drags = nd;
          } else {
            ++ignored;  // judgments, theta...: accepted, no effect on the stand-in
          }
        },
        b);
    if (error.empty()) ++applied;
    return error;
  }

  Job prepare(const CommandBody& b, std::string* error) override {
    if (auto* p = std::get_if<cmd::SetPerplexity>(&b)) {
      if (!(p->perplexity > 0)) {
        *error = "perplexity must be > 0";
        return nullptr;
      }
      const double value = p->perplexity;
      const int ms = job_ms;
      return [this, value, ms]() -> Finish {
        std::this_thread::sleep_for(std::chrono::milliseconds(ms));
        const double scale = 1.0 + value / 100.0;  // computed off the worker, from captured input only
        return [this, value, scale] {
          perplexity = value;
          term.anchors *= scale / anchor_scale;
          anchor_scale = scale;
          ++applied;
        };
      };
    }
    const auto& c = std::get<cmd::InsertItems>(b);
    if (c.features.rows() != Eigen::Index(c.ids.size()) || c.features.cols() != 3) {
      *error = "insert: need one row of 3 features per id";
      return nullptr;
    }
    Points features = c.features;
    std::vector<std::string> new_ids = c.ids;
    const int ms = job_ms;
    return [this, features, new_ids, ms]() -> Finish {
      std::this_thread::sleep_for(std::chrono::milliseconds(ms));
      Points a = features * 2.0;
      return [this, a, new_ids] {
        const Eigen::Index n = y.rows(), m = a.rows();
        y.conservativeResize(n + m, 3);
        term.anchors.conservativeResize(n + m, 3);
        for (Eigen::Index i = 0; i < m; ++i) {
          term.anchors.row(n + i) = a.row(i) * anchor_scale;
          y.row(n + i) = a.row(i);
          ids.push_back(new_ids[i]);
          pinned.push_back(0);
        }
        ++applied;
      };
    };
  }

  StepReport step() override {
    Points g;
    StepReport r;
    r.cost = term.evaluate(y, &g);
    for (Eigen::Index i = 0; i < y.rows(); ++i)
      if (pinned[i]) g.row(i).setZero();
    const Points before = y;
    y -= 0.1 * g;
    const double radius = std::sqrt(y.squaredNorm() / std::max<Eigen::Index>(1, y.rows())) + 1e-12;
    r.movement = y.rows() ? (y - before).rowwise().norm().mean() / radius : 0.0;
    r.finite = y.allFinite();
    return r;
  }
  bool may_settle() const override { return true; }
  void fill(Snapshot& s) override {
    s.positions = y;
    s.ids = ids;
    s.pinned = pinned;
    s.neighbour_cost = term.evaluate(y, nullptr);
    s.health.kl = s.neighbour_cost;  // a stand-in figure for the health history
  }

  SpringTerm term;
  Points y;
  std::vector<std::string> ids;
  std::vector<uint8_t> pinned;
  double blend = 1, perplexity = 30, anchor_scale = 1.0;
  int next_id = 0;
  int job_ms = 5;
  uint64_t applied = 0, ignored = 0;
};

LiveLoopOptions quick_options() {
  LiveLoopOptions o;
  o.slow_after = 20;
  o.settle_after = 60;
  o.settle_tolerance = 1e-6;
  return o;
}

void check_consistent(const Snapshot& s) {
  REQUIRE(s.positions.cols() == 3);
  REQUIRE(size_t(s.positions.rows()) == s.ids.size());
  REQUIRE(s.pinned.size() == s.ids.size());
  REQUIRE(s.positions.allFinite());
  REQUIRE(std::isfinite(s.neighbour_cost));
}

template <typename Pred>
std::shared_ptr<const Snapshot> wait_for(const LiveLoop& loop, Pred pred, std::chrono::milliseconds limit = 10s) {
  const auto end = std::chrono::steady_clock::now() + limit;
  auto s = loop.latest();
  while (!pred(*s) && std::chrono::steady_clock::now() < end) {
    std::this_thread::sleep_for(1ms);
    s = loop.latest();
  }
  return s;
}

double process_cpu_seconds() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return u.ru_utime.tv_sec + u.ru_stime.tv_sec + 1e-6 * (u.ru_utime.tv_usec + u.ru_stime.tv_usec);
}

}  // namespace

TEST_CASE("engine loop: drag targets coalesce to the latest within a run of drags") {
  std::vector<Command> in;
  auto add = [&](CommandBody b) {
    Command c;
    c.seq = in.size() + 1;
    c.body = std::move(b);
    in.push_back(std::move(c));
  };
  add(cmd::DragTarget{1, {0, 0, 0}});  // 1: superseded by 3
  add(cmd::DragTarget{2, {0, 0, 0}});  // 2: kept (last of item 2 in the run)
  add(cmd::DragTarget{1, {1, 0, 0}});  // 3: kept
  add(cmd::ClearDrag{1});              // 4: breaks the run
  add(cmd::DragTarget{1, {2, 0, 0}});  // 5: kept (nothing later in its run)
  Inbox::Batch b = coalesce_drags(in);
  std::vector<uint64_t> kept, gone;
  for (auto& c : b.commands) kept.push_back(c.seq);
  for (auto& c : b.superseded) {
    gone.push_back(c.seq);
    CHECK(c.superseded);
  }
  CHECK(kept == std::vector<uint64_t>{2, 3, 4, 5});
  CHECK(gone == std::vector<uint64_t>{1});
}

TEST_CASE("engine loop: sequence numbers, mailbox and a first snapshot before start") {
  LiveLoop loop(std::make_unique<StandInModel>(20), quick_options());
  auto s0 = loop.latest();
  REQUIRE(s0);
  check_consistent(*s0);
  CHECK(s0->iteration == 0);
  CHECK(loop.post(cmd::SetBlend{2.0}) == 1);
  CHECK(loop.post(cmd::SetBlend{3.0}) == 2);
  loop.start();
  auto s = wait_for(loop, [](const Snapshot& s) { return s.last_command >= 2; });
  CHECK(s->last_command == 2);
  loop.stop();
  auto log = loop.command_log();
  REQUIRE(log.size() == 2);
  CHECK(log[0].seq == 1);
  CHECK(log[1].seq == 2);
  CHECK(log[0].iteration <= log[1].iteration);
}

TEST_CASE("engine loop: pause stops iterations, resume restarts them, commands still apply while paused") {
  LiveLoopOptions o = quick_options();
  o.settle_after = 1 << 30;
  o.slow_after = 1 << 30;
  o.settle_cap = 0;
  LiveLoop loop(std::make_unique<StandInModel>(50), o);
  loop.start();
  wait_for(loop, [](const Snapshot& s) { return s.iteration > 5; });
  const uint64_t p = loop.post(cmd::Pause{});
  auto s = wait_for(loop, [&](const Snapshot& s) { return s.last_command >= p; });
  REQUIRE(s->paused);
  const uint64_t it = s->iteration;
  std::this_thread::sleep_for(100ms);
  CHECK(loop.latest()->iteration == it);
  const uint64_t pin = loop.post(cmd::Pin{3, {1.5, 2.5, 3.5}});
  s = wait_for(loop, [&](const Snapshot& s) { return s.last_command >= pin; });
  CHECK(s->iteration == it);
  CHECK(s->pinned[3] == 1);
  CHECK(s->positions(3, 1) == 2.5);
  loop.post(cmd::Resume{});
  s = wait_for(loop, [&](const Snapshot& s) { return s.iteration > it + 10; });
  CHECK(s->iteration > it + 10);
  CHECK_FALSE(s->paused);
  // The pin holds exactly while everything else moves.
  CHECK(s->positions(3, 0) == 1.5);
  CHECK(s->positions(3, 1) == 2.5);
  CHECK(s->positions(3, 2) == 3.5);
}

TEST_CASE("engine loop: a converged loop settles, sleeps (< 5% of a core) and any command wakes it") {
  LiveLoop loop(std::make_unique<StandInModel>(200), quick_options());
  loop.start();
  auto s = wait_for(loop, [](const Snapshot& s) { return s.settled; });
  REQUIRE(s->settled);
  const uint64_t it = s->iteration;
  // Idle budget: under 5% of one core over 1.5 s of wall time (the target).
  const double cpu0 = process_cpu_seconds();
  const auto t0 = std::chrono::steady_clock::now();
  std::this_thread::sleep_for(1500ms);
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  const double cpu = process_cpu_seconds() - cpu0;
  CHECK(cpu / wall < 0.05);
  CHECK(loop.latest()->iteration == it);
  const uint64_t seq = loop.post(cmd::DragTarget{0, {10, 10, 10}});
  s = wait_for(loop, [&](const Snapshot& s) { return s.last_command >= seq && s.iteration > it; });
  CHECK_FALSE(s->settled);
  CHECK(s->iteration > it);
  // ... and settles again at the new equilibrium: halfway between anchor and drag target.
  s = wait_for(loop, [&](const Snapshot& s) { return s.settled && s.iteration > it; });
  REQUIRE(s->settled);
  loop.stop();
  const auto& m = static_cast<StandInModel&>(loop.model());
  const Eigen::RowVector3d expect = 0.5 * (m.term.anchors.row(0) + Eigen::RowVector3d(10, 10, 10));
  CHECK((s->positions.row(0) - expect).norm() < 1e-3);
}

TEST_CASE("engine loop: snapshots say how quiet the map is, the steps left before it settles, and carry the health over time") {
  LiveLoopOptions o = quick_options();
  o.slow_after = 20;
  o.settle_after = 300;  // about 1.5 s of quiet steps (5 ms apart once slowed down), so snapshots see them
  LiveLoop loop(std::make_unique<StandInModel>(200), o);
  CHECK(loop.latest()->history->samples.size() <= 1);  // the first snapshot, before any step
  loop.start();
  std::vector<std::shared_ptr<const Snapshot>> seen;
  const auto end = std::chrono::steady_clock::now() + 20s;
  while (std::chrono::steady_clock::now() < end) {
    auto s = loop.latest();
    if (seen.empty() || s->generation != seen.back()->generation) seen.push_back(s);
    if (s->settled) break;
    std::this_thread::sleep_for(1ms);
  }
  REQUIRE(seen.back()->settled);
  bool saw_quiet = false;
  uint64_t last_left = UINT64_MAX;
  for (const auto& s : seen) {
    CAPTURE(s->iteration);
    CHECK(s->quiet == (s->quiet_steps >= uint64_t(o.slow_after)));
    if (s->settled) {
      CHECK(s->steps_to_settle == 0);
      continue;
    }
    CHECK(s->steps_to_settle > 0);
    if (s->quiet_steps > 0) {
      // Quiet: exactly the quiet steps still needed (the cap of 3000 is far off).
      CHECK(s->quiet_steps + s->steps_to_settle == uint64_t(o.settle_after));
      CHECK(s->steps_to_settle <= last_left);  // counts down
      last_left = s->steps_to_settle;
    }
    saw_quiet |= s->quiet;
  }
  CHECK(saw_quiet);
  // The history: oldest first, steps increasing, capped, the newest at the settled step with its
  // figures; shared between snapshots that add no sample.
  const auto& last = *seen.back();
  const auto& h = last.history->samples;
  REQUIRE(h.size() >= 2);
  CHECK(h.size() <= HealthHistory::kMaxSamples);
  for (size_t k = 1; k < h.size(); ++k) CHECK(h[k].iteration > h[k - 1].iteration);
  CHECK(h.back().iteration == last.iteration);
  CHECK(h.back().figures.kl == last.health.kl);
  CHECK(h.front().figures.kl > h.back().figures.kl);  // the springs relax
  size_t shared = 0;
  for (size_t k = 1; k < seen.size(); ++k)
    if (seen[k]->history->samples.back().iteration == seen[k - 1]->history->samples.back().iteration) {
      CHECK(seen[k]->history == seen[k - 1]->history);
      ++shared;
    }
  CHECK(shared > 0);  // snapshots come every 16 ms, samples every 250 ms
  // Held: nothing to go.
  const uint64_t drag = loop.post(cmd::DragTarget{0, {10, 10, 10}});
  const uint64_t hold = loop.post(cmd::Pause{});
  auto s = wait_for(loop, [&](const Snapshot& s) { return s.last_command >= std::max(drag, hold); });
  REQUIRE(s->paused);
  CHECK(s->steps_to_settle == 0);
  loop.stop();
}

TEST_CASE("engine loop: a heavy command runs on the helper thread while the map keeps moving") {
  LiveLoopOptions o = quick_options();
  o.settle_cap = 0;
  o.settle_after = 1 << 30;
  auto model = std::make_unique<StandInModel>(30);
  model->job_ms = 300;
  LiveLoop loop(std::move(model), o);
  loop.start();
  wait_for(loop, [](const Snapshot& s) { return s.iteration > 2; });
  const uint64_t heavy = loop.post(cmd::SetPerplexity{50});
  const uint64_t blend = loop.post(cmd::SetBlend{0.5});
  auto s = wait_for(loop, [&](const Snapshot& s) { return s.last_command >= blend; });
  REQUIRE(s->last_command >= blend);
  CHECK(s->rebuilding);  // the light command went past the rebuild
  const uint64_t it = s->iteration;
  std::this_thread::sleep_for(100ms);
  s = loop.latest();
  CHECK(s->rebuilding);
  CHECK(s->iteration > it);  // still iterating
  // An insert (changes indices) and a pin of the new item posted meanwhile wait in order.
  const uint64_t insert = loop.post(cmd::InsertItems{{"new"}, Points::Constant(1, 3, 1.0)});
  const uint64_t pin = loop.post(cmd::Pin{30, {}});
  s = wait_for(loop, [&](const Snapshot& s) { return s.last_command >= pin; }, 20s);
  REQUIRE(s->positions.rows() == 31);
  CHECK(s->pinned[30] == 1);
  loop.stop();
  auto log = loop.command_log();
  std::map<uint64_t, Command> by_seq;
  for (auto& c : log) by_seq[c.seq] = c;
  CHECK(by_seq.at(heavy).rejected.empty());
  CHECK(by_seq.at(pin).rejected.empty());
  CHECK(by_seq.at(heavy).iteration > by_seq.at(blend).iteration);
  CHECK(by_seq.at(pin).iteration >= by_seq.at(insert).iteration);
  CHECK(static_cast<StandInModel&>(loop.model()).perplexity == 50);
}

TEST_CASE("engine loop: stress: posting threads and reading threads, every command once, replay identical") {
  LiveLoopOptions o = quick_options();
  o.settle_after = 40;
  auto live_model = std::make_unique<StandInModel>(60);
  StandInModel* live = live_model.get();
  LiveLoop loop(std::move(live_model), o);
  loop.start();

  std::atomic<bool> done{false};
  std::atomic<uint64_t> posted{0};
  std::atomic<int> bad_snapshots{0};
  std::vector<std::thread> writers, readers;
  for (int w = 0; w < 3; ++w)
    writers.emplace_back([&, w] {
      std::mt19937_64 rng(100 + w);
      std::uniform_real_distribution<double> u(-10, 10);
      int inserted = 0;
      while (!done) {
        // Keep the backlog bounded (the worker is much slower under ThreadSanitizer).
        if (loop.latest()->last_command + 400 < posted) {
          std::this_thread::sleep_for(1ms);
          continue;
        }
        const int n = int(loop.latest()->ids.size());
        const int32_t item = int32_t(rng() % (n + 3)) - 1;  // sometimes unknown: rejected
        switch (rng() % 12) {
          case 0: case 1: case 2: case 3:
            for (int k = 0; k < 4; ++k) loop.post(cmd::DragTarget{item, {u(rng), u(rng), u(rng)}}), ++posted;
            break;
          case 4: loop.post(cmd::ClearDrag{item}), ++posted; break;
          case 5: loop.post(cmd::Pin{item, {}}), ++posted; break;
          case 6: loop.post(cmd::Unpin{item}), ++posted; break;
          case 7: loop.post(cmd::SetBlend{u(rng)}), ++posted; break;  // negative ones are rejected
          case 8: loop.post(cmd::SetPerplexity{5 + std::abs(u(rng))}), ++posted; break;
          case 9:
            if (n < 90) {
              const std::string id = "w" + std::to_string(w) + "-" + std::to_string(inserted++);
              loop.post(cmd::InsertItems{{id}, Points::Constant(1, 3, u(rng))}), ++posted;
            }
            break;
          case 10:
            if (n > 40) loop.post(cmd::RemoveItems{{int32_t(rng() % n)}}), ++posted;
            break;
          default:
            loop.post(rng() % 2 ? CommandBody(cmd::Pause{}) : CommandBody(cmd::Resume{})), ++posted;
        }
        std::this_thread::sleep_for(std::chrono::microseconds(200 + rng() % 800));
      }
    });
  for (int r = 0; r < 2; ++r)
    readers.emplace_back([&] {
      uint64_t last_gen = 0, last_cmd = 0, last_it = 0;
      while (!done) {
        auto s = loop.latest();
        bool ok = s->positions.cols() == 3 && size_t(s->positions.rows()) == s->ids.size() &&
                  s->pinned.size() == s->ids.size() && s->positions.allFinite() && s->generation >= last_gen &&
                  s->last_command >= last_cmd && s->iteration >= last_it;
        if (!ok) ++bad_snapshots;
        last_gen = s->generation, last_cmd = s->last_command, last_it = s->iteration;
      }
    });
  std::this_thread::sleep_for(2500ms);
  done = true;
  for (auto& t : writers) t.join();
  for (auto& t : readers) t.join();
  const uint64_t total = posted;
  CHECK(bad_snapshots == 0);
  loop.post(cmd::Resume{});
  const uint64_t all = total + 1;
  const auto end = std::chrono::steady_clock::now() + 60s;
  while (loop.command_log().size() < all && std::chrono::steady_clock::now() < end) std::this_thread::sleep_for(5ms);
  loop.stop();
  const auto log = loop.command_log();
  const auto final_snapshot = loop.latest();
  check_consistent(*final_snapshot);

  // Every posted command appears exactly once, applied, rejected or superseded.
  REQUIRE(log.size() == all);
  std::set<uint64_t> seqs;
  uint64_t applied = 0, rejected = 0, superseded = 0, pause_resume = 0;
  for (size_t i = 0; i < log.size(); ++i) {
    seqs.insert(log[i].seq);
    if (i) CHECK(log[i].iteration >= log[i - 1].iteration);
    if (log[i].superseded) ++superseded;
    else if (!log[i].rejected.empty()) ++rejected;
    else if (std::holds_alternative<cmd::Pause>(log[i].body) || std::holds_alternative<cmd::Resume>(log[i].body)) ++pause_resume;
    else ++applied;
  }
  CHECK(seqs.size() == all);
  CHECK(*seqs.begin() == 1);
  CHECK(*seqs.rbegin() == all);
  // The model saw each applied command exactly once (nothing applied twice or lost).
  CHECK(live->applied + live->ignored == applied);
  MESSAGE("stress: " << all << " commands (" << applied << " applied, " << rejected << " rejected, " << superseded
                     << " superseded drags), " << final_snapshot->iteration << " iterations");
  CHECK(superseded > 0);
  CHECK(applied > 100);

  // Replay: same start, same log -> the identical map.
  LiveLoop again(std::make_unique<StandInModel>(60), o);
  again.replay(log, final_snapshot->iteration);
  const auto replayed = again.latest();
  REQUIRE(replayed->ids == final_snapshot->ids);
  CHECK(replayed->positions == final_snapshot->positions);
  CHECK(replayed->pinned == final_snapshot->pinned);
}

}  // namespace kith
