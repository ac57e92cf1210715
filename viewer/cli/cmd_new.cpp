// kith new ITEMS -o SESSION.kith [--judgments J.csv]: creates a session file from a collection,
// optionally with judgments read from a CSV. Everything is read and checked before the file is
// made; the file appears complete or not at all, and an existing file is kept unless --force.
// Main thread only.
#include <cstdio>
#include <cstdlib>

#include "solver/io/collection.h"
#include "solver/session/session_store.h"
#include "viewer/cli/cli_text.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/session_cli.h"
#include "solver/io/judgment_io.h"

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
    "\n"
    "options:\n"
    "  -o, --output FILE     the session file to create (required)\n"
    "  --judgments J.csv     judgments to start with: anchor,nearer,farther[,person][,time][,kind][,weight]\n"
    "                        by item id; every bad row is reported with its line, and a file with\n"
    "                        bad rows adds none (and no session is made) unless --skip-bad-rows\n"
    "  --skip-bad-rows       add the good rows of a judgments file that has bad ones\n"
    "  --force               replace an existing file (never one open in another kith process);\n"
    "                        without it an existing file is left alone\n"
    "  --id, --exclude, --pictures, --tags   how to read ITEMS, as in 'kith check'\n"
    "  --dims 2|3            map dimensions (default: 3)\n"
    "  --perplexity P        t-SNE perplexity (default: 30)\n"
    "  --blend B             weight of judgments against features (default: 1)\n"
    "  --theta T             Barnes-Hut angle (default: 0.5)\n"
    "  --dof D               Student-t degrees of freedom of the map (default: 1)\n"
    "  --seed S              random seed (default: 42)\n"
    "\n"
    "exit codes: 0 created, 2 bad usage or the file exists, 3 a problem in ITEMS or J.csv\n";

int usage_error(const std::string& message) {
  std::fprintf(stderr, "kith new: %s\n%s", message.c_str(), kUsage);
  return kExitUsage;
}

}  // namespace

int cmd_new(const Args& args) {
  session_cli::Parsed p;
  const std::string error = session_cli::parse(
      args,
      {"--output", "--judgments", "--id", "--exclude", "--pictures", "--tags", "--dims", "--perplexity", "--blend",
       "--theta", "--dof", "--seed"},
      {"--force", "--skip-bad-rows"}, &p);
  if (p.help) {
    std::fputs(kUsage, stdout);
    return kExitOk;
  }
  if (!error.empty()) return usage_error(error);
  if (p.positional.size() != 1) return usage_error(p.positional.empty() ? "which collection? give ITEMS"
                                                                        : "one ITEMS file only");
  const std::string out = p.value("--output");
  if (out.empty()) return usage_error("where to? give -o SESSION.kith");

  SessionSettings settings;
  struct NumberOption {
    const char* name;
    double* target;
  };
  double dims = settings.dims, seed = double(settings.seed);
  for (const NumberOption& o : {NumberOption{"--dims", &dims}, NumberOption{"--perplexity", &settings.perplexity},
                                NumberOption{"--blend", &settings.blend}, NumberOption{"--theta", &settings.theta},
                                NumberOption{"--dof", &settings.dof}, NumberOption{"--seed", &seed}}) {
    if (p.values.count(o.name) && !session_cli::parse_double(p.value(o.name), o.target))
      return usage_error(std::string(o.name) + " needs a number, got '" + p.value(o.name) + "'");
  }
  if (dims != 2 && dims != 3) return usage_error("--dims must be 2 or 3");
  if (seed < 0 || seed != std::floor(seed)) return usage_error("--seed must be a whole number >= 0");
  settings.dims = int(dims);
  settings.seed = uint64_t(seed);
  std::string why;
  if (!settings.IsValid(&why)) return usage_error(why);

  LoadOptions load;
  load.id_column = p.value("--id");
  load.exclude = split_commas(p.value("--exclude"));
  load.picture_column = p.value("--pictures");
  load.tags_csv = p.value("--tags");
  Collection collection;
  try {
    collection = load_collection(p.positional[0], load);
  } catch (const LoadError& e) {
    std::fprintf(stderr, "kith new: %s\n", e.problem().str().c_str());
    return kExitBadInput;
  }
  for (size_t i = 0; i < collection.warnings.size() && i < 10; ++i)
    std::fprintf(stderr, "kith new: warning: %s\n", collection.warnings[i].str().c_str());

  std::vector<Judgment> judgments;
  if (p.values.count("--judgments")) {
    JudgmentReadOptions read;
    read.skip_bad_rows = p.flags.count("--skip-bad-rows") > 0;
    const JudgmentReadResult r = read_judgments_csv(p.value("--judgments"), collection.ids, read);
    for (const Problem& problem : r.problems) std::fprintf(stderr, "kith new: %s\n", describe(problem).c_str());
    if (!r.ok() && !read.skip_bad_rows) {
      std::fprintf(stderr, "kith new: %zu bad row%s in %s: no session made (fix them, or add --skip-bad-rows)\n",
                   r.bad_rows, r.bad_rows == 1 ? "" : "s", p.value("--judgments").c_str());
      return kExitBadInput;
    }
    judgments = r.judgments;
    if (r.bad_rows) std::fprintf(stderr, "kith new: skipped %zu bad rows\n", r.bad_rows);
  }

  try {
    SessionCreateOptions create;
    create.overwrite = p.flags.count("--force") > 0;
    create.judgments = judgments;
    auto store = SessionStore::create(out, collection, settings, create);
    std::printf("%s: %zu items x %zu features, %zu tag columns, %zu judgments\n", out.c_str(), collection.size(),
                collection.feature_names.size(), collection.tags.size(), judgments.size());
  } catch (const SessionError& e) {
    return session_cli::report("new", e);
  }
  return kExitOk;
}

}  // namespace kith
