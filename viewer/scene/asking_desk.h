// AskingDesk: the logic behind the asking screens, with no GL or ImGui, so tests drive it
// directly. It owns the question flow (solver/asking/question_flow.h) and the picker (solver/asking/picker.h),
// maps keys to answers, and sends every answer through the window's post path:
//   an answer's judgments are posted one by one through links.post (which writes them to the
//   session first and gives each its stored id); if any is refused, the ones already posted are
//   retracted, the answer is undone in the flow and the same question stays on screen with the
//   message, so nothing is shown as done that was not written;
//   "can't tell", people changes, undo and re-asked answers are written through links.record_event
//   first, and only then does the screen move on;
//   undo retracts the last answer's judgments (cmd::RetractJudgment), keeping them in the record.
// It also holds a person's own judgment while it is being made (OwnDraft: click or type the
// anchor, the nearer and the farther item, then commit; kind JudgmentKind::kOwn).
// Window thread only.
#pragma once
#include <array>
#include <functional>
#include <memory>
#include <string>
#include <unordered_map>
#include <vector>

#include "solver/asking/picker.h"
#include "solver/asking/question_flow.h"
#include "solver/asking/session_event.h"
#include "solver/io/collection.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"

namespace kith {

enum class AskingMode { kOff, kPair, kGrid, kOwn };

// What a key means on the asking screens.
enum class AskingAction {
  kNone,        // not an asking key: the window's own keys apply
  kStartPair,   // A (asking off or grid): pair questions
  kStartGrid,   // A (pair): grid questions
  kStartOwn,    // O: the person's own judgment
  kLeave,       // Esc: stop asking / drop the own judgment
  kLeft,        // left arrow or 1 (pair): the left one is closer
  kRight,       // right arrow or 2 (pair): the right one is closer
  kCantTell,    // down arrow or 0: can't tell
  kUndo,        // Backspace: undo the last answer (grid: unpick first; own: clear the last slot)
  kPick,        // 1..9 (grid): pick or unpick that place
  kCommit,      // Enter (own): store the judgment
  kNextPerson,  // W / shift+W: the facilitator moves the turn on / back
  kPrevPerson,
  kLargeType,  // B: big (large) type on/off
};
struct KeyAction {
  AskingAction action = AskingAction::kNone;
  int place = -1;  // kPick: 0-based grid place
};
// GLFW key codes and modifier bits in, an action out. `grid_size` bounds the number keys.
KeyAction asking_key_action(AskingMode mode, int key, int mods, int grid_size);

// A person's own judgment being made: three slots filled in order by clicks in the map (or by
// typed ids). The same item cannot fill two slots.
class OwnDraft {
 public:
  // Fills the next empty slot; returns "" or why not (the draft is full, the item is already in it).
  std::string add(int item);
  void back();  // empties the last filled slot
  void clear() { slots_ = {-1, -1, -1}; }
  int filled() const;  // 0..3
  bool complete() const { return filled() == 3; }
  const std::array<int, 3>& slots() const { return slots_; }

 private:
  std::array<int, 3> slots_{-1, -1, -1};
};

// "anchor nearer farther" as ids separated by spaces or commas. Returns "" and fills `items`,
// or a message naming the bad word ("no item 'x'", "an item appears twice", "three ids are needed").
std::string parse_own_line(const std::string& line, const std::unordered_map<std::string, int>& index_of_id,
                           std::array<int, 3>* items);
// Ids starting with the last word of `line` (case-insensitive), at most `limit`, in collection order.
std::vector<std::string> complete_id(const std::vector<std::string>& ids, const std::string& line, size_t limit);
// `line` with its last word replaced by `id` and a space after it.
std::string apply_completion(const std::string& line, const std::string& id);

// Colour as "#RRGGBB" for events and the store.
std::string colour_hex(uint32_t rgb);

struct DeskLinks {
  // Prepares and posts one command (App::post's path). "" when done (body completed, e.g. with
  // the judgment's stored id), else why it was refused.
  std::function<std::string(CommandBody& body)> post;
  // WindowHooks::record_event: "" when written or when there is nowhere to write.
  std::function<std::string(const SessionEvent& event)> record_event;
  std::function<std::shared_ptr<const Snapshot>()> snapshot;  // the map the picker reads
  std::function<std::vector<Judgment>()> judgments;           // the judgments in force (the snapshot's)
  std::function<std::vector<int>()> selection;                // for "about the selection"
  std::function<double()> now;                                // seconds since the epoch
};

enum class PickerChoice { kInformative = 0, kRandom = 1, kSelection = 2 };

class AskingDesk {
 public:
  AskingDesk(const Collection& collection, DeskLinks links, QuestionFlowOptions flow = {}, PickerOptions picker = {});

  AskingMode mode() const { return mode_; }
  bool asking() const { return mode_ == AskingMode::kPair || mode_ == AskingMode::kGrid; }
  void set_mode(AskingMode mode);
  bool large_type() const { return large_; }

  // Runs what a key means; returns true when the key was used. The outcome is in message().
  bool key(int key, int mods);
  bool act(KeyAction action);
  const std::string& message() const { return message_; }

  // ---- people (each change is written as a "person" event first; "" or why not) ----
  std::string add_person(const std::string& name, uint32_t colour);
  std::string rename_person(int person, const std::string& name);
  std::string set_colour(int person, uint32_t colour);
  std::string set_turn(int person);
  std::string turn_name() const;  // "" when nobody is listed
  std::string next_name() const;  // who comes after (under the turn rule), "" if nobody else

  // ---- settings ----
  void set_flow_options(const QuestionFlowOptions& options);  // throws std::invalid_argument
  const QuestionFlowOptions& flow_options() const { return flow_.options(); }
  void set_picker_choice(PickerChoice choice);
  PickerChoice picker_choice() const { return choice_; }

  // ---- the question on screen ----
  const Question& question();  // anchor -1 when there is none (map not ready, too few items)
  const std::vector<int>& grid_picks() const { return picks_; }
  std::vector<int> question_items();  // anchor first, then candidates
  const QuestionFlow& flow() const { return flow_; }
  size_t answered() const;  // answers not undone
  size_t judgments_made() const;

  // ---- a person's own judgment ----
  OwnDraft& own() { return own_; }
  // Stores the draft as a judgment by whoever's turn it is; "" when stored (draft cleared).
  std::string commit_own();

 private:
  bool start(AskingMode mode, std::string message);  // set_mode, then say MESSAGE
  std::string post_answer(std::vector<Judgment> judgments);
  std::string answer_pair(bool left);
  std::string answer_cant_tell();
  std::string answer_grid();
  std::string undo();
  std::string record(const SessionEvent& event);
  AskedQuestion asked(const Question& q) const;

  const Collection& collection_;
  DeskLinks links_;
  QuestionFlow flow_;
  Picker picker_;
  PickerChoice choice_ = PickerChoice::kInformative;
  AskingMode mode_ = AskingMode::kOff;
  bool large_ = false;
  std::vector<int> picks_;
  OwnDraft own_;
  std::string message_;
  std::vector<Judgment> own_made_;  // own judgments, for undo (Backspace on an empty draft)
};

}  // namespace kith
