#include "solver/live/live_loop.h"

#include <algorithm>
#include <cstdint>
#include <stdexcept>
#include <utility>

namespace kith {

namespace {
using Clock = std::chrono::steady_clock;

bool is_pause(const CommandBody& b) { return std::holds_alternative<cmd::Pause>(b); }
bool is_resume(const CommandBody& b) { return std::holds_alternative<cmd::Resume>(b); }
}  // namespace

LiveLoop::LiveLoop(std::unique_ptr<LiveModel> model, LiveLoopOptions options)
    : model_(std::move(model)), options_(options) {
  paused_ = options_.start_paused;
  publish();
}

LiveLoop::~LiveLoop() { stop(); }

void LiveLoop::start() {
  if (worker_.joinable()) return;
  stop_ = false;
  worker_ = std::thread([this] { run(); });
}

void LiveLoop::stop() {
  stop_ = true;
  inbox_.wake();
  if (worker_.joinable()) worker_.join();
  join_helper();
}

void LiveLoop::join_helper() {
  if (flight_ && flight_->thread.joinable()) flight_->thread.join();
  // An unfinished rebuild is dropped: its command was never applied and is not in the log.
  flight_.reset();
}

std::vector<Command> LiveLoop::command_log() const {
  std::lock_guard<std::mutex> lock(log_mutex_);
  return log_;
}

void LiveLoop::log(Command c) {
  if (c.seq > last_command_) last_command_ = c.seq;
  if (!c.rejected.empty()) {
    last_rejected_ = c.rejected;
    refusals_.push_back(Refusal{c.seq, command_name(c.body), c.rejected});
    if (refusals_.size() > Snapshot::kMaxRefusals) refusals_.erase(refusals_.begin());
  }
  std::lock_guard<std::mutex> lock(log_mutex_);
  log_.push_back(std::move(c));
}

void LiveLoop::publish() {
  auto s = std::make_shared<Snapshot>();
  s->iteration = iteration_;
  s->last_command = last_command_;
  s->generation = ++generation_;
  s->iterations_per_second = seconds_per_iteration_ > 0 ? 1.0 / seconds_per_iteration_ : 0.0;
  s->movement = movement_;
  s->paused = paused_;
  s->settled = settled_;
  s->rebuilding = flight_ != nullptr;
  s->waiting_commands = pending_.size();
  s->last_rejected = last_rejected_;
  s->refusals = refusals_;
  s->quiet_steps = uint64_t(quiet_);
  s->quiet = quiet_ >= options_.slow_after;
  s->steps_to_settle = steps_to_settle();
  model_->fill(*s);  // the model may look at the loop's fields (e.g. settled)
  record_health(*s);
  s->history = history_;
  mailbox_.publish(std::move(s));
  last_publish_ = Clock::now();
}

uint64_t LiveLoop::steps_to_settle() const {
  if (paused_ || settled_) return 0;
  const uint64_t cap = options_.settle_cap > 0 && since_command_ < options_.settle_cap
                           ? options_.settle_cap - since_command_
                           : (options_.settle_cap > 0 ? 0 : UINT64_MAX);
  // Quiet now: the quiet steps still needed (the map rarely wakes again without a command).
  if (quiet_ > 0 && quiet_ < options_.settle_after) return std::min<uint64_t>(cap, uint64_t(options_.settle_after - quiet_));
  return cap == UINT64_MAX ? uint64_t(options_.settle_after) : cap;
}

void LiveLoop::record_health(const Snapshot& s) {
  const auto now = Clock::now();
  const auto& old = history_->samples;
  if (!old.empty() && old.back().iteration == s.iteration) return;  // nothing new since the last sample
  const bool due = old.empty() || s.settled ||
                   now - last_sample_ >= std::chrono::duration<double>(HealthHistory::kSampleSeconds);
  if (!due) return;
  auto next = std::make_shared<HealthHistory>();
  const size_t keep = std::min(old.size(), HealthHistory::kMaxSamples - 1);
  next->samples.assign(old.end() - std::ptrdiff_t(keep), old.end());
  next->samples.push_back(HealthSample{s.iteration, s.health});
  history_ = std::move(next);
  last_sample_ = now;
}

// ==== the worker ============================================================================

void LiveLoop::run() {
  const auto interval = std::chrono::duration<double, std::milli>(options_.publish_interval_ms);
  const auto slow_sleep =
      std::chrono::duration_cast<std::chrono::microseconds>(std::chrono::duration<double, std::milli>(options_.slow_sleep_ms));
  while (!stop_) {
    if (paused_ || settled_) inbox_.wait();  // any command, a finished rebuild or stop() wakes it
    if (stop_) break;
    if (top_of_iteration()) {
      since_command_ = 0;
      quiet_ = 0;
      settled_ = false;
      publish();
    }
    if (paused_ || settled_ || stop_) continue;

    const auto t0 = Clock::now();
    const StepReport r = model_->step();
    ++iteration_;
    ++since_command_;
    const double dt = std::chrono::duration<double>(Clock::now() - t0).count();
    seconds_per_iteration_ = seconds_per_iteration_ == 0.0 ? dt : 0.9 * seconds_per_iteration_ + 0.1 * dt;

    movement_ = r.movement;
    quiet_ = (r.finite && r.movement < options_.settle_tolerance) ? quiet_ + 1 : 0;
    if (model_->may_settle() &&
        (quiet_ >= options_.settle_after || (options_.settle_cap > 0 && since_command_ >= options_.settle_cap))) {
      settled_ = true;
      publish();
      continue;
    }
    if (Clock::now() - last_publish_ >= interval) publish();
    if (quiet_ >= options_.slow_after && model_->may_settle()) inbox_.wait_for(slow_sleep);
  }
  publish();
}

bool LiveLoop::top_of_iteration() {
  bool changed = false;
  Inbox::Batch batch = inbox_.take();
  for (Command& c : batch.superseded) {
    c.iteration = iteration_;
    log(std::move(c));
    changed = true;
  }
  for (Command& c : batch.commands) pending_.push_back(std::move(c));

  if (flight_) {
    bool done = false;
    LiveModel::Finish finish;
    std::string error;
    {
      std::lock_guard<std::mutex> lock(flight_->mutex);
      done = flight_->done;
      if (done) {
        finish = std::move(flight_->finish);
        error = std::move(flight_->error);
      }
    }
    if (done) {
      flight_->thread.join();
      Command c = std::move(flight_->command);
      flight_.reset();
      c.iteration = iteration_;
      if (finish)
        finish();
      else
        c.rejected = error.empty() ? "the rebuild failed" : error;
      log(std::move(c));
      changed = true;
    }
  }
  if (!pending_.empty()) process_pending(&changed);
  return changed;
}

void LiveLoop::process_pending(bool* changed) {
  std::vector<Command> keep;
  // While an index-changing command waits or is being rebuilt, everything after it waits too.
  bool blocked = flight_ && model_->reindexes(flight_->command.body);
  for (Command& c : pending_) {
    if (blocked) {
      keep.push_back(std::move(c));
      continue;
    }
    c.iteration = iteration_;
    if (is_pause(c.body) || is_resume(c.body)) {
      paused_ = is_pause(c.body);
      log(std::move(c));
      *changed = true;
      continue;
    }
    const bool heavy = model_->heavy(c.body);
    const bool reindexes = model_->reindexes(c.body);
    if (flight_ && (heavy || reindexes)) {
      blocked = reindexes;
      // A waiting heavy command is superseded by a later one of the same kind (a perplexity slider
      // moved on): only the newest is rebuilt. Nothing that changes indices lies between them.
      if (heavy && !reindexes && !keep.empty() && keep.back().body.index() == c.body.index()) {
        keep.back().superseded = true;
        keep.back().iteration = iteration_;
        log(std::move(keep.back()));
        keep.pop_back();
        *changed = true;
      }
      keep.push_back(std::move(c));
      continue;
    }
    if (heavy) {
      std::string error;
      LiveModel::Job job = model_->prepare(c.body, &error);
      if (!job) {
        c.rejected = error.empty() ? "rejected" : error;
        log(std::move(c));
        *changed = true;
        continue;
      }
      flight_ = std::make_unique<Flight>();
      flight_->command = std::move(c);
      Flight* f = flight_.get();
      f->thread = std::thread([this, f, job = std::move(job)]() {
        LiveModel::Finish finish;
        std::string error;
        try {
          finish = job();
        } catch (const std::exception& e) {
          error = e.what();
        }
        {
          std::lock_guard<std::mutex> lock(f->mutex);
          f->finish = std::move(finish);
          f->error = std::move(error);
          f->done = true;
        }
        inbox_.wake();
      });
      blocked = reindexes;
      *changed = true;  // the snapshot shows the rebuild
      continue;
    }
    c.rejected = model_->apply(c.body);
    log(std::move(c));
    *changed = true;
  }
  pending_ = std::move(keep);
}

// ==== replay ================================================================================

void LiveLoop::replay(const std::vector<Command>& entries, uint64_t iterations) {
  if (worker_.joinable()) throw std::logic_error("replay: the worker is running; stop() it first");
  for (size_t i = 1; i < entries.size(); ++i)
    if (entries[i].iteration < entries[i - 1].iteration)
      throw std::invalid_argument("replay: log entry " + std::to_string(i) + " (command " +
                                  std::to_string(entries[i].seq) + ") goes back in iterations");
  size_t k = 0;
  while (k < entries.size() && entries[k].iteration < iteration_) ++k;  // already past
  for (;;) {
    while (k < entries.size() && entries[k].iteration == iteration_) {
      Command c = entries[k++];
      if (c.superseded || !c.rejected.empty()) {
        log(std::move(c));
        continue;
      }
      std::string error;
      if (is_pause(c.body) || is_resume(c.body)) {
        paused_ = is_pause(c.body);
      } else if (model_->heavy(c.body)) {
        LiveModel::Job job = model_->prepare(c.body, &error);
        if (job) {
          LiveModel::Finish finish = job();
          if (finish) finish();
          else error = "the rebuild failed";
        }
      } else {
        error = model_->apply(c.body);
      }
      if (!error.empty())
        throw std::runtime_error("replay: command " + std::to_string(c.seq) + " at iteration " +
                                 std::to_string(c.iteration) + " was applied in the log but fails now: " + error);
      log(std::move(c));
    }
    if (iteration_ >= iterations) break;
    model_->step();
    ++iteration_;
  }
  publish();
}

}  // namespace kith
