#include "viewer/session/session_export.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "solver/io/judgment_io.h"
#include "solver/io/layout_writer.h"
#include "solver/io/safe_file.h"
#include "solver/measures/groups.h"
#include "solver/measures/judgment_health.h"
#include "solver/measures/suspects.h"

namespace kith {
namespace {

// The groups (solver/measures/groups.h) and suspect scores over `tag_column` (solver/measures/
// suspects.h) of a layout; either stays empty, with a note on stderr, when it cannot be computed.
void analyse(const Collection& c, const Points& map, const std::string& tag_column, Layout* layout) {
  try {
    layout->group = find_groups(map).label;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith export: no groups (%s)\n", e.what());
  }
  const TagColumn* tags = find_tag_column(c, tag_column);
  if (!tags) return;
  try {
    SuspectOptions o;
    o.space = c.features.cols() > 0 ? SuspectSpace::kBoth : SuspectSpace::kMap;
    layout->suspect = find_suspects(tags->values, c.features, map, o).score;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith export: no suspect scores (%s)\n", e.what());
  }
}

}  // namespace

std::string export_layout(const Collection& collection, const Points& map, uint64_t iteration, const std::string& out,
                          const std::string& tag_column, const SafeWriteOptions& file, bool raw_csv) {
  if (const std::string problem = check_write_target(out, file); !problem.empty()) return problem;
  if (size_t(map.rows()) != collection.size()) return "the map and the collection differ in size";
  Layout layout;
  layout.collection = &collection;
  layout.map = &map;
  layout.header["iteration"] = iteration;
  analyse(collection, map, tag_column, &layout);
  if (layout.group.empty()) layout.group.assign(collection.size(), -1);
  if (layout.suspect.empty()) layout.suspect.assign(collection.size(), std::nan(""));
  LayoutFormat format;
  format.raw_csv = raw_csv;
  return write_layout(out, layout, format, file);
}

std::string export_judgments(std::vector<Judgment> judgments, const Collection& collection, const std::string& out,
                             PeopleInExport people, bool include_retracted, const SafeWriteOptions& file,
                             bool raw_csv) {
  if (const std::string problem = check_write_target(out, file); !problem.empty()) return problem;
  apply_people_rule(&judgments, people);
  JudgmentWriteOptions w;
  w.include_retracted = include_retracted;
  w.include_people = people != PeopleInExport::kLeaveOut;
  w.raw_csv = raw_csv;
  return write_judgments_csv(out, judgments, collection.ids, w, file);
}

FlatMapOptions flat_options(const SessionSettings& settings, size_t items) {
  FlatMapOptions fo;
  const int64_t steps = fo.iterations;  // the flat map's own number of steps
  static_cast<MapParameters&>(fo) = settings;
  fo.iterations = steps;
  // A 2-D refinement of a settled map needs fewer neighbours than the 3-D one may use.
  fo.perplexity = std::min(settings.perplexity_for(items), std::max(1.0, double(items > 0 ? items - 1 : 0) / 3.0));
  return fo;
}

std::string export_flat(const Collection& collection, const Points& map, const std::vector<Judgment>& judgments,
                        const std::vector<int32_t>& pinned, const FlatMapOptions& options, const std::string& out,
                        const std::string& tag_column, const SafeWriteOptions& file, double* agreement,
                        bool raw_csv) {
  if (const std::string problem = check_write_target(out, file); !problem.empty()) return problem;
  Points flat;
  try {
    flat = flatten_map(collection, map, judgments, pinned, options);
  } catch (const std::exception& e) {
    return std::string("the flat layout could not be made: ") + e.what();
  }
  if (agreement) *agreement = judgment_agreement(flat, judgments);
  return export_layout(collection, flat, uint64_t(options.iterations), out, tag_column, file, raw_csv);
}

}  // namespace kith
