#include "viewer/scene/undo_feed.h"

#include <algorithm>

namespace kith {

namespace {

std::vector<double> position_of(const Snapshot& s, int32_t item) {
  std::vector<double> p;
  if (item < 0 || item >= s.positions.rows()) return p;
  for (Eigen::Index d = 0; d < s.positions.cols(); ++d) p.push_back(s.positions(item, d));
  return p;
}

bool pinned_in(const Snapshot& s, int32_t item) {
  return item >= 0 && size_t(item) < s.pinned.size() && s.pinned[size_t(item)];
}

std::string name_of(const std::vector<std::string>& ids, int32_t item) {
  return item >= 0 && size_t(item) < ids.size() ? ids[size_t(item)] : "item " + std::to_string(item);
}

}  // namespace

std::string UndoFeed::record(CommandBody& body) {
  if (std::string refused = inner_.prepare(body); !refused.empty()) return refused;
  if (replaying_) return "";
  const auto s = inner_.latest();
  if (!s) return "";
  CommandBody forward, backward;
  if (const auto* pin = std::get_if<cmd::Pin>(&body)) {
    forward = *pin;
    if (pinned_in(*s, pin->item)) backward = cmd::Pin{pin->item, position_of(*s, pin->item)};
    else backward = cmd::Unpin{pin->item};
  } else if (const auto* unpin = std::get_if<cmd::Unpin>(&body)) {
    if (!pinned_in(*s, unpin->item)) return "";  // nothing changes
    forward = *unpin;
    backward = cmd::Pin{unpin->item, position_of(*s, unpin->item)};
  } else if (const auto* add = std::get_if<cmd::AddJudgment>(&body)) {
    // The judgment stays in the record; undo retracts it and redo restores it.
    forward = cmd::RetractJudgment{add->judgment.id, false};
    backward = cmd::RetractJudgment{add->judgment.id, true};
  } else if (const auto* r = std::get_if<cmd::RetractJudgment>(&body)) {
    forward = *r;
    backward = cmd::RetractJudgment{r->judgment_id, !r->retracted};
  } else {
    return "";
  }
  if (open_.forward.empty()) undone_.clear();  // a new step: what was undone cannot come back
  open_.forward.push_back(std::move(forward));
  open_.backward.push_back(std::move(backward));
  open_.added += std::holds_alternative<cmd::AddJudgment>(body);
  return "";
}

void UndoFeed::end_step() {
  if (open_.forward.empty()) return;
  const auto s = inner_.latest();
  open_.what = describe_step(open_.forward, open_.added, s ? s->ids : std::vector<std::string>{});
  done_.push_back(std::move(open_));
  open_ = Step{};
  if (done_.size() > kMostSteps) done_.erase(done_.begin());
}

std::string UndoFeed::replay(const std::vector<CommandBody>& bodies, bool reversed) {
  replaying_ = true;
  std::string first_refusal;
  const auto one = [&](CommandBody body) {
    if (std::string e = prepare(body); !e.empty()) {
      if (first_refusal.empty()) first_refusal = e;
      return;
    }
    inner_.post(std::move(body));
  };
  if (reversed)
    for (auto it = bodies.rbegin(); it != bodies.rend(); ++it) one(*it);
  else
    for (const CommandBody& b : bodies) one(b);
  replaying_ = false;
  return first_refusal;
}

std::string UndoFeed::undo(std::string* refused) {
  end_step();
  if (done_.empty()) return "";
  Step step = std::move(done_.back());
  done_.pop_back();
  // A pin made "where it is" comes back where it was when undone (a pin holds its item).
  if (const auto s = inner_.latest())
    for (CommandBody& f : step.forward)
      if (auto* pin = std::get_if<cmd::Pin>(&f); pin && pin->position.empty() && pinned_in(*s, pin->item))
        pin->position = position_of(*s, pin->item);
  const std::string e = replay(step.backward, true);
  if (refused) *refused = e;
  undone_.push_back(std::move(step));
  return undone_.back().what;
}

std::string UndoFeed::redo(std::string* refused) {
  end_step();
  if (undone_.empty()) return "";
  Step step = std::move(undone_.back());
  undone_.pop_back();
  const std::string e = replay(step.forward, false);
  if (refused) *refused = e;
  done_.push_back(std::move(step));
  return done_.back().what;
}

std::string describe_step(const std::vector<CommandBody>& forward, size_t added, const std::vector<std::string>& ids) {
  size_t pins = 0, unpins = 0, retractions = 0, restores = 0;
  int32_t last_item = -1;
  for (const CommandBody& b : forward) {
    if (const auto* p = std::get_if<cmd::Pin>(&b)) ++pins, last_item = p->item;
    else if (const auto* u = std::get_if<cmd::Unpin>(&b)) ++unpins, last_item = u->item;
    else if (const auto* r = std::get_if<cmd::RetractJudgment>(&b)) r->retracted ? ++retractions : ++restores;
  }
  restores -= std::min(restores, added);
  const auto items = [&](const char* what, size_t n) {
    return std::string(what) + (n == 1 ? " of " + name_of(ids, last_item) : " of " + std::to_string(n) + " items");
  };
  std::vector<std::string> parts;
  if (added) parts.push_back(added == 1 ? "judgment" : std::to_string(added) + " judgments");
  if (pins) parts.push_back(items("pin", pins));
  if (unpins) parts.push_back(items("unpin", unpins));
  if (retractions) parts.push_back(retractions == 1 ? "retraction" : std::to_string(retractions) + " retractions");
  if (restores) parts.push_back(restores == 1 ? "restore" : std::to_string(restores) + " restores");
  std::string out;
  for (size_t k = 0; k < parts.size(); ++k) out += (k ? ", " : "") + parts[k];
  return out;
}

}  // namespace kith
