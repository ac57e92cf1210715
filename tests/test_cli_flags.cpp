// The one flag reader of every command (viewer/cli/flags.h), the shared map settings
// (viewer/cli/shared_flags.h), and the commands refusing a setting the engine would refuse
// before they write anything.
#include <doctest/doctest.h>

#include <cstdint>
#include <filesystem>
#include <sstream>
#include <string>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/shared_flags.h"

namespace fs = std::filesystem;
using kith::FlagReader;

namespace {

const char* const kOptions =
    "  -o, --output FILE     where to\n"
    "  --force               replace\n"
    "  --count N             how many\n"
    "  --scale X             how much,\n"
    "                        said on two lines\n"
    "  --add A,B             repeatable\n"
    "  --mode on|off         a choice\n"
    "  --size WxH            a size\n"
    "  --colour, --color NAME\n"
    "                        a colour\n";

FlagReader reader() {
  return FlagReader("try", "usage: kith try ITEMS\n", kOptions, "exit codes: none\n", "--hook FILE");
}

// An invented collection file of N swatches.
std::string write_items(const std::string& dir, size_t n) {
  std::ostringstream s;
  s << "id,weave,warmth,gloss\n";
  for (size_t i = 0; i < n; ++i)
    s << "sw" << i << "," << (i % 2 ? "twill" : "satin") << "," << i % 5 << "," << i % 3 << "\n";
  const std::string path = dir + "/swatches.csv";
  kith::test::write_bytes(path, s.str());
  return path;
}

}  // namespace

TEST_CASE("cli flags: values, flags, --key=value, -o, repeats and positional arguments") {
  FlagReader f = reader();
  REQUIRE(f.read({"items.csv", "-o", "out.csv", "--force", "--count=12", "--add", "a,b", "--add=c,,d", "--scale",
                  "-2.5", "--color", "red", "--", "--not-an-option"}));
  CHECK(f.ok());
  CHECK_FALSE(f.help());
  CHECK(f.positional() == std::vector<std::string>{"items.csv", "--not-an-option"});
  CHECK(f.text("--output") == "out.csv");
  CHECK(f.has("--force"));
  CHECK_FALSE(f.has("--mode"));
  CHECK(f.text("--mode", "on") == "on");
  CHECK(f.text("--colour") == "red");  // the alias is stored under the declared name
  CHECK(f.all("--add") == std::vector<std::string>{"a,b", "c,,d"});
  std::vector<std::string> parts;
  REQUIRE(f.list("--add", &parts));
  CHECK(parts == std::vector<std::string>{"a", "b", "c", "d"});
  int64_t count = 0;
  double scale = 0;
  REQUIRE(f.integer("--count", &count, 1, 100));
  REQUIRE(f.number("--scale", &scale));  // a value may start with '-'
  CHECK(count == 12);
  CHECK(scale == -2.5);
  int64_t untouched = 7;
  CHECK(f.integer("--hook", &untouched));  // not given: left as it was
  CHECK(untouched == 7);

  FlagReader later = reader();
  REQUIRE(later.read({"--scale", "1", "--scale", "2"}));
  CHECK(later.text("--scale") == "2");  // the last one counts

  FlagReader help = reader();
  CHECK_FALSE(help.read({"--bogus", "-h"}));  // help wins over anything else
  CHECK(help.help());
  CHECK(help.ok());
}

TEST_CASE("cli flags: the help's option lines are the declarations") {
  FlagReader f = reader();
  for (const char* name :
       {"--output", "--force", "--count", "--scale", "--add", "--mode", "--size", "--colour", "--hook"})
    CHECK(f.declared(name));
  CHECK_FALSE(f.declared("--color"));  // an alias, not a second option
  CHECK_FALSE(f.declared("--said"));   // words of a continuation line declare nothing
  REQUIRE(f.read({"--scale", "2", "--hook", "h.txt", "--color", "red", "-o", "x"}));
  CHECK(f.text("--hook") == "h.txt");
  CHECK(f.text("--output") == "x");
  FlagReader flags_take_no_value = reader();
  CHECK(flags_take_no_value.read({"--force", "items.csv"}));
  CHECK(flags_take_no_value.positional() == std::vector<std::string>{"items.csv"});
  CHECK(kith::option_line("--dims 2|3", "map dimensions\nin one line") ==
        "  --dims 2|3            map dimensions\n                        in one line\n");
  CHECK(kith::option_line("--a-very-long-option VALUE", "help") ==
        "  --a-very-long-option VALUE\n" + std::string(24, ' ') + "help\n");
}

