#include "viewer/session_link.h"

#include <chrono>
#include <cstdio>
#include <filesystem>

namespace kith {

namespace {
double now_seconds() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}
}  // namespace

SessionLink::SessionLink(const std::string& path) : path_(path) {
  store_ = SessionStore::open(path);
  collection_ = store_->collection();
  judgments_ = store_->judgments();
}

SessionLink::~SessionLink() {
  try {
    if (store_) store_->flush_checkpoints();
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith: the last map checkpoint was not written: %s\n", e.what());
  }
}

EngineOptions SessionLink::engine_options() const {
  const SessionSettings s = store_->settings();
  EngineOptions o;
  o.dims = s.dims;
  o.perplexity = s.perplexity;
  o.blend = s.blend;
  o.theta = s.theta;
  o.dof = s.dof;
  o.learning_rate = s.learning_rate;
  o.seed = s.seed;
  return o;
}

Points SessionLink::start() const {
  const auto c = store_->last_checkpoint();
  if (c && size_t(c->positions.rows()) == collection_.size()) return c->positions;
  return {};
}

void SessionLink::post_pins(MapFeed& feed) const {
  for (const SessionPin& p : store_->pins()) feed.post(cmd::Pin{p.item, p.position});
}

std::string SessionLink::record(CommandBody& body) {
  try {
    if (auto* a = std::get_if<cmd::AddJudgment>(&body)) {
      a->judgment.id = store_->add_judgment(a->judgment);
      judgments_.push_back(a->judgment);
    } else if (auto* r = std::get_if<cmd::RetractJudgment>(&body)) {
      store_->set_retracted(r->judgment_id, r->retracted);
    } else if (auto* p = std::get_if<cmd::Pin>(&body)) {
      std::vector<double> where = p->position;
      if (where.empty() && last_ && p->item < last_->positions.rows())
        for (Eigen::Index d = 0; d < last_->positions.cols(); ++d) where.push_back(last_->positions(p->item, d));
      if (!where.empty()) store_->set_pin(p->item, where);
    } else if (auto* u = std::get_if<cmd::Unpin>(&body)) {
      store_->remove_pin(u->item);
    } else if (auto* b = std::get_if<cmd::SetBlend>(&body)) {
      SessionSettings s = store_->settings();
      s.blend = b->blend;
      store_->set_settings(s);
    } else if (auto* pp = std::get_if<cmd::SetPerplexity>(&body)) {
      SessionSettings s = store_->settings();
      s.perplexity = pp->perplexity;
      store_->set_settings(s);
    } else if (auto* t = std::get_if<cmd::SetTheta>(&body)) {
      SessionSettings s = store_->settings();
      s.theta = t->theta;
      store_->set_settings(s);
    }
  } catch (const std::exception& e) {
    // Not written, so not done: the window does not post it and shows this message.
    const std::string message = "could not write to the session " + path_ + ": " + e.what();
    std::fprintf(stderr, "kith: %s\n", message.c_str());
    return message;
  }
  return "";
}

std::unique_ptr<MapFeed> SessionLink::recording(MapFeed& inner) {
  return std::make_unique<RecordingFeed>(inner, [this](CommandBody& body) { return record(body); });
}

WindowHooks SessionLink::hooks(WindowHooks base) {
  WindowHooks h = base;
  auto previous_snapshot = base.on_snapshot;
  h.on_snapshot = [this, previous_snapshot](const std::shared_ptr<const Snapshot>& s) {
    last_ = s;
    const double now = now_seconds();
    if (now - last_checkpoint_ > 5.0) {
      last_checkpoint_ = now;
      store_->post_checkpoint(s->positions, s->iteration);
    }
    if (previous_snapshot) previous_snapshot(s);
  };
  return h;
}

std::string SessionLink::title_state() const {
  return "session " + std::filesystem::path(path_).filename().string() + " (saved as you go)";
}

void SessionLink::final_checkpoint(const Snapshot& s) {
  try {
    store_->write_checkpoint(s.positions, s.iteration);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith: the last map checkpoint was not written: %s\n", e.what());
  }
}

}  // namespace kith
