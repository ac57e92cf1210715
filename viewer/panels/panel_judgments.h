// JudgmentsPanel: the window's "Judgments" panel (key L): a window with the List and Files tabs and
// an "Agreement" window below it.
//   List       every judgment (id, anchor / nearer / farther, person, time, kind, retracted), filtered
//              by person and by part of an item id; retract and restore (a RetractJudgment command
//              through the window's post path, so with a session it is written to the file before
//              the map sees it; a refused post leaves the list as it was and shows why); "show in
//              map" selects the judgment's three items and glides the camera to them. Rows are
//              clipped (ImGuiListClipper), so 50,000 judgments stay fast.
//   Agreement  per person: agreement with the map (share of their active judgments the map
//              satisfies), consistency on questions they answered again, agreement with other people
//              on shared questions (solver/measures/judgment_review.h, from the judgments alone); a chart of
//              each person's agreement with the map over time (sampled every few seconds); the
//              judgments the map gives a t-STE probability below a threshold, to discuss.
//   Files      import judgments from CSV (none of a bad file unless "skip bad rows" is ticked; every
//              bad row listed with its line and cause) and export them (solver/io/judgment_io.h).
// The list is the judgment set in force as the map's snapshot carries it (MapView::judgments()):
// a retraction or an import is posted, and shows once the next snapshot has it; the panel keeps no
// copy of its own and never numbers a judgment (the feed or the session does, MapFeed::prepare).
// The actions are plain methods, so tests drive them without a window (draw() needs ImGui).
// Window thread only.
#pragma once
#include <cstdint>
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"
#include "solver/measures/judgment_review.h"
#include "viewer/scene/dock_layout.h"
#include "viewer/scene/map_view.h"

namespace kith {

struct JudgmentsPanelLinks {
  // Posts a command through the window's path (feed prepare, then post). Returns "" when posted
  // (the body completed as the feed left it, e.g. a new judgment's stored id), else why not.
  std::function<std::string(CommandBody& body)> post;
  std::function<void(const std::string& text)> say;  // a short message in the window (may be empty)
  // The colour a person was given (the people list of the question screens); false = none given,
  // then the palette's colours in name order. May be empty.
  std::function<bool(const std::string& person, Rgb* colour)> person_colour;
};

class JudgmentsPanel {
 public:
  static constexpr size_t kNone = std::numeric_limits<size_t>::max();
  enum class Tab { kList, kAgreement, kFiles };

  JudgmentsPanel(const Collection& collection, MapView& view, JudgmentsPanelLinks links);

  // Draws the panel (an ImGui window) while *open.
  // Draws the list docked at `list` and, while shown, the agreement at `agreement` (window pixels,
  // kith's chrome; an empty rect leaves it out this frame).
  void draw(bool* open, const DockRect& list, const DockRect& agreement);
  bool agreement_shown() const { return show_agreement_; }
  void show_agreement(bool on) { show_agreement_ = on; }
  void show_tab(Tab tab) { wanted_tab_ = tab, tab_pending_ = true; }
  // Once per frame, open or not: samples agreement for the chart every sample_seconds.
  void tick(double now_seconds);
  double sample_seconds = 3.0;  // (default: 3 s)

  // ---- list ---------------------------------------------------------------------------------
  JudgmentFilter& filter() {
    filter_dirty_ = true;
    return filter_;
  }
  const std::vector<size_t>& rows();  // indices into view.judgments() passing the filter
  // Retract (true) or restore (false) judgment `index` of view.judgments(). "" when done.
  std::string set_retracted(size_t index, bool retracted);
  std::string toggle_chosen();                  // retract or restore the chosen judgment
  void choose(size_t index, bool show = true);  // choose a row (and show it in the map)
  void choose_step(int step);                   // the next / previous row of the filtered list
  size_t chosen() const { return chosen_; }
  void show_in_map(size_t index);
  const std::string& last_problem() const { return problem_; }

  // ---- agreement ----------------------------------------------------------------------------
  struct PersonRow {
    std::string person;
    size_t judgments = 0;
    double with_map = -1.0;
    PersonQuestionAgreement questions;
  };
  void compute_figures();  // from the snapshot shown now
  const std::vector<PersonRow>& people_rows() const { return people_; }
  const std::vector<ViolatedJudgment>& violated() const { return violated_; }
  ViolationOptions violation;  // threshold 0.1 by default
  const AgreementHistory& history() const { return history_; }

  // ---- files --------------------------------------------------------------------------------
  // Imports judgments from a CSV; returns how many were added. Messages (one per bad row, and a
  // summary) go to file_messages().
  size_t import_csv(const std::string& path, bool skip_bad_rows);
  bool export_csv(const std::string& path, bool include_retracted, bool include_people, bool replace);
  const std::vector<std::string>& file_messages() const { return file_messages_; }

 private:
  void tab_list();
  void tab_agreement();
  void tab_files();
  void draw_chart(float height);
  void mark_judgments_changed() { filter_dirty_ = true, questions_dirty_ = true, figures_due_ = 0.0; }
  int person_colour_index(const std::string& person) const;
  Rgb person_colour(const std::string& person) const;

  const Collection& collection_;
  MapView& view_;
  JudgmentsPanelLinks links_;
  JudgmentFilter filter_;
  std::vector<size_t> rows_;
  bool filter_dirty_ = true;
  uint64_t rows_for_version_ = ~uint64_t(0);  // the judgment set's version when rows_ was made
  size_t retracted_count_ = 0;
  uint64_t seen_version_ = ~uint64_t(0);       // what tick() saw last
  size_t chosen_ = kNone;
  bool scroll_to_chosen_ = false;
  std::string problem_;
  char item_text_[96] = "";
  std::vector<std::string> people_names_;  // every person named, sorted (colour order)
  std::vector<PersonRow> people_;
  std::vector<ViolatedJudgment> violated_;
  size_t repeated_ = 0;
  // Same-question figures depend on the judgments only: made again when they change.
  std::vector<PersonQuestionAgreement> questions_;
  bool questions_dirty_ = true;
  uint64_t questions_for_version_ = ~uint64_t(0);
  uint64_t figures_generation_ = 0;
  double figures_due_ = 0.0, next_sample_ = 0.0, now_ = 0.0;
  AgreementHistory history_;
  Tab wanted_tab_ = Tab::kList;
  bool tab_pending_ = false;
  bool show_agreement_ = true;  // the Agreement window beside the list
  char import_path_[512] = "";
  char export_path_[512] = "";
  bool skip_bad_rows_ = false, export_retracted_ = false, export_people_ = true, export_replace_ = false;
  std::vector<std::string> file_messages_;
};

}  // namespace kith
