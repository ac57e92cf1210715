#include "viewer/window/session_menu.h"

#include <imgui.h>
#include <spawn.h>
#include <unistd.h>

#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>

#include "solver/io/collection.h"
#include "solver/io/safe_file.h"
#include "solver/measures/judgment_health.h"
#include "viewer/panels/ui_style.h"
#include "viewer/session/session_export.h"
#include "viewer/window/offscreen_render.h"

extern char** environ;

namespace kith {

namespace fs = std::filesystem;

namespace {
fs::path recent_file() {
  const char* xdg = std::getenv("XDG_CONFIG_HOME");
  const char* home = std::getenv("HOME");
  const fs::path base = xdg && *xdg ? fs::path(xdg) : fs::path(home ? home : ".") / ".config";
  return base / "kith" / "recent-sessions";
}
}  // namespace

std::vector<std::string> recent_sessions() {
  std::vector<std::string> out;
  std::ifstream in(recent_file());
  std::string line;
  while (std::getline(in, line))
    if (!line.empty()) out.push_back(line);
  return out;
}

void remember_session(const std::string& path) {
  if (path.empty()) return;
  std::error_code ec;
  const std::string abs = fs::absolute(path, ec).string();
  std::vector<std::string> list = {abs};
  for (const auto& p : recent_sessions())
    if (p != abs && list.size() < 10) list.push_back(p);
  fs::create_directories(recent_file().parent_path(), ec);
  std::string text;
  for (const auto& p : list) text += p + "\n";
  write_file_safely(recent_file().string(), text);  // a recent list is a convenience: never an error
}

std::string open_in_new_window(const std::string& path) {
  char self[4096];
  const ssize_t n = ::readlink("/proc/self/exe", self, sizeof self - 1);
  if (n <= 0) return "cannot find the kith program to start";
  self[n] = '\0';
  std::string a0 = "kith", a1 = "open", a2 = path;
  char* argv[] = {a0.data(), a1.data(), a2.data(), nullptr};
  pid_t pid = 0;
  const int rc = ::posix_spawn(&pid, self, nullptr, nullptr, argv, environ);
  return rc == 0 ? "" : std::string("cannot start a new window: ") + std::strerror(rc);
}

SessionMenu::SessionMenu(SessionLink& link, MapFeed& feed) : link_(link), feed_(feed), recent_(recent_sessions()) {
  remember_session(link_.path());
}

WindowHooks SessionMenu::hooks(WindowHooks base) {
  WindowHooks h = std::move(base);
  auto previous_menus = h.menus, previous_windows = h.windows;
  h.menus = [this, previous_menus] {
    menus();
    if (previous_menus) previous_menus();
  };
  h.windows = [this, previous_windows] {
    windows();
    if (previous_windows) previous_windows();
  };
  return h;
}

std::string SessionMenu::suggestion(const std::string& suffix) const {
  fs::path base = link_.path().empty() ? fs::path(link_.collection().source) : fs::path(link_.path());
  if (base.empty()) base = "kith";
  return (base.parent_path() / (base.stem().string() + suffix)).string();
}

void SessionMenu::open(Dialog d, const std::string& suggestion) {
  dialog_ = d;
  open_popup_ = true;
  message_.clear();
  std::snprintf(path_, sizeof path_, "%s", suggestion.c_str());
}

void SessionMenu::menus() {
  if (!ImGui::BeginMenu("Session")) return;
  ImGui::TextDisabled("%s", link_.title_state().c_str());
  if (!link_.path().empty()) ImGui::TextDisabled("%s", link_.path().c_str());
  if (!done_.empty()) ImGui::TextDisabled("%s", done_.c_str());
  ImGui::Separator();
  if (ImGui::MenuItem(link_.path().empty() ? "Save as a session..." : "Save as...")) open(Dialog::kSaveAs, suggestion(link_.path().empty() ? ".kith" : "-copy.kith"));
  if (ImGui::MenuItem("New session from a collection...")) open(Dialog::kNew, "");
  if (ImGui::BeginMenu("Recent sessions", !recent_.empty())) {
    for (const auto& p : recent_) {
      if (ImGui::MenuItem(p.c_str())) {
        const std::string m = open_in_new_window(p);
        done_ = m.empty() ? "opening " + p + " in a new window" : m;
      }
    }
    ImGui::EndMenu();
  }
  ImGui::Separator();
  if (ImGui::MenuItem("Export the layout (CSV)...")) open(Dialog::kLayout, suggestion("-layout.csv"));
  if (ImGui::MenuItem("Export the layout (JSON)...")) open(Dialog::kLayout, suggestion("-layout.json"));
  if (ImGui::MenuItem("Export a flat 2-D layout...")) open(Dialog::kFlat, suggestion("-flat.csv"));
  if (ImGui::MenuItem("Export the judgments...")) open(Dialog::kJudgments, suggestion("-judgments.csv"));
  if (ImGui::MenuItem("Export a picture of the map...")) open(Dialog::kPicture, suggestion("-map.png"));
  ImGui::EndMenu();
}

std::string SessionMenu::run(Dialog d, const std::string& out, const std::string& items) {
  if (out.empty()) return "give a file name";
  const auto snap = feed_.latest();
  const Collection& c = link_.collection();
  SafeWriteOptions file;  // exports: an existing file only when ticked, never the session
  file.replace = replace_;
  file.inputs = {link_.path()};
  switch (d) {
    case Dialog::kSaveAs: {
      const std::string m = link_.save_as(out);
      if (m.empty()) {
        remember_session(out);
        recent_ = recent_sessions();
        done_ = "now saving to " + out;
      }
      return m;
    }
    case Dialog::kNew: {
      if (items.empty()) return "which collection? give the path of a CSV, TSV or .npy file";
      try {
        const Collection fresh = load_collection(items);
        SessionStore::create(out, fresh).reset();
      } catch (const LoadError& e) {
        return e.what();
      } catch (const std::exception& e) {
        return e.what();
      }
      remember_session(out);
      recent_ = recent_sessions();
      const std::string m = open_in_new_window(out);
      done_ = m.empty() ? "opened " + out + " in a new window" : m;
      return m;
    }
    case Dialog::kLayout: {
      if (!snap) return "no map yet";
      const std::string m = export_layout(c, snap->positions, snap->iteration, out, "", file);
      if (m.empty()) done_ = "wrote " + out;
      return m;
    }
    case Dialog::kFlat: {
      if (!snap) return "no map yet";
      const FlatMapOptions fo = flat_options(link_.settings(), c.size());
      std::vector<int32_t> pinned;
      for (size_t i = 0; i < snap->pinned.size(); ++i)
        if (snap->pinned[i]) pinned.push_back(int32_t(i));
      double agreement = 0.0;
      const std::string m = export_flat(c, snap->positions, link_.judgments(), pinned, fo, out, "", file, &agreement);
      if (m.empty()) done_ = "wrote " + out;
      return m;
    }
    case Dialog::kJudgments: {
      static const PeopleInExport kRule[] = {PeopleInExport::kNames,
                                                          PeopleInExport::kCodes,
                                                          PeopleInExport::kLeaveOut};
      const std::string m = export_judgments(link_.judgments(), c, out, kRule[people_rule_], false, file);
      if (m.empty()) done_ = "wrote " + out;
      return m;
    }
    case Dialog::kPicture: {
      if (!snap) return "no map yet";
      RenderOptions r;
      r.pinned = snap->pinned;
      r.title = fs::path(link_.path().empty() ? c.source : link_.path()).filename().string();
      const std::string m = render_map_png(c, snap->positions, r, out, file);
      if (m.empty()) done_ = "wrote " + out;
      return m;
    }
    case Dialog::kNone: return "";
  }
  return "";
}

void SessionMenu::windows() {
  if (open_popup_) {
    ImGui::OpenPopup("Session##dialog");
    open_popup_ = false;
  }
  if (!ImGui::BeginPopupModal("Session##dialog", nullptr, ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoTitleBar))
    return;
  panel_heading("Session", nullptr);
  static const char* kTitles[] = {"",
                                  "Save this session as (kith goes on saving there)",
                                  "New session from a collection (opens in a new window)",
                                  "Export the layout of the current map to",
                                  "Export the judgments to",
                                  "Export a flat 2-D layout (the same objective run in 2-D) to",
                                  "Export a picture of the map to"};
  ImGui::TextUnformatted(kTitles[int(dialog_)]);
  if (dialog_ == Dialog::kNew) {
    ImGui::SetNextItemWidth(480);
    ImGui::InputText("collection (CSV, TSV or .npy)", items_, sizeof items_);
  }
  ImGui::SetNextItemWidth(480);
  ImGui::InputText(dialog_ == Dialog::kNew ? "new session file" : "file", path_, sizeof path_);
  if (dialog_ == Dialog::kJudgments) {
    chip_choice("people as", &people_rule_, {"names", "codes (P1, P2, ...)", "left out"});
  }
  if (dialog_ != Dialog::kSaveAs && dialog_ != Dialog::kNew)
    chip("replace an existing file (never a session)", &replace_);
  if (!message_.empty()) ImGui::TextColored(ImVec4(0.75f, 0.2f, 0.1f, 1.f), "%s", message_.c_str());
  if (ImGui::Button("OK") || ImGui::IsKeyPressed(ImGui::GetKeyIndex(ImGuiKey_Enter))) {
    message_ = run(dialog_, path_, items_);
    if (message_.empty()) {
      dialog_ = Dialog::kNone;
      ImGui::CloseCurrentPopup();
    }
  }
  ImGui::SameLine();
  if (ImGui::Button("Cancel") || ImGui::IsKeyPressed(ImGui::GetKeyIndex(ImGuiKey_Escape))) {
    dialog_ = Dialog::kNone;
    ImGui::CloseCurrentPopup();
  }
  ImGui::EndPopup();
}

}  // namespace kith
