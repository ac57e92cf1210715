// The options several commands share, each declared, described and read in one place:
//   the map settings (--dims --perplexity --theta --dof --blend --learning-rate --seed
//   --iterations --metric), read into MapParameters (solver/base/map_parameters.h) and checked by its
//   IsValid once the collection is loaded, before anything is written;
//   how to read ITEMS (--id --exclude --pictures --tags --neighbours), read into LoadOptions;
//   the output rule (--force): every file a command writes goes through write_file_safely
//   (solver/io/safe_file.h); an existing file is replaced only with --force, and never a session
//   (any SQLite file), a folder or one of the command's own inputs. A refused output is a usage
//   error (exit 2), checked before the command's work; a write that fails (disk full, I/O) exits 1.
// Main thread only.
#pragma once
#include <string>
#include <vector>

#include "solver/base/map_parameters.h"
#include "solver/io/collection.h"
#include "solver/io/safe_file.h"
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

// --id, --exclude, --pictures, --tags: how every command reads ITEMS (map_source.h read_input);
// with `neighbours`, also --neighbours GRAPH (a given neighbour graph, for the commands that make
// a map from it: fit, new, open; and check, which checks it). read_load_flags reads every one the
// reader declares.
std::string load_flags(bool neighbours = false);
bool read_load_flags(FlagReader& flags, LoadOptions* options);
// The reading options a SESSION refuses (it keeps its collection, and graph, as they were read).
extern const char* const kReadingFlags[5];

// The --colour option line (open, render, export --picture, report); map_source.h choose_colour
// reads it.
std::string colour_flag();

// The --force option line; WHAT names the outputs it lets replace ("FILE", "the exports").
std::string force_flag(const std::string& what);
// The rule for this command's outputs: replace with --force, never one of INPUTS.
SafeWriteOptions output_rule(const FlagReader& flags, const std::vector<std::string>& inputs);
// 0 when OUTPUT may be written under RULE; else prints the usage message naming the path and why
// (with "give --force to replace it" when only --force is missing) and returns 2.
int refuse_output(const FlagReader& flags, const std::string& output, const SafeWriteOptions& rule);
// A write that did not happen: prints "kith COMMAND: PROBLEM" and returns 1.
int write_failed(const FlagReader& flags, const std::string& problem);

}  // namespace kith
