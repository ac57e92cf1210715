// Exports of a map and its judgments, shared by `kith export` (from a session file) and the
// window's Session menu (from the live map): layouts (CSV or JSON: id, x, y[, z], tags, group,
// suspect score), judgments (CSV, people as names, codes or left out), and the flat 2-D layout
// (solver/fit/flat_map.h). Every output goes through write_file_safely (solver/io/safe_file.h)
// with the caller's SafeWriteOptions: an existing file only when `replace`, never the session
// itself (put it in `inputs`) or any SQLite file. Main thread (or any one thread).
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"
#include "solver/fit/flat_map.h"
#include "solver/io/collection.h"
#include "solver/io/judgment_io.h"
#include "solver/io/safe_file.h"
#include "solver/session/session_store.h"

namespace kith {

// Writes the layout of `map` (N x 2 or N x 3) to OUT: JSON when it ends in .json, else CSV.
// Groups come from solver/measures/groups.h, suspect scores from solver/measures/suspects.h over `tag_column`
// (default: the first tag column). Returns "" or a message; notes go to stderr.
// RAW_CSV: text fields as they are, not neutralized for spreadsheets (solver/io/text_fields.h).
std::string export_layout(const Collection& collection, const Points& map, uint64_t iteration, const std::string& out,
                          const std::string& tag_column, const SafeWriteOptions& file, bool raw_csv = false);

// Writes judgments as CSV by item id; people as names, codes (P1, P2, ...) or left out.
std::string export_judgments(std::vector<Judgment> judgments, const Collection& collection, const std::string& out,
                             PeopleInExport people, bool include_retracted, const SafeWriteOptions& file,
                             bool raw_csv = false);

// The flat layout's options from a session's settings, for `items` items (the perplexity is capped
// at (items - 1) / 3 so that small collections still have enough neighbours).
FlatMapOptions flat_options(const SessionSettings& settings, size_t items);

// Flattens `map` to 2-D with solver/fit/flat_map.h and writes it like export_layout (CSV or JSON).
// `agreement` (may be null) receives the share of non-retracted judgments the flat map satisfies.
std::string export_flat(const Collection& collection, const Points& map, const std::vector<Judgment>& judgments,
                        const std::vector<int32_t>& pinned, const FlatMapOptions& options, const std::string& out,
                        const std::string& tag_column, const SafeWriteOptions& file, double* agreement = nullptr,
                        bool raw_csv = false);

}  // namespace kith
