// The malformed-input corpus (tests/data/bad/EXPECTED): each file must fail with exactly the
// listed message, both through load_collection and through the built `kith check` (exit 3);
// every good file must pass `kith check` with exit 0.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <sys/wait.h>

#include "solver/io/collection.h"
#include "tests/approx.h"

namespace {

namespace fs = std::filesystem;
const std::string kBad = std::string(KITH_TEST_DATA) + "/bad";
const std::string kGood = std::string(KITH_TEST_DATA) + "/good";

struct Case {
  std::string file, args, message;
};

std::vector<Case> read_expected() {
  std::ifstream in(kBad + "/EXPECTED");
  REQUIRE(in.good());
  std::vector<Case> cases;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    const size_t a = line.find('\t'), b = line.find('\t', a + 1);
    REQUIRE_MESSAGE(b != std::string::npos, "EXPECTED line without two tabs: " << line);
    cases.push_back({line.substr(0, a), line.substr(a + 1, b - a - 1), line.substr(b + 1)});
    if (cases.back().args == "-") cases.back().args.clear();
  }
  return cases;
}

kith::LoadOptions options_from(const std::string& args) {
  kith::LoadOptions o;
  std::istringstream in(args);
  std::string key, value;
  while (in >> key >> value) {
    if (key == "--id") o.id_column = value;
    else if (key == "--tags") o.tags_csv = kBad + "/" + value;
    else if (key == "--pictures") o.picture_column = value;
    else if (key == "--exclude") {
      std::istringstream parts(value);
      std::string part;
      while (std::getline(parts, part, ',')) o.exclude.push_back(part);
    } else FAIL("unknown option in EXPECTED: " << key);
  }
  return o;
}

struct Run {
  int exit_code = -1;
  std::string out, err;
};

// Runs `kith ARGS` in FOLDER, capturing stdout and stderr through files.
Run run_kith(const std::string& folder, const std::string& args) {
  const std::string tmp = kith::test::temp_dir("corpus-run");
  const std::string command = "cd '" + folder + "' && '" + std::string(KITH_BINARY) + "' " + args + " >'" + tmp +
                              "/out' 2>'" + tmp + "/err'";
  const int status = std::system(command.c_str());
  Run r;
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  auto slurp = [](const std::string& path) {
    std::ifstream f(path);
    return std::string(std::istreambuf_iterator<char>(f), {});
  };
  r.out = slurp(tmp + "/out");
  r.err = slurp(tmp + "/err");
  return r;
}

}  // namespace

TEST_CASE("every malformed file fails the loader with its exact message") {
  const auto cases = read_expected();
  CHECK(cases.size() >= 30);
  for (const Case& c : cases) {
    CAPTURE(c.file);
    std::string got = "(no error)";
    try {
      kith::load_collection(kBad + "/" + c.file, options_from(c.args));
    } catch (const kith::LoadError& e) {
      got = e.problem().str();
      for (size_t at; (at = got.find(kBad + "/")) != std::string::npos;) got.erase(at, kBad.size() + 1);
    }
    CHECK(got == c.message);
  }
}

TEST_CASE("every file in the corpus folder has an expected message") {
  std::set<std::string> listed;
  for (const Case& c : read_expected()) listed.insert(c.file);
  for (const auto& entry : fs::directory_iterator(kBad)) {
    const std::string name = entry.path().filename().string();
    if (name == "EXPECTED") continue;
    CHECK_MESSAGE(listed.count(name) == 1, name << " is not listed in tests/data/bad/EXPECTED");
  }
}

TEST_CASE("kith check exits 3 with file:line:column and the cause on each malformed file") {
  for (const Case& c : read_expected()) {
    CAPTURE(c.file);
    const Run r = run_kith(kBad, "check " + c.file + " " + c.args);
    CHECK(r.exit_code == 3);
    CHECK(r.err == c.message + "\n");
    CHECK(r.out.empty());
  }
}

TEST_CASE("kith check exits 0 on good files and reports what it found") {
  for (const char* file : {"quoting.csv", "crlf_bom.csv", "tabs.tsv", "no_id.csv", "constant_column.csv",
                           "pictures.csv", "small_v1.npy", "small_v2_f4.npy", "small_v3_1d.npy"}) {
    CAPTURE(file);
    const Run r = run_kith(kGood, std::string("check ") + file);
    CHECK(r.exit_code == 0);
    CHECK(r.err.empty());
    CHECK(r.out.find("ok: 3 items") != std::string::npos);
  }
  const Run tagged = run_kith(kGood, "check small_v1.npy --tags small_tags.csv");
  CHECK(tagged.exit_code == 0);
  CHECK(tagged.out.find("id column:       id") != std::string::npos);
  CHECK(tagged.out.find("tag columns:     1 (family: 2 values)") != std::string::npos);
  const Run pictures = run_kith(kGood, "check pictures.csv");
  CHECK(pictures.out.find("picture column:  picture") != std::string::npos);
  CHECK(pictures.out.find("warnings:        1") != std::string::npos);
}

TEST_CASE("kith check: usage errors exit 2, --help exits 0") {
  CHECK(run_kith(kGood, "check").exit_code == 2);
  CHECK(run_kith(kGood, "check quoting.csv --bogus").exit_code == 2);
  CHECK(run_kith(kGood, "check quoting.csv --id").exit_code == 2);
  CHECK(run_kith(kGood, "check a.csv b.csv").exit_code == 2);
  CHECK(run_kith(kGood, "check quoting.csv --tags small_tags.csv").exit_code == 2);
  const Run help = run_kith(kGood, "check --help");
  CHECK(help.exit_code == 0);
  CHECK(help.out.find("usage: kith check ITEMS") != std::string::npos);
  const Run missing = run_kith(kGood, "check nowhere.csv");
  CHECK(missing.exit_code == 3);
  CHECK(missing.err == "nowhere.csv: cannot open: No such file or directory\n");
}
