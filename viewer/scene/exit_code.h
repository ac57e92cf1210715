// The exit codes of every kith command and of the window (DEVELOPERS.md, "Conventions").
#pragma once

namespace kith {

enum ExitCode : int { kExitOk = 0, kExitInternal = 1, kExitUsage = 2, kExitBadInput = 3 };

}  // namespace kith
