// The Structure panel (see panel_structure.h).
#include "viewer/panels/panel_structure.h"

#include <imgui.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>

#include "solver/fit/fit.h"
#include "solver/measures/neighbour_compare.h"
#include "viewer/panels/ui_style.h"

namespace kith {

namespace {
const std::string kNoTag;
ImVec4 to_imvec(const Rgb& c) { return ImVec4(c.r, c.g, c.b, 1.f); }
}  // namespace

StructurePanel::StructurePanel(const Collection& collection, MapView& view) : collection_(collection), view_(view) {
  if (view.options().colour_by.kind == ColourKind::kTag) tag_column_ = view.options().colour_by.tag_column;
}

StructurePanel::~StructurePanel() {
  if (job_.valid()) job_.wait();
  if (reference_job_.valid()) reference_job_.wait();
}

const std::string& StructurePanel::tag_of(int item) const {
  if (tag_column_ < 0 || size_t(tag_column_) >= collection_.tags.size()) return kNoTag;
  const auto& v = collection_.tags[size_t(tag_column_)].values;
  return item >= 0 && size_t(item) < v.size() ? v[size_t(item)] : kNoTag;
}

void StructurePanel::look() {
  if (job_.valid()) return;
  const auto snapshot = view_.snapshot();
  if (!snapshot || snapshot->positions.rows() != Eigen::Index(collection_.size())) {
    status_ = "no map yet";
    return;
  }
  // Copies: the helper thread shares nothing with the window.
  Points features = collection_.features;
  Points map = snapshot->positions;
  std::vector<std::string> tags;
  const bool have_tags = tag_column_ >= 0 && size_t(tag_column_) < collection_.tags.size();
  if (have_tags) tags = collection_.tags[size_t(tag_column_)].values;
  FindingsOptions options = options_;
  job_iteration_ = snapshot->iteration;
  status_ = "looking...";
  job_ = std::async(std::launch::async, [features = std::move(features), map = std::move(map), tags = std::move(tags),
                                         have_tags, options]() {
    return std::make_shared<MapFindings>(find_structure(features, map, have_tags ? &tags : nullptr, options));
  });
}

void StructurePanel::poll() {
  if (!job_.valid() || job_.wait_for(std::chrono::seconds(0)) != std::future_status::ready) return;
  try {
    found_ = job_.get();
    found_iteration_ = job_iteration_;
    char buf[96];
    std::snprintf(buf, sizeof buf, "the map at step %llu", static_cast<unsigned long long>(found_iteration_));
    status_ = buf;
  } catch (const std::exception& e) {
    job_ = {};
    status_ = std::string("could not look: ") + e.what();
  }
}

void StructurePanel::finish_look() {
  if (job_.valid()) job_.wait();
  poll();
}

void StructurePanel::choose_suspect(int item) {
  chosen_suspect_ = item;
  view_.selection().set({item});
  view_.focus_selection();
  // Its map neighbours join the selection so they show framed in the map.
  if (found_ && found_->map_graph.n == collection_.size()) {
    const NeighbourGraph& g = found_->map_graph;
    for (size_t r = 0; r < std::min<size_t>(g.k, 10); ++r) view_.selection().add(g.index[size_t(item) * g.k + r]);
  }
  view_.selection_changed();
}

void StructurePanel::draw(bool* open, const DockRect& rect) {
  poll();
  if (!looked_once_) {
    looked_once_ = true;
    look();
  }
  begin_docked("Structure", rect, open);
  if (ImGui::Button(busy() ? "Looking..." : "Look again")) look();
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("find suspects, groups and neighbourhoods in the map as it is now");
  ImGui::SameLine();
  ImGui::TextDisabled("%s", status_.c_str());
  if (!collection_.tags.empty()) {
    ImGui::AlignTextToFramePadding();
    ImGui::TextDisabled("tag");
    ImGui::SameLine();
    ImGui::SetNextItemWidth(-1.f);
    if (ImGui::BeginCombo("##tag", collection_.tags[size_t(tag_column_)].name.c_str())) {
      for (size_t t = 0; t < collection_.tags.size(); ++t)
        if (ImGui::Selectable(collection_.tags[t].name.c_str(), int(t) == tag_column_)) {
          tag_column_ = int(t);
          look();
        }
      ImGui::EndCombo();
    }
  }
  int space = int(options_.suspects.space);
  if (chip_choice("neighbours in", &space, {"features", "map", "both"})) {
    options_.suspects.space = SuspectSpace(space);
    look();
  }
  if (ImGui::BeginTabBar("structure-tabs")) {
    if (ImGui::BeginTabItem("Suspects")) {
      tab_suspects();
      ImGui::EndTabItem();
    }
    if (ImGui::BeginTabItem("Groups")) {
      tab_groups();
      ImGui::EndTabItem();
    }
    if (ImGui::BeginTabItem("Neighbours")) {
      tab_neighbours();
      ImGui::EndTabItem();
    }
    if (ImGui::BeginTabItem("Moved")) {
      tab_moved();
      ImGui::EndTabItem();
    }
    ImGui::EndTabBar();
  }
  end_docked();
}

void StructurePanel::tab_suspects() {
  if (!found_) return ImGui::TextDisabled("...");
  if (!found_->have_suspects) return ImGui::TextWrapped("Suspects need a tag column; this collection has none.");
  const SuspectScores& s = found_->suspects;
  if (ImGui::Button("Colour by suspect score")) {
    std::vector<float> v(s.score.begin(), s.score.end());
    view_.set_measure("suspect score", "", v);  // 0..1, the share of neighbours tagged otherwise
  }
  ImGui::SameLine();
  ImGui::TextDisabled("%zu scored", s.ranking.size());
  const float list_h = chosen_suspect_ >= 0 ? 180.f : 0.f;
  if (ImGui::BeginTable("suspects", 4, ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerH,
                        ImVec2(0, list_h))) {
    table_heading({{"item"}, {"tag"}, {"score"}, {"leans to"}});
    ImGuiListClipper clipper;
    clipper.Begin(int(s.ranking.size()));
    while (clipper.Step())
      for (int r = clipper.DisplayStart; r < clipper.DisplayEnd; ++r) {
        const int i = s.ranking[size_t(r)];
        ImGui::TableNextRow();
        ImGui::TableNextColumn();
        ImGui::PushID(r);
        if (ImGui::Selectable(collection_.ids[size_t(i)].c_str(), i == chosen_suspect_,
                              ImGuiSelectableFlags_SpanAllColumns))
          choose_suspect(i);
        ImGui::PopID();
        ImGui::TableNextColumn();
        ImGui::TextUnformatted(tag_of(i).c_str());
        ImGui::TableNextColumn();
        ImGui::Text("%.2f", s.score[size_t(i)]);
        ImGui::TableNextColumn();
        ImGui::Text("%s %.0f%%", s.likely_tag[size_t(i)].c_str(), 100.0 * s.likely_share[size_t(i)]);
      }
    ImGui::EndTable();
  }
  if (chosen_suspect_ < 0) return;
  // The chosen suspect's neighbours, features and map side by side, with their tags.
  const int i = chosen_suspect_;
  ImGui::Separator();
  ImGui::Text("%s  (%s)", collection_.ids[size_t(i)].c_str(), tag_of(i).c_str());
  const NeighbourGraph& f = found_->feature_graph;
  const NeighbourGraph& m = found_->map_graph;
  const size_t k = std::min(options_.suspects.k, m.k);
  const Rgb differ = view_.palette().farther;
  if (ImGui::BeginTable("suspect-neighbours", 3, ImGuiTableFlags_RowBg)) {
    ImGui::TableSetupColumn("#", ImGuiTableColumnFlags_WidthFixed, 24);
    ImGui::TableSetupColumn("in the features");
    ImGui::TableSetupColumn("in the map");
    ImGui::TableHeadersRow();
    for (size_t r = 0; r < k; ++r) {
      ImGui::TableNextRow();
      ImGui::TableNextColumn();
      ImGui::Text("%zu", r + 1);
      for (const NeighbourGraph* g : {&f, &m}) {
        ImGui::TableNextColumn();
        if (g->n != collection_.size() || r >= g->k) {
          ImGui::TextDisabled("-");
          continue;
        }
        const int j = g->index[size_t(i) * g->k + r];
        const std::string& t = tag_of(j);
        const std::string text = collection_.ids[size_t(j)] + "  " + t;
        if (t != tag_of(i))
          ImGui::TextColored(to_imvec(differ), "%s", text.c_str());
        else
          ImGui::TextUnformatted(text.c_str());
      }
    }
    ImGui::EndTable();
  }
  ImGui::PushTextWrapPos(0.f);  // the panel may be narrower than the sentence
  ImGui::TextDisabled("the selection holds it and its map neighbours, framed in the map");
  ImGui::PopTextWrapPos();
}

void StructurePanel::tab_groups() {
  if (!found_) return ImGui::TextDisabled("...");
  const Grouping& g = found_->groups;
  ImGui::TextWrapped("%s", g.summary().c_str());
  if (ImGui::Button("Colour by group")) {
    std::vector<std::string> names;
    for (size_t k = 0; k < g.groups.size(); ++k) names.push_back("group " + std::to_string(k + 1));
    view_.set_groups("groups", std::vector<int>(g.label.begin(), g.label.end()), names);
  }
  if (ImGui::BeginTable("groups", 4, ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerH)) {
    table_heading({{"group", 50.f}, {"size", 50.f}, {"tags"}, {"purity", 50.f}});
    for (size_t k = 0; k < g.groups.size(); ++k) {
      const Group& grp = g.groups[k];
      ImGui::TableNextRow();
      ImGui::TableNextColumn();
      ImGui::PushID(int(k));
      ImGui::ColorButton("##c", to_imvec(view_.palette().category(int(k))), ImGuiColorEditFlags_NoTooltip,
                         ImVec2(10, 10));
      ImGui::SameLine();
      if (ImGui::Selectable(std::to_string(k + 1).c_str(), int(k) == chosen_group_,
                            ImGuiSelectableFlags_SpanAllColumns)) {
        chosen_group_ = int(k);
        view_.selection().set(std::vector<int>(grp.members.begin(), grp.members.end()));
        view_.selection_changed();
        view_.focus_selection();
      }
      ImGui::PopID();
      ImGui::TableNextColumn();
      ImGui::Text("%zu", grp.size);
      ImGui::TableNextColumn();
      std::string tags;
      for (const TagShare& t : grp.tags) {
        char buf[32];
        std::snprintf(buf, sizeof buf, " %.0f%%", 100.0 * t.share);
        tags += (tags.empty() ? "" : ", ") + t.tag + buf;
      }
      ImGui::TextUnformatted(tags.c_str());
      ImGui::TableNextColumn();
      if (grp.tags.empty())
        ImGui::TextDisabled("-");
      else
        ImGui::Text("%.2f", grp.purity);
    }
    ImGui::EndTable();
  }
}

void StructurePanel::tab_neighbours() {
  if (!found_) return ImGui::TextDisabled("...");
  if (found_->kept.empty()) return ImGui::TextWrapped("Neighbour comparison needs features; this collection has none.");
  ImGui::Text("neighbours kept on average: %.3f (k %zu)", found_->mean_kept, options_.compare_k);
  const auto& sel = view_.selection().items();
  if (!sel.empty() && size_t(sel.front()) < collection_.size()) {
    const NeighbourComparison c =
        compare_neighbours(sel.front(), found_->feature_graph, found_->map_graph, options_.compare_k);
    ImGui::Text("%s: keeps %.0f%% of its neighbours", collection_.ids[size_t(c.item)].c_str(), 100.0 * c.kept);
    const Rgb lost = view_.palette().farther, gained = view_.palette().nearer;
    if (ImGui::BeginTable("compare", 3, ImGuiTableFlags_RowBg)) {
      ImGui::TableSetupColumn("#", ImGuiTableColumnFlags_WidthFixed, 24);
      ImGui::TableSetupColumn("in the features (map rank)");
      ImGui::TableSetupColumn("in the map (feature rank)");
      ImGui::TableHeadersRow();
      for (size_t r = 0; r < c.k; ++r) {
        ImGui::TableNextRow();
        ImGui::TableNextColumn();
        ImGui::Text("%zu", r + 1);
        ImGui::TableNextColumn();
        const NeighbourRank& a = c.features[r];
        if (a.map_rank == 0)
          ImGui::TextColored(to_imvec(lost), "%s  lost", collection_.ids[size_t(a.item)].c_str());
        else
          ImGui::Text("%s  (%d)", collection_.ids[size_t(a.item)].c_str(), a.map_rank);
        ImGui::TableNextColumn();
        const NeighbourRank& b = c.map[r];
        if (b.feature_rank == 0)
          ImGui::TextColored(to_imvec(gained), "%s  gained", collection_.ids[size_t(b.item)].c_str());
        else
          ImGui::Text("%s  (%d)", collection_.ids[size_t(b.item)].c_str(), b.feature_rank);
      }
      ImGui::EndTable();
    }
  } else {
    ImGui::TextDisabled("select an item to compare its neighbours");
  }
  ImGui::Separator();
  ImGui::TextUnformatted("Kept worst:");
  ImGui::SameLine();
  if (ImGui::SmallButton("Colour by neighbours kept"))
    view_.set_measure("neighbours kept", "", std::vector<float>(found_->kept.begin(), found_->kept.end()));
  const std::vector<int32_t> worst = worst_kept(found_->kept, 50);
  if (ImGui::BeginTable("worst", 3, ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg, ImVec2(0, 160))) {
    for (int32_t i : worst) item_row(i, false, "%.2f", found_->kept[size_t(i)]);
    ImGui::EndTable();
  }
}

}  // namespace kith

