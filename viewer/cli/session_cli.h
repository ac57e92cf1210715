// Helpers shared by the session subcommands (kith new, judge, export): option parsing, exit codes
// for session errors, CSV quoting, and people codes for exports. Main thread only.
#pragma once
#include <map>
#include <set>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"

namespace kith::session_cli {

struct Parsed {
  std::vector<std::string> positional;
  std::map<std::string, std::vector<std::string>> values;  // options that take a value, in order given
  std::set<std::string> flags;
  bool help = false;
  bool has(const std::string& name) const { return values.count(name) || flags.count(name); }
  std::string value(const std::string& name, const std::string& fallback = "") const;
};

// "--key value" and "--key=value" for names in `with_value`; bare flags in `flags`; "-o" is an
// alias of "--output". Returns "" or a message for the user.
std::string parse(const Args& args, const std::set<std::string>& with_value, const std::set<std::string>& flags,
                  Parsed* out);

// Prints "kith COMMAND: message" and returns the exit code for a session error.
int report(const char* command, const SessionError& e);

// Reads a number; false when the whole text is not one finite number.
bool parse_double(const std::string& text, double* out);

}  // namespace kith::session_cli
