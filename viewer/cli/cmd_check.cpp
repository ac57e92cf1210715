// kith check ITEMS: load a collection and report what was found (items, feature, tag and picture
// columns) and any warnings. A problem in the data is printed as "file:line:column: what" on
// stderr with exit code 3. Runs on the main thread only.
#include <cstdio>
#include <cstdlib>
#include <set>
#include <string>

#include "solver/io/collection.h"
#include "viewer/cli/cli_text.h"
#include "viewer/cli/commands.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith check ITEMS [--id COLUMN] [--exclude COLUMN,...] [--pictures COLUMN] [--tags TAGS.csv]\n"
    "\n"
    "Loads a collection and reports what kith found in it: the number of items, the id column,\n"
    "the feature columns (numeric), the tag columns (text), the picture column, and warnings.\n"
    "ITEMS is a CSV or TSV table with a header row, or a NumPy .npy array of features.\n"
    "\n"
    "options:\n"
    "  --id COLUMN          the column holding item ids (default: 'id', else the first column of\n"
    "                       unique text, else items are numbered)\n"
    "  --exclude A,B,...    numeric columns that are not features (they become tags)\n"
    "  --pictures COLUMN    the column of picture paths, relative to the table's folder (default:\n"
    "                       the text column whose values end in .png, .jpg, ...)\n"
    "  --tags TAGS.csv      for a .npy file: a CSV with one row per array row holding ids and tags\n"
    "  --min-items N        fewer items is an error (default: 2)\n"
    "\n"
    "exit codes: 0 the collection loads, 2 bad usage, 3 a problem in the data (printed as\n"
    "file:line:column: what was expected and what was found)\n";

int usage_error(const std::string& message) {
  std::fprintf(stderr, "kith check: %s\n%s", message.c_str(), kUsage);
  return kExitUsage;
}

std::string list(const std::vector<std::string>& names, size_t max_shown) {
  std::string s;
  for (size_t i = 0; i < names.size() && i < max_shown; ++i) s += (i ? ", " : "") + names[i];
  if (names.size() > max_shown) s += ", ... (" + std::to_string(names.size() - max_shown) + " more)";
  return s;
}

}  // namespace

int cmd_check(const Args& args) {
  std::string items;
  LoadOptions options;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string& a = args[i];
    if (a == "--help" || a == "-h") {
      std::fputs(kUsage, stdout);
      return kExitOk;
    }
    std::string key = a, value;
    bool has_value = false;
    const size_t eq = a.find('=');
    if (a.rfind("--", 0) == 0 && eq != std::string::npos) {
      key = a.substr(0, eq);
      value = a.substr(eq + 1);
      has_value = true;
    }
    const bool takes_value =
        key == "--id" || key == "--exclude" || key == "--pictures" || key == "--tags" || key == "--min-items";
    if (takes_value && !has_value) {
      if (i + 1 >= args.size()) return usage_error(key + " needs a value");
      value = args[++i];
    }
    if (key == "--id") options.id_column = value;
    else if (key == "--exclude") {
      for (auto& name : split_commas(value)) options.exclude.push_back(name);
    } else if (key == "--pictures") options.picture_column = value;
    else if (key == "--tags") options.tags_csv = value;
    else if (key == "--min-items") {
      char* end = nullptr;
      const long n = std::strtol(value.c_str(), &end, 10);
      if (value.empty() || *end != '\0' || n < 1) return usage_error("--min-items needs a whole number >= 1");
      options.min_items = size_t(n);
    } else if (a.rfind("-", 0) == 0 && a.size() > 1) {
      return usage_error("unknown option '" + a + "'");
    } else if (items.empty()) {
      items = a;
    } else {
      return usage_error("one ITEMS file only (got '" + items + "' and '" + a + "')");
    }
  }
  if (items.empty()) return usage_error("which collection? give ITEMS");
  const bool npy = items.size() >= 4 && items.compare(items.size() - 4, 4, ".npy") == 0;
  if (!options.tags_csv.empty() && !npy) return usage_error("--tags goes with a .npy file; a table holds its own tags");

  Collection c;
  try {
    c = load_collection(items, options);
  } catch (const LoadError& e) {
    std::fprintf(stderr, "%s\n", e.problem().str().c_str());
    return kExitBadInput;
  }

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
