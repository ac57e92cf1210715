#include "viewer/cli/session_cli.h"

#include <cstdio>

namespace kith::session_cli {

int report(const char* command, const SessionError& e) {
  std::fprintf(stderr, "kith %s: %s\n", command, e.what());
  switch (e.kind()) {
    case SessionError::Kind::kExists: return kExitUsage;
    default: return kExitBadInput;
  }
}

}  // namespace kith::session_cli
