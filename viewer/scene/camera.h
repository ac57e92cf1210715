// Camera: an orbit camera around a target point, with smooth transitions.
//
// Pose: the eye sits at target + distance * (cos(pitch) sin(yaw), sin(pitch), cos(pitch) cos(yaw)),
// looking at the target with +y up; perspective projection with a vertical field of view.
// Orbit/pan/zoom act on the goal pose; update(dt) moves the shown pose toward the goal with an
// exponential ease (time constant kEaseSeconds), so fit-to-view and focus-on-selection glide.
// Screen coordinates are pixels with (0,0) at the top-left, as GLFW reports the mouse.
// Plain value type, no GL; used by the window's thread only.
#pragma once
#include <cstdint>
#include <glm/glm.hpp>
#include <optional>
#include <string>
#include <vector>

namespace kith {

struct CameraPose {
  glm::vec3 target{0.f};
  float yaw = 0.6f;        // radians around +y
  float pitch = 0.35f;     // radians above the horizon, kept within +-kMaxPitch
  float distance = 10.f;   // eye to target
};

struct Projected {
  glm::vec2 screen{0.f};   // pixels, top-left origin
  float depth = 0.f;       // distance along the view direction (> 0 in front of the eye)
  bool visible = false;    // in front of the near plane
};

class Camera {
 public:
  static constexpr float kMaxPitch = 1.5f;
  static constexpr float kEaseSeconds = 0.18f;
  static constexpr float kFovYDegrees = 40.f;

  void set_viewport(int width, int height);
  // The free area: the part of the viewport the docked panels leave to the map, in viewport
  // pixels (top-left origin). The projection is shifted off centre so the target is drawn at the
  // area's centre, and fitting uses the area's width and height (the scale stays that of the whole
  // viewport, so items keep their size). Every projection (drawing, picking, dragging) goes
  // through it. An empty or inverted area means the whole viewport.
  void set_free_area(float x0, float y0, float x1, float y1);
  // The same for a free area flush with one side: the centre moved sideways by `ndc_x`
  // (normalized device units, -0.6..0.6), the free width 1 - |ndc_x| of the whole.
  void set_centre_offset(float ndc_x);
  float centre_offset() const { return centre_x_; }
  // The free area's centre in normalized device units and its share of the viewport's width and height.
  glm::vec2 free_centre_ndc() const { return {centre_x_, centre_y_}; }
  glm::vec2 free_share() const { return {share_x_, share_y_}; }
  int width() const { return width_; }
  int height() const { return height_; }

  const CameraPose& pose() const { return pose_; }
  const CameraPose& goal() const { return goal_; }
  void set_pose(const CameraPose& pose);   // jumps (no transition)
  void glide_to(const CameraPose& goal);   // smooth transition
  bool moving() const;

  // Mouse gestures, in pixels of mouse motion.
  void orbit(float dx, float dy);
  void pan(float dx, float dy);
  void zoom(float steps);  // > 0 moves closer; one step = 12 % of the distance
  // How many times a person panned or zoomed: the map view stops following a growing map once
  // someone has chosen a framing of their own.
  uint64_t framing_changes() const { return framing_changes_; }
  void spin(float radians) { goal_.yaw += radians; pose_.yaw += radians; }  // auto-rotation

  // Goals framing a box or a set of points (a sphere around them fits the view).
  void fit(const glm::vec3& lo, const glm::vec3& hi, bool smooth = true);
  // Tighter: the nearest distance, along the current view direction, at which every point
  // projects inside the view with `margin` (a fraction of the half-width) to spare; target = box centre.
  void fit_points(const std::vector<glm::vec3>& points, bool smooth = true, float margin = 0.06f);

  void update(float dt_seconds);


  glm::vec3 eye() const;
  glm::vec3 forward() const;  // unit, eye -> target
  glm::mat4 view() const;
  glm::mat4 projection() const;
  float near_plane() const { return pose_.distance * 0.01f; }
  float far_plane() const { return pose_.distance * 20.f + 1.f; }

  Projected project(const glm::vec3& world) const;
  // The point under pixel (x, y) on the plane through `anchor` facing the camera.
  glm::vec3 on_facing_plane(const glm::vec2& pixel, const glm::vec3& anchor) const;

  // "yaw,pitch,distance,tx,ty,tz" (the --camera option and the state dump).
  std::string str() const;
  static std::optional<CameraPose> parse(const std::string& text, std::string* error);

 private:
  static glm::vec3 eye_of(const CameraPose& p);
  CameraPose pose_, goal_;
  int width_ = 1280, height_ = 800;
  uint64_t framing_changes_ = 0;
  float centre_x_ = 0.f, centre_y_ = 0.f;  // the free area's centre, normalized device units
  float share_x_ = 1.f, share_y_ = 1.f;    // its share of the viewport's width and height
};

}  // namespace kith
