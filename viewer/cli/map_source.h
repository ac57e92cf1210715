// What the commands share about their collection argument: loading ITEMS with the problem
// reported the one way ("kith COMMAND: file:line:column: what", exit 3), for `kith open` and
// `kith render` the hidden --generate N collection of tests and benchmarks, and --colour.
// Main thread.
#pragma once
#include <optional>
#include <string>

#include "solver/io/collection.h"
#include "viewer/cli/commands.h"
#include "viewer/scene/map_view.h"

namespace kith {

// Loads PATH. On a problem prints it to stderr, prefixed "kith COMMAND: " (nothing when COMMAND
// is empty), and returns nothing: the exit code is then 3. With a COMMAND, the collection's first
// ten warnings go to stderr as "kith COMMAND: warning: ..." (kith check lists them itself).
std::optional<Collection> load_or_report(const std::string& command, const std::string& path,
                                         const LoadOptions& options = {});

// Loads ITEMS (CSV/TSV/.npy) or generates a test collection of `generate` items. On failure prints
// the problem to stderr and sets *exit_code (3 bad data, 2 bad usage).
std::optional<Collection> load_items_or_report(const std::string& command, const std::string& path, size_t generate,
                                               int* exit_code);

// --colour COLUMN: colours VIEW by that tag column ("plain": one colour; "": leaves it). False,
// with "kith COMMAND: --colour: ..." on stderr, when the collection has no such column.
bool choose_colour(const std::string& command, const Collection& collection, const std::string& colour,
                   ViewOptions* view);

}  // namespace kith
