#include "viewer/scene/map_interaction.h"

#include <algorithm>
#include <cstdio>

#include "viewer/scene/picking.h"

namespace kith {

namespace {
std::vector<double> to_vector(const glm::vec3& p, Eigen::Index dims) {
  std::vector<double> v = {p.x, p.y, p.z};
  v.resize(size_t(std::clamp<Eigen::Index>(dims, 1, 3)));
  return v;
}
}  // namespace

uint64_t MapInteraction::post(CommandBody body) {
  if (const std::string refused = feed_.prepare(body); !refused.empty()) {
    std::fprintf(stderr, "kith: %s\n", refused.c_str());
    return 0;
  }
  const CommandBody copy = body;
  const uint64_t seq = feed_.post(std::move(body));
  if (on_post) on_post(copy, seq);
  return seq;
}

void MapInteraction::pointer_move(const glm::vec2& pixel) {
  const glm::vec2 delta = pixel - pointer_;
  pointer_ = pixel;
  switch (state_) {
    case State::kIdle:
    case State::kChoosing:
      view_.hover_at(pixel);
      break;
    case State::kPressedItem:
      if (glm::length(pixel - press_at_) >= kDragThresholdPx && press_item_ >= 0 &&
          size_t(press_item_) < view_.positions().size()) {
        state_ = State::kDragging;
        drag_item_ = press_item_;
        drag_from_ = view_.positions()[drag_item_];
        drag_targets_ = 0;
      }
      if (state_ != State::kDragging) break;
      [[fallthrough]];
    case State::kDragging:
      drag_to_ = view_.camera().on_facing_plane(pixel, drag_from_);
      view_.set_drag(drag_item_, drag_to_);
      drag_moved_ = true;
      break;
    case State::kOrbiting:
      view_.camera().orbit(delta.x, delta.y);
      break;
    case State::kPanning:
      view_.camera().pan(delta.x, delta.y);
      break;
    case State::kBoxing:
      break;
    case State::kLasso:
      if (lasso_.empty() || glm::length(pixel - lasso_.back()) >= 3.f) lasso_.push_back(pixel);
      break;
  }
}

void MapInteraction::button_down(int button, bool shift, bool lasso) {
  if (state_ == State::kChoosing) choose_release();  // a new gesture lets go of the last drop
  if (state_ != State::kIdle) return;
  press_at_ = pointer_;
  press_shift_ = shift;
  if (button == 0 && lasso) {
    lasso_.assign(1, pointer_);
    state_ = State::kLasso;
  } else if (button == 0) {
    press_item_ = view_.item_at(pointer_);
    if (press_item_ >= 0) {
      if (shift)
        view_.selection().toggle(press_item_);
      else if (!view_.selection().contains(press_item_))
        view_.selection().set({press_item_});
      view_.selection_changed();
      state_ = State::kPressedItem;
    } else {
      state_ = shift ? State::kBoxing : State::kOrbiting;
    }
  } else {
    state_ = State::kPanning;
  }
}

void MapInteraction::button_up(int button) {
  switch (state_) {
    case State::kPressedItem:
      // A plain click on an already-selected item among several makes it the only one.
      if (button == 0 && !press_shift_ && view_.selection().size() > 1) {
        view_.selection().set({press_item_});
        view_.selection_changed();
      }
      state_ = State::kIdle;
      break;
    case State::kDragging:
      per_frame();  // the last position reaches the engine
      state_ = State::kChoosing;
      break;
    case State::kOrbiting:
      if (glm::length(pointer_ - press_at_) < kDragThresholdPx && !press_shift_) {
        view_.selection().clear();
        view_.selection_changed();
      }
      state_ = State::kIdle;
      break;
    case State::kBoxing: {
      std::vector<int> hits = pick_box(view_.camera(), view_.positions(), press_at_, pointer_);
      for (int i : hits) view_.selection().add(i);
      view_.selection_changed();
      state_ = State::kIdle;
      break;
    }
    case State::kLasso: {
      const std::vector<int> hits = pick_lasso(view_.camera(), view_.positions(), lasso_);
      if (!press_shift_) view_.selection().clear();
      for (int i : hits) view_.selection().add(i);
      view_.selection_changed();
      lasso_.clear();
      state_ = State::kIdle;
      break;
    }
    case State::kPanning:
      state_ = State::kIdle;
      break;
    default:
      break;
  }
}

void MapInteraction::per_frame() {
  if (state_ != State::kDragging || !drag_moved_) return;
  const auto snap = view_.snapshot();
  post(cmd::DragTarget{int32_t(drag_item_), to_vector(drag_to_, snap ? snap->positions.cols() : 3)});
  ++drag_targets_;
  drag_moved_ = false;
}

void MapInteraction::choose_pin() {
  if (state_ != State::kChoosing) return;
  const auto snap = view_.snapshot();
  last_drop_.item = drag_item_;
  last_drop_.position = drag_to_;
  last_drop_.drag_targets = drag_targets_;
  last_drop_.seq = post(cmd::Pin{int32_t(drag_item_), to_vector(drag_to_, snap ? snap->positions.cols() : 3)});
  post(cmd::ClearDrag{int32_t(drag_item_)});
  view_.clear_drag();
  state_ = State::kIdle;
}

void MapInteraction::choose_release() {
  if (state_ != State::kChoosing) return;
  post(cmd::ClearDrag{int32_t(drag_item_)});
  view_.clear_drag();
  state_ = State::kIdle;
}

void MapInteraction::choose_teach() {
  if (state_ != State::kChoosing) return;
  if (teach && view_.snapshot()) {
    std::vector<Judgment> made;
    try {
      made = teach(*view_.snapshot(), drag_item_, drag_from_, drag_to_);
    } catch (const std::exception& e) {
      std::fprintf(stderr, "kith: teach: %s\n", e.what());
    }
    for (Judgment& j : made) {
      j.kind = JudgmentKind::kDrag;
      post(cmd::AddJudgment{j});
    }
  }
  choose_release();
}

void MapInteraction::pin_selection() {
  for (int i : view_.selection().items()) post(cmd::Pin{int32_t(i), {}});
}

void MapInteraction::unpin_selection() {
  for (int i : view_.selection().items())
    if (view_.pinned(i)) post(cmd::Unpin{int32_t(i)});
}

}  // namespace kith
