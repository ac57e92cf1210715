#include "viewer/cli/map_source.h"

#include <cstdio>
#include <filesystem>

#include "solver/features/neighbours.h"
#include "solver/io/safe_file.h"
#include "viewer/cli/shared_flags.h"
#include "viewer/cli/synthetic_collection.h"

namespace kith {

namespace {

// The collection's first ten warnings, "kith COMMAND: warning: ..." (none when COMMAND is empty).
void print_warnings(const std::string& command, const Collection& c) {
  for (size_t i = 0; i < c.warnings.size() && i < 10 && !command.empty(); ++i)
    std::fprintf(stderr, "kith %s: warning: %s\n", command.c_str(), c.warnings[i].str().c_str());
}

}  // namespace

std::optional<Collection> load_or_report(const std::string& command, const std::string& path,
                                         const LoadOptions& options) {
  try {
    Collection c = load_collection(path, options);
    print_warnings(command, c);
    return c;
  } catch (const LoadError& e) {
    const std::string prefix = command.empty() ? "" : "kith " + command + ": ";
    std::fprintf(stderr, "%s%s\n", prefix.c_str(), e.problem().str().c_str());
    return std::nullopt;
  }
}

bool is_session_path(const std::string& path) {
  return std::filesystem::path(path).extension() == ".kith" || is_sqlite_file(path);
}

int refuse_reading_flags(const FlagReader& flags, const std::string& path) {
  for (const char* option : kReadingFlags)
    if (flags.declared(option) && flags.has(option))
      return flags.usage_error(std::string(option) + ": " + path +
                               " is a session, which keeps its collection as it was read when it was made; reading "
                               "options go with ITEMS (make a new session from ITEMS to read it otherwise)");
  return kExitOk;
}

std::optional<CollectionInput> read_input(FlagReader& flags, const std::string& path, int* exit_code,
                                          const InputOptions& options) {
  const std::string& command = flags.command();
  CollectionInput in;
  in.path = path;
  in.reading = options.base;
  *exit_code = kExitUsage;
  if (!read_load_flags(flags, &in.reading)) {
    flags.usage_error();
    return std::nullopt;
  }
  if (options.generate > 0) {
    in.collection = synthetic_collection(options.generate);
    return in;
  }
  if (path.empty()) {
    std::fprintf(stderr, "kith %s: which collection? (kith %s ITEMS|SESSION, see --help)\n", command.c_str(),
                 command.c_str());
    return std::nullopt;
  }
  *exit_code = kExitBadInput;
  if (is_session_path(path)) {
    if (refuse_reading_flags(flags, path) != kExitOk) {
      *exit_code = kExitUsage;
      return std::nullopt;
    }
    try {
      SessionOpenOptions o;
      o.read_only = true;
      in.session = SessionStore::open(path, o);
      in.collection = in.session->collection();
    } catch (const SessionError& e) {
      std::fprintf(stderr, "kith %s: %s\n", command.c_str(), e.what());
      return std::nullopt;
    }
    print_warnings(options.quiet ? "" : command, in.collection);
    return in;
  }
  const bool npy = std::filesystem::path(path).extension() == ".npy";
  if (!in.reading.tags_csv.empty() && !npy) {
    flags.usage_error("--tags goes with a .npy file; a table holds its own tags");
    *exit_code = kExitUsage;
    return std::nullopt;
  }
  std::optional<Collection> loaded = load_or_report(options.quiet ? "" : command, path, in.reading);
  if (!loaded) return std::nullopt;
  in.collection = std::move(*loaded);
  return in;
}

int refuse_rows_without_direction(const std::string& command, const Collection& c, Metric metric) {
  if (metric != Metric::kCosine || c.features.cols() == 0) return kExitOk;
  const Eigen::Index r = first_zero_row(c.features);
  if (r < 0) return kExitOk;
  Problem p;
  p.file = c.source;
  const bool has_line = size_t(r) < c.lines.size();
  if (has_line) p.line = c.lines[size_t(r)];
  p.message = (has_line ? "item '" : "row " + std::to_string(r + 1) + ", item '") + c.ids[size_t(r)] +
              "' has every feature 0, so it has no direction; --metric cosine compares items by the "
              "angle between their rows (drop the item, or use --metric euclidean)";
  std::fprintf(stderr, "kith %s: %s\n", command.c_str(), p.str().c_str());
  return kExitBadInput;
}

int refuse_graph_perplexity(const FlagReader& flags, const Collection& c, const MapParameters& settings) {
  if (c.neighbours.empty()) return kExitOk;
  const std::string problem =
      MapParameters::check_graph_perplexity(settings.perplexity_for_graph(c.neighbours.k), c.neighbours.k);
  return problem.empty() ? kExitOk : flags.usage_error(problem);
}

bool choose_colour(const std::string& command, const Collection& c, const std::string& colour, ViewOptions* view) {
  if (colour.empty()) return true;
  std::string why;
  if (colour_by_name(c, colour, &view->colour_by, &why)) return true;
  std::fprintf(stderr, "kith %s: --colour: %s\n", command.c_str(), why.c_str());
  return false;
}

bool choose_caption(const std::string& command, const Collection& c, const std::string& caption, int* column) {
  *column = -1;
  if (caption.empty() || caption == "id") return true;
  std::string names;
  for (size_t t = 0; t < c.tags.size(); ++t) {
    if (c.tags[t].name == caption) {
      *column = int(t);
      return true;
    }
    names += (names.empty() ? "" : ", ") + c.tags[t].name;
  }
  std::fprintf(stderr, "kith %s: --caption: no text column named '%s' (%s)\n", command.c_str(), caption.c_str(),
               names.empty() ? "this collection has none; 'id' shows the ids" : ("there are: id, " + names).c_str());
  return false;
}

}  // namespace kith
