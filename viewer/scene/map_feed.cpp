#include "viewer/scene/map_feed.h"

#include <cmath>

namespace kith {

StillFeed::StillFeed(std::vector<std::string> ids, Points positions) : current_(std::make_shared<Snapshot>()) {
  current_->ids = std::move(ids);
  current_->positions = std::move(positions);
  current_->pinned.assign(current_->ids.size(), 0);
  current_->generation = 1;
  current_->paused = true;
  current_->settled = true;
}

uint64_t StillFeed::post(CommandBody body) {
  std::lock_guard<std::mutex> lock(mutex_);
  auto next = std::make_shared<Snapshot>(*current_);
  const auto place = [&](int32_t item, const std::vector<double>& p) {
    if (item < 0 || item >= next->positions.rows()) return;
    for (Eigen::Index d = 0; d < next->positions.cols() && d < Eigen::Index(p.size()); ++d) next->positions(item, d) = p[d];
  };
  if (auto* pin = std::get_if<cmd::Pin>(&body)) {
    place(pin->item, pin->position);
    if (pin->item >= 0 && size_t(pin->item) < next->pinned.size()) next->pinned[pin->item] = 1;
  } else if (auto* unpin = std::get_if<cmd::Unpin>(&body)) {
    if (unpin->item >= 0 && size_t(unpin->item) < next->pinned.size()) next->pinned[unpin->item] = 0;
  } else if (auto* drag = std::get_if<cmd::DragTarget>(&body)) {
    place(drag->item, drag->position);
  }
  Command c;
  c.seq = next_seq_++;
  c.body = std::move(body);
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

namespace kith {

std::string RecordingFeed::prepare(CommandBody& body) {
  if (const std::string refused = inner_.prepare(body); !refused.empty()) return refused;
  return recorder_ ? recorder_(body) : std::string();
}

}  // namespace kith
