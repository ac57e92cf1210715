#include "viewer/scene/picking.h"

#include <algorithm>
#include <cctype>

namespace kith {


int pick_item(const Camera& camera, const std::vector<glm::vec3>& positions, const glm::vec2& pixel, float radius_px,
              const std::vector<uint8_t>* hidden) {
  int best = -1;
  const float r2 = radius_px * radius_px;
  float best_d2 = r2, best_depth = 0.f;
  // The view-projection is built once; Camera::project per item would rebuild it every call.
  const glm::mat4 vp = camera.projection() * camera.view();
  const float w = float(camera.width()), h = float(camera.height());
  for (size_t i = 0; i < positions.size(); ++i) {
    if (hidden && (*hidden)[i]) continue;
    const glm::vec4 c = vp * glm::vec4(positions[i], 1.f);
    if (c.w <= camera.near_plane()) continue;
    const glm::vec2 s((c.x / c.w * 0.5f + 0.5f) * w, (1.f - (c.y / c.w * 0.5f + 0.5f)) * h);
    const glm::vec2 d = s - pixel;
    const float d2 = glm::dot(d, d);
    const float depth = c.w;
    if (d2 > r2) continue;
    // Within a pixel of each other on screen, the item nearer the eye wins.
    if (best < 0 || d2 < best_d2 - 1.f || (d2 <= best_d2 + 1.f && depth < best_depth)) {
      best = int(i);
      best_d2 = d2;
      best_depth = depth;
    }
  }
  return best;
}

int pick_picture(const Camera& camera, const std::vector<glm::vec3>& positions, const glm::vec2& pixel,
                 const std::vector<glm::vec2>& extent, float side_at_reference, float reference_distance,
                 float min_side) {
  int best = -1;
  float best_depth = 0.f;
  const glm::mat4 vp = camera.projection() * camera.view();
  const float w = float(camera.width()), h = float(camera.height());
  for (size_t i = 0; i < positions.size() && i < extent.size(); ++i) {
    if (extent[i].x <= 0.f) continue;
    const glm::vec4 c = vp * glm::vec4(positions[i], 1.f);
    if (c.w <= camera.near_plane() || (best >= 0 && c.w >= best_depth)) continue;
    const float side = side_at_reference * std::clamp(reference_distance / c.w, 0.35f, 3.f);
    if (side < min_side) continue;
    const glm::vec2 s((c.x / c.w * 0.5f + 0.5f) * w, (1.f - (c.y / c.w * 0.5f + 0.5f)) * h);
    const glm::vec2 d = glm::abs(s - pixel);
    if (d.x <= 0.5f * side * extent[i].x && d.y <= 0.5f * side * extent[i].y) {
      best = int(i);
      best_depth = c.w;
    }
  }
  return best;
}

namespace {
// The visible items (in front of the camera, not hidden) whose screen position passes `inside`.
template <typename Inside>
std::vector<int> pick_on_screen(const Camera& camera, const std::vector<glm::vec3>& positions,
                                const std::vector<uint8_t>* hidden, Inside inside) {
  const glm::mat4 vp = camera.projection() * camera.view();
  const float w = float(camera.width()), h = float(camera.height());
  std::vector<int> out;
  for (size_t i = 0; i < positions.size(); ++i) {
    if (hidden && (*hidden)[i]) continue;
    const glm::vec4 c = vp * glm::vec4(positions[i], 1.f);
    if (c.w <= camera.near_plane()) continue;
    const glm::vec2 s((c.x / c.w * 0.5f + 0.5f) * w, (1.f - (c.y / c.w * 0.5f + 0.5f)) * h);
    if (inside(s)) out.push_back(int(i));
  }
  return out;
}
}  // namespace

std::vector<int> pick_box(const Camera& camera, const std::vector<glm::vec3>& positions, const glm::vec2& a,
                          const glm::vec2& b, const std::vector<uint8_t>* hidden) {
  const glm::vec2 lo = glm::min(a, b), hi = glm::max(a, b);
  return pick_on_screen(camera, positions, hidden, [&](const glm::vec2& s) {
    return s.x >= lo.x && s.x <= hi.x && s.y >= lo.y && s.y <= hi.y;
  });
}

std::vector<int> pick_lasso(const Camera& camera, const std::vector<glm::vec3>& positions,
                            const std::vector<glm::vec2>& lasso, const std::vector<uint8_t>* hidden) {
  if (lasso.size() < 3) return {};
  return pick_on_screen(camera, positions, hidden, [&](const glm::vec2& s) {
    bool in = false;  // even-odd: count the edges a ray to the right crosses
    for (size_t k = 0, prev = lasso.size() - 1; k < lasso.size(); prev = k++) {
      const glm::vec2 &a = lasso[k], &b = lasso[prev];
      if ((a.y > s.y) != (b.y > s.y) && s.x < (b.x - a.x) * (s.y - a.y) / (b.y - a.y) + a.x) in = !in;
    }
    return in;
  });
}

namespace {
std::string lower(std::string s) {
  for (char& c : s) c = char(std::tolower(static_cast<unsigned char>(c)));
  return s;
}
}  // namespace

std::vector<int> search_items(const Collection& collection, const std::string& text, size_t limit) {
  std::vector<int> out;
  if (text.empty()) return out;
  const auto eq = text.find('=');
  if (eq != std::string::npos) {
    const std::string column = lower(text.substr(0, eq)), value = lower(text.substr(eq + 1));
    for (const auto& tag : collection.tags)
      if (lower(tag.name) == column) {
        for (size_t i = 0; i < tag.values.size() && out.size() < limit; ++i)
          if (lower(tag.values[i]) == value) out.push_back(int(i));
        return out;
      }
  }
  const std::string needle = lower(text);
  for (size_t i = 0; i < collection.size() && out.size() < limit; ++i) {
    bool hit = lower(collection.ids[i]).find(needle) != std::string::npos;
    for (size_t t = 0; !hit && t < collection.tags.size(); ++t)
      hit = i < collection.tags[t].values.size() && lower(collection.tags[t].values[i]).find(needle) != std::string::npos;
    if (hit) out.push_back(int(i));
  }
  return out;
}

std::vector<int> items_with_tag(const Collection& collection, size_t column, const std::string& value) {
  std::vector<int> out;
  if (column >= collection.tags.size()) return out;
  const auto& values = collection.tags[column].values;
  for (size_t i = 0; i < values.size(); ++i)
    if (values[i] == value) out.push_back(int(i));
  return out;
}

}  // namespace kith
