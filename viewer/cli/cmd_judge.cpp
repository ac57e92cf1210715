// kith judge SESSION --add ANCHOR,NEARER,FARTHER | --import J.csv | --retract ID | --restore ID:
// adds judgments to a session from the command line. Each is committed to the file before its
// "added" line is printed, so a printed line means the judgment is safe. Main thread only.
#include <cstdio>
#include <unordered_map>

#include "solver/io/judgment_io.h"
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/session_cli.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith judge SESSION --add ANCHOR,NEARER,FARTHER [--add ...] [--person NAME] [--weight W]\n"
    "       kith judge SESSION --import J.csv [--skip-bad-rows] [--person NAME]\n"
    "       kith judge SESSION --retract ID | --restore ID\n"
    "\n"
    "Adds judgments to a session: 'ANCHOR is more like NEARER than like FARTHER', items by id.\n"
    "Each judgment is written to the session file before kith says it was added. Judgments are\n"
    "never deleted; --retract marks one as withdrawn (the map ignores it), --restore undoes that.\n";

const char* const kFooter =
    "exit codes: 0 done, 2 bad usage, 3 bad input (unknown item, bad row, not a sound session, or a\n"
    "session open in another kith process)\n";

const char* const kOptions =
    "  --add A,N,F           one judgment by item ids (repeat for more; ids holding a comma need --import)\n"
    "  --import J.csv        judgments from a CSV: anchor,nearer,farther[,person][,time][,kind][,weight];\n"
    "                        every bad row is reported with its line and cause, and a file with any\n"
    "                        bad row adds none unless --skip-bad-rows\n"
    "  --skip-bad-rows       with --import: add the good rows anyway\n"
    "  --person NAME         who made them: any name or a pseudonym (default: nobody named; with\n"
    "                        --import, only rows without a person get it)\n"
    "  --weight W            weight of --add judgments, > 0 (default: 1)\n"
    "  --retract ID          withdraw judgment ID\n"
    "  --restore ID          bring a withdrawn judgment back\n";

}  // namespace

int cmd_judge(const Args& args) {
  FlagReader flags("judge", kUsage, kOptions, kFooter);
  if (!flags.read(args)) return flags.stop();
  if (flags.positional().size() != 1)
    return flags.usage_error(flags.positional().empty() ? "which session? give SESSION" : "one SESSION only");
  const int actions =
      int(flags.has("--add")) + int(flags.has("--import")) + int(flags.has("--retract")) + int(flags.has("--restore"));
  if (actions == 0) return flags.usage_error("nothing to do: give --add, --import, --retract or --restore");
  if (actions > 1) return flags.usage_error("one of --add, --import, --retract, --restore at a time");
  double weight = 1.0;
  int64_t judgment_id = 0;
  if (!flags.number("--weight", &weight, 0.0) || !flags.integer("--retract", &judgment_id) ||
      !flags.integer("--restore", &judgment_id))
    return flags.usage_error();
  if (!(weight > 0)) return flags.usage_error("--weight needs a number > 0, got '" + flags.text("--weight") + "'");
  const std::string person = flags.text("--person");
  const std::string path = flags.positional()[0];

  try {
    auto store = SessionStore::open(path);
    if (flags.has("--retract") || flags.has("--restore")) {
      const bool retract = flags.has("--retract");
      store->set_retracted(judgment_id, retract);
      std::printf("%s judgment %lld\n", retract ? "retracted" : "restored", static_cast<long long>(judgment_id));
      return kExitOk;
    }

    const std::vector<std::string> ids = store->item_ids();
    std::unordered_map<std::string, int32_t> index;
    for (size_t i = 0; i < ids.size(); ++i) index.emplace(ids[i], int32_t(i));

    if (flags.has("--add")) {
      // Check every --add first: either all are added or none.
      std::vector<Judgment> judgments;
      for (const std::string& triple : flags.all("--add")) {
        std::vector<std::string> parts;
        size_t start = 0;
        for (;;) {
          const size_t comma = triple.find(',', start);
          parts.push_back(triple.substr(start, comma == std::string::npos ? std::string::npos : comma - start));
          if (comma == std::string::npos) break;
          start = comma + 1;
        }
        if (parts.size() != 3)
          return flags.usage_error("--add needs three item ids separated by commas, got '" + triple + "'");
        Judgment j;
        int32_t* slots[3] = {&j.anchor, &j.nearer, &j.farther};
        static const char* kRoles[3] = {"anchor", "nearer", "farther"};
        for (int r = 0; r < 3; ++r) {
          auto it = index.find(parts[size_t(r)]);
          if (it == index.end()) {
            std::fprintf(stderr, "kith judge: --add %s: %s '%s' is not an item of %s\n", triple.c_str(), kRoles[r],
                         parts[size_t(r)].c_str(), path.c_str());
            return kExitBadInput;
          }
          *slots[r] = it->second;
        }
        if (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther) {
          std::fprintf(stderr, "kith judge: --add %s: a judgment needs three different items\n", triple.c_str());
          return kExitBadInput;
        }
        j.person = person;
        j.kind = JudgmentKind::kOwn;
        j.weight = weight;
        judgments.push_back(j);
      }
      for (size_t k = 0; k < judgments.size(); ++k) {
        const int64_t id = store->add_judgment(judgments[k]);
        std::printf("added judgment %lld: %s\n", static_cast<long long>(id), flags.all("--add")[k].c_str());
        std::fflush(stdout);
      }
      return kExitOk;
    }

    const std::string file = flags.text("--import");
    JudgmentReadOptions read;
    read.skip_bad_rows = flags.has("--skip-bad-rows");
    JudgmentReadResult r = read_judgments_csv(file, ids, read);
    for (const Problem& problem : r.problems) std::fprintf(stderr, "kith judge: %s\n", describe(problem).c_str());
    if (!r.ok() && !read.skip_bad_rows) {
      std::fprintf(stderr, "kith judge: %zu bad row%s in %s: none imported (fix them, or add --skip-bad-rows)\n",
                   r.bad_rows, r.bad_rows == 1 ? "" : "s", file.c_str());
      return kExitBadInput;
    }
    if (!person.empty())
      for (Judgment& j : r.judgments)
        if (j.person.empty()) j.person = person;
    const auto added = store->add_judgments(r.judgments);  // one transaction: all or none
    std::printf("imported %zu judgment%s from %s", added.size(), added.size() == 1 ? "" : "s", file.c_str());
    if (!added.empty())
      std::printf(" (ids %lld to %lld)", static_cast<long long>(added.front()), static_cast<long long>(added.back()));
    if (r.bad_rows) std::printf("; skipped %zu bad row%s", r.bad_rows, r.bad_rows == 1 ? "" : "s");
    std::printf("\n");
    return kExitOk;
  } catch (const SessionError& e) {
    return session_cli::report("judge", e);
  }
}

}  // namespace kith