TEST_CASE("cli flags: unknown options, missing values and values given to flags are named") {
  FlagReader unknown = reader();
  CHECK_FALSE(unknown.read({"items.csv", "--perplexity", "5"}));
  CHECK(unknown.error() == "unknown option '--perplexity'");
  FlagReader shorthand = reader();
  CHECK_FALSE(shorthand.read({"-x"}));
  CHECK(shorthand.error() == "unknown option '-x'");
  FlagReader missing = reader();
  CHECK_FALSE(missing.read({"items.csv", "--count"}));
  CHECK(missing.error() == "--count needs a value (N)");
  FlagReader flag_value = reader();
  CHECK_FALSE(flag_value.read({"--force=yes"}));
  CHECK(flag_value.error() == "--force takes no value");
  FlagReader dash = reader();
  CHECK(dash.read({"-"}));  // a lone dash is an argument
  CHECK(dash.positional() == std::vector<std::string>{"-"});
}

TEST_CASE("cli flags: typed getters refuse bad numbers and values out of range with one message") {
  auto read = [](const std::vector<std::string>& args) {
    FlagReader f = reader();
    REQUIRE(f.read(args));
    return f;
  };
  double x = 1;
  FlagReader f = read({"--scale", "abc"});
  CHECK_FALSE(f.number("--scale", &x));
  CHECK(f.error() == "--scale expects a number, got 'abc'");
  CHECK(x == 1);
  f = read({"--scale", "2000"});
  CHECK_FALSE(f.number("--scale", &x, 0, 1000));
  CHECK(f.error() == "--scale expects a number from 0 to 1000, got '2000'");
  for (const char* bad : {"nan", "inf", "1e999", "", " 3", "3 ", "0x"}) {
    CAPTURE(bad);
    f = read({"--scale", bad});
    CHECK_FALSE(f.number("--scale", &x));
  }
  int64_t n = 0;
  f = read({"--count", "2.5"});
  CHECK_FALSE(f.integer("--count", &n));
  CHECK(f.error() == "--count expects a whole number, got '2.5'");
  f = read({"--count", "1e3"});
  CHECK(f.integer("--count", &n, 0, 1000));
  CHECK(n == 1000);
  f = read({"--count", "-3"});
  CHECK_FALSE(f.integer("--count", &n, 0, 100000));
  CHECK(f.error() == "--count expects a whole number from 0 to 100000, got '-3'");
  // Seeds: 0 .. 2^63 - 1, exactly.
  uint64_t seed = 42;
  f = read({"--count", "9223372036854775807"});
  CHECK(f.seed("--count", &seed));
  CHECK(seed == 9223372036854775807ull);
  for (const char* bad : {"-1", "1.5", "9223372036854775808", "lots"}) {
    CAPTURE(bad);
    f = read({"--count", bad});
    CHECK_FALSE(f.seed("--count", &seed));
    CHECK(f.error().find("--count expects a whole number from 0 to 9223372036854775807") == 0);
  }
  int w = 0, h = 0;
  f = read({"--size", "320x200"});
  CHECK(f.size("--size", &w, &h));
  CHECK((w == 320 && h == 200));
  for (const char* bad : {"10", "0x10", "10x", "axb", "-5x5"}) {
    CAPTURE(bad);
    f = read({"--size", bad});
    CHECK_FALSE(f.size("--size", &w, &h));
  }
  std::string mode = "on";
  f = read({"--mode", "maybe"});
  CHECK_FALSE(f.choice("--mode", &mode, {"on", "off"}));
  CHECK(f.error() == "--mode expects on or off, got 'maybe'");
  CHECK(mode == "on");
  // The first problem is the one reported.
  f = read({"--mode", "maybe", "--scale", "x"});
  CHECK_FALSE(f.number("--scale", &x));
  CHECK_FALSE(f.choice("--mode", &mode, {"on", "off"}));
  CHECK(f.error() == "--scale expects a number, got 'x'");
}

