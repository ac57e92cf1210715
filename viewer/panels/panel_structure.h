// StructurePanel: the window's "Structure" panel (key S): suspects, groups and neighbour
// comparison for the map as it is now (solver/measures/map_findings.h).
//   Suspects: ranked list; choosing one flies the camera to it, selects it with its map
//     neighbours (so their picture cards show side by side) and lists its neighbours' tags in
//     the features and in the map; the map can be coloured by suspect score.
//   Groups: DBSCAN groups of the current map with size, tags, purity; choosing one selects its
//     members; colour by group.
//   Neighbours: for the selected item, its nearest in the features and in the map side by side
//     with ranks, gained and lost; the items whose neighbourhoods the map keeps worst.
//   Moved: fits the judgment-free reference map from the features alone (solver/fit/fit.h, default
//     options, on a helper thread), aligns it with the map now (solver/measures/displacement.h) and lists
//     the most moved items, colours by displacement, and names the judgments that pulled the
//     selected item most.
// The work runs on a helper thread over copies of the features, the snapshot's positions and the
// tags (nothing shared); the panel polls its result each frame. Window thread only.
#pragma once
#include <future>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/measures/displacement.h"
#include "solver/measures/map_findings.h"
#include "viewer/scene/dock_layout.h"
#include "viewer/scene/map_view.h"

namespace kith {

class StructurePanel {
 public:
  StructurePanel(const Collection& collection, MapView& view);
  ~StructurePanel();  // waits for a running look
  // Draws the panel docked at `rect` (window pixels) in kith's chrome ("hide" clears *open); the
  // first draw starts a look at the map.
  void draw(bool* open, const DockRect& rect);
  // Starts a new look at the map shown now (no-op while one runs).
  void look();
  bool busy() const { return job_.valid(); }
  void finish_look();  // waits for a running look and takes its result (tests, scripts)
  const MapFindings* findings() const { return found_.get(); }
  void choose_suspect(int item);  // fly to it and select it with its map neighbours
  void fit_reference();           // starts the judgment-free fit (no-op while one runs)
  void finish_reference();        // waits for it (tests, scripts)
  void compare_with_reference();  // displacement of the map now from the reference
  const Displacement* displacement() const { return moved_ ? &*moved_ : nullptr; }

 private:
  void poll();
  void tab_suspects();
  void tab_groups();
  void tab_neighbours();
  void tab_moved();
  void poll_reference();
  const std::string& tag_of(int item) const;
  void item_row(int item, bool selected, const char* format, double value);

  const Collection& collection_;
  MapView& view_;
  FindingsOptions options_;
  int tag_column_ = 0;
  std::future<std::shared_ptr<MapFindings>> job_;
  std::shared_ptr<MapFindings> found_;
  uint64_t found_iteration_ = 0, job_iteration_ = 0;
  std::string status_;
  int chosen_suspect_ = -1;
  int chosen_group_ = -1;
  bool looked_once_ = false;
  std::future<std::shared_ptr<Points>> reference_job_;
  std::shared_ptr<Points> reference_;
  std::optional<Displacement> moved_;
  Points moved_map_;     // the map the displacement was measured on
  int pulls_item_ = -1;  // item whose judgment pulls are cached
  std::vector<JudgmentPull> pulls_;
};

}  // namespace kith
