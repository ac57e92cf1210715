// MapView: everything the map window shows, as logic without GL or GLFW: the current map
// (from engine snapshots), the camera, the selection, hover and drag state, colouring and legend,
// every item's picture (viewer/scene/picture_atlas.h), judgment lines, the floor grid. It turns that state into renderer data
// (viewer/scene/renderer.h) and asks the renderer to draw; the window (viewer/window/app.h) and the windowless
// path (viewer/window/offscreen_render.h) both drive one, and the tests drive one over MockRenderer.
// Window (or render) thread only.
#pragma once
#include <cstdint>
#include <memory>
#include <string>
#include <unordered_map>
#include <vector>

#include "solver/io/collection.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"
#include "solver/base/judgment.h"
#include "viewer/scene/camera.h"
#include "viewer/scene/colour_code.h"
#include "viewer/scene/palette.h"
#include "viewer/scene/picture_atlas.h"
#include "viewer/scene/renderer.h"
#include "viewer/scene/selection.h"

namespace kith {

struct ViewOptions {
  float point_size = 0.f;      // disc diameter in pixels at the target distance; 0 = by item count (default: 0)
  float fade = 0.55f;          // how far the farthest items fade toward the ground, 0..1 (default: 0.55)
  bool grid = true;            // faint floor grid (default: on)
  bool lines = true;           // judgments of the selection (default: on)
  bool pictures = true;        // items with a picture drawn as it, when large enough on screen (default: on)
  float picture_size = 0.f;    // picture side in pixels at the target distance; 0 = by item count (default: 0)
  bool dark = false;           // night ground instead of paper (default: off)
  // Level of detail: while the view or the map moves, draw at most this many items (a fixed
  // random sample, so the picture keeps its shape), fewer when frames take longer than
  // target_frame_seconds; every item once both rest. 0 = always all (default: 40000)
  size_t moving_budget = 40000;
  float target_frame_seconds = 1.f / 30.f;  // (default: 30 fps)
  ColourBy colour_by;
  std::string IsValid() const;  // "" when valid, else what is wrong
};

struct LegendEntry {
  std::string label;
  Rgb colour;
  size_t count = 0;
  int tag_column = -1;   // >= 0: a tag value (click selects those items)
  std::string value;
  Mark mark = Mark::kDisc;
};

class MapView {
 public:
  MapView(const Collection& collection, Renderer& renderer);

  const Collection& collection() const { return collection_; }
  const ViewOptions& options() const { return options_; }
  void set_options(const ViewOptions& options);
  const Palette& palette() const { return palette_; }

  // ---- the map ---------------------------------------------------------------
  void set_snapshot(std::shared_ptr<const Snapshot> snapshot);
  const std::shared_ptr<const Snapshot>& snapshot() const { return snapshot_; }
  const std::vector<glm::vec3>& positions() const { return positions_; }  // as shown (drag included)
  bool pinned(int item) const;
  // The judgments in force, as the snapshot shown carries them (Snapshot::judgments): the lines,
  // the per-item counts and the judgments panel read them here; the view keeps no list of its own.
  const std::vector<Judgment>& judgments() const { return judgment_set()->all(); }
  const std::shared_ptr<const JudgmentSet>& judgment_set() const;
  glm::vec3 bounds_lo() const { return lo_; }
  glm::vec3 bounds_hi() const { return hi_; }

  // ---- camera ----------------------------------------------------------------
  Camera& camera() { return camera_; }
  const Camera& camera() const { return camera_; }
  // Frames the whole map; `by_person` (F, the menu) also resumes following a growing map.
  void fit_all(bool smooth = true, bool by_person = true);
  // Camera::set_centre_offset; a view that follows the map reframes it when the offset changes.
  void set_centre_offset(float ndc_x);
  // Camera::set_free_area (viewport pixels), refitting a followed view in the same way.
  void set_free_area(float x0, float y0, float x1, float y1);
  void focus_selection();
  bool auto_rotate = false;
  float rotate_speed = 0.12f;  // radians per second

  // ---- pointing --------------------------------------------------------------
  Selection& selection() { return selection_; }
  const Selection& selection() const { return selection_; }
  int hovered() const { return hovered_; }
  void hover_at(const glm::vec2& pixel);  // sets hovered() to the item under the mouse or -1
  int item_at(const glm::vec2& pixel) const;
  float pick_radius() const;
  // While dragging, the item is drawn at `where` at once (the engine follows a frame later).
  void set_drag(int item, const glm::vec3& where);
  void clear_drag();
  int dragged() const { return drag_item_; }
  void selection_changed() { dirty_points_ = dirty_lines_ = true; }

