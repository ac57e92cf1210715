#include "viewer/scene/asking_desk.h"

#include <algorithm>
#include <cctype>
#include <cstdio>
#include <sstream>

#include "viewer/scene/keys.h"
#include "viewer/scene/palette.h"

namespace kith {

// ============================================================================ keys

KeyAction asking_key_action(AskingMode mode, int key, int mods, int grid_size) {
  const bool shift = mods & keys::kShift, ctrl = mods & (keys::kControl | keys::kAlt | keys::kSuper);
  KeyAction a;
  if (ctrl) return a;  // ctrl+A, ctrl+Q stay the window's
  const int digit = key >= keys::k0 && key <= keys::k9       ? key - keys::k0
                    : key >= keys::kKp0 && key <= keys::kKp9 ? key - keys::kKp0
                                                             : -1;
  // Keys that mean the same everywhere.
  if (key == keys::letter('b')) return {AskingAction::kLargeType};
  if (key == keys::letter('w')) return {shift ? AskingAction::kPrevPerson : AskingAction::kNextPerson};
  if (key == keys::letter('o') && mode != AskingMode::kOwn) return {AskingAction::kStartOwn};
  if (key == keys::kA) return {mode == AskingMode::kPair ? AskingAction::kStartGrid : AskingAction::kStartPair};
  switch (mode) {
    case AskingMode::kOff:
      break;
    case AskingMode::kPair:
      if (key == keys::kLeft || digit == 1) return {AskingAction::kLeft};
      if (key == keys::kRight || digit == 2) return {AskingAction::kRight};
      if (key == keys::kDown || digit == 0) return {AskingAction::kCantTell};
      if (key == keys::kBackspace) return {AskingAction::kUndo};
      if (key == keys::kEscape) return {AskingAction::kLeave};
      break;
    case AskingMode::kGrid:
      if (digit >= 1 && digit <= std::min(grid_size, 9)) return {AskingAction::kPick, digit - 1};
      if (digit == 0 || key == keys::kDown) return {AskingAction::kCantTell};
      if (key == keys::kBackspace) return {AskingAction::kUndo};
      if (key == keys::kEscape) return {AskingAction::kLeave};
      break;
    case AskingMode::kOwn:
      if (key == keys::kEnter || key == keys::kKpEnter) return {AskingAction::kCommit};
      if (key == keys::kBackspace) return {AskingAction::kUndo};
      if (key == keys::kEscape || key == keys::letter('o')) return {AskingAction::kLeave};
      break;
  }
  return a;
}

// ============================================================================ own judgment

std::string OwnDraft::add(int item) {
  if (item < 0) return "no item there";
  if (complete()) return "all three are chosen: Enter stores the judgment, Backspace changes the last";
  for (int s : slots_)
    if (s == item) return "that item is already in this judgment";
  slots_[size_t(filled())] = item;
  return "";
}

void OwnDraft::back() {
  const int n = filled();
  if (n > 0) slots_[size_t(n - 1)] = -1;
}

int OwnDraft::filled() const {
  int n = 0;
  while (n < 3 && slots_[size_t(n)] >= 0) ++n;
  return n;
}

namespace {
std::vector<std::string> words_of(const std::string& line) {
  std::vector<std::string> words;
  std::string w;
  for (char c : line) {
    if (c == ',' || std::isspace(static_cast<unsigned char>(c))) {
      if (!w.empty()) words.push_back(w), w.clear();
    } else {
      w += c;
    }
  }
  if (!w.empty()) words.push_back(w);
  return words;
}
std::string lower(std::string s) {
  for (char& c : s) c = char(std::tolower(static_cast<unsigned char>(c)));
  return s;
}
// The last word being typed: "" when the line ends with a separator.
size_t last_word_start(const std::string& line) {
  size_t k = line.size();
  while (k > 0 && line[k - 1] != ',' && !std::isspace(static_cast<unsigned char>(line[k - 1]))) --k;
  return k;
}
}  // namespace

std::string parse_own_line(const std::string& line, const std::unordered_map<std::string, int>& index_of_id,
                           std::array<int, 3>* items) {
  const std::vector<std::string> words = words_of(line);
  if (words.size() != 3) return "three ids are needed (anchor, nearer, farther), got " + std::to_string(words.size());
  std::array<int, 3> out{};
  for (size_t k = 0; k < 3; ++k) {
    auto it = index_of_id.find(words[k]);
    if (it == index_of_id.end()) return "no item '" + words[k] + "'";
    out[k] = it->second;
  }
  if (out[0] == out[1] || out[0] == out[2] || out[1] == out[2]) return "an item appears twice";
  *items = out;
  return "";
}

std::vector<std::string> complete_id(const std::vector<std::string>& ids, const std::string& line, size_t limit) {
  const std::string prefix = lower(line.substr(last_word_start(line)));
  std::vector<std::string> out;
  if (prefix.empty()) return out;
  for (const std::string& id : ids) {
    if (out.size() >= limit) break;
    if (id.size() >= prefix.size() && lower(id.substr(0, prefix.size())) == prefix) out.push_back(id);
  }
  return out;
}

std::string apply_completion(const std::string& line, const std::string& id) {
  return line.substr(0, last_word_start(line)) + id + " ";
}

std::string colour_hex(uint32_t rgb) {
  char text[8];
  std::snprintf(text, sizeof text, "#%06X", unsigned(rgb & 0xFFFFFF));
  return text;
}

// ============================================================================ the desk

AskingDesk::AskingDesk(const Collection& collection, DeskLinks links, QuestionFlowOptions flow, PickerOptions picker)
    : collection_(collection),
      links_(std::move(links)),
      flow_(flow,
            [this](QuestionKind kind, int n, int k) -> Question {
              const auto s = links_.snapshot ? links_.snapshot() : nullptr;
              if (!s || s->positions.rows() < 3) return Question{};
              if (kind == QuestionKind::kGrid && s->positions.rows() < n + 1) return Question{};
              const std::vector<Judgment> js = links_.judgments ? links_.judgments() : std::vector<Judgment>{};
              std::vector<int32_t> selection;
              if (choice_ == PickerChoice::kSelection && links_.selection)
                for (int i : links_.selection()) selection.push_back(int32_t(i));
              picker_.set_selection(selection);
              PickerInput in;
              in.map = &s->positions;
              const bool features =
                  collection_.features.rows() == s->positions.rows() && collection_.features.cols() > 0;
              in.features = features ? &collection_.features : nullptr;
              in.judgments = &js;
              return picker_.next(in, kind, n, k);
            }),
      picker_(picker) {
  // Names alone: random questions until every item has a few judgments (picker.h, warm-up).
  if (collection_.features.cols() == 0 && picker_.options().warm_up_judgments == 0) {
    picker.warm_up_judgments = PickerOptions::kWarmUpJudgments;
    picker_ = Picker(picker);
  }
}

void AskingDesk::set_mode(AskingMode mode) {
  if (mode == AskingMode::kPair || mode == AskingMode::kGrid) {
    QuestionFlowOptions o = flow_.options();
    o.kind = mode == AskingMode::kPair ? QuestionKind::kPair : QuestionKind::kGrid;
    flow_.set_options(o);
    if (flow_.people().empty()) add_person("person 1", Palette::person_colour(0));
  }
  if (mode != mode_) picks_.clear();
  if (mode != AskingMode::kOwn) own_.clear();
  mode_ = mode;
}

void AskingDesk::set_flow_options(const QuestionFlowOptions& options) {
  flow_.set_options(options);
  picks_.clear();
}

void AskingDesk::set_picker_choice(PickerChoice choice) {
  choice_ = choice;
  picker_.set_rule(choice == PickerChoice::kRandom ? PickerRule::kRandom : PickerRule::kInformative);
  flow_.skip();  // the next question comes from the new rule
  picks_.clear();
}

const Question& AskingDesk::question() { return flow_.current(); }

std::vector<int> AskingDesk::question_items() {
  std::vector<int> out;
  if (!asking()) return out;
  const Question& q = question();
  if (q.anchor < 0) return out;
  out.push_back(q.anchor);
  for (int32_t c : q.candidates) out.push_back(c);
  return out;
}

size_t AskingDesk::answered() const {
  size_t n = 0;
  for (const Answer& a : flow_.answers()) n += a.undone ? 0 : 1;
  return n;
}

size_t AskingDesk::judgments_made() const {
  size_t n = 0;
  for (const Answer& a : flow_.answers()) n += a.undone ? 0 : a.judgments.size();
  for (const Judgment& j : own_made_) n += j.retracted ? 0 : 1;
  return n;
}

std::string AskingDesk::turn_name() const {
  const int t = flow_.turn();
  return t >= 0 && size_t(t) < flow_.people().size() ? flow_.people()[size_t(t)].name : std::string();
}

std::string AskingDesk::next_name() const {
  const int n = int(flow_.people().size());
  if (n < 2 || flow_.turn() < 0) return "";
  return flow_.people()[size_t((flow_.turn() + 1) % n)].name;
}

std::string AskingDesk::record(const SessionEvent& e) {
  return links_.record_event ? links_.record_event(e) : std::string();
}

AskedQuestion AskingDesk::asked(const Question& q) const {
  AskedQuestion a;
  a.kind = q.kind == QuestionKind::kPair ? "pair" : "grid";
  a.anchor = q.anchor >= 0 ? collection_.ids[size_t(q.anchor)] : "";
  for (int32_t i : q.candidates) a.candidates.push_back(collection_.ids[size_t(i)]);
  if (q.reask) a.repeat_of = q.repeat_of;
  return a;
}

// ---- people ----------------------------------------------------------------------

std::string AskingDesk::add_person(const std::string& raw, uint32_t colour) {
  std::string name = raw;
  while (!name.empty() && std::isspace(static_cast<unsigned char>(name.back()))) name.pop_back();
  while (!name.empty() && std::isspace(static_cast<unsigned char>(name.front()))) name.erase(name.begin());
  if (name.empty()) return "a person needs a name (any name or a pseudonym)";
  for (const Person& p : flow_.people())
    if (p.name == name) return "'" + name + "' is already listed";
  const std::string e = record(event::PersonAdded{name, colour_hex(colour)});
  if (!e.empty()) return e;
  flow_.add_person(name, colour);
  return "";
}

std::string AskingDesk::rename_person(int person, const std::string& raw) {
  if (person < 0 || size_t(person) >= flow_.people().size()) return "no such person";
  std::string name = raw;
  while (!name.empty() && std::isspace(static_cast<unsigned char>(name.back()))) name.pop_back();
  if (name.empty()) return "a person needs a name";
  for (size_t p = 0; p < flow_.people().size(); ++p)
    if (int(p) != person && flow_.people()[p].name == name) return "'" + name + "' is already listed";
  const std::string e = record(event::PersonRenamed{flow_.people()[size_t(person)].name, name});
  if (!e.empty()) return e;
  flow_.rename_person(person, name);
  return "";
}

std::string AskingDesk::set_colour(int person, uint32_t colour) {
  if (person < 0 || size_t(person) >= flow_.people().size()) return "no such person";
  const std::string e = record(event::PersonColoured{flow_.people()[size_t(person)].name, colour_hex(colour)});
  if (!e.empty()) return e;
  flow_.set_colour(person, colour);
  return "";
}

std::string AskingDesk::set_turn(int person) {
  if (person < 0 || size_t(person) >= flow_.people().size()) return "no such person";
  flow_.set_turn(person);
  picks_.clear();
  return "";
}

// ---- answers ---------------------------------------------------------------------

std::string AskingDesk::post_answer(std::vector<Judgment> judgments) {
  std::vector<int64_t> ids;
  for (const Judgment& j : judgments) {
    CommandBody body = cmd::AddJudgment{j};
    const std::string refused = links_.post ? links_.post(body) : std::string("nowhere to send judgments");
    if (!refused.empty()) {
      // Not written: take back what was, and leave the question on screen.
      for (int64_t id : ids) {
        CommandBody r = cmd::RetractJudgment{id, true};
        if (links_.post) links_.post(r);
      }
      flow_.undo();
      return "not saved, ask again: " + refused;
    }
    ids.push_back(std::get<cmd::AddJudgment>(body).judgment.id);
  }
  flow_.set_judgment_ids(ids);
  const Answer& a = flow_.answers().back();
  if (a.question.reask) record(event::Reasked{turn_name(), asked(a.question), ids});
  return "";
}

std::string AskingDesk::answer_pair(bool left) {
  const Question& q = question();
  if (q.anchor < 0 || q.kind != QuestionKind::kPair) return "no pair question on screen yet";
  const std::string who = turn_name();
  const std::string e = post_answer(flow_.answer_pair(left, links_.now ? links_.now() : 0.0));
  return e.empty() ? who + ": " + (left ? "left" : "right") + " is closer" : e;
}

std::string AskingDesk::answer_cant_tell() {
  const Question& q = question();
  if (q.anchor < 0) return "no question on screen yet";
  const std::string who = turn_name();
  const double t = links_.now ? links_.now() : 0.0;
  if (const std::string e = record(event::CantTell{who, t, asked(q)}); !e.empty()) return "not saved, ask again: " + e;
  flow_.answer_cant_tell(t);
  picks_.clear();
  return who + ": can't tell";
}

std::string AskingDesk::answer_grid() {
  const Question& q = question();
  if (q.anchor < 0 || q.kind != QuestionKind::kGrid) return "no grid question on screen yet";
  const std::string who = turn_name();
  const std::vector<int> picks = picks_;
  picks_.clear();
  const std::string e = post_answer(flow_.answer_grid(picks, links_.now ? links_.now() : 0.0));
  if (!e.empty()) {
    picks_ = picks;
    picks_.pop_back();  // the last pick made the answer; take it back so a new key press retries
    return e;
  }
  return who + ": picked " + std::to_string(picks.size());
}

std::string AskingDesk::undo() {
  // Which answer is undone, for the record, before the flow forgets it.
  const Answer* last = nullptr;
  for (auto it = flow_.answers().rbegin(); it != flow_.answers().rend(); ++it)
    if (!it->undone) {
      last = &*it;
      break;
    }
  if (!last) return "nothing to undo";
  const std::string who = last->person >= 0 ? flow_.people()[size_t(last->person)].name : "";
  if (last->cant_tell) {
    const std::string e = record(event::CantTellUndone{who, asked(last->question)});
    if (!e.empty()) return "undo not saved: " + e;
  }
  const std::vector<Judgment> js = flow_.undo();
  std::string problem;
  for (const Judgment& j : js) {
    if (j.id < 0) continue;
    CommandBody r = cmd::RetractJudgment{j.id, true};
    const std::string e = links_.post ? links_.post(r) : std::string("nowhere to send");
    if (!e.empty()) problem = e;
  }
  picks_.clear();
  if (!problem.empty()) return "undo not saved: " + problem;
  return "undone: " + who + "'s last answer";
}

std::string AskingDesk::commit_own() {
  if (!own_.complete()) return "choose " + std::to_string(3 - own_.filled()) + " more: click items in the map";
  Judgment j;
  j.anchor = own_.slots()[0];
  j.nearer = own_.slots()[1];
  j.farther = own_.slots()[2];
  j.person = turn_name();
  j.time = links_.now ? links_.now() : 0.0;
  j.kind = JudgmentKind::kOwn;
  CommandBody body = cmd::AddJudgment{j};
  const std::string refused = links_.post ? links_.post(body) : std::string("nowhere to send judgments");
  if (!refused.empty()) return "not saved: " + refused;
  own_made_.push_back(std::get<cmd::AddJudgment>(body).judgment);
  own_.clear();
  const Judgment& s = own_made_.back();
  return "stored: " + collection_.ids[size_t(s.anchor)] + " is more like " + collection_.ids[size_t(s.nearer)] +
         " than " + collection_.ids[size_t(s.farther)];
}

bool AskingDesk::key(int k, int mods) {
  const int n = flow_.options().grid_size;
  return act(asking_key_action(mode_, k, mods, n));
}

bool AskingDesk::start(AskingMode mode, std::string message) {
  set_mode(mode);
  message_ = std::move(message);
  return true;
}

bool AskingDesk::act(KeyAction a) {
  switch (a.action) {
    case AskingAction::kNone:
      return false;
    case AskingAction::kStartPair:
      return start(AskingMode::kPair, "pair questions");
    case AskingAction::kStartGrid:
      return start(AskingMode::kGrid, "grid questions: pick " + std::to_string(flow_.options().grid_choose));
    case AskingAction::kStartOwn:
      return start(AskingMode::kOwn, "your own judgment: click the anchor, then the nearer, then the farther item");
    case AskingAction::kLeave:
      if (mode_ == AskingMode::kOwn && own_.filled() > 0) {
        own_.clear();
        message_ = "own judgment dropped";
        return true;
      }
      set_mode(AskingMode::kOff);
      message_ = "asking stopped";
      return true;
    case AskingAction::kLargeType:
      large_ = !large_;
      message_ = large_ ? "large type" : "normal type";
      return true;
    case AskingAction::kNextPerson:
    case AskingAction::kPrevPerson: {
      const int n = int(flow_.people().size());
      if (n == 0) {
        message_ = "nobody listed yet";
        return true;
      }
      const int step = a.action == AskingAction::kNextPerson ? 1 : n - 1;
      set_turn((std::max(flow_.turn(), 0) + step) % n);
      message_ = turn_name() + "'s turn";
      return true;
    }
    case AskingAction::kLeft:
    case AskingAction::kRight:
      message_ = answer_pair(a.action == AskingAction::kLeft);
      return true;
    case AskingAction::kCantTell:
      message_ = answer_cant_tell();
      return true;
    case AskingAction::kPick: {
      const Question& q = question();
      if (q.anchor < 0 || q.kind != QuestionKind::kGrid || a.place >= int(q.candidates.size())) {
        message_ = "no such place";
        return true;
      }
      auto it = std::find(picks_.begin(), picks_.end(), a.place);
      if (it != picks_.end()) {
        picks_.erase(it);
        message_ = "unpicked " + std::to_string(a.place + 1);
        return true;
      }
      picks_.push_back(a.place);
      message_ = int(picks_.size()) >= q.choose ? answer_grid()
                                                : "picked " + std::to_string(a.place + 1) + ", pick " +
                                                      std::to_string(q.choose - int(picks_.size())) + " more";
      return true;
    }
    case AskingAction::kUndo:
      if (mode_ == AskingMode::kOwn) {
        if (own_.filled() > 0) {
          own_.back();
          message_ = "cleared the last choice";
        } else if (!own_made_.empty() && !own_made_.back().retracted) {
          CommandBody r = cmd::RetractJudgment{own_made_.back().id, true};
          const std::string e = links_.post ? links_.post(r) : std::string("nowhere to send");
          if (e.empty()) own_made_.back().retracted = true;
          message_ = e.empty() ? "your last own judgment is retracted" : "not saved: " + e;
        } else {
          message_ = "nothing to undo";
        }
        return true;
      }
      if (mode_ == AskingMode::kGrid && !picks_.empty()) {
        picks_.pop_back();
        message_ = "unpicked the last";
        return true;
      }
      message_ = undo();
      return true;
    case AskingAction::kCommit:
      message_ = commit_own();
      return true;
  }
  return false;
}

}  // namespace kith