namespace kith {

// One table row of three columns: the item's id (choosing it selects it and flies there), its
// tag, and VALUE printed with FORMAT.
void StructurePanel::item_row(int item, bool selected, const char* format, double value) {
  ImGui::TableNextRow();
  ImGui::TableNextColumn();
  ImGui::PushID(item);
  if (ImGui::Selectable(collection_.ids[size_t(item)].c_str(), selected, ImGuiSelectableFlags_SpanAllColumns)) {
    view_.selection().set({item});
    view_.selection_changed();
    view_.focus_selection();
  }
  ImGui::PopID();
  ImGui::TableNextColumn();
  ImGui::TextUnformatted(tag_of(item).c_str());
  ImGui::TableNextColumn();
  ImGui::Text(format, value);
}

void StructurePanel::fit_reference() {
  if (reference_job_.valid() || collection_.features.cols() == 0) return;
  const auto snapshot = view_.snapshot();
  FitOptions options;
  if (snapshot && (snapshot->positions.cols() == 2 || snapshot->positions.cols() == 3))
    options.dims = int(snapshot->positions.cols());
  if (!options.IsValid(nullptr, collection_.size())) options.perplexity = std::max(1.0, (collection_.size() - 1) / 3.0);
  Points features = collection_.features;  // a copy: the helper thread shares nothing
  reference_job_ = std::async(std::launch::async, [features = std::move(features), options]() {
    return std::make_shared<Points>(fit_map(features, options).map);
  });
}

void StructurePanel::poll_reference() {
  if (!reference_job_.valid() || reference_job_.wait_for(std::chrono::seconds(0)) != std::future_status::ready) return;
  try {
    reference_ = reference_job_.get();
    compare_with_reference();
  } catch (const std::exception& e) {
    reference_job_ = {};
    status_ = std::string("could not fit the reference map: ") + e.what();
  }
}

void StructurePanel::finish_reference() {
  if (reference_job_.valid()) reference_job_.wait();
  poll_reference();
}

void StructurePanel::compare_with_reference() {
  const auto snapshot = view_.snapshot();
  if (!reference_ || !snapshot || snapshot->positions.rows() != reference_->rows() ||
      snapshot->positions.cols() != reference_->cols())
    return;
  moved_map_ = snapshot->positions;
  moved_ = measure_displacement(*reference_, moved_map_);
  pulls_item_ = -1;
}

void StructurePanel::tab_moved() {
  poll_reference();
  if (collection_.features.cols() == 0) return ImGui::TextWrapped("The reference map needs features; there are none.");
  if (!reference_) {
    ImGui::TextWrapped("Compare the map with the one the features alone give (no judgments): fit it first.");
    if (ImGui::Button(reference_job_.valid() ? "Fitting..." : "Fit the map from the features alone")) fit_reference();
    return;
  }
  if (ImGui::Button("Compare with the map now")) compare_with_reference();
  if (!moved_) return;
  ImGui::SameLine();
  if (ImGui::Button("Colour by displacement"))
    view_.set_measure("moved by judgments", "map units", std::vector<float>(moved_->distance.begin(), moved_->distance.end()));
  ImGui::TextDisabled("aligned by rotation, scale %.3g and shift; rms %.3g", moved_->alignment.scale,
                      moved_->alignment.rms);
  if (ImGui::BeginTable("moved", 3, ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg, ImVec2(0, 200))) {
    for (size_t r = 0; r < std::min<size_t>(100, moved_->ranking.size()); ++r) {
      const int32_t i = moved_->ranking[r];
      item_row(i, view_.selection().contains(i), "%.3g", moved_->distance[size_t(i)]);
    }
    ImGui::EndTable();
  }
  const auto& sel = view_.selection().items();
  if (sel.empty()) return ImGui::TextDisabled("select an item to see which judgments moved it");
  const int item = sel.front();
  if (item != pulls_item_) {
    pulls_ = judgments_moving(item, moved_map_, *moved_, view_.judgments(), 5);
    pulls_item_ = item;
  }
  ImGui::Text("Judgments pulling %s the way it moved:", collection_.ids[size_t(item)].c_str());
  if (pulls_.empty() || pulls_.front().pull <= 0.0) ImGui::TextDisabled("none");
  for (const JudgmentPull& p : pulls_) {
    if (p.pull <= 0.0) break;
    const Judgment& j = view_.judgments()[p.index];
    ImGui::BulletText("%s nearer %s than %s%s%s  (pull %.3g)", collection_.ids[size_t(j.anchor)].c_str(),
                      collection_.ids[size_t(j.nearer)].c_str(), collection_.ids[size_t(j.farther)].c_str(),
                      j.person.empty() ? "" : ", ", j.person.c_str(), p.pull);
  }
}

}  // namespace kith
