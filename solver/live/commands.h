// The command vocabulary of the live map: everything the window (or a test, or the demo) may
// ask of the engine (solver/live/engine.h). Commands are plain values; each carries its own
// name (kName), used in logs and the window's state dump, and command_name() reads it for any
// alternative of CommandBody, so a new command cannot be added without a name.
// Values only; safe to build and copy on any thread.
#pragma once
#include <array>
#include <cstdint>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"

namespace kith {

namespace cmd {
struct AddJudgment {
  static constexpr const char* kName = "add-judgment";
  Judgment judgment;  // its id is the one the session stored it under (-1 without a session)
};
struct RetractJudgment {
  static constexpr const char* kName = "retract-judgment";
  int64_t judgment_id = -1;
  bool retracted = true;  // false = restore
};
struct Pin {
  static constexpr const char* kName = "pin";
  int32_t item = -1;
  std::vector<double> position;  // empty = where it is
};
struct Unpin {
  static constexpr const char* kName = "unpin";
  int32_t item = -1;
};
struct DragTarget {
  static constexpr const char* kName = "drag-target";
  int32_t item = -1;
  std::vector<double> position;  // coalesced per item
};
struct ClearDrag {
  static constexpr const char* kName = "clear-drag";
  int32_t item = -1;
};
struct SetBlend {
  static constexpr const char* kName = "set-blend";
  double blend = 1.0;
};
struct SetTheta {
  static constexpr const char* kName = "set-theta";
  double theta = 0.5;
};
struct SetLearningRate {
  static constexpr const char* kName = "set-learning-rate";
  double learning_rate = 0.0;  // <= 0 means "auto"
};
struct SetExaggeration {
  static constexpr const char* kName = "set-exaggeration";
  double exaggeration = 1.0;
};
struct SetPerplexity {
  static constexpr const char* kName = "set-perplexity";
  double perplexity = 30.0;  // rebuilt off the hot loop
};
struct Pause {
  static constexpr const char* kName = "pause";
};
struct Resume {
  static constexpr const char* kName = "resume";
};
struct Restart {
  static constexpr const char* kName = "restart";  // from the PCA start, schedule from zero
};
struct InsertItems {
  static constexpr const char* kName = "insert-items";
  std::vector<std::string> ids;
  Points features;
};
struct RemoveItems {
  static constexpr const char* kName = "remove-items";
  std::vector<int32_t> items;
};
// New features for the same items (e.g. reweighted by what judgments taught,
// solver/features/block_weights.h): rebuilt off the hot loop like SetPerplexity; when swapped in,
// the neighbour term is exaggerated by regroup_exaggeration for regroup_iterations iterations so
// groups can move past each other.
struct SetFeatures {
  static constexpr const char* kName = "set-features";
  Points features;
  int regroup_iterations = 0;
  double regroup_exaggeration = 12.0;
};
}  // namespace cmd

using CommandBody = std::variant<cmd::AddJudgment, cmd::RetractJudgment, cmd::Pin, cmd::Unpin, cmd::DragTarget,
                                 cmd::ClearDrag, cmd::SetBlend, cmd::SetTheta, cmd::SetLearningRate,
                                 cmd::SetExaggeration, cmd::SetPerplexity, cmd::Pause, cmd::Resume, cmd::Restart,
                                 cmd::InsertItems, cmd::RemoveItems, cmd::SetFeatures>;

struct Command {
  uint64_t seq = 0;         // assigned by post()
  uint64_t iteration = 0;   // iteration at which the worker applied it (filled in the log)
  CommandBody body;
  bool superseded = false;  // replaced before it was applied: by a later drag target of the same item, or
                            // (perplexity) by a later one while it waited for a rebuild
  std::string rejected;     // non-empty: not applied, and why (unknown item, NaN, impossible value)
};

// The command's name, e.g. "add-judgment" (its kName).
inline const char* command_name(const CommandBody& body) {
  return std::visit([](const auto& c) { return std::decay_t<decltype(c)>::kName; }, body);
}

// Every command's name, in the variant's order.
template <typename Variant> struct CommandNamesOf;
template <typename... Alternatives> struct CommandNamesOf<std::variant<Alternatives...>> {
  static constexpr std::array<const char*, sizeof...(Alternatives)> value{Alternatives::kName...};
};
inline constexpr auto kCommandNames = CommandNamesOf<CommandBody>::value;
static_assert(kCommandNames.size() == std::variant_size_v<CommandBody>, "every command has a name");

// The item a command is about, or -1.
int32_t command_item(const CommandBody& body);

// For a command that changes a map setting (SetBlend, SetTheta, SetLearningRate, SetExaggeration,
// SetPerplexity): MapParameters' message when its value is impossible on a map of item_count
// items (0: the perplexity is not checked against a size), else "". "" for every other command.
// The engine refuses with it; the window checks with it before anything is recorded.
std::string setting_problem(const CommandBody& body, size_t item_count);

}  // namespace kith
