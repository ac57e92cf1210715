// See flags.h.
#include "viewer/cli/flags.h"

#include <algorithm>
#include <cassert>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace kith {
namespace {

// The whole text as one finite number.
bool parse_real(const std::string& text, double* out) {
  if (text.empty() || std::isspace(static_cast<unsigned char>(text[0]))) return false;
  char* end = nullptr;
  errno = 0;
  const double v = std::strtod(text.c_str(), &end);
  if (end != text.c_str() + text.size() || !std::isfinite(v)) return false;
  *out = v;
  return true;
}

// The whole text as one whole number: digits, or a number such as 1e6 that is whole and exact.
bool parse_whole(const std::string& text, int64_t* out) {
  if (text.empty() || std::isspace(static_cast<unsigned char>(text[0]))) return false;
  char* end = nullptr;
  errno = 0;
  const long long v = std::strtoll(text.c_str(), &end, 10);
  if (end == text.c_str() + text.size() && errno == 0) {
    *out = v;
    return true;
  }
  double d = 0;
  constexpr double kExact = 9007199254740992.0;  // 2^53: every whole number below it is exact
  if (!parse_real(text, &d) || d != std::floor(d) || std::fabs(d) > kExact) return false;
  *out = int64_t(d);
  return true;
}

// " from LO to HI", " >= LO", " <= HI" or "": bounds at the limits of an int or wider are no bounds to a person.
std::string range_words(int64_t lo, int64_t hi) {
  const bool low = lo > std::numeric_limits<int>::min(), high = hi < std::numeric_limits<int>::max();
  if (low && high) return " from " + std::to_string(lo) + " to " + std::to_string(hi);
  if (low) return " >= " + std::to_string(lo);
  if (high) return " <= " + std::to_string(hi);
  return "";
}

}  // namespace

constexpr size_t kHelpColumn = 24;  // where an option line's help starts

std::string number_text(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

std::string option_line(const std::string& left, const std::string& help) {
  const std::string indent(kHelpColumn, ' ');
  std::string line = "  " + left;
  line += line.size() < kHelpColumn ? std::string(kHelpColumn - line.size(), ' ') : "\n" + indent;
  for (char c : help) line += c == '\n' ? "\n" + indent : std::string(1, c);
  return line + "\n";
}

FlagReader::FlagReader(std::string command, std::string usage, const std::string& options, std::string footer,
                       const std::string& hidden)
    : command_(std::move(command)), usage_(std::move(usage)), footer_(std::move(footer)) {
  add(options);
  for (size_t start = 0; start < hidden.size();) {
    const size_t comma = std::min(hidden.find(',', start), hidden.size());
    const size_t first = hidden.find_first_not_of(' ', start);
    if (first < comma) declare(hidden.substr(first, comma - first));
    start = comma + 1;
  }
}

FlagReader& FlagReader::add(const std::string& options) {
  options_ += options;
  for (size_t start = 0; start < options.size();) {
    const size_t end = std::min(options.find('\n', start), options.size());
    const std::string line = options.substr(start, end - start);
    start = end + 1;
    if (line.rfind("  -", 0) != 0) {
      assert((line.empty() || line.rfind("      ", 0) == 0) &&
             "an option line starts with '  -', a continuation deeper");
      continue;
    }
    const size_t gap = line.find("  ", 2);  // the declaration ends where the help begins
    declare(line.substr(2, gap == std::string::npos ? std::string::npos : gap - 2));
  }
  return *this;
}

// "-o, --output FILE", "--colour, --color COLUMN", "--force": spellings, then the value's placeholder.
void FlagReader::declare(const std::string& spec) {
  Flag flag;
  for (size_t at = 0; at < spec.size();) {
    const size_t end = std::min(spec.find(' ', at), spec.size());
    std::string word = spec.substr(at, end - at);
    at = end + 1;
    if (word.empty()) continue;
    if (word.back() == ',') word.pop_back();
    if (word[0] != '-') {
      flag.value = word;
      break;
    }
    if (flag.name.empty())
      flag.name = word;
    else
      flag.aliases.push_back(word);
  }
  // "-o, --output": the long spelling is the name, the short one an alias.
  for (auto& alias : flag.aliases)
    if (flag.name.size() == 2 && alias.size() > 2) std::swap(flag.name, alias);
  assert(!flag.name.empty() && !declared(flag.name) && "an option declared twice");
  flags_.push_back(std::move(flag));
}

const Flag* FlagReader::find(const std::string& spelling) const {
  for (const Flag& f : flags_)
    if (f.name == spelling || std::find(f.aliases.begin(), f.aliases.end(), spelling) != f.aliases.end()) return &f;
  return spelling == "-o" ? find("--output") : nullptr;
}

bool FlagReader::declared(const std::string& name) const {
  for (const Flag& f : flags_)
    if (f.name == name) return true;
  return false;
}

bool FlagReader::read(const Args& args) {
  for (const std::string& a : args)
    if (a == "--")
      break;
    else if (a == "--help" || a == "-h")
      help_ = true;
  if (help_) return false;
  bool options_end = false;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string& a = args[i];
    if (options_end || a.size() < 2 || a[0] != '-') {
      positional_.push_back(a);
      continue;
    }
    if (a == "--") {
      options_end = true;
      continue;
    }
    const size_t eq = a.rfind("--", 0) == 0 ? a.find('=') : std::string::npos;
    const std::string key = a.substr(0, eq);
    const Flag* flag = find(key);
    if (!flag) return fail("unknown option '" + key + "'");
    std::vector<std::string>& values = given_[flag->name];
    if (flag->value.empty()) {
      if (eq != std::string::npos) return fail(flag->name + " takes no value");
      values.emplace_back();
    } else if (eq != std::string::npos) {
      values.push_back(a.substr(eq + 1));
    } else {
      if (i + 1 >= args.size()) return fail(flag->name + " needs a value (" + flag->value + ")");
      values.push_back(args[++i]);
    }
  }
  return ok();
}

