// WindowHooks: the optional links by which other parts (the demo, a session, teaching by drags)
// join a map window without the window knowing them. Each may be left empty. All are called on
// the window's (main) thread.
#pragma once
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "solver/asking/session_event.h"
#include "solver/live/commands.h"
#include "solver/live/snapshot.h"
#include "viewer/scene/map_interaction.h"

namespace kith {

// Optional links to other features; each may be left empty.
struct WindowHooks {
  TeachHook teach;                                                 // drag -> judgments
  std::function<void(const CommandBody&, uint64_t seq)> on_post;   // every command the window posts
  // Used by `kith demo` (all main thread):
  std::function<void()> on_open;                                   // the window opened (before the first frame)
  std::function<std::string(int key, int mods)> on_key;            // keys the window leaves unused; returns a
                                                                   // line to show briefly ("" for none)
  std::function<bool(std::vector<int>* items)> take_selection;     // once per frame: true = select *items
  std::string panel_title;                                         // an extra panel, shown when
  std::function<std::vector<std::string>()> panel_lines;           // panel_lines is set: its text lines
  std::function<void(const std::shared_ptr<const Snapshot>&)> on_snapshot;  // each new snapshot shown
  // Records something that is not a command to the engine (a "can't tell" answer, a person
  // added, renamed or given a colour, a re-asked question: solver/asking/session_event.h) in the
  // session, committed before it returns. Returns "" when written (or when there is no session to
  // write to), else why it was not. Judgments, retractions and pins are not events: they go
  // through MapFeed::prepare/post.
  std::function<std::string(const SessionEvent& event)> record_event;
  // Sessions (viewer/session/session_link.h, viewer/window/session_menu.h):
  std::function<std::string()> title_state;  // the saving state for the title bar (polled each second)
  std::function<void()> menus;               // more menus, drawn inside the main menu bar
  std::function<void()> windows;             // more windows, drawn once per frame
};

}  // namespace kith
