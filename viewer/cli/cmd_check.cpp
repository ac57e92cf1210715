// kith check ITEMS|SESSION: load a collection and report what was found (items, feature, tag and
// picture columns) and any warnings; for a session also what it holds besides. A problem in the data is printed as
// "file:line:column: what" on stderr with exit code 3. Runs on the main thread only.
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
    "usage: kith check ITEMS|SESSION [--id COLUMN] [--exclude COLUMN,...] [--pictures COLUMN] [--tags TAGS.csv]\n"
    "\n"
    "Loads a collection and reports what kith found in it: the number of items, the id column,\n"
    "the feature columns (numeric), the tag columns (text), the picture column, and warnings.\n"
    "ITEMS is a CSV or TSV table with a header row, or a NumPy .npy array of features; a SESSION\n"
    "(.kith) is checked as kith opens it and its judgments, pins and map are counted.\n";

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
  FlagReader flags("check", kUsage, load_flags(true) + "  --min-items N         fewer items is an error (default: 2)\n",
                   kFooter);
  if (!flags.read(args)) return flags.stop();
  LoadOptions options;
  if (!flags.count("--min-items", &options.min_items, 1, SIZE_MAX / 2)) return flags.usage_error();
  if (flags.positional().empty()) return flags.usage_error("which collection? give ITEMS or SESSION");
  if (flags.positional().size() > 1)
    return flags.usage_error("one ITEMS file only (got '" + flags.positional()[0] + "' and '" + flags.positional()[1] +
                             "')");
  int code = kExitOk;
  InputOptions io;
  io.base = options;
  io.quiet = true;  // the warnings are listed below
  const std::optional<CollectionInput> in = read_input(flags, flags.positional()[0], &code, io);
  if (!in) return code;
  const Collection& c = in->collection;

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
  if (!c.neighbours.empty())
    std::printf("  neighbours:      %zu an item, given (%s)\n", c.neighbours.k,
                in->is_session() ? "kept in the session" : flags.text("--neighbours").c_str());
  std::printf("  warnings:        %zu\n", c.warnings.size());
  for (size_t i = 0; i < c.warnings.size() && i < kMaxWarnings; ++i)
    std::printf("    %s\n", c.warnings[i].str().c_str());
  if (c.warnings.size() > kMaxWarnings) std::printf("    ... (%zu more)\n", c.warnings.size() - kMaxWarnings);
  if (in->is_session()) {
    const SessionStore& store = *in->session;
    const std::string reading = store.reading();
    const auto checkpoint = store.last_checkpoint();
    std::printf("  session:         %zu judgments, %zu pins, %s\n", store.judgment_count(), store.pins().size(),
                checkpoint ? ("a map of iteration " + std::to_string(checkpoint->iteration)).c_str() : "no map yet");
    std::printf("  read from:       %s%s\n", c.source.c_str(),
                reading.empty() ? " (default reading)" : (" with " + reading).c_str());
  }
  std::printf("ok: %zu items x %zu features\n", c.size(), c.feature_names.size());
  return kExitOk;
}

}  // namespace kith