int FlagReader::print_help() const {
  std::string out = usage_;
  if (!out.empty() && out.back() != '\n') out += '\n';
  if (!options_.empty()) out += "\noptions:\n" + options_;
  if (!footer_.empty()) out += "\n" + footer_;
  std::fputs(out.c_str(), stdout);
  return kExitOk;
}

bool FlagReader::has(const std::string& name) const { return given_.count(name) > 0; }

const std::string* FlagReader::last(const std::string& name) const {
  auto it = given_.find(name);
  return it == given_.end() || it->second.empty() ? nullptr : &it->second.back();
}

std::string FlagReader::text(const std::string& name, const std::string& fallback) const {
  const std::string* v = last(name);
  return v ? *v : fallback;
}

std::vector<std::string> FlagReader::all(const std::string& name) const {
  auto it = given_.find(name);
  return it == given_.end() ? std::vector<std::string>{} : it->second;
}

bool FlagReader::fail(const std::string& message) {
  if (error_.empty()) error_ = message;
  return false;
}

int FlagReader::usage_error(const std::string& message) const {
  std::fprintf(stderr, "kith %s: %s\n(kith %s --help lists the options)\n", command_.c_str(), message.c_str(),
               command_.c_str());
  return kExitUsage;
}

// The typed getters' one shape: an option not given is fine; PARSE decides a given value.
bool FlagReader::typed(const std::string& name, const std::function<bool(const std::string&)>& parse,
                       const std::string& expects) {
  const std::string* v = last(name);
  return !v || parse(*v) || fail(name + " expects " + expects + ", got '" + *v + "'");
}

bool FlagReader::number(const std::string& name, double* out, double lo, double hi) {
  std::string range;
  if (std::isfinite(lo) && std::isfinite(hi))
    range = " from " + number_text(lo) + " to " + number_text(hi);
  else if (std::isfinite(lo))
    range = " >= " + number_text(lo);
  else if (std::isfinite(hi))
    range = " <= " + number_text(hi);
  return typed(
      name,
      [&](const std::string& v) {
        double x = 0;
        return parse_real(v, &x) && x >= lo && x <= hi && (*out = x, true);
      },
      "a number" + range);
}

bool FlagReader::integer(const std::string& name, int64_t* out, int64_t lo, int64_t hi) {
  return typed(
      name,
      [&](const std::string& v) {
        int64_t x = 0;
        return parse_whole(v, &x) && x >= lo && x <= hi && (*out = x, true);
      },
      "a whole number" + range_words(lo, hi));
}

bool FlagReader::integer(const std::string& name, int* out, int lo, int hi) {
  int64_t x = *out;
  return integer(name, &x, int64_t(lo), int64_t(hi)) && (*out = int(x), true);
}

bool FlagReader::count(const std::string& name, size_t* out, size_t lo, size_t hi) {
  int64_t x = int64_t(*out);
  return integer(name, &x, int64_t(lo), int64_t(hi)) && (*out = size_t(x), true);
}

bool FlagReader::seed(const std::string& name, uint64_t* out) {
  return typed(
      name,
      [&](const std::string& v) {
        int64_t x = 0;
        return parse_whole(v, &x) && x >= 0 && (*out = uint64_t(x), true);
      },
      "a whole number from 0 to " + std::to_string(std::numeric_limits<int64_t>::max()));
}

bool FlagReader::list(const std::string& name, std::vector<std::string>* out) {
  if (!has(name)) return true;
  out->clear();
  for (const std::string& v : all(name))
    for (size_t start = 0;;) {
      const size_t comma = v.find(',', start);
      const std::string part = v.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
      if (!part.empty()) out->push_back(part);
      if (comma == std::string::npos) break;
      start = comma + 1;
    }
  return true;
}

bool FlagReader::size(const std::string& name, int* width, int* height) {
  return typed(
      name,
      [&](const std::string& v) {
        const size_t x = v.find_first_of("xX");
        int64_t w = 0, h = 0;
        const bool ok = x != std::string::npos && parse_whole(v.substr(0, x), &w) && parse_whole(v.substr(x + 1), &h) &&
                        w > 0 && h > 0 && w <= 1 << 20 && h <= 1 << 20;
        return ok && (*width = int(w), *height = int(h), true);
      },
      "WxH in pixels, e.g. 1280x800");
}

bool FlagReader::choice(const std::string& name, std::string* out, const std::vector<std::string>& allowed) {
  std::string words;
  for (size_t i = 0; i < allowed.size(); ++i)
    words += (i == 0 ? "" : i + 1 == allowed.size() ? " or " : ", ") + allowed[i];
  return typed(
      name,
      [&](const std::string& v) {
        const bool ok = std::find(allowed.begin(), allowed.end(), v) != allowed.end();
        return ok && (*out = v, true);
      },
      words);
}

}  // namespace kith
