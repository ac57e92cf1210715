// SessionMenu: the window's "Session" menu and its small dialogs: the saving state, save as, new
// session from a collection, recent sessions (each opens in a new window), and the exports of
// the live map (layout CSV/JSON, judgments with names / codes / no people, the flat 2-D layout,
// a picture). Drawn through WindowHooks::menus/windows. Main thread only (ImGui).
//
// The recent-sessions list is a text file, one absolute path per line, newest first, in
// $XDG_CONFIG_HOME/kith/recent-sessions (or ~/.config/kith/recent-sessions).
#pragma once
#include <string>
#include <vector>

#include "viewer/window/app.h"
#include "viewer/scene/map_feed.h"
#include "viewer/session/session_link.h"

namespace kith {

class SessionMenu {
 public:
  SessionMenu(SessionLink& link, MapFeed& feed);
  // Adds the menu and its dialogs to `base`.
  WindowHooks hooks(WindowHooks base);
  void menus();    // inside BeginMainMenuBar
  void windows();  // once per frame, outside the menu bar

  enum class Dialog { kNone, kSaveAs, kNew, kLayout, kJudgments, kFlat, kPicture };
  // Runs a dialog's action with `path` (and `items` for kNew); "" or a message. Public for tests.
  std::string run(Dialog d, const std::string& path, const std::string& items = "");

 private:
  void open(Dialog d, const std::string& suggestion);
  std::string suggestion(const std::string& suffix) const;

  SessionLink& link_;
  MapFeed& feed_;
  Dialog dialog_ = Dialog::kNone;
  bool open_popup_ = false;
  char path_[1024] = "";
  char items_[1024] = "";
  int people_rule_ = 0;  // 0 names, 1 codes, 2 leave out
  bool replace_ = false;  // exports: write over an existing file (never a session) (default: off)
  std::string message_, done_;
  std::vector<std::string> recent_;
};

// The recent-sessions list: read, and put PATH first (kept to 10).
std::vector<std::string> recent_sessions();
void remember_session(const std::string& path);
// Starts `kith open PATH` as a separate process (a new window). Returns "" or a message.
std::string open_in_new_window(const std::string& path);

}  // namespace kith
