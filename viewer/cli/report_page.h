// ReportPage: the self-contained HTML page written by `kith report`: health figures, the
// suspect list, the groups table, the most moved items and pictures of the map (PNG, base64
// inline, inside inline SVG for the group labels). No external resources: no links, scripts,
// fonts or images from elsewhere; CSS is inline. Pure functions; any thread.
#pragma once
#include <string>
#include <utility>
#include <vector>

#include "solver/measures/displacement.h"
#include "solver/measures/groups.h"
#include "solver/base/points.h"
#include "solver/measures/suspects.h"
#include "viewer/scene/colour_code.h"

namespace kith {

struct ReportContent {
  std::string title;                  // shown as the heading, e.g. the collection's file name
  std::string source;                 // where the items came from
  std::vector<std::string> ids;       // N
  std::string tag_name;               // the tag column used ("" if none)
  std::vector<std::string> tags;      // N, or empty
  ColourCode colour;                  // the map picture's colours (default, when empty: by the tags)
  Points view;                        // N x 2: the map as seen in the pictures
  std::vector<std::pair<std::string, std::string>> figures;  // health and fit figures: name, value
  const SuspectScores* suspects = nullptr;   // optional
  const Grouping* groups = nullptr;          // optional
  std::vector<double> kept;                  // neighbourhood kept per item (neighbour_compare.h), or empty
  const Displacement* displacement = nullptr;  // optional: reference map vs current
  std::vector<std::string> moved_by;  // N or empty: which judgments moved each item, as text
  size_t list_rows = 25;              // rows in the suspect and most-moved lists (default: 25)
  int picture_size = 560;             // pixels per picture side (default: 560)
};

std::string report_html(const ReportContent& content);

// Helpers exposed for tests.
std::string html_escape(const std::string& text);
std::string base64_encode(const std::string& bytes);
// Empty if `html` refers to nothing outside itself, else the first offending reference.
std::string external_reference(const std::string& html);

}  // namespace kith
