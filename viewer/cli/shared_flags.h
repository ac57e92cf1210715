// The options several commands share, each declared, described and read in one place:
//   the map settings (--dims --perplexity --theta --dof --blend --learning-rate --seed
//   --iterations), read into MapParameters (solver/base/map_parameters.h) and checked by its
//   IsValid once the collection is loaded, before anything is written;
//   how to read ITEMS (--id --exclude --pictures --tags), read into LoadOptions.
// Main thread only.
#pragma once
#include <string>
#include <vector>

#include "solver/base/map_parameters.h"
#include "solver/io/collection.h"
#include "viewer/cli/flags.h"

namespace kith {

// The option lines (flags.h) of the named map settings ("--perplexity", ...), showing the
// defaults in `defaults`.
std::string map_flags(const std::vector<std::string>& names, const MapParameters& defaults = {});
// The same for a command that starts from a session's settings: "(default: the session's)".
std::string session_map_flags(const std::vector<std::string>& names);

// Reads every map setting the reader declares into *settings (those not given keep their value).
// False when a value is not a number of the right kind (the reader holds the message); the ranges
// are MapParameters::IsValid's, which the command calls with the item count once it has them.
bool read_map_flags(FlagReader& flags, MapParameters* settings);

// --id, --exclude, --pictures, --tags (as `kith check` describes them).
std::string load_flags();
bool read_load_flags(FlagReader& flags, LoadOptions* options);

}  // namespace kith
