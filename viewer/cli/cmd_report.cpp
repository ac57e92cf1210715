// kith report ITEMS|SESSION -o report.html: a self-contained HTML page (viewer/cli/report_page.h)
// with the health figures, the suspect list, the groups table, the neighbourhoods the map keeps
// worst and pictures of the map. For ITEMS it fits a map itself (solver/fit/fit.h). Main thread only.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <optional>
#include <string>

#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/io/collection.h"
#include "solver/io/safe_file.h"
#include "solver/measures/displacement.h"
#include "solver/measures/health.h"
#include "solver/measures/judgment_health.h"
#include "solver/measures/map_findings.h"
#include "solver/objective/judgment_term.h"
#include "solver/objective/neighbour_term.h"
#include "solver/session/session_store.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/report_page.h"
#include "viewer/cli/shared_flags.h"

namespace kith {
namespace {

const char* const kUsage =
    "usage: kith report ITEMS|SESSION -o report.html [options]\n"
    "\n"
    "Writes one self-contained HTML page (no links to anything outside it) about a map: its health\n"
    "figures, the suspects (tagged items whose nearest neighbours mostly carry another tag), the\n"
    "groups found in the map (DBSCAN with an automatic radius), the neighbourhoods the map keeps\n"
    "worst, and pictures of the map coloured by tag and by group. For ITEMS (CSV, TSV or .npy) the\n"
    "map is fitted first (as kith fit does). For a SESSION (.kith, opened read-only) the map is its\n"
    "last saved one, and the page adds what the judgments changed: each item's displacement from\n"
    "the map fitted from the features alone, and the judgments that pulled the most moved items.\n"
    "The session's own settings (dims, perplexity, seed) are used for the reference map, and the\n"
    "map settings below apply to ITEMS only.\n";

const char* const kFooter = "exit codes: 0 written, 2 bad usage, 3 a problem in the data, 1 internal error\n";

const char* const kOptions =
    "  -o, --output FILE     the HTML file to write (required; never the input)\n"
    "  --tag COLUMN          the tag column for suspects and group purity (default: the first that groups)\n"
    "  --space features|map|both\n"
    "                        where suspects' neighbours come from (default: both)\n"
    "  --k N                 neighbours looked at per suspect (default: 10)\n"
    "  --eps R               DBSCAN radius in map units (default: automatic, from the k-distance knee)\n"
    "  --min-points N        DBSCAN's minPts (default: max(10, 2 x dims))\n"
    "  --rows N              rows in the lists (default: 25)\n";

std::string fixed(double v, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, v);
  return buf;
}

}  // namespace

