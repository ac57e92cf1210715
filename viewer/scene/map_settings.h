// MapSettings: the live map's settings as the window's controls show and change them, and the
// notice that says when a command was refused. No ImGui, so tests drive it directly.
//   - A control shows the value in force (Snapshot::parameters); between the release of a slider
//     and the snapshot that has taken the command, it shows the value asked for, so it does not
//     jump back while the engine (or a perplexity rebuild) catches up. The window keeps no copy of
//     the settings of its own.
//   - A control's range lies inside what MapParameters accepts for the map shown (the
//     perplexity's stays below the item count), so a slider cannot make an impossible value.
//   - release() is the one way a control changes a setting (a slider when let go, the input
//     script's `set`): the command goes through the window's post path, where MapFeed::prepare
//     checks it (setting_problem) before a session records it.
//   - A refusal, by that check or later by the engine (Snapshot::refusals), becomes the notice,
//     "COMMAND refused: WHY", shown until it is dismissed, replaced, or kNoticeSeconds pass.
// Window thread only.
#pragma once
#include <array>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "solver/live/commands.h"
#include "solver/live/snapshot.h"

namespace kith {

enum class Setting { kBlend = 0, kPerplexity = 1, kTheta = 2 };
constexpr size_t kSettingCount = 3;

struct SettingControl {
  Setting setting = Setting::kBlend;
  const char* name = "";    // "blend": the slider's label, the script's and the state dump's name
  const char* hint = "";    // what it does, for a tooltip
  const char* format = "";  // printf format of the value
  double lo = 0.0, hi = 1.0;  // the slider's range, inside what MapParameters accepts
  bool logarithmic = false;
  bool enabled = true;      // false when the map cannot take it (perplexity without features)
  std::string why_disabled;
};

class MapSettings {
 public:
  static constexpr double kNoticeSeconds = 12.0;
  // Posts through the window's path (prepare, then post). Returns "" and sets *seq when posted,
  // else why it was refused.
  using Post = std::function<std::string(CommandBody& body, uint64_t* seq)>;

  MapSettings(bool has_features, Post post);

  // The controls for a map of item_count items, in the order they are drawn.
  std::array<SettingControl, kSettingCount> controls(size_t item_count) const;
  static const char* name(Setting setting);
  static bool from_name(const std::string& name, Setting* setting);  // false if unknown
  static double value_in(const MapParameters& parameters, Setting setting);
  static CommandBody command(Setting setting, double value);

  // What the control shows: the value asked for while its command is on its way, else the one in force.
  double shown(Setting setting, const Snapshot* snapshot) const;
  bool pending(Setting setting) const { return pending_[size_t(setting)].seq != 0; }

  // The control let go at `value`: posted through the window's path. "" when posted; else why
  // not, which is also the notice.
  std::string release(Setting setting, double value, double now_seconds);

  // Every new snapshot: forgets what it has taken (applied or refused), and makes the newest
  // refusal not seen before the notice.
  void update(const Snapshot& snapshot, double now_seconds);

  // ---- the notice ----
  const std::string& notice() const { return notice_; }
  bool notice_showing(double now_seconds) const {
    return !notice_.empty() && now_seconds - notice_since_ < kNoticeSeconds;
  }
  void dismiss() { notice_.clear(); }
  static std::string refusal_text(const std::string& command, const std::string& reason);

 private:
  void say(const std::string& text, double now_seconds);
  struct Pending {
    uint64_t seq = 0;  // 0: none
    double value = 0.0;
  };
  bool has_features_;
  Post post_;
  std::array<Pending, kSettingCount> pending_{};
  uint64_t seen_refusal_ = 0;  // the newest refusal's seq already noticed
  std::string notice_;
  double notice_since_ = 0.0;
};

}  // namespace kith
