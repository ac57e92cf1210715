// Subcommands whose capability has not landed yet. Each helper that lands one deletes its line
// here and adds cmd_NAME.cpp. Until then they say so plainly and exit 1.
#include <cstdio>

#include "viewer/commands.h"

namespace kith {
namespace {
int pending(const char* name) {
  std::fprintf(stderr, "kith %s: not available in this build yet\n", name);
  return kExitInternal;
}
}  // namespace

int cmd_check(const Args&) { return pending("check"); }
int cmd_fit(const Args&) { return pending("fit"); }
int cmd_open(const Args&) { return pending("open"); }
int cmd_render(const Args&) { return pending("render"); }
int cmd_demo(const Args&) { return pending("demo"); }
int cmd_new(const Args&) { return pending("new"); }
int cmd_judge(const Args&) { return pending("judge"); }
int cmd_export(const Args&) { return pending("export"); }
int cmd_report(const Args&) { return pending("report"); }
int cmd_describe(const Args&) { return pending("describe"); }

}  // namespace kith
