// What the session subcommands (kith new, judge, export) share beyond the flag reader: the exit
// code and message of a session error. Main thread only.
#pragma once
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"

namespace kith::session_cli {

// Prints "kith COMMAND: message" and returns the exit code for a session error.
int report(const char* command, const SessionError& e);

}  // namespace kith::session_cli
