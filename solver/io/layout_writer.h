// The one layout format, for `kith fit -o`, `kith export --layout/--flat` and the window's Session
// menu: where each item sits in the map, with its tags and, when computed, its group and suspect
// score. Documented once, in the README ("Layout files").
//   CSV:  id,x,y[,z],<tag columns>[,group][,suspect_score], one row per item; coordinates and
//         scores as %.9g, fields through csv_field (text_fields.h). group: 1, 2, ... and 0 for an
//         item in no group (so the column reads as numbers); suspect_score: 0..1, empty for an
//         untagged item.
//   JSON: {"dims": D, <header fields>, "items": [{"id", "x", "y"[, "z"], "tags": {...}[, "group"]
//         [, "suspect_score"]}, ...]}: the same numbering, null for no score.
//   .npy: the positions alone, N x D float64 (NumPy's format, npy_file.h), and beside it
//         STEM.ids.csv: the CSV above without the coordinates, one row per array row.
// Written through write_file_safely (safe_file.h). Pure functions apart from the files; any thread.
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

struct LayoutFormat {
  // CSV: write text fields as they are, without the leading apostrophe that keeps a spreadsheet
  // from running one that looks like a formula (text_fields.h; --raw-csv). (default: false)
  bool raw_csv = false;
};

std::string layout_csv(const Layout& layout, const LayoutFormat& format = {});
std::string layout_json(const Layout& layout, const LayoutFormat& format = {});

// Whether PATH names a layout kith writes: .csv, .json or .npy (any case).
bool is_layout_name(const std::string& path);
// The files a layout at PATH makes: PATH, and for .npy the sidecar STEM.ids.csv.
std::vector<std::string> layout_files(const std::string& path);

// JSON when PATH ends in .json, .npy (with its sidecar) when in .npy, else CSV. Returns "" or a
// message naming the path. For .npy both files are checked before either is written.
std::string write_layout(const std::string& path, const Layout& layout, const LayoutFormat& format = {},
                         const SafeWriteOptions& options = {});

}  // namespace kith
