// The one layout writer, for `kith fit -o`, `kith export --layout/--flat` and the window's
// Session menu: where each item sits in the map, with its tags and, when computed, its group and
// suspect score.
//   CSV:  id,x,y[,z],<tag columns>[,group][,<suspect column>], one row per item; coordinates
//         and scores as %.9g, fields through csv_field (text_fields.h).
//   JSON: {"dims": D, <header fields>, "items": [{"id", "x", "y"[, "z"], "tags": {...}[, "group"]
//         [, <suspect column>]}, ...]}; a missing group or score is null (or 0, see LayoutFormat).
// Written through write_file_safely (safe_file.h). Pure functions apart from the file; any thread.
#pragma once
#include <cstdint>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "solver/base/points.h"
#include "solver/io/collection.h"
#include "solver/io/safe_file.h"

namespace kith {

struct Layout {
  const Collection* collection = nullptr;  // ids and tags, N items
  const Points* map = nullptr;             // N x 2 or N x 3
  std::vector<int32_t> group;              // N group indexes from 0, -1 = none; empty: no group column
  std::vector<double> suspect;             // N scores, NaN = none; empty: no suspect column
  nlohmann::ordered_json header = nlohmann::ordered_json::object();  // JSON: fields between dims and items
};

// Where `kith fit` and `kith export` still differ (both documented in the README); a later change
// makes them one format.
struct LayoutFormat {
  std::string suspect_column = "suspect_score";  // kith fit: "suspect" (default: suspect_score)
  // kith fit numbers groups 1, 2, ... with 0 for no group (so the CSV loads as all numbers);
  // export numbers them 0, 1, ... with an empty field (JSON null) for no group. (default: false)
  bool groups_from_one = false;
  // CSV: write text fields as they are, without the leading apostrophe that keeps a spreadsheet
  // from running one that looks like a formula (text_fields.h; --raw-csv). (default: false)
  bool raw_csv = false;
};

std::string layout_csv(const Layout& layout, const LayoutFormat& format = {});
std::string layout_json(const Layout& layout, const LayoutFormat& format = {});

// JSON when PATH ends in .json (any case), else CSV. Returns "" or a message naming the path.
std::string write_layout(const std::string& path, const Layout& layout, const LayoutFormat& format = {},
                         const SafeWriteOptions& options = {});

}  // namespace kith
