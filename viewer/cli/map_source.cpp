#include "viewer/cli/map_source.h"

#include <cstdio>
#include <filesystem>

#include "viewer/cli/synthetic_collection.h"

namespace kith {

std::optional<Collection> load_or_report(const std::string& command, const std::string& path,
                                         const LoadOptions& options) {
  try {
    Collection c = load_collection(path, options);
    for (size_t i = 0; i < c.warnings.size() && i < 10 && !command.empty(); ++i)
      std::fprintf(stderr, "kith %s: warning: %s\n", command.c_str(), c.warnings[i].str().c_str());
    return c;
  } catch (const LoadError& e) {
    const std::string prefix = command.empty() ? "" : "kith " + command + ": ";
    std::fprintf(stderr, "%s%s\n", prefix.c_str(), e.problem().str().c_str());
    return std::nullopt;
  }
}

std::optional<Collection> load_items_or_report(const std::string& command, const std::string& path, size_t generate,
                                               int* exit_code) {
  if (generate > 0) return synthetic_collection(generate);
  *exit_code = kExitBadInput;
  if (path.empty()) {
    std::fprintf(stderr, "kith %s: which collection? (kith %s ITEMS, see --help)\n", command.c_str(), command.c_str());
    *exit_code = kExitUsage;
    return std::nullopt;
  }
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    std::fprintf(stderr, "kith %s: %s: no such file\n", command.c_str(), path.c_str());
    return std::nullopt;
  }
  if (std::filesystem::path(path).extension() == ".kith") {
    std::fprintf(stderr, "kith %s: %s: session files are not readable by this build yet\n", command.c_str(),
                 path.c_str());
    return std::nullopt;
  }
  return load_or_report(command, path);
}

bool choose_colour(const std::string& command, const Collection& c, const std::string& colour, ViewOptions* view) {
  if (colour.empty()) return true;
  if (colour == "plain") {
    view->colour_by.kind = ColourKind::kPlain;
    return true;
  }
  for (size_t t = 0; t < c.tags.size(); ++t)
    if (c.tags[t].name == colour) {
      view->colour_by = {ColourKind::kTag, int(t)};
      return true;
    }
  std::fprintf(stderr, "kith %s: --colour: no tag column named '%s'\n", command.c_str(), colour.c_str());
  return false;
}

}  // namespace kith
