#include "viewer/scene/camera.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <glm/gtc/matrix_transform.hpp>
#include <limits>
#include <sstream>
#include <vector>

namespace kith {

void Camera::set_viewport(int width, int height) {
  width_ = std::max(width, 1);
  height_ = std::max(height, 1);
}

void Camera::set_pose(const CameraPose& pose) {
  pose_ = pose;
  pose_.pitch = std::clamp(pose_.pitch, -kMaxPitch, kMaxPitch);
  pose_.distance = std::max(pose_.distance, 1e-4f);
  goal_ = pose_;
}

void Camera::glide_to(const CameraPose& goal) {
  goal_ = goal;
  goal_.pitch = std::clamp(goal_.pitch, -kMaxPitch, kMaxPitch);
  goal_.distance = std::max(goal_.distance, 1e-4f);
}

bool Camera::moving() const {
  const float scale = std::max(goal_.distance, 1e-3f);
  return glm::length(goal_.target - pose_.target) > 1e-4f * scale || std::abs(goal_.yaw - pose_.yaw) > 1e-4f ||
         std::abs(goal_.pitch - pose_.pitch) > 1e-4f || std::abs(goal_.distance - pose_.distance) > 1e-4f * scale;
}

void Camera::orbit(float dx, float dy) {
  const float per_pixel = 0.008f;
  goal_.yaw -= dx * per_pixel;
  goal_.pitch = std::clamp(goal_.pitch + dy * per_pixel, -kMaxPitch, kMaxPitch);
  // Direct manipulation feels laggy when eased: the shown pose follows at once.
  pose_.yaw = goal_.yaw;
  pose_.pitch = goal_.pitch;
}

void Camera::pan(float dx, float dy) {
  ++framing_changes_;
  // Move the target so the point under the mouse stays under it (at the target's depth).
  const float world_per_pixel = 2.f * goal_.distance * std::tan(glm::radians(kFovYDegrees) / 2.f) / float(height_);
  const glm::vec3 f = forward();
  const glm::vec3 right = glm::normalize(glm::cross(f, glm::vec3(0, 1, 0)));
  const glm::vec3 up = glm::cross(right, f);
  const glm::vec3 shift = (-dx * right + dy * up) * world_per_pixel;
  goal_.target += shift;
  pose_.target += shift;
}

void Camera::zoom(float steps) {
  ++framing_changes_;
  goal_.distance = std::max(goal_.distance * std::pow(0.88f, steps), 1e-4f);
}

void Camera::fit(const glm::vec3& lo, const glm::vec3& hi, bool smooth) {
  CameraPose g = goal_;
  g.target = (lo + hi) * 0.5f;
  const float radius = std::max(glm::length(hi - lo) * 0.5f, 1e-7f);
  const float half_fov_y = glm::radians(kFovYDegrees) / 2.f;
  const float half_fov_x = std::atan(std::tan(half_fov_y) * float(width_) / float(height_) * share_x_);
  const float half = std::min(half_fov_x, std::atan(std::tan(half_fov_y) * share_y_));
  g.distance = radius / std::sin(half) * 1.02f;
  if (smooth)
    glide_to(g);
  else
    set_pose(g);
}

void Camera::fit_points(const std::vector<glm::vec3>& points, bool smooth, float margin) {
  if (points.empty()) return;
  glm::vec3 lo(std::numeric_limits<float>::max()), hi(-std::numeric_limits<float>::max());
  for (const auto& p : points) lo = glm::min(lo, p), hi = glm::max(hi, p);
  CameraPose g = goal_;
  g.target = (lo + hi) * 0.5f;
  // For an offset o = (x, y, z) in the view basis (z away from the eye), the point fits when
  // |x| <= (d + z) tan(half_x) and |y| <= (d + z) tan(half_y): d >= |x| / tan(half_x) - z, etc.
  const glm::vec3 eye_dir(std::cos(g.pitch) * std::sin(g.yaw), std::sin(g.pitch), std::cos(g.pitch) * std::cos(g.yaw));
  const glm::vec3 f = -eye_dir;
  const glm::vec3 right = glm::normalize(glm::cross(f, glm::vec3(0, 1, 0)));
  const glm::vec3 up = glm::cross(right, f);
  const float tan_y = std::tan(glm::radians(kFovYDegrees) / 2.f) * (1.f - margin) * share_y_;
  const float tan_x = std::tan(glm::radians(kFovYDegrees) / 2.f) * float(width_) / float(height_) * (1.f - margin) *
                      share_x_;
  float d = 1e-3f;
  for (const auto& p : points) {
    const glm::vec3 o = p - g.target;
    const float x = glm::dot(o, right), y = glm::dot(o, up), z = glm::dot(o, f);
    d = std::max({d, std::abs(x) / tan_x - z, std::abs(y) / tan_y - z});
  }
  // Keep the eye outside the cloud so the near plane does not cut it.
  d = std::max(d, glm::length(hi - lo) * 0.5f * 1.05f);
  g.distance = d;
  if (smooth)
    glide_to(g);
  else
    set_pose(g);
}

void Camera::update(float dt) {
  const float a = 1.f - std::exp(-std::max(dt, 0.f) / kEaseSeconds);
  pose_.target += (goal_.target - pose_.target) * a;
  pose_.yaw += (goal_.yaw - pose_.yaw) * a;
  pose_.pitch += (goal_.pitch - pose_.pitch) * a;
  // Distance eases in log space so zooming feels even at every scale.
  pose_.distance = std::exp(std::log(pose_.distance) + (std::log(goal_.distance) - std::log(pose_.distance)) * a);
  if (!moving()) pose_ = goal_;
}

glm::vec3 Camera::eye_of(const CameraPose& p) {
  const glm::vec3 dir(std::cos(p.pitch) * std::sin(p.yaw), std::sin(p.pitch), std::cos(p.pitch) * std::cos(p.yaw));
  return p.target + p.distance * dir;
}

glm::vec3 Camera::eye() const { return eye_of(pose_); }
glm::vec3 Camera::forward() const { return glm::normalize(pose_.target - eye()); }

glm::mat4 Camera::view() const { return glm::lookAt(eye(), pose_.target, glm::vec3(0, 1, 0)); }

glm::mat4 Camera::projection() const {
  // Clip-space x += cx * w (and y), i.e. normalized device x += cx: the target lands at the free area's centre.
  const glm::mat4 shift = glm::translate(glm::mat4(1.f), glm::vec3(centre_x_, centre_y_, 0.f));
  return shift * glm::perspective(glm::radians(kFovYDegrees), float(width_) / float(height_), near_plane(), far_plane());
}

void Camera::set_centre_offset(float ndc_x) {
  centre_x_ = std::clamp(ndc_x, -0.6f, 0.6f);
  centre_y_ = 0.f;
  share_x_ = 1.f - std::abs(centre_x_);
  share_y_ = 1.f;
}

void Camera::set_free_area(float x0, float y0, float x1, float y1) {
  const float w = float(width_), h = float(height_);
  x0 = std::clamp(x0, 0.f, w), x1 = std::clamp(x1, 0.f, w), y0 = std::clamp(y0, 0.f, h), y1 = std::clamp(y1, 0.f, h);
  if (x1 - x0 < 1.f || y1 - y0 < 1.f) x0 = 0.f, y0 = 0.f, x1 = w, y1 = h;
  share_x_ = (x1 - x0) / w;
  share_y_ = (y1 - y0) / h;
  centre_x_ = (x0 + x1) / w - 1.f;
  centre_y_ = 1.f - (y0 + y1) / h;
}

Projected Camera::project(const glm::vec3& world) const {
  Projected out;
  const glm::vec4 v = view() * glm::vec4(world, 1.f);
  out.depth = -v.z;
  if (out.depth <= near_plane()) return out;
  const glm::vec4 c = projection() * v;
  const glm::vec2 ndc(c.x / c.w, c.y / c.w);
  out.screen = glm::vec2((ndc.x * 0.5f + 0.5f) * float(width_), (1.f - (ndc.y * 0.5f + 0.5f)) * float(height_));
  out.visible = true;
  return out;
}

glm::vec3 Camera::on_facing_plane(const glm::vec2& pixel, const glm::vec3& anchor) const {
  const glm::vec2 ndc(pixel.x / float(width_) * 2.f - 1.f, 1.f - pixel.y / float(height_) * 2.f);
  const glm::mat4 inv = glm::inverse(projection() * view());
  glm::vec4 far_point = inv * glm::vec4(ndc, 1.f, 1.f);
  far_point /= far_point.w;
  const glm::vec3 origin = eye();
  const glm::vec3 dir = glm::normalize(glm::vec3(far_point) - origin);
  const glm::vec3 n = forward();
  const float denom = glm::dot(dir, n);
  if (std::abs(denom) < 1e-6f) return anchor;
  const float t = glm::dot(anchor - origin, n) / denom;
  return origin + dir * t;
}

std::string Camera::str() const {
  char buf[256];
  std::snprintf(buf, sizeof buf, "%.6g,%.6g,%.6g,%.6g,%.6g,%.6g", pose_.yaw, pose_.pitch, pose_.distance,
                pose_.target.x, pose_.target.y, pose_.target.z);
  return buf;
}

std::optional<CameraPose> Camera::parse(const std::string& text, std::string* error) {
  std::vector<float> v;
  std::stringstream ss(text);
  std::string part;
  while (std::getline(ss, part, ',')) {
    try {
      size_t used = 0;
      const float x = std::stof(part, &used);
      if (used != part.size() || !std::isfinite(x)) throw std::invalid_argument(part);
      v.push_back(x);
    } catch (const std::exception&) {
      if (error) *error = "camera: '" + part + "' is not a number (expected yaw,pitch,distance[,tx,ty,tz])";
      return std::nullopt;
    }
  }
  if (v.size() != 3 && v.size() != 6) {
    if (error) *error = "camera: expected 3 or 6 comma-separated numbers (yaw,pitch,distance[,tx,ty,tz]), got " +
                        std::to_string(v.size());
    return std::nullopt;
  }
  if (v[2] <= 0) {
    if (error) *error = "camera: distance must be > 0";
    return std::nullopt;
  }
  CameraPose p;
  p.yaw = v[0];
  p.pitch = std::clamp(v[1], -kMaxPitch, kMaxPitch);
  p.distance = v[2];
  if (v.size() == 6) p.target = glm::vec3(v[3], v[4], v[5]);
  return p;
}

}  // namespace kith
