// See flags.h.
#include "viewer/cli/flags.h"

#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace kith {
namespace {

std::string shown(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

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

FlagReader::FlagReader(std::string command, std::string usage, std::vector<Flag> flags, std::string footer)
    : command_(std::move(command)), usage_(std::move(usage)), footer_(std::move(footer)), flags_(std::move(flags)) {}

FlagReader& FlagReader::add(const std::vector<Flag>& more) {
  flags_.insert(flags_.end(), more.begin(), more.end());
  return *this;
}

const Flag* FlagReader::find(const std::string& spelling) const {
  const std::string name = spelling == "-o" && !declared("-o") ? "--output" : spelling;
  for (const Flag& f : flags_)
    if (f.name == name || (!f.alias.empty() && f.alias == name)) return &f;
  return nullptr;
}

bool FlagReader::declared(const std::string& name) const {
  for (const Flag& f : flags_)
    if (f.name == name) return true;
  return false;
}

bool FlagReader::read(const Args& args) {
  for (const std::string& a : args)
    if (a == "--") break;
    else if (a == "--help" || a == "-h") help_ = true;
  if (help_) return true;
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
  bool any = false;
  for (const Flag& f : flags_) {
    if (f.help.empty()) continue;
    if (!any) out += "\noptions:\n";
    any = true;
    std::string left = "  ";
    if (f.alias.size() == 2) left += f.alias + ", ";  // a short spelling goes first: "-o, --output FILE"
    left += f.name + (f.value.empty() ? "" : " " + f.value);
    constexpr size_t kColumn = 24;
    const std::string indent(kColumn, ' ');
    out += left.size() < kColumn ? left + std::string(kColumn - left.size(), ' ') : left + "\n" + indent;
    for (char c : f.help) out += c == '\n' ? "\n" + indent : std::string(1, c);
    out += '\n';
  }
  if (!footer_.empty()) out += "\n" + footer_;
  if (!out.empty() && out.back() != '\n') out += '\n';
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

bool FlagReader::number(const std::string& name, double* out, double lo, double hi) {
  const std::string* v = last(name);
  if (!v) return true;
  double x = 0;
  if (parse_real(*v, &x) && x >= lo && x <= hi) {
    *out = x;
    return true;
  }
  std::string range;
  if (std::isfinite(lo) && std::isfinite(hi)) range = " from " + shown(lo) + " to " + shown(hi);
  else if (std::isfinite(lo)) range = " >= " + shown(lo);
  else if (std::isfinite(hi)) range = " <= " + shown(hi);
  return fail(name + " expects a number" + range + ", got '" + *v + "'");
}

bool FlagReader::integer(const std::string& name, int64_t* out, int64_t lo, int64_t hi) {
  const std::string* v = last(name);
  if (!v) return true;
  int64_t x = 0;
  if (parse_whole(*v, &x) && x >= lo && x <= hi) {
    *out = x;
    return true;
  }
  return fail(name + " expects a whole number" + range_words(lo, hi) + ", got '" + *v + "'");
}

bool FlagReader::integer(const std::string& name, int* out, int lo, int hi) {
  int64_t x = *out;
  if (!integer(name, &x, int64_t(lo), int64_t(hi))) return false;
  *out = int(x);
  return true;
}

bool FlagReader::count(const std::string& name, size_t* out, size_t lo, size_t hi) {
  int64_t x = int64_t(*out);
  if (!integer(name, &x, int64_t(lo), int64_t(hi))) return false;
  *out = size_t(x);
  return true;
}

bool FlagReader::seed(const std::string& name, uint64_t* out) {
  const std::string* v = last(name);
  if (!v) return true;
  int64_t x = 0;
  if (parse_whole(*v, &x) && x >= 0) {
    *out = uint64_t(x);
    return true;
  }
  return fail(name + " expects a whole number from 0 to " + std::to_string(std::numeric_limits<int64_t>::max()) +
              ", got '" + *v + "'");
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
  const std::string* v = last(name);
  if (!v) return true;
  const size_t x = v->find_first_of("xX");
  int64_t w = 0, h = 0;
  if (x != std::string::npos && parse_whole(v->substr(0, x), &w) && parse_whole(v->substr(x + 1), &h) && w > 0 &&
      h > 0 && w <= 1 << 20 && h <= 1 << 20) {
    *width = int(w);
    *height = int(h);
    return true;
  }
  return fail(name + " expects WxH in pixels, e.g. 1280x800, got '" + *v + "'");
}

bool FlagReader::choice(const std::string& name, std::string* out, const std::vector<std::string>& allowed) {
  const std::string* v = last(name);
  if (!v) return true;
  for (const std::string& a : allowed)
    if (*v == a) {
      *out = a;
      return true;
    }
  std::string words;
  for (size_t i = 0; i < allowed.size(); ++i)
    words += (i == 0 ? "" : i + 1 == allowed.size() ? " or " : ", ") + allowed[i];
  return fail(name + " expects " + words + ", got '" + *v + "'");
}

}  // namespace kith
