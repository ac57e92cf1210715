// The one command-line reader of every kith command. A command's options are declared by the
// option lines of its help, so what --help shows is exactly what is read:
//   "  -o, --output FILE     where to write"   --output (also -o), takes a value
//   "  --force               replace FILE"     --force, a flag
//   "                        more words"       (indented further: continues the line above)
// The reader takes "--key value", "--key=value", bare flags, "-o" for "--output" and "-h" for
// "--help", and names any option it does not know. Typed getters read numbers (with a range),
// whole numbers, seeds, lists, sizes and choices, and every problem ends in the same message:
//   kith COMMAND: WHAT WAS WRONG
//   (kith COMMAND --help lists the options)
// with exit code 2. Main thread only.
#pragma once
#include <cstdint>
#include <functional>
#include <limits>
#include <map>
#include <string>
#include <vector>

#include "viewer/cli/commands.h"

namespace kith {

// One declared option.
struct Flag {
  std::string name;                  // "--perplexity"
  std::string value;                 // its placeholder ("P", "FILE"); empty: a flag without a value
  std::vector<std::string> aliases;  // other spellings: "-o", "--color"
};

// One option line of a help text: "  LEFT" padded to the help column, then HELP ('\n' in it
// starts a continuation line). For option lines built from values (shared_flags.h).
std::string option_line(const std::string& left, const std::string& help);

// A number as help lines and messages show it (%g).
std::string number_text(double v);

class FlagReader {
 public:
  // `usage` opens the help (usage lines and what the command does), `options` holds the option
  // lines (see above), `footer` closes the help (exit codes). `hidden` declares options left out
  // of the help (test hooks), comma-separated: "--generate N, --frames N, --no-vsync".
  FlagReader(std::string command, std::string usage, const std::string& options, std::string footer = "",
             const std::string& hidden = "");
  FlagReader& add(const std::string& options);  // more option lines (groups in shared_flags.h)

  // Reads ARGS; true when the command goes on. False for "--help" or "-h" anywhere (help() is
  // then set), or when an option is unknown, lacks its value or has one it does not take
  // (error() says which): the command returns stop(). "--" ends the options.
  bool read(const Args& args);
  bool help() const { return help_; }
  int stop() const { return help_ ? print_help() : usage_error(); }  // the help (0) or the usage message (2)
  int print_help() const;                                            // the help on stdout; returns 0

  bool declared(const std::string& name) const;
  bool has(const std::string& name) const;                                            // given at least once
  std::string text(const std::string& name, const std::string& fallback = "") const;  // the last one given
  std::vector<std::string> all(const std::string& name) const;                        // every one, in order
  const std::vector<std::string>& positional() const { return positional_; }

  // Typed getters. An option not given leaves *out as it is and returns true; a bad value
  // returns false and records the standard message (the first problem is the one reported).
  bool number(const std::string& name, double* out, double lo = -std::numeric_limits<double>::infinity(),
              double hi = std::numeric_limits<double>::infinity());  // finite, lo <= v <= hi
  bool integer(const std::string& name, int64_t* out, int64_t lo = std::numeric_limits<int64_t>::min(),
               int64_t hi = std::numeric_limits<int64_t>::max());
  bool integer(const std::string& name, int* out, int lo = std::numeric_limits<int>::min(),
               int hi = std::numeric_limits<int>::max());
  bool count(const std::string& name, size_t* out, size_t lo, size_t hi);  // a whole number as a size
  bool seed(const std::string& name, uint64_t* out);                       // 0 .. 2^63 - 1
  bool list(const std::string& name, std::vector<std::string>* out);       // "a,b,,c" -> a, b, c (every one given)
  bool size(const std::string& name, int* width, int* height);             // WxH, both above 0
  bool choice(const std::string& name, std::string* out, const std::vector<std::string>& allowed);

  bool ok() const { return error_.empty(); }
  const std::string& error() const { return error_; }
  // Prints the standard usage message for error() (or MESSAGE) on stderr and returns 2.
  int usage_error() const { return usage_error(error_); }
  int usage_error(const std::string& message) const;
  // Records MESSAGE as the problem (unless one is recorded already); returns false.
  bool fail(const std::string& message);
  const std::string& command() const { return command_; }

 private:
  const Flag* find(const std::string& spelling) const;
  const std::string* last(const std::string& name) const;

  void declare(const std::string& spec);  // "-o, --output FILE"
  bool typed(const std::string& name, const std::function<bool(const std::string&)>& parse, const std::string& expects);

  std::string command_, usage_, options_, footer_, error_;
  std::vector<Flag> flags_;
  std::map<std::string, std::vector<std::string>> given_;  // by declared name, every value in order
  std::vector<std::string> positional_;
  bool help_ = false;
};

}  // namespace kith
