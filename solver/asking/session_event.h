// SessionEvent: what people do while being asked that is not an engine command, as typed
// values: a person added, renamed or given a colour, a "can't tell" answer (and its undo), a
// re-asked question answered. The window builds them; a session stores them (SessionStore's
// events table, as kind + JSON detail: docs/session-schema.md) through to_record(), the one
// place that knows the stored form. Items are named by id, as in every file kith writes.
// Plain values; any thread.
#pragma once
#include <cstdint>
#include <string>
#include <variant>
#include <vector>

namespace kith {

// A question as it was shown: its kind ("pair" or "grid"), anchor and candidates by item id.
struct AskedQuestion {
  std::string kind;
  std::string anchor;
  std::vector<std::string> candidates;
  int64_t repeat_of = -1;  // >= 0: it re-asked this earlier question (its number in the sitting)
};

namespace event {
struct PersonAdded {
  static constexpr const char* kKind = "person";
  std::string name;
  std::string colour;  // "#rrggbb"
};
struct PersonRenamed {
  static constexpr const char* kKind = "person";
  std::string from;
  std::string name;
};
struct PersonColoured {
  static constexpr const char* kKind = "person";
  std::string name;
  std::string colour;  // "#rrggbb"
};
struct CantTell {
  static constexpr const char* kKind = "cant_tell";
  std::string person;
  double time = 0.0;  // seconds since the Unix epoch
  AskedQuestion question;
};
struct CantTellUndone {
  static constexpr const char* kKind = "cant_tell_undone";
  std::string person;
  AskedQuestion question;
};
struct Reasked {
  static constexpr const char* kKind = "reask";
  std::string person;
  AskedQuestion question;
  std::vector<int64_t> judgments;  // the stored ids of the answer's judgments
};
// Undo or redo in the window (viewer/scene/undo_feed.h): what it took back or brought back.
// The pins, unpins and retractions it made are stored as such; this says why they happened.
struct Undone {
  static constexpr const char* kKind = "undo";
  bool redo = false;  // true: redo
  std::string what;   // e.g. "pin of c7", "3 judgments"
};
}  // namespace event

using SessionEvent = std::variant<event::PersonAdded, event::PersonRenamed, event::PersonColoured, event::CantTell,
                                  event::CantTellUndone, event::Reasked, event::Undone>;

// The stored form: a short kind word and a JSON object as text.
struct EventRecord {
  std::string kind;
  std::string detail;
};
EventRecord to_record(const SessionEvent& event);

}  // namespace kith
