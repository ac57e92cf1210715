// Placeholders for subcommands whose capability has not landed: weak symbols, so adding
// cmd_NAME.cpp with the real definition replaces one without touching this file. Remove a line
// here once its real command exists.
#include <cstdio>

#include "viewer/commands.h"

namespace kith {
namespace {
int pending(const char* name) {
  std::fprintf(stderr, "kith %s: not available in this build yet\n", name);
  return kExitInternal;
}
}  // namespace

#define KITH_PENDING(NAME) \
  __attribute__((weak)) int cmd_##NAME(const Args&) { return pending(#NAME); }

}  // namespace kith
