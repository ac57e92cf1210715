// Picking: which item is under the mouse, which fall inside a dragged box, which match a search.
// Works on projected positions (Camera::project), so it needs no GL and no depth buffer:
// the nearest item on screen within a radius wins, ties going to the one nearer the eye.
// Pure functions; window thread.
#pragma once
#include <glm/glm.hpp>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "viewer/scene/camera.h"

namespace kith {

// -1 if no item lies within radius_px of pixel. `hidden` (optional, per item) skips items.
int pick_item(const Camera& camera, const std::vector<glm::vec3>& positions, const glm::vec2& pixel, float radius_px,
              const std::vector<uint8_t>* hidden = nullptr);

// The item nearest the eye whose picture covers `pixel`, -1 if none. Item i's picture is
// extent[i] (its share of the sprite's side, x and y; zero = no picture) of a square sprite
// side_at_reference * clamp(reference_distance / depth, 0.35, 3) pixels across (as points.vert
// draws it), drawn only when at least min_side.
int pick_picture(const Camera& camera, const std::vector<glm::vec3>& positions, const glm::vec2& pixel,
                 const std::vector<glm::vec2>& extent, float side_at_reference, float reference_distance,
                 float min_side);

// Items whose projection lies inside the screen rectangle with corners a and b (any order).
std::vector<int> pick_box(const Camera& camera, const std::vector<glm::vec3>& positions, const glm::vec2& a,
                          const glm::vec2& b, const std::vector<uint8_t>* hidden = nullptr);
// Items whose screen position lies inside the closed path `lasso` (window pixels; even-odd rule,
// so a path that crosses itself leaves out what it encloses twice), skipping `hidden` ones.
std::vector<int> pick_lasso(const Camera& camera, const std::vector<glm::vec3>& positions,
                            const std::vector<glm::vec2>& lasso, const std::vector<uint8_t>* hidden = nullptr);

// Items whose id or any tag value contains `text` (case-insensitive); "column=value" matches that
// tag column exactly. At most `limit` results, in collection order.
std::vector<int> search_items(const Collection& collection, const std::string& text, size_t limit = 1000000);

// Items with this value in tag column `column`.
std::vector<int> items_with_tag(const Collection& collection, size_t column, const std::string& value);

}  // namespace kith
