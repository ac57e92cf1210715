#include "viewer/cli/session_cli.h"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <unordered_map>

namespace kith::session_cli {

std::string Parsed::value(const std::string& name, const std::string& fallback) const {
  auto it = values.find(name);
  return it == values.end() || it->second.empty() ? fallback : it->second.back();
}

std::string parse(const Args& args, const std::set<std::string>& with_value, const std::set<std::string>& flags,
                  Parsed* out) {
  for (size_t i = 0; i < args.size(); ++i) {
    std::string a = args[i];
    if (a == "--help" || a == "-h") {
      out->help = true;
      continue;
    }
    if (a == "-o") a = "--output";
    if (a.rfind("--", 0) != 0 || a == "--") {
      out->positional.push_back(a);
      continue;
    }
    std::string key = a, value;
    bool has_value = false;
    const size_t eq = a.find('=');
    if (eq != std::string::npos) {
      key = a.substr(0, eq);
      value = a.substr(eq + 1);
      has_value = true;
    }
    if (with_value.count(key)) {
      if (!has_value) {
        if (i + 1 >= args.size()) return key + " needs a value";
        value = args[++i];
      }
      out->values[key].push_back(value);
    } else if (flags.count(key)) {
      if (has_value) return key + " takes no value";
      out->flags.insert(key);
    } else {
      return "unknown option '" + key + "'";
    }
  }
  return "";
}

int report(const char* command, const SessionError& e) {
  std::fprintf(stderr, "kith %s: %s\n", command, e.what());
  switch (e.kind()) {
    case SessionError::Kind::kExists: return kExitUsage;
    default: return kExitBadInput;
  }
}



bool parse_double(const std::string& text, double* out) {
  if (text.empty()) return false;
  char* end = nullptr;
  const double v = std::strtod(text.c_str(), &end);
  if (end != text.c_str() + text.size() || !std::isfinite(v)) return false;
  *out = v;
  return true;
}

}  // namespace kith::session_cli
