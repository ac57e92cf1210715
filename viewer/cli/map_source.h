// What `kith open` and `kith render` share: reading the command line's collection argument
// (ITEMS file, or the hidden --generate N for tests and benchmarks), engine options from flags,
// and starting the map feed (the live engine when built in, else a still map).
// Main thread.
#pragma once
#include <memory>
#include <optional>
#include <string>

#include "solver/io/collection.h"
#include "solver/live/engine.h"
#include "viewer/cli/commands.h"
#include "viewer/scene/map_feed.h"

namespace kith {

// A tiny flag reader: "--name value", "--name=value" and "--flag".
class FlagReader {
 public:
  FlagReader(const Args& args, std::string command) : args_(args), command_(std::move(command)) {}
  bool flag(const std::string& name);                             // consumes --name
  std::optional<std::string> value(const std::string& name);      // consumes --name V or --name=V
  std::vector<std::string> positional();                          // what is left; call last
  const std::string& error() const { return error_; }             // "" unless a value was missing
  // Returns false and sets error() for the first unknown flag left.
  bool finish(std::vector<std::string>* positional);

 private:
  Args args_;
  std::string command_, error_;
  std::vector<bool> used_ = std::vector<bool>(args_.size(), false);
};

bool parse_size(const std::string& text, int* w, int* h);
bool parse_number(const std::string& text, double* out);

// Loads ITEMS (CSV/TSV/.npy) or generates a test collection ("generated:N"). On failure prints
// the problem to stderr and sets *exit_code (3 bad data, 2 bad usage).
std::optional<Collection> load_items_or_report(const std::string& command, const std::string& path, size_t generate,
                                               int* exit_code);

// Reads --perplexity --theta --blend --seed --paused into options; false (message printed) on bad values.
bool read_engine_flags(FlagReader& flags, const std::string& command, EngineOptions* options);

}  // namespace kith
