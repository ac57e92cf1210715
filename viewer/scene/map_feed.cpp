#include "viewer/scene/map_feed.h"

#include <algorithm>
#include <cmath>

namespace kith {

std::string MapFeed::prepare(CommandBody& body) {
  const auto s = latest();
  if (std::string e = setting_problem(body, s ? s->ids.size() : 0); !e.empty()) return e;
  if (auto* a = std::get_if<cmd::AddJudgment>(&body); a && a->judgment.id < 0) {
    if (s) next_judgment_id_ = std::max(next_judgment_id_, s->judgments->next_id());
    a->judgment.id = next_judgment_id_++;
  }
  return record(body);
}

StillFeed::StillFeed(std::vector<std::string> ids, Points positions, std::vector<Judgment> judgments,
                     MapParameters parameters)
    : current_(std::make_shared<Snapshot>()) {
  current_->ids = std::move(ids);
  current_->positions = std::move(positions);
  current_->pinned.assign(current_->ids.size(), 0);
  current_->judgments = std::make_shared<const JudgmentSet>(std::move(judgments), 1);
  current_->parameters = parameters;
  current_->generation = 1;
  current_->paused = true;
  current_->settled = true;
}

std::string StillFeed::apply(const CommandBody& body, Snapshot& next) {
  const size_t n = next.ids.size();
  if (std::string e = setting_problem(body, n); !e.empty()) return e;
  const auto place = [&](int32_t item, const std::vector<double>& p) {
    if (item < 0 || item >= next.positions.rows()) return;
    for (Eigen::Index d = 0; d < next.positions.cols() && d < Eigen::Index(p.size()); ++d) next.positions(item, d) = p[d];
  };
  if (auto* pin = std::get_if<cmd::Pin>(&body)) {
    place(pin->item, pin->position);
    if (pin->item >= 0 && size_t(pin->item) < next.pinned.size()) next.pinned[pin->item] = 1;
  } else if (auto* unpin = std::get_if<cmd::Unpin>(&body)) {
    if (unpin->item >= 0 && size_t(unpin->item) < next.pinned.size()) next.pinned[unpin->item] = 0;
  } else if (auto* drag = std::get_if<cmd::DragTarget>(&body)) {
    place(drag->item, drag->position);
  } else if (auto* add = std::get_if<cmd::AddJudgment>(&body)) {
    if (std::string e = judgment_problem(add->judgment, n); !e.empty()) return "judgment: " + e;
    std::vector<Judgment> all = next.judgments->all();
    all.push_back(add->judgment);
    if (all.back().id < 0) all.back().id = next.judgments->next_id();
    next.judgments = std::make_shared<const JudgmentSet>(std::move(all), next.judgments->version() + 1);
  } else if (auto* r = std::get_if<cmd::RetractJudgment>(&body)) {
    if (!next.judgments->find(r->judgment_id)) return "judgment " + std::to_string(r->judgment_id) + " is unknown";
    std::vector<Judgment> all = next.judgments->all();
    for (Judgment& j : all)
      if (j.id == r->judgment_id) j.retracted = r->retracted;
    next.judgments = std::make_shared<const JudgmentSet>(std::move(all), next.judgments->version() + 1);
  } else if (auto* b = std::get_if<cmd::SetBlend>(&body)) {
    next.parameters.blend = b->blend;
  } else if (auto* t = std::get_if<cmd::SetTheta>(&body)) {
    next.parameters.theta = t->theta;
  } else if (auto* l = std::get_if<cmd::SetLearningRate>(&body)) {
    next.parameters.learning_rate = l->learning_rate;
  } else if (auto* x = std::get_if<cmd::SetExaggeration>(&body)) {
    next.parameters.exaggeration = x->exaggeration;
  } else if (auto* p = std::get_if<cmd::SetPerplexity>(&body)) {
    next.parameters.perplexity = p->perplexity;
  }
  return "";
}

uint64_t StillFeed::post(CommandBody body) {
  std::lock_guard<std::mutex> lock(mutex_);
  auto next = std::make_shared<Snapshot>(*current_);
  Command c;
  c.seq = next_seq_++;
  c.rejected = apply(body, *next);
  c.body = std::move(body);
  if (!c.rejected.empty()) {
    next = std::make_shared<Snapshot>(*current_);  // a refused command changes nothing
    next->last_rejected = c.rejected;
    next->refusals.push_back(Refusal{c.seq, command_name(c.body), c.rejected});
    if (next->refusals.size() > Snapshot::kMaxRefusals) next->refusals.erase(next->refusals.begin());
  }
  log_.push_back(c);
  next->last_command = c.seq;
  next->generation = current_->generation + 1;
  current_ = next;
  return c.seq;
}

std::shared_ptr<const Snapshot> StillFeed::latest() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return current_;
}

std::vector<Command> StillFeed::command_log() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return log_;
}

Points rough_positions(const Collection& collection) {
  const Eigen::Index n = Eigen::Index(collection.size());
  Points y = Points::Zero(n, 3);
  const Eigen::Index f = std::min<Eigen::Index>(3, collection.features.cols());
  for (Eigen::Index d = 0; d < f; ++d) {
    const auto col = collection.features.col(d);
    const double mean = col.mean();
    const double sd = std::sqrt((col.array() - mean).square().mean());
    for (Eigen::Index i = 0; i < n; ++i) y(i, d) = sd > 0 ? (col(i) - mean) / sd * 5.0 : 0.0;
  }
  return y;
}

}  // namespace kith

