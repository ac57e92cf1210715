// The Judgments panel (see panel_judgments.h). Index:
//   [SECTION] actions (no ImGui)
//   [SECTION] drawing
#include "viewer/panels/panel_judgments.h"

#include <imgui.h>

#include <algorithm>
#include <cstdio>
#include <cstring>
#include <filesystem>

#include "solver/io/judgment_io.h"
#include "viewer/panels/ui_style.h"

namespace kith {

namespace {
ImVec4 to_imvec(const Rgb& c, float a = 1.f) { return ImVec4(c.r, c.g, c.b, a); }
std::string percent(double share) {
  if (share < 0) return "-";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.0f%%", share * 100.0);
  return buf;
}
// "12-01 21:54:23" (UTC): enough to tell answers apart in a list.
std::string short_time(double seconds) {
  if (seconds <= 0) return "-";
  const std::string iso = format_time_utc(seconds);  // 2026-12-01T21:54:23.123Z
  return iso.size() >= 19 ? iso.substr(5, 5) + " " + iso.substr(11, 8) : iso;
}
const std::string& name_of(const std::vector<std::string>& ids, int32_t item) {
  static const std::string unknown = "?";
  return item >= 0 && size_t(item) < ids.size() ? ids[size_t(item)] : unknown;
}
std::string person_label(const std::string& person) { return person.empty() ? "(no name)" : person; }
// Three table columns: the judgment's anchor, nearer and farther item.
void name_columns(const std::vector<std::string>& ids, const Judgment& j) {
  for (const int32_t item : {j.anchor, j.nearer, j.farther}) {
    ImGui::TableNextColumn();
    ImGui::TextUnformatted(name_of(ids, item).c_str());
  }
}
}  // namespace

// ============================================================================ [SECTION] actions (no ImGui)

JudgmentsPanel::JudgmentsPanel(const Collection& collection, MapView& view, JudgmentsPanelLinks links)
    : collection_(collection), view_(view), links_(std::move(links)) {}

const std::vector<size_t>& JudgmentsPanel::rows() {
  const auto& all = view_.judgments();
  if (filter_dirty_ || rows_for_version_ != view_.judgment_set()->version()) {
    rows_ = filter_judgments(all, collection_.ids, filter_);
    rows_for_version_ = view_.judgment_set()->version();
    retracted_count_ = size_t(std::count_if(all.begin(), all.end(), [](const Judgment& j) { return j.retracted; }));
    people_names_ = judgment_people(all);
    filter_dirty_ = false;
  }
  return rows_;
}

std::string JudgmentsPanel::set_retracted(size_t index, bool retracted) {
  const auto& all = view_.judgments();
  if (index >= all.size()) return problem_ = "no such judgment";
  if (all[index].retracted == retracted) return problem_ = "";
  if (all[index].id < 0) return problem_ = "this judgment has no stored id yet, so it cannot be retracted";
  CommandBody body = cmd::RetractJudgment{all[index].id, retracted};
  const int64_t id = all[index].id;
  const std::string refused = links_.post ? links_.post(body) : "nowhere to send it";
  if (!refused.empty()) return problem_ = refused;  // the list stays as it was
  // The list shows it once the map's next snapshot carries the changed judgment set.
  problem_.clear();
  if (links_.say) links_.say(std::string(retracted ? "retracted" : "restored") + " judgment " + std::to_string(id));
  return "";
}

std::string JudgmentsPanel::toggle_chosen() {
  const auto& all = view_.judgments();
  if (chosen_ >= all.size()) return problem_ = "choose a judgment first (click a row, or ctrl + up / down)";
  return set_retracted(chosen_, !all[chosen_].retracted);
}

void JudgmentsPanel::choose(size_t index, bool show) {
  chosen_ = index;
  scroll_to_chosen_ = true;
  if (show && index < view_.judgments().size()) show_in_map(index);
}

void JudgmentsPanel::choose_step(int step) {
  const auto& r = rows();
  if (r.empty()) return;
  auto at = std::find(r.begin(), r.end(), chosen_);
  size_t pos;
  if (at == r.end())
    pos = step > 0 ? 0 : r.size() - 1;
  else
    pos = size_t(std::clamp<long long>((long long)(at - r.begin()) + step, 0, (long long)r.size() - 1));
  choose(r[pos]);
  // Said as well, so stepping through judgments works with the panels hidden (Tab) and the map in full.
  const Judgment& j = view_.judgments()[r[pos]];
  if (links_.say)
    links_.say("judgment " + std::to_string(j.id) + ": " + name_of(collection_.ids, j.anchor) + " is more like " +
               name_of(collection_.ids, j.nearer) + " than " + name_of(collection_.ids, j.farther) + " (" +
               person_label(j.person) + (j.retracted ? ", retracted)" : ")"));
}

void JudgmentsPanel::show_in_map(size_t index) {
  const auto& all = view_.judgments();
  if (index >= all.size()) return;
  const Judgment& j = all[index];
  std::vector<int> items;
  for (int32_t i : {j.anchor, j.nearer, j.farther})
    if (i >= 0 && size_t(i) < collection_.size()) items.push_back(int(i));
  view_.selection().set(items);
  view_.selection_changed();
  view_.focus_selection();
}

int JudgmentsPanel::person_colour_index(const std::string& person) const {
  auto it = std::lower_bound(people_names_.begin(), people_names_.end(), person);
  return it != people_names_.end() && *it == person ? int(it - people_names_.begin()) : -1;
}

Rgb JudgmentsPanel::person_colour(const std::string& person) const {
  Rgb c;
  if (links_.person_colour && links_.person_colour(person, &c)) return c;
  const int k = person_colour_index(person);
  return k >= 0 ? view_.palette().category(k) : view_.palette().muted;
}

void JudgmentsPanel::compute_figures() {
  rows();  // people_names_ up to date
  const auto s = view_.snapshot();
  const auto& all = view_.judgments();
  people_.clear();
  violated_.clear();
  const bool have_map = s && s->positions.rows() == Eigen::Index(collection_.size());
  std::vector<PersonJudgmentAgreement> with_map;
  if (have_map) with_map = per_person_agreement(s->positions, all);
  if (questions_dirty_ || questions_for_version_ != view_.judgment_set()->version()) {
    questions_ = same_question_agreement(all);
    repeated_ = repeated_questions(all);
    questions_for_version_ = view_.judgment_set()->version();
    questions_dirty_ = false;
  }
  for (const PersonQuestionAgreement& q : questions_) {
    PersonRow r;
    r.person = q.person;
    r.questions = q;
    for (const auto& m : with_map)
      if (m.person == q.person) r.judgments = m.judgments, r.with_map = m.agreement;
    if (!have_map)
      r.judgments = size_t(std::count_if(all.begin(), all.end(),
                                         [&](const Judgment& j) { return !j.retracted && j.person == q.person; }));
    people_.push_back(r);
  }
  if (have_map) {
    try {
      violated_ = strongly_violated(s->positions, all, violation);
    } catch (const std::exception& e) {
      problem_ = e.what();
    }
    figures_generation_ = s->generation;
  }
}

void JudgmentsPanel::tick(double now_seconds) {
  now_ = now_seconds;
  // The judgments changed (here, in the question screens, anywhere): a new set, a new version.
  if (view_.judgment_set()->version() != seen_version_) {
    seen_version_ = view_.judgment_set()->version();
    mark_judgments_changed();
  }
  if (now_seconds < next_sample_) return;
  const auto s = view_.snapshot();
  if (!s || s->positions.rows() != Eigen::Index(collection_.size())) return;
  next_sample_ = now_seconds + sample_seconds;
  history_.add(now_seconds, per_person_agreement(s->positions, view_.judgments()));
}

size_t JudgmentsPanel::import_csv(const std::string& path, bool skip_bad_rows) {
  file_messages_.clear();
  if (path.empty()) {
    file_messages_.push_back("give the path of a CSV file to import");
    return 0;
  }
  JudgmentReadOptions options;
  options.skip_bad_rows = skip_bad_rows;
  JudgmentReadResult r = read_judgments_csv(path, collection_.ids, options);
  for (const Problem& p : r.problems) file_messages_.push_back(describe(p));
  if (!r.ok() && !skip_bad_rows) {
    file_messages_.push_back(std::to_string(r.bad_rows) + " bad row" + (r.bad_rows == 1 ? "" : "s") + " in " + path +
                             ": none imported (fix them, or tick \"skip bad rows\")");
    return 0;
  }
  // Every judgment goes through the window's post path (written to the session first, if any,
  // which gives it its id); the list shows them with the map's next snapshot.
  size_t added = 0;
  std::string refused;
  for (Judgment j : r.judgments) {
    j.id = -1;
    CommandBody body = cmd::AddJudgment{j};
    refused = links_.post ? links_.post(body) : "nowhere to send it";
    if (!refused.empty()) break;
    ++added;
  }
  std::string summary = "imported " + std::to_string(added) + " judgment" + (added == 1 ? "" : "s") + " from " + path;
  if (r.bad_rows) summary += "; skipped " + std::to_string(r.bad_rows) + " bad row" + (r.bad_rows == 1 ? "" : "s");
  if (!refused.empty())
    summary +=
        "; stopped after " + std::to_string(added) + " of " + std::to_string(r.judgments.size()) + ": " + refused;
  file_messages_.push_back(summary);
  if (links_.say) links_.say(summary);
  return added;
}

bool JudgmentsPanel::export_csv(const std::string& path, bool include_retracted, bool include_people, bool replace) {
  file_messages_.clear();
  namespace fs = std::filesystem;
  if (path.empty()) {
    file_messages_.push_back("give the path of the CSV file to write");
    return false;
  }
  if (fs::path(path).extension() == ".kith") {
    file_messages_.push_back(path + ": a judgments export is a CSV file; refusing to write over a session");
    return false;
  }
  SafeWriteOptions file;  // the safe writer refuses a session (any SQLite file) whatever the name
  file.replace = replace;
  if (const std::string problem = check_write_target(path, file); !problem.empty()) {
    SafeWriteOptions forced = file;
    forced.replace = true;
    file_messages_.push_back(problem + (check_write_target(path, forced).empty()
                                            ? ": tick \"replace an existing file\" to write over it"
                                            : ""));
    return false;
  }
  JudgmentWriteOptions options;
  options.include_retracted = include_retracted;
  options.include_people = include_people;
  const auto& all = view_.judgments();
  const std::string e = write_judgments_csv(path, all, collection_.ids, options, file);
  if (!e.empty()) {
    file_messages_.push_back(e);
    return false;
  }
  size_t written = 0;
  for (const Judgment& j : all) written += include_retracted || !j.retracted;
  const std::string summary =
      "wrote " + std::to_string(written) + " judgment" + (written == 1 ? "" : "s") + " to " + path;
  file_messages_.push_back(summary);
  if (links_.say) links_.say(summary);
  return true;
}

// ============================================================================ [SECTION] drawing

void JudgmentsPanel::draw(bool* open, const DockRect& list, const DockRect& agreement) {
  // Figures: when the map or the judgments changed, at most every two seconds.
  const auto s = view_.snapshot();
  if (now_ >= figures_due_ && (!s || s->generation != figures_generation_ || figures_due_ == 0.0)) {
    compute_figures();
    figures_due_ = now_ + 2.0;
  }
  begin_docked("Judgments", list, open);
  if (ImGui::BeginTabBar("judgment tabs")) {
    auto flags = [&](Tab t) { return tab_pending_ && wanted_tab_ == t ? ImGuiTabItemFlags_SetSelected : 0; };
    if (ImGui::BeginTabItem("List", nullptr, flags(Tab::kList))) {
      tab_list();
      ImGui::EndTabItem();
    }
    if (ImGui::BeginTabItem("Files", nullptr, flags(Tab::kFiles))) {
      tab_files();
      ImGui::EndTabItem();
    }
    if (ImGui::TabItemButton(show_agreement_ ? "agreement: hide" : "agreement: show", ImGuiTabItemFlags_Trailing))
      show_agreement_ = !show_agreement_;
    ImGui::EndTabBar();
  }
  end_docked();
  if (tab_pending_ && wanted_tab_ == Tab::kAgreement) show_agreement_ = true;
  tab_pending_ = false;
  if (!show_agreement_ || agreement.empty()) return;
  begin_docked("Agreement", agreement, &show_agreement_);
  tab_agreement();
  end_docked();
}

void JudgmentsPanel::tab_list() {
  const auto& all = view_.judgments();
  rows();
  // Filters: by whom, which items, and the retracted ones as a chip.
  ImGui::SetNextItemWidth(std::min(150.f, ImGui::GetContentRegionAvail().x * 0.45f));
  const std::string current = filter_.any_person ? "everyone" : person_label(filter_.person);
  if (ImGui::BeginCombo("##person", current.c_str())) {
    if (ImGui::Selectable("everyone", filter_.any_person)) filter().any_person = true;
    for (const std::string& p : people_names_)
      if (ImGui::Selectable(person_label(p).c_str(), !filter_.any_person && filter_.person == p)) {
        filter().any_person = false;
        filter_.person = p;
      }
    ImGui::EndCombo();
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("whose judgments to list");
  ImGui::SameLine();
  ImGui::SetNextItemWidth(-1.f);
  if (ImGui::InputTextWithHint("##item", "item: part of an id", item_text_, sizeof item_text_)) filter().item = item_text_;
  bool show_retracted = filter_.show_retracted;
  if (chip("retracted too", &show_retracted)) filter().show_retracted = show_retracted;
  const auto& r = rows();
  ImGui::SameLine();
  ImGui::TextDisabled("%zu shown of %zu  (%zu retracted)", r.size(), all.size(), retracted_count_);
  ImGui::PushTextWrapPos(0.f);
  ImGui::TextDisabled("ctrl + up / down: choose,  Delete: retract / restore");
  ImGui::PopTextWrapPos();
  if (!problem_.empty()) ImGui::TextColored(ImVec4(0.80f, 0.25f, 0.15f, 1.f), "%s", problem_.c_str());

  const ImGuiTableFlags flags = ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerV |
                                ImGuiTableFlags_Resizable | ImGuiTableFlags_SizingFixedFit;
  if (!ImGui::BeginTable("judgments", 9, flags, ImVec2(0, ImGui::GetContentRegionAvail().y))) return;
  table_heading({{"id"},
                 {"anchor", 0.f, true},
                 {"nearer", 0.f, true},
                 {"farther", 0.f, true},
                 {"person"},
                 {"time (UTC)"},
                 {"kind"},
                 {"state"},
                 {""}});
  ImGuiListClipper clipper;
  clipper.Begin(int(r.size()));
  const float row_height = ImGui::GetFrameHeight();
  if (scroll_to_chosen_) {
    auto at = std::find(r.begin(), r.end(), chosen_);
    if (at != r.end()) {
      const float y = float(at - r.begin()) * row_height;
      const float view_h = ImGui::GetWindowHeight() - 2 * row_height;
      if (y < ImGui::GetScrollY() || y > ImGui::GetScrollY() + view_h)
        ImGui::SetScrollY(std::max(0.f, y - view_h * 0.5f));
    }
    scroll_to_chosen_ = false;
  }
  size_t click = kNone, flip = kNone;
  while (clipper.Step()) {
    for (int row = clipper.DisplayStart; row < clipper.DisplayEnd; ++row) {
      const size_t k = r[size_t(row)];
      const Judgment& j = all[k];
      ImGui::TableNextRow(ImGuiTableRowFlags_None, row_height);
      ImGui::PushID(int(k));
      if (j.retracted) ImGui::PushStyleColor(ImGuiCol_Text, ImGui::GetStyleColorVec4(ImGuiCol_TextDisabled));
      ImGui::TableNextColumn();
      char id[32];
      std::snprintf(id, sizeof id, "%lld", static_cast<long long>(j.id));
      if (ImGui::Selectable(id, k == chosen_,
                            ImGuiSelectableFlags_SpanAllColumns | ImGuiSelectableFlags_AllowItemOverlap,
                            ImVec2(0, row_height)))
        click = k;
      if (ImGui::IsItemHovered())
        ImGui::SetTooltip("show %s, %s and %s in the map", name_of(collection_.ids, j.anchor).c_str(),
                          name_of(collection_.ids, j.nearer).c_str(), name_of(collection_.ids, j.farther).c_str());
      name_columns(collection_.ids, j);
      ImGui::TableNextColumn();
      if (!j.retracted)
        ImGui::TextColored(to_imvec(person_colour(j.person)), "%s", person_label(j.person).c_str());
      else
        ImGui::TextUnformatted(person_label(j.person).c_str());
      ImGui::TableNextColumn();
      ImGui::TextUnformatted(short_time(j.time).c_str());
      ImGui::TableNextColumn();
      ImGui::TextUnformatted(to_string(j.kind));
      ImGui::TableNextColumn();
      ImGui::TextUnformatted(j.retracted ? "retracted" : "");
      ImGui::TableNextColumn();
      if (j.retracted) ImGui::PopStyleColor();
      if (ImGui::SmallButton(j.retracted ? "restore" : "retract")) flip = k;
      ImGui::PopID();
    }
  }
  ImGui::EndTable();
  if (click != kNone) choose(click);
  if (flip != kNone) {
    chosen_ = flip;
    set_retracted(flip, !all[flip].retracted);
  }
}

void JudgmentsPanel::draw_chart(float height) {
  const auto& series = history_.series();
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const ImVec2 at = ImGui::GetCursorScreenPos();
  const float width = ImGui::GetContentRegionAvail().x;
  const float left = 34.f;
  const ImVec2 lo(at.x + left, at.y + 4), hi(at.x + width - 6, at.y + height - 16);
  dl->AddRectFilled(lo, hi, ImGui::GetColorU32(ImGuiCol_FrameBg), 3.f);
  // Agreement from 0 to 1 (every judgment satisfied); 0.5 is what a map unrelated to the
  // judgments would score, drawn stronger.
  auto y_of = [&](float v) { return hi.y - std::clamp(v, 0.f, 1.f) * (hi.y - lo.y); };
  for (int g = 0; g <= 4; ++g) {
    const float y = y_of(g / 4.f);
    dl->AddLine(ImVec2(lo.x, y), ImVec2(hi.x, y), ImGui::GetColorU32(ImGuiCol_Border), g == 2 ? 2.f : 1.f);
    if (g % 2 == 0) {
      char label[8];
      std::snprintf(label, sizeof label, "%d%%", g * 25);
      dl->AddText(ImVec2(at.x, y - 7), ImGui::GetColorU32(ImGuiCol_TextDisabled), label);
    }
  }
  const double t0 = history_.first_seconds(), t1 = std::max(history_.last_seconds(), t0 + 30.0);
  auto x_of = [&](double t) { return lo.x + float((t - t0) / (t1 - t0)) * (hi.x - lo.x); };
  for (const auto& [person, points] : series) {
    const ImU32 colour = ImGui::GetColorU32(to_imvec(person_colour(person)));
    std::vector<ImVec2> line;
    line.reserve(points.size());
    for (const auto& p : points) line.emplace_back(x_of(p.seconds), y_of(p.agreement));
    if (line.size() == 1)
      dl->AddCircleFilled(line[0], 3.f, colour);
    else if (line.size() > 1)
      dl->AddPolyline(line.data(), int(line.size()), colour, ImDrawFlags_None, 2.f);
  }
  char span[64];
  std::snprintf(span, sizeof span, "last %.0f s, a point every %.0f s", t1 - t0, sample_seconds);
  dl->AddText(ImVec2(lo.x, hi.y + 2), ImGui::GetColorU32(ImGuiCol_TextDisabled), span);
  ImGui::Dummy(ImVec2(width, height));
}

void JudgmentsPanel::tab_agreement() {
  const ImGuiTableFlags flags = ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerV | ImGuiTableFlags_SizingFixedFit;
  if (people_.empty()) ImGui::TextDisabled("no judgments yet");
  if (!people_.empty() && ImGui::BeginTable("people", 5, flags)) {
    ImGui::TableSetupColumn("person", ImGuiTableColumnFlags_WidthStretch);
    ImGui::TableSetupColumn("judgments");
    ImGui::TableSetupColumn("with the map");
    ImGui::TableSetupColumn("same again");
    ImGui::TableSetupColumn("with others");
    ImGui::TableNextRow(ImGuiTableRowFlags_Headers);
    static const char* kHints[] = {
        "colour: the person's line in the chart below", "their judgments that are not retracted",
        "share of their judgments the map satisfies now (anchor nearer to the nearer item)",
        "share of agreeing pairs among their own answers to a question asked again (pairs in brackets)",
        "share of agreeing pairs between their answers and other people's to the same question (pairs)"};
    for (int c = 0; c < 5; ++c) {
      ImGui::TableSetColumnIndex(c);
      ImGui::TableHeader(ImGui::TableGetColumnName(c));
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", kHints[c]);
    }
    for (const PersonRow& p : people_) {
      ImGui::TableNextRow();
      ImGui::TableNextColumn();
      ImGui::ColorButton("##c", to_imvec(person_colour(p.person)), ImGuiColorEditFlags_NoTooltip, ImVec2(12, 12));
      ImGui::SameLine();
      ImGui::TextUnformatted(person_label(p.person).c_str());
      ImGui::TableNextColumn();
      ImGui::Text("%zu", p.judgments);
      ImGui::TableNextColumn();
      ImGui::TextUnformatted(percent(p.with_map).c_str());
      ImGui::TableNextColumn();
      ImGui::Text("%s (%zu)", percent(p.questions.consistency()).c_str(), p.questions.repeat_pairs);
      ImGui::TableNextColumn();
      ImGui::Text("%s (%zu)", percent(p.questions.cross_agreement()).c_str(), p.questions.shared_pairs);
    }
    ImGui::EndTable();
    ImGui::TextDisabled("%zu questions answered more than once (hover a heading for its meaning)", repeated_);
  }
  ImGui::Spacing();
  ImGui::TextUnformatted("Agreement with the map over time");
  draw_chart(110.f);

  ImGui::Spacing();
  float threshold = float(violation.threshold);
  ImGui::SetNextItemWidth(120);
  if (ImGui::SliderFloat("##threshold", &threshold, 0.01f, 0.5f, "p < %.2f")) {
    violation.threshold = threshold;
    figures_due_ = 0.0;
    compute_figures();
  }
  ImGui::SameLine();
  ImGui::Text("Strongly violated: %zu (the map gives them a t-STE probability below %.2f)", violated_.size(),
              violation.threshold);
  const auto& all = view_.judgments();
  const ImGuiTableFlags list_flags = flags | ImGuiTableFlags_ScrollY;
  const float h = std::max(ImGui::GetContentRegionAvail().y, 4 * ImGui::GetFrameHeight());
  if (!violated_.empty() && ImGui::BeginTable("violated", 5, list_flags, ImVec2(0, h))) {
    table_heading({{"p"}, {"anchor", 0.f, true}, {"nearer", 0.f, true}, {"farther", 0.f, true}, {"person"}});
    ImGuiListClipper clipper;
    clipper.Begin(int(violated_.size()));
    size_t click = kNone;
    while (clipper.Step()) {
      for (int row = clipper.DisplayStart; row < clipper.DisplayEnd; ++row) {
        const ViolatedJudgment& v = violated_[size_t(row)];
        if (v.index >= all.size()) continue;
        const Judgment& j = all[v.index];
        ImGui::TableNextRow();
        ImGui::PushID(row);
        ImGui::TableNextColumn();
        char p[16];
        std::snprintf(p, sizeof p, "%.3f", v.probability);
        if (ImGui::Selectable(p, v.index == chosen_, ImGuiSelectableFlags_SpanAllColumns)) click = v.index;
        name_columns(collection_.ids, j);
        ImGui::TableNextColumn();
        ImGui::TextUnformatted(person_label(j.person).c_str());
        ImGui::PopID();
      }
    }
    ImGui::EndTable();
    if (click != kNone) choose(click);
  }
}

void JudgmentsPanel::tab_files() {
  ImGui::TextWrapped("Import judgments from a CSV file (anchor,nearer,farther,person,time,kind; items by id)");
  ImGui::SetNextItemWidth(-80);
  ImGui::InputTextWithHint("##import", "path/to/judgments.csv", import_path_, sizeof import_path_);
  ImGui::SameLine();
  if (ImGui::Button("Import")) import_csv(import_path_, skip_bad_rows_);
  chip("skip bad rows", &skip_bad_rows_);
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("otherwise a file with any bad row imports nothing");
  ImGui::Separator();
  ImGui::TextWrapped("Export the judgments to a CSV file");
  ImGui::SetNextItemWidth(-80);
  ImGui::InputTextWithHint("##export", "path/to/judgments.csv", export_path_, sizeof export_path_);
  ImGui::SameLine();
  if (ImGui::Button("Export")) export_csv(export_path_, export_retracted_, export_people_, export_replace_);
  chip("retracted too", &export_retracted_);
  ImGui::SameLine();
  chip("with people's names", &export_people_);
  chip("replace an existing file", &export_replace_);
  ImGui::Separator();
  if (ImGui::BeginChild("messages", ImVec2(0, 0), false)) {
    for (const std::string& m : file_messages_) ImGui::TextWrapped("%s", m.c_str());
  }
  ImGui::EndChild();
}

}  // namespace kith
