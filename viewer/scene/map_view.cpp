#include "viewer/scene/map_view.h"


#include <algorithm>
#include <initializer_list>
#include <cmath>
#include <map>
#include <numeric>
#include <random>

#include "viewer/scene/picking.h"

namespace kith {

namespace {
// How far an item no judgment names is drawn toward the ground, in a collection without features.
constexpr float kUnjudgedFade = 0.65f;
Rgb toward(const Rgb& c, const Rgb& to, float t) {
  return {c.r + (to.r - c.r) * t, c.g + (to.g - c.g) * t, c.b + (to.b - c.b) * t};
}
}  // namespace

// ============================================================================ [options]

std::string ViewOptions::IsValid() const {
  if (!(point_size >= 0.f && point_size <= 64.f)) return "point size must be within 0..64 pixels";
  if (!(fade >= 0.f && fade <= 1.f)) return "fade must be within 0..1";
  if (!(picture_size == 0.f || (picture_size >= 8.f && picture_size <= 160.f)))
    return "picture size must be 0 (by item count) or within 8..160 pixels";
  return "";
}

MapView::MapView(const Collection& collection, Renderer& renderer) : collection_(collection), renderer_(renderer) {
  selection_.resize(collection.size());
  judgment_count_.assign(collection.size(), 0);
  options_.colour_by.tag_column = default_tag_column(collection);
  if (options_.colour_by.tag_column < 0) options_.colour_by.kind = ColourKind::kPlain;
}

void MapView::set_options(const ViewOptions& o) {
  const bool colours = o.colour_by.kind != options_.colour_by.kind ||
                       o.colour_by.tag_column != options_.colour_by.tag_column ||
                       o.colour_by.feature_column != options_.colour_by.feature_column || o.dark != options_.dark;
  options_ = o;
  if (options_.colour_by.kind == ColourKind::kTag && options_.colour_by.tag_column == -1)
    options_.colour_by.tag_column = default_tag_column(collection_);
  if (options_.colour_by.kind == ColourKind::kTag &&
      (options_.colour_by.tag_column < 0 || size_t(options_.colour_by.tag_column) >= collection_.tags.size()))
    options_.colour_by.kind = ColourKind::kPlain;
  if (options_.colour_by.kind == ColourKind::kColumn &&
      (options_.colour_by.feature_column < 0 || options_.colour_by.feature_column >= collection_.features.cols()))
    options_.colour_by.kind = ColourKind::kPlain;
  palette_ = options_.dark ? Palette::night() : Palette::paper();
  if (colours) dirty_colours_ = dirty_grid_ = dirty_lines_ = true;
  dirty_points_ = true;
}

// ============================================================================ [map]

void MapView::set_snapshot(std::shared_ptr<const Snapshot> s) {
  if (!s) return;
  const bool first = !snapshot_;
  snapshot_ = std::move(s);
  const Points& p = snapshot_->positions;
  const size_t n = std::min<size_t>(size_t(p.rows()), collection_.size());
  positions_.resize(n);
  for (size_t i = 0; i < n; ++i)
    positions_[i] = glm::vec3(float(p(Eigen::Index(i), 0)), p.cols() > 1 ? float(p(Eigen::Index(i), 1)) : 0.f,
                              p.cols() > 2 ? float(p(Eigen::Index(i), 2)) : 0.f);
  if (drag_item_ >= 0 && size_t(drag_item_) < n) positions_[drag_item_] = drag_where_;
  pinned_.assign(n, 0);
  for (size_t i = 0; i < n && i < snapshot_->pinned.size(); ++i) pinned_[i] = snapshot_->pinned[i];
  if (start_positions_.size() != n) start_positions_ = positions_;
  if (judgment_set() != counted_) {  // a new set (added, retracted, restored): new counts and lines
    counted_ = judgment_set();
    judgment_count_.assign(collection_.size(), 0);
    for (const auto& j : *counted_) {
      if (j.retracted) continue;
      for (int32_t i : {j.anchor, j.nearer, j.farther})
        if (i >= 0 && size_t(i) < judgment_count_.size()) ++judgment_count_[i];
    }
    if (options_.colour_by.kind == ColourKind::kJudgments) dirty_colours_ = true;
    dirty_points_ = true;  // the faded items of a collection without features
  }
  update_bounds();
  if (first) {
    fit_all(false);
  } else if (following_ && camera_.framing_changes() == framing_at_fit_ && drag_item_ < 0) {
    // Until someone pans, zooms or focuses, the camera keeps the whole map in view as it grows
    // out of its tiny start (or shrinks well inside the frame).
    const bool outgrown = glm::any(glm::lessThan(lo_, fitted_lo_)) || glm::any(glm::greaterThan(hi_, fitted_hi_));
    const bool shrunk = glm::length(hi_ - lo_) < 0.6f * glm::length(fitted_hi_ - fitted_lo_);
    if (outgrown || shrunk) fit_all(true, false);
  }
  dirty_points_ = dirty_lines_ = true;
  if (options_.colour_by.kind == ColourKind::kDisplacement) dirty_colours_ = true;
  map_still_seconds_ = 0.f;
}

void MapView::note_frame_time(float seconds) {
  if (options_.moving_budget == 0 || !(seconds > 0.f)) return;
  smoothed_frame_ = smoothed_frame_ == 0.f ? seconds : 0.8f * smoothed_frame_ + 0.2f * seconds;
  const bool at_rest = still_seconds_ >= 0.25f && map_still_seconds_ >= 0.25f;
  detail_.note(seconds, !at_rest, options_.target_frame_seconds);
  if (at_rest) return;  // every item is drawn anyway
  // Scale the sample toward the frame-time target: the drawing cost is roughly linear in it.
  const float ratio = std::clamp(options_.target_frame_seconds / smoothed_frame_, 0.7f, 1.15f);
  const size_t cap = std::min(options_.moving_budget, std::max<size_t>(positions_.size(), 1));
  const size_t floor = std::min<size_t>(5000, cap);
  budget_ = std::clamp(size_t(float(budget_ == 0 ? cap : budget_) * ratio), floor, cap);
}

bool MapView::pinned(int item) const { return item >= 0 && size_t(item) < pinned_.size() && pinned_[item]; }

const std::shared_ptr<const JudgmentSet>& MapView::judgment_set() const {
  return snapshot_ && snapshot_->judgments ? snapshot_->judgments : JudgmentSet::none();
}

void MapView::update_bounds() {
  if (positions_.empty()) return;
  glm::vec3 lo(std::numeric_limits<float>::max()), hi(-std::numeric_limits<float>::max());
  for (const auto& p : positions_) {
    if (!std::isfinite(p.x) || !std::isfinite(p.y) || !std::isfinite(p.z)) continue;
    lo = glm::min(lo, p);
    hi = glm::max(hi, p);
  }
  if (lo.x > hi.x) return;
  lo_ = lo;
  hi_ = hi;
  // Rebuild the floor only when the map has outgrown it or shrunk well inside it.
  const float size = glm::length(hi - lo) + 1e-6f;
  const float grid_size = glm::length(grid_hi_ - grid_lo_);
  if (!have_bounds_ || glm::any(glm::lessThan(lo, grid_lo_)) || glm::any(glm::greaterThan(hi, grid_hi_)) ||
      grid_size > 2.5f * size || lo.y < grid_floor_y_)
    dirty_grid_ = true;
  have_bounds_ = true;
}

// ============================================================================ [camera]

void MapView::fit_all(bool smooth, bool by_person) {
  if (by_person || framing_at_fit_ == camera_.framing_changes()) following_ = true;
  framing_at_fit_ = camera_.framing_changes();
  // A growing map is refitted (smoothly) as soon as it leaves the box framed now; the frame's own
  // margin (6 %) keeps it on screen meanwhile.
  fitted_lo_ = lo_;
  fitted_hi_ = hi_;
  if (positions_.empty()) return camera_.fit(lo_, hi_, smooth);
  // Pictures reach half their side beyond their item: that much more margin, so none is cut.
  const bool pictures = options_.pictures && !collection_.pictures.empty();
  const float extra = pictures ? picture_size() / float(std::max(camera_.height(), 1)) : 0.f;
  camera_.fit_points(positions_, smooth, 0.06f + std::min(extra, 0.2f));
}

void MapView::set_centre_offset(float ndc_x) {
  const float before = camera_.centre_offset();
  camera_.set_centre_offset(ndc_x);
  if (camera_.centre_offset() != before && following_ && camera_.framing_changes() == framing_at_fit_ && have_bounds_)
    fit_all(true, false);
}

void MapView::set_free_area(float x0, float y0, float x1, float y1) {
  const glm::vec2 c = camera_.free_centre_ndc(), f = camera_.free_share();
  camera_.set_free_area(x0, y0, x1, y1);
  const bool changed = camera_.free_centre_ndc() != c || camera_.free_share() != f;
  if (changed && following_ && camera_.framing_changes() == framing_at_fit_ && have_bounds_) fit_all(true, false);
}

void MapView::focus_selection() {
  if (selection_.empty()) return fit_all(true);
  following_ = false;
  glm::vec3 lo(std::numeric_limits<float>::max()), hi(-std::numeric_limits<float>::max());
  for (int i : selection_.items())
    if (size_t(i) < positions_.size()) {
      lo = glm::min(lo, positions_[i]);
      hi = glm::max(hi, positions_[i]);
    }
  // A lone item: frame a neighbourhood a tenth of the map across.
  const glm::vec3 pad(std::max(glm::length(hi_ - lo_) * 0.05f, 1e-3f));
  std::vector<glm::vec3> pts;
  for (int i : selection_.items())
    if (size_t(i) < positions_.size()) pts.push_back(positions_[i]);
  pts.push_back(lo - pad);
  pts.push_back(hi + pad);
  camera_.fit_points(pts, true);
}

// ============================================================================ [pointing]

float MapView::pick_radius() const {
  return std::max(6.f, (options_.point_size > 0 ? options_.point_size : auto_point_size()) * 0.75f);
}

int MapView::item_at(const glm::vec2& pixel) const {
  // The front picture under the pointer, as drawn; else the nearest disc.
  if (const PictureAtlas* a = atlas(); a && a->ready_count() > 0) {
    std::vector<glm::vec2> extent(positions_.size(), glm::vec2(0.f));
    for (size_t i = 0; i < positions_.size(); ++i)
      if (a->ready(int(i))) extent[i] = {picture_extent_x(a->aspect(int(i))), picture_extent_y(a->aspect(int(i)))};
    const int front = pick_picture(camera_, positions_, pixel, extent, picture_size(), camera_.pose().distance,
                                   detail_.pixels());
    if (front >= 0) return front;
  }
  return pick_item(camera_, positions_, pixel, pick_radius());
}

void MapView::hover_at(const glm::vec2& pixel) {
  const int h = item_at(pixel);
  if (h != hovered_) {
    hovered_ = h;
    dirty_points_ = true;
  }
}

void MapView::set_drag(int item, const glm::vec3& where) {
  drag_item_ = item;
  drag_where_ = where;
  if (item >= 0 && size_t(item) < positions_.size()) positions_[item] = where;
  dirty_points_ = dirty_lines_ = true;
}

void MapView::clear_drag() {
  drag_item_ = -1;
  dirty_points_ = dirty_lines_ = true;
}

// ============================================================================ [colour]

std::string MapView::colour_title() const {
  const ColourBy& by = options_.colour_by;
  switch (by.kind) {
    case ColourKind::kTag: return collection_.tags[size_t(by.tag_column)].name;
    case ColourKind::kColumn: return collection_.feature_names[size_t(by.feature_column)];
    case ColourKind::kDisplacement: return "moved since opening";
    case ColourKind::kJudgments: return "judgments per item";
    case ColourKind::kPlain: return "items";
    case ColourKind::kMeasure:
    case ColourKind::kGroup: return external_title_;
  }
  return "";
}

void MapView::set_measure(const std::string& title, const std::string& unit, std::vector<float> values) {
  external_title_ = title;
  external_unit_ = unit;
  external_measure_ = std::move(values);
  ViewOptions o = options_;
  o.colour_by.kind = ColourKind::kMeasure;
  set_options(o);
  dirty_colours_ = true;
}

void MapView::set_groups(const std::string& title, std::vector<int> groups, std::vector<std::string> names) {
  external_title_ = title;
  external_groups_ = std::move(groups);
  external_group_names_ = std::move(names);
  ViewOptions o = options_;
  o.colour_by.kind = ColourKind::kGroup;
  set_options(o);
  dirty_colours_ = true;
}

Rgb MapView::colour_of(int item) const {
  if (item < 0 || size_t(item) >= code_.colour.size()) return palette_.muted;
  return code_.colour[size_t(item)];
}

void MapView::rebuild_colours() {
  const size_t n = collection_.size();
  const ColourBy& by = options_.colour_by;
  switch (by.kind) {
    case ColourKind::kJudgments: {
      code_ = ramp_code(colour_title(), "judgments",
                        std::vector<double>(judgment_count_.begin(), judgment_count_.end()), true, palette_);
      break;
    }
    case ColourKind::kDisplacement: {
      // In percent of the map's size (the diagonal of its bounding box), a unit that reads the
      // same whatever the map's scale.
      const float size = std::max(glm::length(hi_ - lo_), 1e-6f);
      std::vector<double> m(n, 0.0);
      for (size_t i = 0; i < n && i < positions_.size() && i < start_positions_.size(); ++i)
        m[i] = 100.0 * glm::length(positions_[i] - start_positions_[i]) / size;
      code_ = ramp_code(colour_title(), "% of the map's size", m, true, palette_);
      break;
    }
    case ColourKind::kMeasure:
      code_ = external_measure_.size() == n
                  ? ramp_code(external_title_, external_unit_,
                              std::vector<double>(external_measure_.begin(), external_measure_.end()), true, palette_)
                  : plain_code("items", n, palette_);
      break;
    case ColourKind::kGroup:
      code_ = external_groups_.size() == n ? group_code(external_title_, external_groups_, external_group_names_, palette_)
                                           : plain_code("items", n, palette_);
      break;
    default: code_ = collection_code(collection_, by, palette_);
  }
  legend_.clear();
  for (const CodeEntry& e : code_.entries) {
    const bool tag_value = by.kind == ColourKind::kTag && !e.value.empty();
    legend_.push_back({e.label, e.colour, e.count, tag_value ? by.tag_column : -1, e.value, e.mark});
  }
  dirty_colours_ = false;
  dirty_points_ = true;
}

namespace {
// A size chosen by the number of items N: that of the first step with N <= up_to, else `beyond`.
struct CountStep {
  size_t up_to;
  float size;
};
float size_by_count(size_t n, std::initializer_list<CountStep> steps, float beyond) {
  for (const CountStep& s : steps)
    if (n <= s.up_to) return s.size;
  return beyond;
}
}  // namespace

float MapView::auto_point_size() const {
  return size_by_count(collection_.size(), {{2000, 10.f}, {20000, 7.f}, {60000, 5.f}}, 3.5f);
}

void MapView::rebuild_points() {
  std::vector<PointVertex> v(positions_.size()), highlights;
  const float size = options_.point_size > 0 ? options_.point_size : auto_point_size();
  if (draw_order_.size() != positions_.size()) {
    draw_order_.resize(positions_.size());
    std::iota(draw_order_.begin(), draw_order_.end(), 0);
    std::mt19937 rng(12345);
    std::shuffle(draw_order_.begin(), draw_order_.end(), rng);
  }
  for (size_t k = 0; k < positions_.size(); ++k) {
    const size_t i = size_t(draw_order_[k]);
    Rgb c = i < code_.colour.size() ? code_.colour[i] : palette_.muted;
    // Names alone: an item no judgment names yet has no place of its own; drawn faded.
    if (collection_.features.cols() == 0 && i < judgment_count_.size() && judgment_count_[i] == 0)
      c = toward(c, palette_.ground, kUnjudgedFade);
    uint32_t flags = i < code_.mark.size() ? uint32_t(code_.mark[i]) << kPointMarkShift : 0u;
    if (selection_.contains(int(i))) flags |= kPointSelected;
    if (i < pinned_.size() && pinned_[i]) flags |= kPointPinned;
    if (int(i) == hovered_) flags |= kPointHovered;
    if (int(i) == drag_item_) flags |= kPointDragged | kPointHovered;
    const float s = (flags & kPointPinned) ? std::max(size, 7.f) : size;
    v[k] = {positions_[i], pack_rgba(c.r, c.g, c.b, 1.f), s, flags};
    if (atlas_ && atlas_->ready(int(i))) {
      v[k].slot = atlas_->slot_of(int(i));
      v[k].aspect = atlas_->aspect(int(i));
    }
    if (flags & (kPointSelected | kPointHovered | kPointDragged)) highlights.push_back(v[k]);
  }
  renderer_.set_points(v);
  renderer_.set_highlights(highlights);
  dirty_points_ = false;
}

void MapView::rebuild_grid() {
  std::vector<LineVertex> g;
  const glm::vec3 size = hi_ - lo_;
  const float extent = std::max({size.x, size.z, 1e-7f}) * 1.3f;
  // A round step: 1, 2 or 5 times a power of ten, about 12 cells across.
  const float raw = extent / 12.f;
  const float p10 = std::pow(10.f, std::floor(std::log10(raw)));
  const float step = raw / p10 < 2.f ? 2.f * p10 : raw / p10 < 5.f ? 5.f * p10 : 10.f * p10;
  const glm::vec3 centre = (lo_ + hi_) * 0.5f;
  const float y = lo_.y - 0.04f * std::max(size.y, 1e-3f);
  const int cells = int(std::ceil(extent / step / 2.f));
  const float x0 = std::round(centre.x / step) * step, z0 = std::round(centre.z / step) * step;
  const uint32_t colour = pack_rgba(palette_.faint.r, palette_.faint.g, palette_.faint.b, 1.f);
  for (int k = -cells; k <= cells; ++k) {
    const float x = x0 + k * step, z = z0 + k * step;
    g.push_back({{x, y, z0 - cells * step}, colour});
    g.push_back({{x, y, z0 + cells * step}, colour});
    g.push_back({{x0 - cells * step, y, z}, colour});
    g.push_back({{x0 + cells * step, y, z}, colour});
  }
  grid_lo_ = glm::vec3(x0 - cells * step, lo_.y - 1e-3f, z0 - cells * step) - glm::vec3(0, 0, 0);
  grid_hi_ = glm::vec3(x0 + cells * step, hi_.y + 1e-3f, z0 + cells * step);
  // The floor tracks the map's height too: allow growth upward without a rebuild.
  grid_lo_.y = -std::numeric_limits<float>::max();
  grid_hi_.y = std::numeric_limits<float>::max();
  renderer_.set_grid(g);
  grid_floor_y_ = y;
  dirty_grid_ = false;
}

void MapView::rebuild_lines() {
  std::vector<LineVertex> l;
  const uint32_t nearer = pack_rgba(palette_.nearer.r, palette_.nearer.g, palette_.nearer.b, 0.9f);
  const uint32_t farther = pack_rgba(palette_.farther.r, palette_.farther.g, palette_.farther.b, 0.55f);
  const size_t n = positions_.size();
  const size_t kMaxLines = 4000;
  if (!selection_.empty()) {
    for (const auto& j : judgments()) {
      if (j.retracted || l.size() >= kMaxLines) continue;
      if (!selection_.contains(j.anchor) && !selection_.contains(j.nearer) && !selection_.contains(j.farther)) continue;
      if (size_t(j.anchor) >= n || size_t(j.nearer) >= n || size_t(j.farther) >= n || j.anchor < 0 || j.nearer < 0 ||
          j.farther < 0)
        continue;
      l.push_back({positions_[j.anchor], nearer});
      l.push_back({positions_[j.nearer], nearer});
      l.push_back({positions_[j.anchor], farther});
      l.push_back({positions_[j.farther], farther});
    }
  }
  renderer_.set_lines(l);
  dirty_lines_ = false;
}

// ============================================================================ [neighbours]

namespace {
template <typename Dist>
std::vector<int> k_smallest(size_t n, int item, int k, Dist dist) {
  std::vector<std::pair<double, int>> d;
  d.reserve(n);
  for (size_t i = 0; i < n; ++i)
    if (int(i) != item) d.push_back({dist(i), int(i)});
  const size_t kk = std::min<size_t>(size_t(std::max(k, 0)), d.size());
  std::partial_sort(d.begin(), d.begin() + kk, d.end());
  std::vector<int> out;
  for (size_t i = 0; i < kk; ++i) out.push_back(d[i].second);
  return out;
}
}  // namespace

std::vector<int> MapView::nearest_in_features(int item, int k) const {
  const Points& f = collection_.features;
  if (item < 0 || item >= f.rows() || f.cols() == 0) return {};
  return k_smallest(size_t(f.rows()), item, k, [&](size_t i) { return (f.row(Eigen::Index(i)) - f.row(item)).squaredNorm(); });
}

std::vector<int> MapView::nearest_in_map(int item, int k) const {
  if (item < 0 || size_t(item) >= positions_.size()) return {};
  const glm::vec3 p = positions_[item];
  return k_smallest(positions_.size(), item, k, [&](size_t i) {
    const glm::vec3 d = positions_[i] - p;
    return double(glm::dot(d, d));
  });
}

// ============================================================================ [pictures]

float MapView::picture_size() const {
  if (options_.picture_size > 0) return options_.picture_size;
  // Large enough to tell pictures apart, small enough that a fitted map is not one pile.
  return size_by_count(collection_.size(), {{500, 30.f}, {2000, 26.f}, {10000, 20.f}}, 16.f);
}

void MapView::update_pictures() {
  if (!options_.pictures || collection_.pictures.empty()) return;
  if (!atlas_) atlas_ = std::make_unique<PictureAtlas>(collection_.pictures);
  // A bounded number of slots a frame, so loading never stalls one (about 2.8 MB of texels).
  constexpr size_t kSlotsPerFrame = 128;
  if (atlas_->pump(renderer_, kSlotsPerFrame) > 0) dirty_points_ = true;
}

void MapView::finish_pictures() {
  if (!options_.pictures || collection_.pictures.empty()) return;
  update_pictures();
  atlas_->finish(renderer_);
  dirty_points_ = true;
}

// ============================================================================ [frame]

FrameParams MapView::frame_params() const {
  FrameParams f;
  f.view = camera_.view();
  f.projection = camera_.projection();
  f.width = camera_.width();
  f.height = camera_.height();
  f.ground = glm::vec3(palette_.ground.r, palette_.ground.g, palette_.ground.b);
  f.ink = glm::vec3(palette_.ink.r, palette_.ink.g, palette_.ink.b);
  f.reference_distance = camera_.pose().distance;
  f.point_scale = 1.f;
  const float radius = std::max(glm::length(hi_ - lo_) * 0.5f, 1e-7f);
  const float centre_depth = glm::dot((lo_ + hi_) * 0.5f - camera_.eye(), camera_.forward());
  f.fade_near = centre_depth - radius * 0.8f;
  f.fade_far = centre_depth + radius;
  f.fade_amount = options_.fade;
  f.grid = options_.grid;
  f.lines = options_.lines;
  f.pictures = options_.pictures && atlas_ != nullptr;
  f.picture_size = picture_size();
  f.picture_min_pixels = detail_.pixels();
  f.point_budget = reduced_ ? budget_ : 0;
  return f;
}

void MapView::frame(float dt, int width, int height) {
  camera_.set_viewport(width, height);
  if (auto_rotate && drag_item_ < 0) camera_.spin(rotate_speed * dt);
  camera_.update(dt);
  const CameraPose& p = camera_.pose();
  const bool moved = p.yaw != last_pose_.yaw || p.pitch != last_pose_.pitch || p.distance != last_pose_.distance ||
                     p.target != last_pose_.target;
  last_pose_ = p;
  still_seconds_ = moved ? 0.f : still_seconds_ + dt;
  map_still_seconds_ += dt;
  if (budget_ == 0 || budget_ > options_.moving_budget) budget_ = options_.moving_budget;
  budget_ = std::min(budget_, std::max<size_t>(positions_.size(), 1));
  const bool at_rest = still_seconds_ >= 0.25f && map_still_seconds_ >= 0.25f;
  reduced_ = options_.moving_budget > 0 && positions_.size() > budget_ && !at_rest;
  update_pictures();
  if (dirty_colours_) rebuild_colours();
  if (dirty_grid_) rebuild_grid();
  if (dirty_points_ || last_hovered_drawn_ != hovered_) rebuild_points();
  if (dirty_lines_) rebuild_lines();
  last_hovered_drawn_ = hovered_;
  renderer_.draw(frame_params());
  ++frames_;
}

}  // namespace kith
