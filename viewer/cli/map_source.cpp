#include "viewer/cli/map_source.h"

#include <cmath>
#include <cstdio>
#include <filesystem>

#include "viewer/cli/synthetic_collection.h"

namespace kith {

bool FlagReader::flag(const std::string& name) {
  for (size_t i = 0; i < args_.size(); ++i)
    if (!used_[i] && args_[i] == name) {
      used_[i] = true;
      return true;
    }
  return false;
}

std::optional<std::string> FlagReader::value(const std::string& name) {
  for (size_t i = 0; i < args_.size(); ++i) {
    if (used_[i]) continue;
    if (args_[i] == name) {
      used_[i] = true;
      if (i + 1 >= args_.size()) {
        error_ = command_ + ": " + name + " needs a value";
        return std::nullopt;
      }
      used_[i + 1] = true;
      return args_[i + 1];
    }
    if (args_[i].rfind(name + "=", 0) == 0) {
      used_[i] = true;
      return args_[i].substr(name.size() + 1);
    }
  }
  return std::nullopt;
}

bool FlagReader::finish(std::vector<std::string>* positional) {
  if (!error_.empty()) return false;
  for (size_t i = 0; i < args_.size(); ++i) {
    if (used_[i]) continue;
    if (args_[i].size() > 1 && args_[i][0] == '-') {
      error_ = command_ + ": unknown option '" + args_[i] + "' (kith " + command_ + " --help lists them)";
      return false;
    }
    positional->push_back(args_[i]);
  }
  return true;
}

bool parse_size(const std::string& text, int* w, int* h) {
  const auto x = text.find_first_of("xX");
  if (x == std::string::npos) return false;
  try {
    size_t a = 0, b = 0;
    *w = std::stoi(text.substr(0, x), &a);
    *h = std::stoi(text.substr(x + 1), &b);
    return a == x && b == text.size() - x - 1 && *w > 0 && *h > 0;
  } catch (const std::exception&) {
    return false;
  }
}

bool parse_number(const std::string& text, double* out) {
  try {
    size_t used = 0;
    *out = std::stod(text, &used);
    return used == text.size() && std::isfinite(*out);
  } catch (const std::exception&) {
    return false;
  }
}

std::optional<Collection> load_items_or_report(const std::string& command, const std::string& path, size_t generate,
                                               int* exit_code) {
  if (generate > 0) return synthetic_collection(generate);
  if (path.empty()) {
    std::fprintf(stderr, "kith %s: which collection? (kith %s ITEMS, see --help)\n", command.c_str(), command.c_str());
    *exit_code = kExitUsage;
    return std::nullopt;
  }
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    std::fprintf(stderr, "kith %s: %s: no such file\n", command.c_str(), path.c_str());
    *exit_code = kExitBadInput;
    return std::nullopt;
  }
  if (std::filesystem::path(path).extension() == ".kith") {
    std::fprintf(stderr, "kith %s: %s: session files are not readable by this build yet\n", command.c_str(),
                 path.c_str());
    *exit_code = kExitBadInput;
    return std::nullopt;
  }
  try {
    return load_collection(path);
  } catch (const LoadError& e) {
    std::fprintf(stderr, "kith %s: %s\n", command.c_str(), e.problem().str().c_str());
    *exit_code = kExitBadInput;
    return std::nullopt;
  }
}

bool read_engine_flags(FlagReader& flags, const std::string& command, EngineOptions* o) {
  auto number = [&](const char* name, double* target) {
    if (auto v = flags.value(name)) {
      if (!parse_number(*v, target)) {
        std::fprintf(stderr, "kith %s: %s expects a number, got '%s'\n", command.c_str(), name, v->c_str());
        return false;
      }
    }
    return true;
  };
  double seed = double(o->seed);
  if (!number("--perplexity", &o->perplexity) || !number("--theta", &o->theta) || !number("--blend", &o->blend) ||
      !number("--seed", &seed))
    return false;
  if (seed < 0 || seed != std::floor(seed)) {
    std::fprintf(stderr, "kith %s: --seed expects a whole number >= 0\n", command.c_str());
    return false;
  }
  o->seed = uint64_t(seed);
  if (flags.flag("--paused")) o->start_paused = true;
  return true;
}

}  // namespace kith
