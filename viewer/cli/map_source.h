// What the commands share about their collection argument. Every command that reads a
// collection takes ITEMS (CSV, TSV or .npy, read with the reading options of shared_flags.h) or
// a SESSION (.kith, or any SQLite file: kith opens its own read-only and refuses others), through
// read_input, with problems reported the one way ("kith COMMAND: file:line:column: what", exit 3).
// Also --colour, and for `kith open` and `kith render` the hidden --generate N collection of
// tests and benchmarks. Main thread.
#pragma once
#include <memory>
#include <optional>
#include <string>

#include "solver/io/collection.h"
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/scene/map_view.h"

namespace kith {

// Loads PATH. On a problem prints it to stderr, prefixed "kith COMMAND: " (nothing when COMMAND
// is empty), and returns nothing: the exit code is then 3. With a COMMAND, the collection's first
// ten warnings go to stderr as "kith COMMAND: warning: ..." (kith check lists them itself).
std::optional<Collection> load_or_report(const std::string& command, const std::string& path,
                                         const LoadOptions& options = {});

// True when PATH names a session: a .kith name, or a file that begins as SQLite files do.
bool is_session_path(const std::string& path);

// A command's collection: from ITEMS, or from a SESSION with what it holds besides.
struct CollectionInput {
  std::string path;  // as given ("" for a generated collection)
  Collection collection;
  LoadOptions reading;                    // the reading options used for ITEMS
  std::unique_ptr<SessionStore> session;  // open read-only for a SESSION, else null
  bool is_session() const { return session != nullptr; }
};

// Reads the collection argument PATH the way every command does: the reading options declared on
// FLAGS (read_load_flags) apply to ITEMS; given with a SESSION they are refused (exit 2) with the
// reason (the session holds the collection as it was read when it was made). On failure prints the problem and sets
// *exit_code (3 bad data or an unreadable session, 2 bad usage).
struct InputOptions {
  size_t generate = 0;  // > 0: the generated test collection of that many items (default: 0)
  LoadOptions base;     // reading options the flags start from (default: the defaults)
  bool quiet = false;   // no warnings on stderr, no "kith COMMAND:" before a problem (kith check)
};
std::optional<CollectionInput> read_input(FlagReader& flags, const std::string& path, int* exit_code,
                                          const InputOptions& options = {});
// For a command that opens a SESSION itself: 0, or the usage error (2) when a reading option was
// given with one (see read_input).
int refuse_reading_flags(const FlagReader& flags, const std::string& session_path);

// Under --metric cosine every row needs a direction: 0, or 3 after printing
// "kith COMMAND: FILE:LINE: ..." (for .npy "row R", for a session the item's id) for the first
// row whose features are all 0.
int refuse_rows_without_direction(const std::string& command, const Collection& collection, Metric metric);

// With a given neighbour graph, the settings' perplexity must fit in its k neighbours
// (MapParameters::check_graph_perplexity): 0, or the usage error (2). 0 without a graph.
int refuse_graph_perplexity(const FlagReader& flags, const Collection& collection, const MapParameters& settings);

// --colour COLUMN: colours VIEW by that tag column ("plain": one colour; "": leaves it). False,
// with "kith COMMAND: --colour: ..." on stderr, when the collection has no such column.
bool choose_colour(const std::string& command, const Collection& collection, const std::string& colour,
                   ViewOptions* view);

// --caption COLUMN: the tag column whose value the question cards show (*column its index; "id"
// or "": the item's id, -1). False, with "kith COMMAND: --caption: ..." naming the columns there
// are, when the collection has no such column.
bool choose_caption(const std::string& command, const Collection& collection, const std::string& caption, int* column);

}  // namespace kith