  // ---- colour ----------------------------------------------------------------
  const std::vector<LegendEntry>& legend() const { return legend_; }
  Rgb colour_of(int item) const;
  std::string colour_title() const;
  // The whole code: per-item colours and marks, the legend's entries and notes, a ramp's range.
  const ColourCode& colour_code() const { return code_; }
  // Colour by a measure (ramp from 0 to its largest value, `unit` in the legend; NaN = muted) or
  // by groups (-1 = muted, names[g] in the legend) and switch the colouring to it. N values each.
  void set_measure(const std::string& title, const std::string& unit, std::vector<float> values);
  void set_groups(const std::string& title, std::vector<int> groups, std::vector<std::string> names);

  // ---- nearest lists for the selection panel -----------------------------------
  std::vector<int> nearest_in_features(int item, int k) const;
  std::vector<int> nearest_in_map(int item, int k) const;

  // ---- pictures --------------------------------------------------------------
  // The picture side in pixels at the target distance (ViewOptions::picture_size or by item count).
  float picture_size() const;
  // Pictures are on and the collection has some: the atlas, else null.
  const PictureAtlas* atlas() const { return options_.pictures ? atlas_.get() : nullptr; }
  const DetailThreshold& detail() const { return detail_; }
  // Waits until every picture is decoded and on the renderer (the windowless path draws once).
  void finish_pictures();

  // Advance the camera by dt, rebuild what changed, draw into a framebuffer of this size.
  void frame(float dt, int width, int height);
  FrameParams frame_params() const;
  int frames_drawn() const { return frames_; }
  bool reduced_detail() const { return reduced_; }  // the last frame drew a sample only
  size_t detail_budget() const { return budget_; }
  // The time the last whole frame took (window loop); adapts the level-of-detail budget.
  void note_frame_time(float seconds);

 private:
  void rebuild_colours();
  void rebuild_points();
  void rebuild_grid();
  void rebuild_lines();
  void update_pictures();
  void update_bounds();
  float auto_point_size() const;

  const Collection& collection_;
  Renderer& renderer_;
  ViewOptions options_;
  Palette palette_ = Palette::paper();
  Camera camera_;
  std::shared_ptr<const Snapshot> snapshot_;
  std::vector<glm::vec3> positions_, start_positions_;
  std::vector<uint8_t> pinned_;
  std::shared_ptr<const JudgmentSet> counted_;  // the judgment set judgment_count_ was made from
  std::vector<int> judgment_count_;
  glm::vec3 lo_{-1.f}, hi_{1.f};
  bool following_ = true;          // the camera keeps a growing map framed (until a pan/zoom/focus)
  uint64_t framing_at_fit_ = 0;    // Camera::framing_changes() at the last fit
  glm::vec3 fitted_lo_{0.f}, fitted_hi_{0.f};  // the box last framed
  bool have_bounds_ = false;
  glm::vec3 grid_lo_{0.f}, grid_hi_{0.f};
  ColourCode code_;
  std::string external_title_, external_unit_;
  std::vector<float> external_measure_;
  std::vector<int> external_groups_;
  std::vector<std::string> external_group_names_;
  std::vector<LegendEntry> legend_;
  Selection selection_;
  int hovered_ = -1;
  int drag_item_ = -1;
  glm::vec3 drag_where_{0.f};
  std::unique_ptr<PictureAtlas> atlas_;  // made at the first frame that shows pictures
  DetailThreshold detail_;
  bool dirty_points_ = true, dirty_colours_ = true, dirty_grid_ = true, dirty_lines_ = true;
  int frames_ = 0;
  std::vector<int> draw_order_;   // a fixed shuffle of the items: any prefix is a fair sample
  CameraPose last_pose_;
  float still_seconds_ = 1e9f;
  float map_still_seconds_ = 1e9f;
  float smoothed_frame_ = 0.f;
  size_t budget_ = 0;
  bool reduced_ = false;
  int last_hovered_drawn_ = -2;
  float grid_floor_y_ = 0.f;
};

}  // namespace kith
