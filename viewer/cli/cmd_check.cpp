// kith check ITEMS: load a collection and report what was found (items, feature, tag and picture
// columns) and any warnings. A problem in the data is printed as "file:line:column: what" on
// stderr with exit code 3. Runs on the main thread only.
#include <cstdint>
#include <cstdio>
#include <optional>
#include <set>
#include <string>

#include "solver/io/collection.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/shared_flags.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith check ITEMS [--id COLUMN] [--exclude COLUMN,...] [--pictures COLUMN] [--tags TAGS.csv]\n"
    "\n"
    "Loads a collection and reports what kith found in it: the number of items, the id column,\n"
    "the feature columns (numeric), the tag columns (text), the picture column, and warnings.\n"
    "ITEMS is a CSV or TSV table with a header row, or a NumPy .npy array of features.\n";

const char* const kFooter =
    "exit codes: 0 the collection loads, 2 bad usage, 3 a problem in the data (printed as\n"
    "file:line:column: what was expected and what was found)\n";

std::string list(const std::vector<std::string>& names, size_t max_shown) {
  std::string s;
  for (size_t i = 0; i < names.size() && i < max_shown; ++i) s += (i ? ", " : "") + names[i];
  if (names.size() > max_shown) s += ", ... (" + std::to_string(names.size() - max_shown) + " more)";
  return s;
}

}  // namespace

int cmd_check(const Args& args) {
  FlagReader flags("check", kUsage, load_flags() + "  --min-items N         fewer items is an error (default: 2)\n",
                   kFooter);
  if (!flags.read(args)) return flags.stop();
  LoadOptions options;
  if (!read_load_flags(flags, &options) || !flags.count("--min-items", &options.min_items, 1, SIZE_MAX / 2))
    return flags.usage_error();
  if (flags.positional().empty()) return flags.usage_error("which collection? give ITEMS");
  if (flags.positional().size() > 1)
    return flags.usage_error("one ITEMS file only (got '" + flags.positional()[0] + "' and '" + flags.positional()[1] +
                             "')");
  const std::string items = flags.positional()[0];
  const bool npy = items.size() >= 4 && items.compare(items.size() - 4, 4, ".npy") == 0;
  if (!options.tags_csv.empty() && !npy)
    return flags.usage_error("--tags goes with a .npy file; a table holds its own tags");

  const std::optional<Collection> loaded = load_or_report("", items, options);
  if (!loaded) return kExitBadInput;
  const Collection& c = *loaded;

  constexpr size_t kMaxNames = 20, kMaxWarnings = 20;
  std::printf("%s\n", c.source.c_str());
  std::printf("  items:           %zu\n", c.size());
  std::printf("  id column:       %s\n", c.id_column.empty() ? "none (items are numbered)" : c.id_column.c_str());
  std::printf("  feature columns: %zu", c.feature_names.size());
  if (!c.feature_names.empty()) std::printf(" (%s)", list(c.feature_names, kMaxNames).c_str());
  std::printf("\n  tag columns:     %zu", c.tags.size());
  if (!c.tags.empty()) {
    std::vector<std::string> described;
    for (const TagColumn& t : c.tags) {
      const size_t distinct = std::set<std::string>(t.values.begin(), t.values.end()).size();
      described.push_back(t.name + ": " + std::to_string(distinct) + (distinct == 1 ? " value" : " values"));
    }
    std::printf(" (%s)", list(described, kMaxNames).c_str());
  }
  std::printf("\n  picture column:  %s\n", c.picture_column.empty() ? "none" : c.picture_column.c_str());
  std::printf("  warnings:        %zu\n", c.warnings.size());
  for (size_t i = 0; i < c.warnings.size() && i < kMaxWarnings; ++i)
    std::printf("    %s\n", c.warnings[i].str().c_str());
  if (c.warnings.size() > kMaxWarnings) std::printf("    ... (%zu more)\n", c.warnings.size() - kMaxWarnings);
  std::printf("ok: %zu items x %zu features\n", c.size(), c.feature_names.size());
  return kExitOk;
}

}  // namespace kith
