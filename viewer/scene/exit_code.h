// The exit codes of every kith command and of the window (DEVELOPERS.md, "Conventions"). An
// output kith may not write (it exists without --force, is a session, a folder or the command's
// input) is bad usage (2); a write that fails (disk full, I/O) is 1.
#pragma once

namespace kith {

enum ExitCode : int { kExitOk = 0, kExitInternal = 1, kExitUsage = 2, kExitBadInput = 3 };

}  // namespace kith
