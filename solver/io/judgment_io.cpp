#include "solver/io/judgment_io.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <fstream>
#include <sstream>
#include <unordered_map>

#include "solver/io/csv_table.h"
#include "solver/io/safe_file.h"
#include "solver/io/text_fields.h"

namespace kith {

std::string describe(const Problem& p) {
  std::ostringstream m;
  m << p.file;
  if (p.line > 0) m << ":" << p.line;
  if (p.column > 0) m << ":" << p.column;
  m << ": " << p.message;
  return m.str();
}

namespace {

std::string lower(std::string s) {
  for (auto& c : s) c = char(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

std::string trim(const std::string& s) {
  size_t b = 0, e = s.size();
  while (b < e && std::isspace(static_cast<unsigned char>(s[b]))) ++b;
  while (e > b && std::isspace(static_cast<unsigned char>(s[e - 1]))) --e;
  return s.substr(b, e - b);
}

// One RFC 4180 record starting at `pos`; advances `pos` and `line` past it. Returns false with
// *error set on an unterminated quote.
bool next_record(const std::string& text, size_t& pos, long& line, std::vector<std::string>& fields,
                 std::vector<bool>& quoted_fields, std::string* error) {
  fields.assign(1, std::string());
  quoted_fields.assign(1, false);
  bool quoted = false;
  while (pos < text.size()) {
    const char c = text[pos];
    if (quoted) {
      if (c == '"') {
        if (pos + 1 < text.size() && text[pos + 1] == '"') {
          fields.back() += '"';
          pos += 2;
          continue;
        }
        quoted = false;
      } else {
        if (c == '\n') ++line;
        fields.back() += c;
      }
      ++pos;
      continue;
    }
    if (c == '"') {
      quoted = true;
      quoted_fields.back() = true;
    } else if (c == ',') {
      fields.emplace_back();
      quoted_fields.push_back(false);
    } else if (c == '\r' && (pos + 1 >= text.size() || text[pos + 1] != '\n')) {
      ++pos;  // a lone CR ends the line too
      ++line;
      return true;
    } else if (c == '\r') {
      // CR of CRLF
    } else if (c == '\n') {
      ++pos;
      ++line;
      return true;
    } else {
      fields.back() += c;
    }
    ++pos;
  }
  if (quoted) {
    *error = "a quoted field is not closed before the end of the file";
    return false;
  }
  return true;
}

bool is_blank(const std::vector<std::string>& fields) {
  return std::all_of(fields.begin(), fields.end(), [](const std::string& f) { return trim(f).empty(); });
}

enum Column { kAnchor, kNearer, kFarther, kPerson, kTime, kKind, kWeight, kColumns };
const char* const kColumnNames[kColumns] = {"anchor", "nearer", "farther", "person", "time", "kind", "weight"};


}  // namespace

std::string format_time_utc(double seconds) {
  if (!std::isfinite(seconds)) return "";
  const double whole = std::floor(seconds);
  long millis = std::lround((seconds - whole) * 1000.0);
  std::time_t t = std::time_t(whole);
  if (millis == 1000) {
    ++t;
    millis = 0;
  }
  std::tm tm{};
  gmtime_r(&t, &tm);
  char buf[64];
  std::snprintf(buf, sizeof buf, "%04d-%02d-%02dT%02d:%02d:%02d", tm.tm_year + 1900, tm.tm_mon + 1, tm.tm_mday,
                tm.tm_hour, tm.tm_min, tm.tm_sec);
  std::string out = buf;
  if (millis != 0) {
    std::snprintf(buf, sizeof buf, ".%03ld", millis);
    out += buf;
  }
  return out + "Z";
}

bool parse_time(const std::string& raw, double* seconds) {
  const std::string text = trim(raw);
  if (text.empty()) return false;
  {
    char* end = nullptr;
    const double v = std::strtod(text.c_str(), &end);
    if (end && *end == '\0') {
      if (!std::isfinite(v)) return false;
      *seconds = v;
      return true;
    }
  }
  int y, mo, d, h = 0, mi = 0;
  double s = 0.0;
  char tail[8] = {0};
  const int got = std::sscanf(text.c_str(), "%4d-%2d-%2dT%2d:%2d:%lf%7s", &y, &mo, &d, &h, &mi, &s, tail);
  if (got == 3 && text.size() == 10) {
    // date only
  } else if (got == 7 && std::string(tail) == "Z") {
  } else if (got == 6) {
    // no zone: taken as UTC
  } else {
    return false;
  }
  if (mo < 1 || mo > 12 || d < 1 || d > 31 || h < 0 || h > 23 || mi < 0 || mi > 59 || s < 0 || s >= 61) return false;
  std::tm tm{};
  tm.tm_year = y - 1900;
  tm.tm_mon = mo - 1;
  tm.tm_mday = d;
  tm.tm_hour = h;
  tm.tm_min = mi;
  tm.tm_sec = 0;
  *seconds = double(timegm(&tm)) + s;
  return true;
}

JudgmentReadResult parse_judgments_csv(const std::string& text, const std::string& source,
                                       const std::vector<std::string>& ids, const JudgmentReadOptions& options) {
  JudgmentReadResult result;
  std::unordered_map<std::string, int32_t> index;
  for (size_t i = 0; i < ids.size(); ++i) index.emplace(ids[i], int32_t(i));

  auto report = [&](long line, long column, const std::string& message) {
    if (result.problems.size() < options.max_problems) result.problems.push_back({source, line, column, message});
    else if (result.problems.size() == options.max_problems)
      result.problems.push_back({source, 0, 0, "more problems not listed"});
  };

  int where[kColumns];
  for (int c = 0; c < kColumns; ++c) where[c] = c;  // positional unless a header says otherwise
  // A UTF-8 byte order mark is exactly EF BB BF at the start.
  size_t pos = text.compare(0, 3, "\xEF\xBB\xBF") == 0 ? 3 : 0;
  long line = 1;
  bool first = true;
  std::vector<std::string> fields;
  std::vector<bool> quoted_fields;  // a quoted field keeps its spaces
  while (pos < text.size()) {
    const long row_line = line;
    std::string error;
    if (!next_record(text, pos, line, fields, quoted_fields, &error)) {
      report(row_line, 0, error);
      ++result.bad_rows;
      break;
    }
    if (is_blank(fields)) continue;
    if (first) {
      first = false;
      bool header = false;
      for (const auto& f : fields)
        for (const char* name : kColumnNames)
          if (lower(trim(f)) == name) header = true;
      if (header) {
        for (int c = 0; c < kColumns; ++c) where[c] = -1;
        bool bad = false;
        for (size_t f = 0; f < fields.size(); ++f) {
          const std::string name = lower(trim(fields[f]));
          int found = -1;
          for (int c = 0; c < kColumns; ++c)
            if (name == kColumnNames[c]) found = c;
          if (found < 0) {
            report(row_line, long(f + 1), "unknown column '" + trim(fields[f]) +
                                               "' (expected anchor, nearer, farther, person, time, kind, weight)");
            bad = true;
          } else if (where[found] >= 0) {
            report(row_line, long(f + 1), "column '" + name + "' appears twice");
            bad = true;
          } else {
            where[found] = int(f);
          }
        }
        for (int c : {kAnchor, kNearer, kFarther})
          if (where[c] < 0) {
            report(row_line, 0, std::string("the header has no '") + kColumnNames[c] + "' column");
            bad = true;
          }
        if (bad) {
          result.judgments.clear();
          return result;
        }
        continue;
      }
    }
    ++result.rows;
    const size_t problems_before = result.problems.size();
    bool bad = false;
    // Ids are compared exactly as written, as the collection loader keeps them (no trimming);
    // the other fields are trimmed.
    auto exact = [&](int c) -> std::string {
      return where[c] >= 0 && size_t(where[c]) < fields.size() ? fields[size_t(where[c])] : std::string();
    };
    auto field = [&](int c) {
      const bool quoted = where[c] >= 0 && size_t(where[c]) < quoted_fields.size() && quoted_fields[size_t(where[c])];
      return quoted ? exact(c) : trim(exact(c));
    };
    int max_col = 0;
    for (int c = 0; c < kColumns; ++c) max_col = std::max(max_col, where[c] + 1);
    if (fields.size() < 3) {
      report(row_line, 0, "expected at least 3 fields (anchor, nearer, farther), found " + std::to_string(fields.size()));
      ++result.bad_rows;
      continue;
    }
    if (fields.size() > size_t(max_col)) {
      report(row_line, long(max_col + 1), "expected at most " + std::to_string(max_col) + " fields, found " +
                                             std::to_string(fields.size()));
      bad = true;
    }
    Judgment j;
    j.kind = JudgmentKind::kImport;
    int32_t* roles[3] = {&j.anchor, &j.nearer, &j.farther};
    for (int c : {kAnchor, kNearer, kFarther}) {
      const std::string id = unneutralized(exact(c));
      const long col = long(where[c] + 1);
      if (trim(id).empty()) {
        report(row_line, col, std::string(kColumnNames[c]) + " is empty");
        bad = true;
        continue;
      }
      auto it = index.find(id);
      if (it == index.end()) {
        const bool spaced = trim(id) != id && index.count(trim(id));
        report(row_line, col, std::string(kColumnNames[c]) + " '" + id + "' is not an item of the collection" +
                                  (spaced ? " (ids are compared exactly: the spaces around it are part of it)" : ""));
        bad = true;
        continue;
      }
      *roles[c] = it->second;
    }
    j.person = unneutralized(field(kPerson));
    if (!field(kTime).empty()) {
      if (!parse_time(field(kTime), &j.time)) {
        report(row_line, long(where[kTime] + 1),
               "time '" + field(kTime) + "' is neither seconds since 1970 nor an ISO 8601 time like 2026-12-01T21:54:23Z");
        bad = true;
      } else if (!(j.time > 0.0 && j.time < kLatestJudgmentTime)) {
        report(row_line, long(where[kTime] + 1),
               "time '" + field(kTime) + "' is outside 1970-01-01 .. 9999-12-31 (leave it empty for the time of import)");
        bad = true;
      }
    }
    if (!field(kKind).empty() && !judgment_kind_from_string(lower(field(kKind)), &j.kind)) {
      report(row_line, long(where[kKind] + 1), "kind '" + field(kKind) + "' is not one of own, pair, grid, drag, import");
      bad = true;
    }
    if (!field(kWeight).empty()) {
      char* end = nullptr;
      const std::string w = field(kWeight);
      j.weight = std::strtod(w.c_str(), &end);
      if (!end || *end != '\0' || !(j.weight > 0) || !(j.weight <= kMaxJudgmentWeight)) {
        report(row_line, long(where[kWeight] + 1),
               "weight '" + w + "' is not a number above 0 and at most " + std::to_string(int(kMaxJudgmentWeight)));
        bad = true;
      }
    }
    if (!bad) {
      const std::string problem = judgment_problem(j, ids.size());
      if (!problem.empty()) {
        // Same item twice: name the ids the person wrote.
        std::string message = problem;
        if (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther)
          message = "names the same item twice ('" + ids[size_t(j.anchor == j.nearer || j.anchor == j.farther ? j.anchor : j.nearer)] +
                    "'): " + problem;
        report(row_line, 0, message);
        bad = true;
      }
    }
    if (bad || result.problems.size() != problems_before) {
      ++result.bad_rows;
      continue;
    }
    result.judgments.push_back(j);
  }
  if (!result.problems.empty() && !options.skip_bad_rows) result.judgments.clear();
  return result;
}

JudgmentReadResult read_judgments_csv(const std::string& path, const std::vector<std::string>& ids,
                                      const JudgmentReadOptions& options) {
  std::string text;
  try {
    text = read_file(path);  // regular files only, bounded (solver/io/csv_table.h)
  } catch (const LoadError& e) {
    JudgmentReadResult r;
    const std::string& why = e.problem().message;
    r.problems.push_back({path, 0, 0, why.rfind("cannot open", 0) == 0 ? "cannot open the judgments file"
                                                                       : "cannot read the judgments file: " + why});
    return r;
  }
  return parse_judgments_csv(text, path, ids, options);
}

std::string format_judgments_csv(const std::vector<Judgment>& judgments, const std::vector<std::string>& ids,
                                 const JudgmentWriteOptions& options) {
  std::ostringstream out;
  out.precision(17);
  out << "anchor,nearer,farther,person,time,kind,weight\n";
  for (const auto& j : judgments) {
    if (j.retracted && !options.include_retracted) continue;
    const bool raw = options.raw_csv;
    out << csv_field(ids.at(size_t(j.anchor)), raw) << ',' << csv_field(ids.at(size_t(j.nearer)), raw) << ','
        << csv_field(ids.at(size_t(j.farther)), raw) << ',' << (options.include_people ? csv_field(j.person, raw) : "")
        << ','
        << (j.time != 0.0 ? format_time_utc(j.time) : "") << ',' << to_string(j.kind) << ',' << j.weight << '\n';
  }
  return out.str();
}

std::string write_judgments_csv(const std::string& path, const std::vector<Judgment>& judgments,
                                const std::vector<std::string>& ids, const JudgmentWriteOptions& options,
                                const SafeWriteOptions& file) {
  for (const auto& j : judgments)
    for (int32_t i : {j.anchor, j.nearer, j.farther})
      if (i < 0 || size_t(i) >= ids.size()) return "a judgment names item " + std::to_string(i) + ", which has no id";
  return write_file_safely(path, format_judgments_csv(judgments, ids, options), file);
}

bool people_from_string(const std::string& text, PeopleInExport* out) {
  if (text == "names") *out = PeopleInExport::kNames;
  else if (text == "leave-out" || text == "none") *out = PeopleInExport::kLeaveOut;
  else if (text == "codes") *out = PeopleInExport::kCodes;
  else return false;
  return true;
}

void apply_people_rule(std::vector<Judgment>* judgments, PeopleInExport rule) {
  if (rule == PeopleInExport::kNames) return;
  std::unordered_map<std::string, std::string> codes;
  for (auto& j : *judgments) {
    if (rule == PeopleInExport::kLeaveOut || j.person.empty()) {
      j.person.clear();
      continue;
    }
    auto it = codes.find(j.person);
    if (it == codes.end()) it = codes.emplace(j.person, "P" + std::to_string(codes.size() + 1)).first;
    j.person = it->second;
  }
}

}  // namespace kith
