// See shared_flags.h.
#include "viewer/cli/shared_flags.h"

#include <cassert>
#include <cstdio>

namespace kith {
namespace {

std::string shown(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

// The help line of one map setting, ending in its default: `fixed` when given, else the value in `d`.
Flag map_flag(const std::string& name, const MapParameters& d, const std::string& fixed) {
  auto is = [&](const std::string& value) { return " (default: " + (fixed.empty() ? value : fixed) + ")"; };
  if (name == "--dims") return {name, "2|3", "map dimensions" + is(std::to_string(d.dims))};
  if (name == "--perplexity")
    return {name, "P",
            "about how many neighbours each item listens to, above 0 and below the\nnumber of items" +
                is(shown(d.perplexity) +
                   (d.perplexity == MapParameters::kDefaultPerplexity ? ", or (N - 1) / 3 on a small collection" : ""))};
  if (name == "--theta") return {name, "T", "Barnes-Hut angle, 0 (exact) .. 1.5" + is(shown(d.theta))};
  if (name == "--dof") return {name, "D", "Student-t degrees of freedom of the map, 0.05 .. 100" + is(shown(d.dof))};
  if (name == "--blend") return {name, "B", "weight of judgments against features, 0 .. 1000" + is(shown(d.blend))};
  if (name == "--learning-rate")
    return {name, "R",
            "step size; 0 = auto, max(N / 48, 50)" + is(d.learning_rate > 0 ? shown(d.learning_rate) : "auto")};
  if (name == "--seed") return {name, "S", "random seed: neighbour graph, start, questions" + is(std::to_string(d.seed))};
  if (name == "--iterations")
    return {name, "N", "gradient steps, the first 250 with early exaggeration" + is(std::to_string(d.iterations))};
  return {};
}

std::vector<Flag> flags_for(const std::vector<std::string>& names, const MapParameters& defaults,
                            const std::string& fixed) {
  std::vector<Flag> out;
  for (const std::string& name : names) {
    out.push_back(map_flag(name, defaults, fixed));
    assert(!out.back().name.empty() && "not a map setting");
  }
  return out;
}

}  // namespace

std::vector<Flag> map_flags(const std::vector<std::string>& names, const MapParameters& defaults) {
  return flags_for(names, defaults, "");
}

std::vector<Flag> session_map_flags(const std::vector<std::string>& names) {
  return flags_for(names, MapParameters{}, "the session's");
}

bool read_map_flags(FlagReader& f, MapParameters* s) {
  auto number = [&](const char* name, double* target) { return !f.declared(name) || f.number(name, target); };
  auto whole = [&](const char* name, auto* target) { return !f.declared(name) || f.integer(name, target); };
  return whole("--dims", &s->dims) && number("--perplexity", &s->perplexity) && number("--theta", &s->theta) &&
         number("--dof", &s->dof) && number("--blend", &s->blend) && number("--learning-rate", &s->learning_rate) &&
         (!f.declared("--seed") || f.seed("--seed", &s->seed)) && whole("--iterations", &s->iterations);
}

std::vector<Flag> load_flags() {
  return {{"--id", "COLUMN", "the column holding item ids (default: 'id', else the first column of\nunique text, else items are numbered)"},
          {"--exclude", "A,B,...", "numeric columns that are not features (they become tags)"},
          {"--pictures", "COLUMN", "the column of picture paths, relative to the table's folder (default:\nthe text column whose values end in .png, .jpg, ...)"},
          {"--tags", "TAGS.csv", "for a .npy file: a CSV with one row per array row holding ids and tags"}};
}

bool read_load_flags(FlagReader& f, LoadOptions* o) {
  o->id_column = f.text("--id", o->id_column);
  o->picture_column = f.text("--pictures", o->picture_column);
  o->tags_csv = f.text("--tags", o->tags_csv);
  return f.list("--exclude", &o->exclude);
}

}  // namespace kith