TEST_CASE("cli flags: the map settings are read by one function and checked by MapParameters") {
  FlagReader f("try", "", kith::map_flags({"--dims", "--perplexity", "--theta", "--seed", "--iterations"}));
  CHECK(kith::map_flags({"--theta"}) == "  --theta T             Barnes-Hut angle, 0 (exact) .. 1.5 (default: 0.5)\n");
  REQUIRE(f.read({"--dims=2", "--perplexity", "12.5", "--theta", "9.99", "--seed", "7", "--iterations", "300"}));
  kith::MapParameters p;
  REQUIRE(kith::read_map_flags(f, &p));
  CHECK(p.dims == 2);
  CHECK(p.perplexity == 12.5);
  CHECK(p.theta == 9.99);  // read as given: the range is MapParameters::IsValid's
  CHECK(p.seed == 7);
  CHECK(p.iterations == 300);
  CHECK(p.blend == kith::MapParameters{}.blend);  // not declared here: left alone
  std::string why;
  CHECK_FALSE(p.IsValid(&why, 60));
  CHECK(why.find("theta") == 0);
  // Undeclared map settings are unknown options for that command.
  FlagReader g("try", "", kith::map_flags({"--perplexity"}));
  CHECK_FALSE(g.read({"--blend", "2"}));
  FlagReader bad("try", "", kith::map_flags({"--dims"}));
  REQUIRE(bad.read({"--dims", "three"}));
  CHECK_FALSE(kith::read_map_flags(bad, &p));
  CHECK(bad.error() == "--dims expects a whole number, got 'three'");
}

TEST_CASE("cli flags: kith new and kith fit refuse settings the engine would refuse, writing nothing") {
  const std::string dir = kith::test::temp_dir("cli-flags-refuse");
  const std::string items = write_items(dir, 60);
  struct Case {
    const char* setting;
    const char* words;  // in the message
  };
  for (const Case& c : {Case{"--perplexity 5000", "perplexity must be smaller than the number of items (60)"},
                        Case{"--perplexity=60", "perplexity must be smaller than the number of items (60)"},
                        Case{"--theta 9.99", "theta must be between 0 and 1.5"},
                        Case{"--dof 0", "dof must be between 0.05 and 100"}, Case{"--dims 4", "dims must be 2 or 3"}}) {
    CAPTURE(c.setting);
    const std::string session = dir + "/box.kith";
    kith::test::KithRun r = kith::test::run_kith("new " + items + " -o " + session + " " + c.setting);
    CAPTURE(r.output);
    CHECK(r.code == 2);
    CHECK(r.output.find("kith new: " + std::string(c.words)) == 0);
    CHECK(r.output.find("(kith new --help lists the options)") != std::string::npos);
    CHECK_FALSE(fs::exists(session));
    const std::string layout = dir + "/layout.csv";
    r = kith::test::run_kith("fit " + items + " -o " + layout + " --quiet " + c.setting);
    CAPTURE(r.output);
    CHECK(r.code == 2);
    CHECK(r.output.find("kith fit: " + std::string(c.words)) == 0);
    CHECK_FALSE(fs::exists(layout));
  }
  CHECK(kith::test::folder_listing(dir) == std::vector<std::string>{"swatches.csv"});

  // The most extreme settings the rule allows make a session that opens.
  const std::string edge = dir + "/edge.kith";
  kith::test::KithRun r = kith::test::run_kith("new " + items + " -o " + edge +
                                               " --perplexity 59.5 --theta 1.5 --dof 100 --blend 1000 --dims 2");
  CAPTURE(r.output);
  REQUIRE(r.code == 0);
  auto store = kith::SessionStore::open(edge);
  CHECK(store->settings().perplexity == 59.5);
  std::string why;
  CHECK(store->settings().IsValid(&why, store->item_count()));
}

TEST_CASE("cli flags: every command names an unknown option and a missing value the same way") {
  const std::string dir = kith::test::temp_dir("cli-flags-commands");
  const std::string items = write_items(dir, 30);
  for (const char* command :
       {"check", "fit", "new", "judge", "export", "report", "describe", "render", "demo", "open"}) {
    CAPTURE(command);
    kith::test::KithRun r = kith::test::run_kith(std::string(command) + " " + items + " --frobnicate");
    CHECK(r.code == 2);
    CHECK(r.output == "kith " + std::string(command) + ": unknown option '--frobnicate'\n(kith " + command +
                          " --help lists the options)\n");
    r = kith::test::run_kith(std::string(command) + " --help");
    CHECK(r.code == 0);
    CHECK(r.output.find("usage: kith " + std::string(command)) == 0);
  }
  for (const std::string& args :
       {"fit " + items + " -o " + dir + "/l.csv --perplexity", "new " + items + " -o", "report " + items + " --rows"}) {
    CAPTURE(args);
    const kith::test::KithRun r = kith::test::run_kith(args);
    CHECK(r.code == 2);
    CHECK(r.output.find("needs a value") != std::string::npos);
  }
  CHECK(kith::test::folder_listing(dir) == std::vector<std::string>{"swatches.csv"});
}
