// kith fit: a map computed headlessly from a collection's features (solver/fit/fit.h), written as a
// layout CSV or JSON, with a progress line on stderr and the map's health at the end.
#include <unistd.h>

#include <cctype>
#include <cstdio>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>

#include "solver/fit/fit.h"
#include "solver/io/collection.h"
#include "solver/io/judgment_io.h"
#include "solver/io/layout_writer.h"
#include "solver/io/neighbour_graph_file.h"
#include "solver/measures/health.h"
#include "solver/measures/judgment_health.h"
#include "solver/measures/map_findings.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/shared_flags.h"

namespace kith {
namespace {

namespace fs = std::filesystem;

const char* const kUsage =
    "usage: kith fit ITEMS|SESSION -o layout.csv|layout.json|layout.npy [options]\n"
    "\n"
    "Computes a t-SNE map of ITEMS (CSV, TSV or .npy; see 'kith check') from its feature columns and\n"
    "writes it as a layout (README, 'Layout files'): CSV id,x,y,z (id,x,y in 2-D), the tag columns,\n"
    "group and suspect_score when asked for; JSON the same per item, plus the options and the map's\n"
    "health; .npy the positions, with the rest in STEM.ids.csv. A SESSION gives its collection, its\n"
    "settings (the map settings below change them) and its judgments. Progress (iteration, KL,\n"
    "steps per second, time left) goes to stderr; the health figures (KL, trustworthiness,\n"
    "neighbour recall) to stdout.\n";

const char* const kFooter =
    "exit codes: 0 written, 1 the optimization diverged or the write failed (nothing written),\n"
    "            2 bad usage (or an output kith may not write over), 3 bad input data\n";

const char* const kOptions =
    "  -o, --output FILE     layout to write, .csv, .json or .npy (required)\n"
    "  --force               replace FILE if it exists (never a session, a folder or an input)\n"
    "  --raw-csv             CSV text fields exactly as they are (default: a field a spreadsheet\n"
    "                        would run as a formula gets a leading apostrophe)\n"
    "  --exact               exact neighbours and exact O(N^2) forces (slow above a few thousand)\n"
    "  --standardize         scale every feature column to unit variance first\n"
    "  --threads N           threads, 0 = all (default: 0)\n"
    "  --quiet               no progress line\n"
    "  --stages              print each stage's time and peak memory to stderr at the end\n"
    "  --judgments FILE      blend people's judgments in (CSV anchor,nearer,farther[,person][,time]\n"
    "                        [,kind][,weight] by id; with a SESSION, added to its own); reports how\n"
    "                        many the map agrees with\n"
    "  --skip-bad-judgments  use the good rows of a judgments file with bad ones (default: refuse)\n"
    "  --suspects            add each tagged item's suspect score (0..1: the share of its 10 nearest\n"
    "                        neighbours, in the features and the map, tagged otherwise; see README)\n"
    "  --groups              add each item's group in the map (DBSCAN, automatic radius; 0 = none)\n"
    "  --tag COLUMN          the tag column suspects are judged by (default: the first that groups items)\n";

std::string format_seconds(double s) {
  char buf[32];
  if (s < 60)
    std::snprintf(buf, sizeof buf, "%.0fs", s);
  else
    std::snprintf(buf, sizeof buf, "%dm%02ds", int(s) / 60, int(s) % 60);
  return buf;
}

// The JSON layout's header: where the map came from, the options it was fitted with, its health.
nlohmann::ordered_json fit_header(const Collection& c, const FitResult& r, const FitOptions& o, const MapHealth& h) {
  nlohmann::ordered_json j;
  j["source"] = c.source;
  j["options"] = {{"perplexity", o.perplexity},
                  {"iterations", o.iterations},
                  {"theta", o.theta},
                  {"dof", o.dof},
                  {"seed", o.seed},
                  {"exact", o.exact},
                  {"learning_rate", r.summary.learning_rate},
                  {"standardize", o.standardize},
                  {"metric", metric_name(o.metric)}};
  j["health"] = {{"kl", h.kl},
                 {"trustworthiness", h.trustworthiness},
                 {"neighbour_recall", h.neighbour_recall},
                 {"measured_on", h.sample}};
  if (!o.judgments.empty()) {
    j["options"]["blend"] = o.blend;
    j["options"]["judgments"] = o.judgments.size();
    j["health"]["judgment_agreement"] = judgment_agreement(r.map, o.judgments);
  }
  return j;
}

}  // namespace

int cmd_fit(const Args& args) {
  FitOptions o;
  FlagReader flags("fit", kUsage,
                   kOptions + load_flags(true) +
                       map_flags({"--dims", "--perplexity", "--iterations", "--theta", "--dof", "--seed",
                                  "--learning-rate", "--blend", "--metric"}),
                   kFooter);
  if (!flags.read(args)) return flags.stop();
  if (!read_map_flags(flags, &o) || !flags.integer("--threads", &o.threads, 0)) return flags.usage_error();
  o.exact = flags.has("--exact");
  o.standardize = flags.has("--standardize");
  const bool quiet = flags.has("--quiet");
  const bool want_stages = flags.has("--stages");
  StageLog stages;
  o.stages = &stages;
  const bool skip_bad_judgments = flags.has("--skip-bad-judgments");
  const bool want_suspects = flags.has("--suspects"), want_groups = flags.has("--groups");
  const std::string output = flags.text("--output"), judgments_path = flags.text("--judgments");
  const std::string suspect_tag = flags.text("--tag");
  if (flags.positional().size() > 1)
    return flags.usage_error("only one ITEMS file, got '" + flags.positional()[0] + "' and '" + flags.positional()[1] +
                             "'");
  if (flags.positional().empty() || output.empty()) return flags.usage_error("need ITEMS and -o FILE");
  const std::string input = flags.positional()[0];
  if (!is_layout_name(output))
    return flags.usage_error("the output must end in .csv, .json or .npy, got '" + output + "'");
  const SafeWriteOptions rule =
      output_rule(flags, {input, judgments_path, flags.text("--tags"), flags.text("--neighbours"),
                          graph_distances_path(flags.text("--neighbours"))});
  for (const std::string& file : layout_files(output))
    if (const int refused = refuse_output(flags, file, rule)) return refused;
  int code = kExitOk;
  stages.begin("read items");
  const std::optional<CollectionInput> in = read_input(flags, input, &code);
  if (!in) return code;
  const Collection& c = in->collection;
  if (in->is_session()) {  // the session's settings, changed by the flags given
    static_cast<MapParameters&>(o) = in->session->settings();
    if (!read_map_flags(flags, &o)) return flags.usage_error();
    for (Judgment j : in->session->judgments())
      if (!j.retracted) o.judgments.push_back(j);
    if (!in->session->pins().empty() && !quiet)
      std::fprintf(stderr, "kith fit: %s has %zu pins; kith fit does not hold items in place (kith open does)\n",
                   input.c_str(), in->session->pins().size());
  }
  const bool given_graph = !c.neighbours.empty();
  const bool names_alone = c.features.cols() == 0 && !given_graph;
  if (given_graph) o.neighbours = &c.neighbours;
  if (names_alone && judgments_path.empty() && o.judgments.empty())
    return flags.usage_error(input +
                             " has no feature columns (numbers), so its map comes from judgments alone: give "
                             "--judgments FILE (or ask them in kith new and kith open)");
  if (names_alone && !flags.has("--dof")) o.dof = MapParameters::kJudgmentsAloneDof;
  if (c.size() < 3) {
    std::fprintf(stderr, "kith fit: %s has %zu items; a map needs at least 3\n", input.c_str(), c.size());
    return kExitBadInput;
  }
  if (std::string error; !o.IsValid(&error, c.size())) return flags.usage_error(error);
  if (const int refused = refuse_graph_perplexity(flags, c, o)) return refused;
  if (const int bad = refuse_rows_without_direction("fit", c, o.metric)) return bad;

  if (!judgments_path.empty()) {
    JudgmentReadOptions jo;
    jo.skip_bad_rows = skip_bad_judgments;
    const JudgmentReadResult jr = read_judgments_csv(judgments_path, c.ids, jo);
    for (const auto& p : jr.problems) std::fprintf(stderr, "kith fit: %s\n", describe(p).c_str());
    if (!jr.ok() && !skip_bad_judgments) {
      std::fprintf(stderr, "kith fit: %zu of %zu judgment rows are bad; nothing imported (--skip-bad-judgments uses the rest)\n",
                   jr.bad_rows, jr.rows);
      return kExitBadInput;
    }
    o.judgments.insert(o.judgments.end(), jr.judgments.begin(), jr.judgments.end());
    if (!quiet)
      std::fprintf(stderr, "kith fit: %zu judgments from %s, blend %g\n", o.judgments.size(), judgments_path.c_str(),
                   o.blend);
  }

  const bool tty = ::isatty(2);
  ProgressFn progress;
  if (!quiet)
    progress = [&](const FitProgress& p) {
      // While exaggerating, the objective is of the scaled affinities and is no KL a reader can compare.
      char what[64];
      if (p.exaggerating)
        std::snprintf(what, sizeof what, "early phase (clusters drawn apart)");
      else
        std::snprintf(what, sizeof what, "KL %.4f", p.cost);
      std::fprintf(stderr, "%sstep %lld of %lld  %s  %.1f steps a second  about %s to go%s", tty ? "\r" : "",
                   static_cast<long long>(p.iteration), static_cast<long long>(p.total), what,
                   p.iterations_per_second, format_seconds(p.seconds_left).c_str(), tty ? "   " : "\n");
      return true;
    };
  if (!quiet)
    std::fprintf(stderr, "kith fit: %zu items, %ld features, %d-D map, perplexity %g%s\n", c.size(),
                 long(c.features.cols()), o.dims,
                 given_graph ? o.perplexity_for_graph(c.neighbours.k) : o.perplexity_for(c.size()),
                 given_graph ? (", " + std::to_string(c.neighbours.k) + " given neighbours an item").c_str() : "");
  FitResult r;
  try {
    r = fit_map(c.features, o, progress);
  } catch (const DivergenceError& e) {
    std::fprintf(stderr, "%skith fit: %s; nothing written\n", tty && !quiet ? "\n" : "", e.what());
    return kExitInternal;
  } catch (const std::invalid_argument& e) {
    std::fprintf(stderr, "%skith fit: %s: %s\n", tty && !quiet ? "\n" : "", input.c_str(), e.what());
    return kExitBadInput;
  }
  if (tty && !quiet) std::fprintf(stderr, "\n");
  stages.begin("measures");
  HealthOptions ho;
  ho.seed = o.seed;
  ho.threads = o.threads;
  MapHealth h = r.features.cols() == 0 ? MapHealth{} : measure_health(r.features, r.map, ho);
  h.kl = r.summary.kl;
  Layout layout;
  layout.collection = &c;
  layout.map = &r.map;
  layout.header = fit_header(c, r, o, h);
  LayoutFormat format;
  format.raw_csv = flags.has("--raw-csv");
  std::string findings_note;
  if (want_suspects || want_groups) {
    const TagColumn* found = find_tag_column(c, suspect_tag);
    const std::vector<std::string>* tags = found ? &found->values : nullptr;
    if (!suspect_tag.empty() && !tags) {
      std::fprintf(stderr, "kith fit: --tag: %s has no tag column '%s'; nothing written\n", input.c_str(),
                   suspect_tag.c_str());
      return kExitUsage;
    }
    if (want_suspects && !tags) {
      std::fprintf(stderr, "kith fit: --suspects: %s has no tag column; nothing written\n", input.c_str());
      return kExitUsage;
    }
    FindingsOptions fo;
    fo.search.seed = o.seed;
    const MapFindings f = find_structure(r.features, r.map, want_suspects ? tags : nullptr, fo);
    if (want_suspects) {
      layout.suspect = f.suspects.score;
      findings_note += "suspects: " + f.suspects.summary() + "\n";
    }
    if (want_groups) {
      layout.group = f.groups.label;
      findings_note += "groups: " + f.groups.summary() + "\n";
    }
  }
  stages.begin("write");
  if (const std::string problem = write_layout(output, layout, format, rule); !problem.empty())
    return write_failed(flags, problem);
  stages.end();
  if (want_stages) std::fprintf(stderr, "stages (time, peak memory):\n%s", stages.Report().c_str());
  std::printf("wrote %s (%zu items)\n", output.c_str(), c.size());
  std::printf("fit: %s; %s\n", r.summary.BriefReport().c_str(), r.features_note.c_str());
  std::printf("health: %s\n", h.BriefReport().c_str());
  if (!o.judgments.empty()) {
    std::printf("judgments: %zu, the map agrees with %.1f%%\n", o.judgments.size(),
                100.0 * judgment_agreement(r.map, o.judgments));
    for (const auto& pa : per_person_agreement(r.map, o.judgments))
      if (!pa.person.empty())
        std::printf("  %s: %zu judgments, %.1f%% agreed\n", pa.person.c_str(), pa.judgments, 100.0 * pa.agreement);
  }
  std::fputs(findings_note.c_str(), stdout);
  return kExitOk;
}

}  // namespace kith
