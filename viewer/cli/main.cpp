// kith: arrange a collection so that things that feel alike sit together.
// Entry point: dispatches to one subcommand (viewer/cli/commands.h). `kith ITEMS` alone opens ITEMS.
#include <cstdio>
#include <cstring>
#include <exception>
#include <string>

#include "viewer/cli/commands.h"

namespace {

struct Subcommand {
  const char* name;
  int (*run)(const kith::Args&);
  const char* usage;
  const char* summary;
};

const Subcommand kSubcommands[] = {
    {"open", kith::cmd_open, "open ITEMS|SESSION", "open the live map of a collection or session in a window"},
    {"demo", kith::cmd_demo, "demo", "the sample library: a window, or a PNG when there is no display"},
    {"fit", kith::cmd_fit, "fit ITEMS -o layout.csv|json", "compute a map headlessly and print its health"},
    {"check", kith::cmd_check, "check ITEMS", "load a collection and report what was found and any problems"},
    {"render", kith::cmd_render, "render ITEMS|SESSION -o map.png", "draw the map to a PNG with no display"},
    {"new", kith::cmd_new, "new ITEMS -o SESSION.kith", "create a session file from a collection"},
    {"judge", kith::cmd_judge, "judge SESSION --add A,N,F | --import J.csv", "add judgments to a session"},
    {"export", kith::cmd_export, "export SESSION --layout|--judgments|--picture|--flat|--poster FILE",
     "write what a session holds in formats other tools read, or a poster"},
    {"report", kith::cmd_report, "report SESSION|ITEMS -o report.html", "a self-contained HTML report"},
    {"describe", kith::cmd_describe, "describe PICTURES -o features.csv", "features computed from pictures"},
};

void print_help(std::FILE* out) {
  std::fprintf(out,
               "kith: lay out a collection in 3-D so that things that feel alike sit together,\n"
               "blending feature vectors (t-SNE) with people's judgments (t-STE).\n\n"
               "usage: kith COMMAND [options]     (kith COMMAND --help for each command's options)\n"
               "       kith ITEMS|SESSION         same as 'kith open'\n\ncommands:\n");
  for (const auto& s : kSubcommands) std::fprintf(out, "  %-44s %s\n", s.usage, s.summary);
  std::fprintf(out, "\nexit codes: 0 success, 1 internal error or a failed write, 2 bad usage, 3 bad input data\n");
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    print_help(stderr);
    return kith::kExitUsage;
  }
  const std::string first = argv[1];
  if (first == "--help" || first == "-h" || first == "help") {
    print_help(stdout);
    return kith::kExitOk;
  }
  try {
    for (const auto& s : kSubcommands) {
      if (first == s.name) return s.run(kith::Args(argv + 2, argv + argc));
    }
    if (first.rfind("-", 0) != 0) return kith::cmd_open(kith::Args(argv + 1, argv + argc));
    std::fprintf(stderr, "kith: unknown command '%s' (kith --help lists them)\n", first.c_str());
    return kith::kExitUsage;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith: internal error: %s\n", e.what());
    return kith::kExitInternal;
  }
}