int cmd_report(const Args& args) {
  FlagReader flags("report", kUsage,
                   kOptions + colour_flag() + force_flag("FILE") + load_flags() +
                       map_flags({"--dims", "--perplexity", "--iterations", "--seed"}),
                   kFooter);
  if (!flags.read(args)) return flags.stop();
  FitOptions fit;
  FindingsOptions find;
  size_t rows = 25;
  if (!read_map_flags(flags, &fit) || !flags.count("--k", &find.suspects.k, 1, 1000) ||
      !flags.number("--eps", &find.groups.eps, 0, 1e12) ||
      !flags.count("--min-points", &find.groups.min_points, 2, 100000) || !flags.count("--rows", &rows, 1, 100000))
    return flags.usage_error();
  if (flags.has("--space") && !suspect_space_from_string(flags.text("--space"), &find.suspects.space))
    return flags.usage_error("--space expects features, map or both, got '" + flags.text("--space") + "'");
  const std::string output = flags.text("--output"), tag_column = flags.text("--tag");
  if (flags.positional().size() > 1)
    return flags.usage_error("one input only (got '" + flags.positional()[0] + "' and '" + flags.positional()[1] +
                             "')");
  if (flags.positional().empty()) return flags.usage_error("which collection? (kith report ITEMS -o report.html)");
  if (output.empty()) return flags.usage_error("where to? (-o report.html)");
  const std::string input = flags.positional()[0];
  const SafeWriteOptions rule = output_rule(flags, {input, flags.text("--tags")});
  if (const int refused = refuse_output(flags, output, rule)) return refused;
  int code = kExitOk;
  std::optional<CollectionInput> in = read_input(flags, input, &code);
  if (!in) return code;
  const bool is_session = in->is_session();
  Collection items = std::move(in->collection);
  std::vector<Judgment> judgments;
  std::optional<MapCheckpoint> saved;
  if (is_session) {
    const SessionStore& store = *in->session;
    judgments = store.judgments();
    saved = store.last_checkpoint();
    const SessionSettings settings = store.settings();
    fit.dims = settings.dims;
    fit.perplexity = settings.perplexity;
    fit.seed = settings.seed;
    fit.dof = settings.dof;
    fit.theta = settings.theta;
  }
  if (items.features.cols() == 0) {
    std::fprintf(stderr, "kith report: %s: no feature columns, so there is no map to fit\n", input.c_str());
    return kExitBadInput;
  }
  try {
    validate_judgments(judgments, items.size());
  } catch (const JudgmentError& e) {
    std::fprintf(stderr, "kith report: %s: %s\n", input.c_str(), e.what());
    return kExitBadInput;
  }
  if (saved && (size_t(saved->positions.rows()) != items.size() || saved->positions.cols() != fit.dims ||
                !saved->positions.allFinite())) {
    std::fprintf(stderr, "kith report: %s: the saved map does not fit the collection (%ld x %ld for %zu items); "
                 "using the map fitted from the features\n", input.c_str(), long(saved->positions.rows()),
                 long(saved->positions.cols()), items.size());
    saved.reset();
  }
  const TagColumn* tag = find_tag_column(items, tag_column);
  const std::vector<std::string>* tags = tag ? &tag->values : nullptr;
  const std::string tag_name = tag ? tag->name : "";
  if (!tag_column.empty() && !tags) {
    std::string names;
    for (const TagColumn& t : items.tags) names += (names.empty() ? "" : ", ") + t.name;
    return flags.usage_error("no tag column '" + tag_column + "' in " + input +
                             " (tag columns: " + (names.empty() ? "none" : names) + ")");
  }
  std::string error;
  if (!fit.IsValid(&error, items.size())) return flags.usage_error(error);
  if (!find.IsValid(&error)) return flags.usage_error(error);

  std::fprintf(stderr, "kith report: fitting the map of %zu items from their features...\n", items.size());
  FitResult fitted;
  try {
    fitted = fit_map(items.features, fit);
  } catch (const DivergenceError& e) {
    std::fprintf(stderr, "kith report: the fit diverged: %s\n", e.what());
    return kExitInternal;
  } catch (const std::invalid_argument& e) {
    std::fprintf(stderr, "kith report: %s: %s\n", input.c_str(), e.what());
    return kExitBadInput;
  }
  // The map reported: the session's saved map, else the fitted one (which is also the reference).
  const Points& map = saved ? saved->positions : fitted.map;
  const MapFindings found = find_structure(fitted.features, map, tags, find);
  const MapHealth health = measure_health(fitted.features, map);
  double kl = fitted.summary.kl;
  if (saved) {
    NeighbourTermOptions no;
    no.dof = fit.dof;
    no.theta = fit.theta;
    kl = NeighbourTerm(fitted.p, no).evaluate(map, nullptr);
  }
  const double agreement = judgment_agreement(map, judgments);  // -1 when there are none
  std::optional<Displacement> moved;
  std::vector<std::string> moved_by;
  if (saved) {
    moved = measure_displacement(fitted.map, map);
    moved_by.assign(items.size(), "");
    for (size_t r = 0; r < std::min(rows, moved->ranking.size()); ++r) {
      const int32_t i = moved->ranking[r];
      std::string text;
      for (const JudgmentPull& p : judgments_moving(i, map, *moved, judgments, 3, fit.dof)) {
        if (p.pull <= 0.0) break;
        const Judgment& j = judgments[p.index];
        text += (text.empty() ? "" : "; ") + items.ids[size_t(j.anchor)] + " nearer " + items.ids[size_t(j.nearer)] +
                " than " + items.ids[size_t(j.farther)] + (j.person.empty() ? "" : " (" + j.person + ")");
      }
      moved_by[size_t(i)] = text.empty() ? "-" : text;
    }
  }

  ReportContent c;
  if (const std::string colour = flags.text("--colour"); !colour.empty()) {
    ColourBy by;
    std::string why;
    if (!colour_by_name(items, colour, &by, &why)) return flags.usage_error("--colour: " + why);
    if (by.kind == ColourKind::kJudgments) {
      std::vector<double> count(items.size(), 0.0);
      for (const Judgment& j : judgments)
        if (!j.retracted)
          for (int32_t i : {j.anchor, j.nearer, j.farther}) count[size_t(i)] += 1.0;
      c.colour = ramp_code("judgments per item", "judgments", count, true, Palette::paper());
    } else {
      c.colour = collection_code(items, by, Palette::paper());
    }
  }
  c.title = std::filesystem::path(input).filename().string();
  c.source = input;
  c.ids = items.ids;
  c.tag_name = tag_name;
  if (tags) c.tags = *tags;
  c.view = fit.dims == 2 ? map : fit_pca(map, 2).project(map);
  c.figures = {{"KL divergence", fixed(kl, 4)},
               {"trustworthiness (k 5)", fixed(health.trustworthiness, 4)},
               {"neighbour recall (k 10)", fixed(health.neighbour_recall, 4)},
               {"items", std::to_string(items.size())},
               {"features", std::to_string(items.features.cols())},
               {"map", std::to_string(fit.dims) + "-D, perplexity " + fixed(fit.perplexity, 1) + ", " +
                           std::to_string(fitted.summary.iterations) + " iterations, seed " + std::to_string(fit.seed)},
               {"fit time", fixed(fitted.summary.seconds, 1) + " s"}};
  if (is_session) {
    c.figures.push_back({"map shown", saved ? "the session's last saved map (iteration " +
                                                  std::to_string(saved->iteration) + ")"
                                            : "fitted from the features (the session has no saved map)"});
    const size_t active = size_t(std::count_if(judgments.begin(), judgments.end(), [](const Judgment& j) { return !j.retracted; }));
    c.figures.push_back({"judgments", std::to_string(active) + " active of " + std::to_string(judgments.size())});
    if (agreement >= 0) c.figures.push_back({"judgment agreement", fixed(agreement, 4)});
  }
  if (health.sample < items.size())
    c.figures.push_back({"health measured on", std::to_string(health.sample) + " sampled items"});
  if (found.have_suspects) c.suspects = &found.suspects;
  c.groups = &found.groups;
  c.kept = found.kept;
  c.list_rows = rows;
  if (moved) {
    c.displacement = &*moved;
    c.moved_by = moved_by;
  }

  if (const std::string problem = write_file_safely(output, report_html(c), rule); !problem.empty())
    return write_failed(flags, problem);
  std::printf("%s\n%s\n%s\nwrote %s\n", fitted.summary.BriefReport().c_str(), found.groups.summary().c_str(),
              found.have_suspects ? found.suspects.summary().c_str() : "no tag column, so no suspects",
              output.c_str());
  return kExitOk;
}

}  // namespace kith
