// MapInteraction: what the mouse does to the map, as a small state machine without GL or GLFW.
//   left press on an item      selects it (shift: adds/removes) and, once moved 4 px, drags it
//   left drag on empty space   orbits;  shift + left drag on empty space: box selection
//   right or middle drag       pans;    wheel: zoom
//   left click on empty space  clears the selection
// Dragging moves the item in the plane through it that faces the camera and posts a
// cmd::DragTarget for it every frame it moved. On release the item waits, held where it was
// dropped, for the person's choice: pin it there, let it go (cmd::ClearDrag), or teach (turn the
// move into judgments through the teach hook, then let go).
// Window thread; posts to the feed, which is thread-safe.
#pragma once
#include <functional>
#include <glm/glm.hpp>
#include <vector>

#include "solver/base/judgment.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/map_view.h"

namespace kith {

// Turns a finished drag of `item` from `from` to `to` into judgments (the judgments feature).
using TeachHook = std::function<std::vector<Judgment>(const Snapshot& snapshot, int item, const glm::vec3& from,
                                                      const glm::vec3& to)>;

class MapInteraction {
 public:
  enum class State { kIdle, kPressedItem, kDragging, kOrbiting, kPanning, kBoxing, kLasso, kChoosing };
  static constexpr float kDragThresholdPx = 4.f;

  MapInteraction(MapView& view, MapFeed& feed) : view_(view), feed_(feed) {}

  void pointer_move(const glm::vec2& pixel);
  // `shift`: add to the selection (click, box, lasso); `lasso`: a left drag draws a lasso (ctrl held).
  void button_down(int button, bool shift, bool lasso = false);
  void button_up(int button);
  void scroll(float steps) { view_.camera().zoom(steps); }
  // Call once per frame: posts the drag target if the dragged item moved.
  void per_frame();

  State state() const { return state_; }
  glm::vec2 pointer() const { return pointer_; }
  glm::vec2 box_start() const { return press_at_; }
  const std::vector<glm::vec2>& lasso_path() const { return lasso_; }  // while kLasso

  // ---- the release choice -------------------------------------------------------
  bool choosing() const { return state_ == State::kChoosing; }
  int choice_item() const { return drag_item_; }
  glm::vec3 choice_position() const { return drag_to_; }
  void choose_pin();
  void choose_release();
  bool can_teach() const { return bool(teach); }
  void choose_teach();
  TeachHook teach;
  // Called with every command this object posts (sessions record them).
  std::function<void(const CommandBody&, uint64_t seq)> on_post;

  struct Drop {
    int item = -1;
    glm::vec3 position{0.f};
    uint64_t seq = 0;       // the Pin command's sequence number
    int drag_targets = 0;   // drag targets posted during that drag
  };
  const Drop& last_drop() const { return last_drop_; }
  int drag_targets_posted() const { return drag_targets_; }

  // Pins/unpins the selection where it is.
  void pin_selection();
  void unpin_selection();

 private:
  uint64_t post(CommandBody body);
  MapView& view_;
  MapFeed& feed_;
  State state_ = State::kIdle;
  glm::vec2 pointer_{0.f}, press_at_{0.f}, last_{0.f};
  bool press_shift_ = false;
  std::vector<glm::vec2> lasso_;
  int press_item_ = -1;
  int drag_item_ = -1;
  glm::vec3 drag_from_{0.f}, drag_to_{0.f};
  bool drag_moved_ = false;
  int drag_targets_ = 0;
  Drop last_drop_;
};

}  // namespace kith
