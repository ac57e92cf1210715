// Judgments as CSV (RFC 4180), items named by id:
//   anchor,nearer,farther[,person][,time][,kind][,weight]
// A header row naming these columns (any order, case-insensitive) is optional; without one the
// columns are taken in the order above. `time` is seconds since the Unix epoch or an ISO 8601
// UTC time (2026-12-01T21:54:23Z, fraction of a second allowed); `kind` is own, pair, grid,
// drag or import (default: import). Every bad row is reported with its line and cause; unless
// skip_bad_rows is set, a file with any bad row imports nothing.
// Pure functions; safe from any thread.
#pragma once
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/io/collection.h"
#include "solver/io/safe_file.h"

namespace kith {

struct JudgmentReadOptions {
  bool skip_bad_rows = false;  // import the good rows of a file with bad ones (default: false)
  size_t max_problems = 50;    // stop listing problems after this many (default: 50)
};

struct JudgmentReadResult {
  std::vector<Judgment> judgments;  // empty if there were problems and skip_bad_rows is false
  std::vector<Problem> problems;    // one per bad row (file, line, column, message)
  size_t rows = 0;                  // data rows read
  size_t bad_rows = 0;
  bool ok() const { return problems.empty(); }
};

// "judgments.csv:12:2: nearer 'lamp-9' is not an item of the collection"
std::string describe(const Problem& problem);

// `ids` are the collection's item ids in row order. A file that cannot be opened is one problem
// with line 0.
JudgmentReadResult read_judgments_csv(const std::string& path, const std::vector<std::string>& ids,
                                      const JudgmentReadOptions& options = {});
JudgmentReadResult parse_judgments_csv(const std::string& text, const std::string& source_name,
                                       const std::vector<std::string>& ids, const JudgmentReadOptions& options = {});

struct JudgmentWriteOptions {
  bool include_retracted = false;  // (default: false; retracted judgments are left out)
  bool include_people = true;      // false writes an empty person column (default: true)
  bool raw_csv = false;            // fields as they are, not neutralized (text_fields.h) (default: false)
};
// Writes anchor,nearer,farther,person,time,kind,weight with ISO 8601 UTC times, through
// write_file_safely (safe_file.h) with `file`: an existing file is replaced whole (when
// file.replace) or left as it was, and a SQLite file never. Returns "" or what went wrong.
std::string write_judgments_csv(const std::string& path, const std::vector<Judgment>& judgments,
                                const std::vector<std::string>& ids, const JudgmentWriteOptions& options = {},
                                const SafeWriteOptions& file = {});
std::string format_judgments_csv(const std::vector<Judgment>& judgments, const std::vector<std::string>& ids,
                                 const JudgmentWriteOptions& options = {});

// How exports treat people: keep names, leave them out, or replace each with a code (P1, P2, ...
// numbered in order of first appearance, so the same session always gives the same codes).
enum class PeopleInExport { kNames, kLeaveOut, kCodes };
bool people_from_string(const std::string& text, PeopleInExport* out);  // names | leave-out | codes
void apply_people_rule(std::vector<Judgment>* judgments, PeopleInExport rule);

// ISO 8601 UTC with milliseconds, and its reader (also accepts a plain number of seconds).
std::string format_time_utc(double seconds);
bool parse_time(const std::string& text, double* seconds);

}  // namespace kith
