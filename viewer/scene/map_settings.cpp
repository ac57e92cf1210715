// See map_settings.h.
#include "viewer/scene/map_settings.h"

#include <algorithm>

namespace kith {

namespace {
constexpr const char* kNames[kSettingCount] = {"blend", "perplexity", "theta"};
}  // namespace

MapSettings::MapSettings(bool has_features, Post post) : has_features_(has_features), post_(std::move(post)) {}

const char* MapSettings::name(Setting setting) { return kNames[size_t(setting)]; }

bool MapSettings::from_name(const std::string& text, Setting* setting) {
  for (size_t k = 0; k < kSettingCount; ++k)
    if (text == kNames[k]) {
      *setting = Setting(k);
      return true;
    }
  return false;
}

std::array<SettingControl, kSettingCount> MapSettings::controls(size_t item_count) const {
  std::array<SettingControl, kSettingCount> c;
  c[0].setting = Setting::kBlend;
  c[0].hint = "weight of people's judgments against the features (recorded when you let go)";
  c[0].format = "%.2f";
  c[0].lo = 0.0, c[0].hi = 20.0;  // MapParameters takes 0 .. 1000
  c[0].logarithmic = true;
  c[1].setting = Setting::kPerplexity;
  c[1].hint = "about how many neighbours each item listens to (rebuilt and recorded when you let go)";
  c[1].format = "%.0f";
  // MapParameters takes any perplexity above 0 and below the item count.
  c[1].hi = std::min(100.0, double(item_count) - 1.0);
  c[1].lo = std::min(2.0, c[1].hi);
  if (!has_features_) {
    c[1].enabled = false;
    c[1].why_disabled = "this collection has no features, so there are no feature neighbours";
  } else if (!(c[1].hi > c[1].lo)) {
    c[1].enabled = false;
    c[1].why_disabled = "too few items to choose a perplexity";
  }
  c[2].setting = Setting::kTheta;
  c[2].hint = "Barnes-Hut angle: 0 exact, larger is faster and rougher (recorded when you let go)";
  c[2].format = "%.2f";
  c[2].lo = 0.0, c[2].hi = 1.0;  // MapParameters takes 0 .. 1.5
  for (SettingControl& s : c) s.name = name(s.setting);
  return c;
}

double MapSettings::value_in(const MapParameters& p, Setting setting) {
  switch (setting) {
    case Setting::kBlend: return p.blend;
    case Setting::kPerplexity: return p.perplexity;
    case Setting::kTheta: return p.theta;
  }
  return 0.0;
}

CommandBody MapSettings::command(Setting setting, double value) {
  switch (setting) {
    case Setting::kBlend: return cmd::SetBlend{value};
    case Setting::kPerplexity: return cmd::SetPerplexity{value};
    case Setting::kTheta: return cmd::SetTheta{value};
  }
  return cmd::SetBlend{value};
}

double MapSettings::shown(Setting setting, const Snapshot* snapshot) const {
  const Pending& p = pending_[size_t(setting)];
  if (p.seq != 0) return p.value;
  return value_in(snapshot ? snapshot->parameters : MapParameters{}, setting);
}

std::string MapSettings::refusal_text(const std::string& command, const std::string& reason) {
  return command + " refused: " + reason;
}

void MapSettings::say(const std::string& text, double now_seconds) {
  notice_ = text;
  notice_since_ = now_seconds;
}

std::string MapSettings::release(Setting setting, double value, double now_seconds) {
  CommandBody body = command(setting, value);
  uint64_t seq = 0;
  const std::string refused = post_ ? post_(body, &seq) : std::string("nowhere to send it");
  if (!refused.empty()) {
    say(refusal_text(command_name(body), refused), now_seconds);
    return refused;
  }
  pending_[size_t(setting)] = Pending{seq, value};
  return "";
}

void MapSettings::update(const Snapshot& s, double now_seconds) {
  for (size_t k = 0; k < kSettingCount; ++k) {
    Pending& p = pending_[k];
    if (p.seq == 0) continue;
    const bool refused = std::any_of(s.refusals.begin(), s.refusals.end(), [&](const Refusal& r) { return r.seq == p.seq; });
    // A perplexity is in force only once its rebuild is swapped in (later commands may be taken before).
    const bool waiting = Setting(k) == Setting::kPerplexity && s.rebuilding;
    if (refused || (s.last_command >= p.seq && !waiting)) p = Pending{};
  }
  if (!s.refusals.empty() && s.refusals.back().seq > seen_refusal_) {
    seen_refusal_ = s.refusals.back().seq;
    say(refusal_text(s.refusals.back().command, s.refusals.back().reason), now_seconds);
  }
}

}  // namespace kith
