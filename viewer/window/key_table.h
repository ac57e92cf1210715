// The window's keys, as one table that both runs them (App::handle_key) and lists them in the
// help overlay (H, F1, ?), so the two cannot drift apart. A row is
//   keys, what   as the help shows them (a row with no `keys` only runs, and is not listed);
//   chords       the key presses that run it (none: a mouse row, or keys another screen reads
//                itself, which the row only describes);
//   when         null, or the state in which the row applies (e.g. the release choice after a
//                drag); rows with a `when` are tried first, in table order, then the others;
//   act          what it does; returns false when it did not use the key, and the search goes on.
// A key no row uses goes to WindowHooks::on_key. Key codes are viewer/scene/keys.h's (GLFW's).
// Window thread only.
#pragma once
#include <initializer_list>
#include <vector>

namespace kith {

struct App;

struct KeyChord {
  static constexpr int kAnyKey = -1;
  int key = 0;
  int mods = 0;  // the modifier bits that must be held ...
  int mask = 0;  // ... among these (0: any modifiers)
  bool matches(int k, int m) const { return (key == kAnyKey || key == k) && (m & mask) == mods; }
};

struct KeyRow {
  const char* keys = nullptr;
  const char* what = "";
  std::vector<KeyChord> chords;
  bool (*when)(const App& app, int key) = nullptr;
  bool (*act)(App& app, int key, int mods) = nullptr;
};

const std::vector<KeyRow>& key_table();

}  // namespace kith
