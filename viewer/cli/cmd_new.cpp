// kith new ITEMS -o SESSION.kith [--judgments J.csv]: creates a session file from a collection,
// optionally with judgments read from a CSV. Everything is read and checked before the file is
// made; the file appears complete or not at all, and an existing file is kept unless --force.
// Main thread only.
#include <cstdio>
#include <optional>

#include "solver/io/collection.h"
#include "solver/io/judgment_io.h"
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/session_cli.h"
#include "viewer/cli/shared_flags.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith new ITEMS -o SESSION.kith [--judgments J.csv [--skip-bad-rows]] [--force]\n"
    "                [--id COLUMN] [--exclude A,B] [--pictures COLUMN] [--tags TAGS.csv]\n"
    "                [--dims 2|3] [--perplexity P] [--blend B] [--theta T] [--dof D] [--seed S]\n"
    "\n"
    "Creates a session: one .kith file holding the collection (ids, tags, picture paths and the\n"
    "features themselves), the map settings, and from then on every judgment, pin and map\n"
    "checkpoint. Open it with 'kith open SESSION.kith'; add judgments with 'kith judge'.\n"
    "Every setting is checked against the collection before the file is made.\n";

const char* const kFooter = "exit codes: 0 created, 2 bad usage or the file exists, 3 a problem in ITEMS or J.csv\n";

const char* const kOptions =
    "  -o, --output FILE     the session file to create (required)\n"
    "  --judgments J.csv     judgments to start with: anchor,nearer,farther[,person][,time][,kind][,weight]\n"
    "                        by item id; every bad row is reported with its line, and a file with\n"
    "                        bad rows adds none (and no session is made) unless --skip-bad-rows\n"
    "  --skip-bad-rows       add the good rows of a judgments file that has bad ones\n"
    "  --force               replace an existing file (never one open in another kith process);\n"
    "                        without it an existing file is left alone\n";

}  // namespace

int cmd_new(const Args& args) {
  FlagReader flags(
      "new", kUsage,
      kOptions + load_flags(true) + map_flags({"--dims", "--perplexity", "--blend", "--theta", "--dof", "--seed", "--metric"}),
      kFooter);
  if (!flags.read(args)) return flags.stop();
  SessionSettings settings;
  if (!read_map_flags(flags, &settings)) return flags.usage_error();
  if (flags.positional().size() != 1)
    return flags.usage_error(flags.positional().empty() ? "which collection? give ITEMS" : "one ITEMS file only");
  const std::string out = flags.text("--output");
  if (out.empty()) return flags.usage_error("where to? give -o SESSION.kith");
  for (const std::string& input : {flags.positional()[0], flags.text("--judgments")})
    if (!input.empty() && same_file(out, input))
      return flags.usage_error(out + ": that is the input (" + input + "); kith does not write over it");

  if (is_session_path(flags.positional()[0]))
    return flags.usage_error(flags.positional()[0] + " is a session already (Session > Save as in the window copies one)");
  int code = kExitOk;
  const std::optional<CollectionInput> in = read_input(flags, flags.positional()[0], &code);
  if (!in) return code;
  const Collection& collection = in->collection;
  if (collection.features.cols() == 0 && collection.neighbours.empty() && !flags.has("--dof"))
    settings.dof = MapParameters::kJudgmentsAloneDof;
  // The settings as the engine will take them, before anything is written.
  if (std::string why; !settings.IsValid(&why, collection.size())) return flags.usage_error(why);
  if (const int refused = refuse_graph_perplexity(flags, collection, settings)) return refused;
  if (const int bad = refuse_rows_without_direction("new", collection, settings.metric)) return bad;

  std::vector<Judgment> judgments;
  if (flags.has("--judgments")) {
    JudgmentReadOptions read;
    read.skip_bad_rows = flags.has("--skip-bad-rows");
    const JudgmentReadResult r = read_judgments_csv(flags.text("--judgments"), collection.ids, read);
    for (const Problem& problem : r.problems) std::fprintf(stderr, "kith new: %s\n", describe(problem).c_str());
    if (!r.ok() && !read.skip_bad_rows) {
      std::fprintf(stderr, "kith new: %zu bad row%s in %s: no session made (fix them, or add --skip-bad-rows)\n",
                   r.bad_rows, r.bad_rows == 1 ? "" : "s", flags.text("--judgments").c_str());
      return kExitBadInput;
    }
    judgments = r.judgments;
    if (r.bad_rows) std::fprintf(stderr, "kith new: skipped %zu bad rows\n", r.bad_rows);
  }

  try {
    SessionCreateOptions create;
    create.overwrite = flags.has("--force");
    create.judgments = judgments;
    create.reading = reading_flags(in->reading);
    auto store = SessionStore::create(out, collection, settings, create);
    std::printf("%s: %zu items x %zu features, %zu tag columns, %zu judgments\n", out.c_str(), collection.size(),
                collection.feature_names.size(), collection.tags.size(), judgments.size());
  } catch (const SessionError& e) {
    return session_cli::report("new", e);
  }
  return kExitOk;
}

}  // namespace kith
