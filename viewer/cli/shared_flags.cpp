// See shared_flags.h.
#include "viewer/cli/shared_flags.h"

#include <cassert>
#include <cstdio>

namespace kith {
namespace {

// The option line of one map setting, ending in its default: `fixed` when given, else the value in `d`.
std::string map_flag(const std::string& name, const MapParameters& d, const std::string& fixed) {
  auto is = [&](const std::string& value) { return " (default: " + (fixed.empty() ? value : fixed) + ")"; };
  if (name == "--dims") return option_line("--dims 2|3", "map dimensions" + is(std::to_string(d.dims)));
  if (name == "--perplexity")
    return option_line(
        "--perplexity P",
        "about how many neighbours each item listens to, above 0 and below the\n"
        "number of items" +
            is(number_text(d.perplexity) +
               (d.perplexity == MapParameters::kDefaultPerplexity ? ", or (N - 1) / 3 on a small collection" : "")));
  if (name == "--theta")
    return option_line("--theta T", "Barnes-Hut angle, 0 (exact) .. 1.5" + is(number_text(d.theta)));
  if (name == "--dof")
    return option_line("--dof D", "Student-t degrees of freedom of the map, 0.05 .. 100" + is(number_text(d.dof)));
  if (name == "--blend")
    return option_line("--blend B", "weight of judgments against features, 0 .. 1000" + is(number_text(d.blend)));
  if (name == "--learning-rate")
    return option_line("--learning-rate R", "step size; 0 = auto, max(N / 48, 50)" +
                                                is(d.learning_rate > 0 ? number_text(d.learning_rate) : "auto"));
  if (name == "--seed")
    return option_line("--seed S", "random seed: neighbour graph, start, questions" + is(std::to_string(d.seed)));
  if (name == "--metric")
    return option_line("--metric euclidean|cosine",
                       "how items' features are compared: euclidean (straight-line distance), or\n"
                       "cosine (by angle: each row is scaled to length 1 first, and distances are\n"
                       "between those unit rows, sqrt(2 - 2 cos); a row of zeros is refused)" +
                           is(metric_name(d.metric)));
  if (name == "--iterations")
    return option_line("--iterations N",
                       "gradient steps, the first 250 with early exaggeration" + is(std::to_string(d.iterations)));
  assert(false && "not a map setting");
  return "";
}

bool metric(FlagReader& f, Metric* out) {
  std::string name = metric_name(*out);
  if (!f.declared("--metric")) return true;
  return f.choice("--metric", &name, {"euclidean", "cosine"}) && parse_metric(name, out);
}

std::string lines_for(const std::vector<std::string>& names, const MapParameters& defaults, const std::string& fixed) {
  std::string out;
  for (const std::string& name : names) out += map_flag(name, defaults, fixed);
  return out;
}

}  // namespace

std::string map_flags(const std::vector<std::string>& names, const MapParameters& defaults) {
  return lines_for(names, defaults, "");
}

std::string session_map_flags(const std::vector<std::string>& names) {
  return lines_for(names, MapParameters{}, "the session's");
}

bool read_map_flags(FlagReader& f, MapParameters* s) {
  auto number = [&](const char* name, double* target) { return !f.declared(name) || f.number(name, target); };
  auto whole = [&](const char* name, auto* target) { return !f.declared(name) || f.integer(name, target); };
  return whole("--dims", &s->dims) && number("--perplexity", &s->perplexity) && number("--theta", &s->theta) &&
         number("--dof", &s->dof) && number("--blend", &s->blend) && number("--learning-rate", &s->learning_rate) &&
         (!f.declared("--seed") || f.seed("--seed", &s->seed)) && whole("--iterations", &s->iterations) &&
         metric(f, &s->metric);
}

const char* const kReadingFlags[5] = {"--id", "--exclude", "--pictures", "--tags", "--neighbours"};

std::string load_flags(bool neighbours) {
  const std::string graph =
      neighbours ? "  --neighbours GRAPH    each item's nearest neighbours, computed elsewhere: GRAPH.csv with\n"
                   "                        columns id,neighbour,distance, or arrays of shape (items, k) in\n"
                   "                        GRAPH.npz (indices, distances) or NAME-indices.npy with\n"
                   "                        NAME-distances.npy beside it; the map's\n"
                   "                        affinities then come from it and features are optional (README,\n"
                   "                        'A neighbour graph made elsewhere'; scripts/neighbour_graph.py\n"
                   "                        makes one)\n"
                 : "";
  return graph +
         "  --id COLUMN           the column holding item ids (default: 'id', else the first column of\n"
         "                        unique text, else items are numbered)\n"
         "  --exclude A,B,...     numeric columns that are not features (they become tags)\n"
         "  --pictures COLUMN     the column of picture paths, relative to the table's folder (default:\n"
         "                        the text column whose values end in .png, .jpg, ...)\n"
         "  --tags TAGS.csv       for a .npy file: a CSV with one row per array row holding ids and tags\n"
         "                        (how ITEMS is read: README, 'Reading a collection'; a SESSION keeps\n"
         "                        its collection as it was read, so these options do not go with one)\n";
}

std::string colour_flag() {
  return option_line("--colour, --color COLUMN",
                     "what colours the map: a tag column (a colour a value, most common first;\n"
                     "past 12 values the colours repeat as rings, squares, diamonds), a numeric\n"
                     "column (a ramp from its smallest to its largest value; a unit in brackets\n"
                     "at the end of the name, as in 'caffeine (mg)', is shown with the range),\n"
                     "'judgments' (per item) or 'plain' (default: the first tag column that\n"
                     "groups items). The window, render, export --picture and report agree");
}

std::string force_flag(const std::string& what) {
  return option_line("--force", "replace " + what + " if it exists (never a session, a folder or an input)");
}

SafeWriteOptions output_rule(const FlagReader& flags, const std::vector<std::string>& inputs) {
  SafeWriteOptions rule;
  rule.replace = flags.has("--force");
  for (const std::string& input : inputs)
    if (!input.empty()) rule.inputs.push_back(input);
  return rule;
}

int refuse_output(const FlagReader& flags, const std::string& output, const SafeWriteOptions& rule) {
  const std::string problem = check_write_target(output, rule);
  if (problem.empty()) return kExitOk;
  SafeWriteOptions forced = rule;
  forced.replace = true;
  const bool only_force_missing = check_write_target(output, forced).empty();
  return flags.usage_error(problem + (only_force_missing ? "; give --force to replace it" : ""));
}

int write_failed(const FlagReader& flags, const std::string& problem) {
  std::fprintf(stderr, "kith %s: %s\n", flags.command().c_str(), problem.c_str());
  return kExitInternal;
}

bool read_load_flags(FlagReader& f, LoadOptions* o) {
  o->id_column = f.text("--id", o->id_column);
  o->picture_column = f.text("--pictures", o->picture_column);
  o->tags_csv = f.text("--tags", o->tags_csv);
  if (f.declared("--neighbours")) o->neighbours = f.text("--neighbours", o->neighbours);
  return f.list("--exclude", &o->exclude);
}

}  // namespace kith
