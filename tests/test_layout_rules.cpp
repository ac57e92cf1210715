// The layers' include rules (scripts/check_includes.cmake, DEVELOPERS.md "Layout") hold on the
// source tree, and the check catches what it is meant to catch: a planted forbidden include, a
// GUI header in the solver, SQLite outside solver/session, a source file outside a layer folder.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "tests/approx.h"
#include "tests/sessions_support.h"

namespace fs = std::filesystem;

namespace {

// Runs the check on `root` as `cmake -P` would at configure time.
kith::test::KithRun check_tree(const std::string& root) {
  return kith::test::run_shell("cmake -DKITH_ROOT='" + root + "' -P '" + std::string(KITH_SOURCE_DIR) +
                               "/scripts/check_includes.cmake'");
}

void write(const fs::path& path, const std::string& text) {
  fs::create_directories(path.parent_path());
  std::ofstream(path) << text;
}

// A small tree that follows the rules: a base header, an io header that includes it, a scene
// header that sees the engine's commands only.
std::string clean_tree(const std::string& name) {
  const std::string root = kith::test::temp_dir(name);
  write(fs::path(root) / "solver/base/points.h", "#pragma once\n#include <vector>\n");
  write(fs::path(root) / "solver/io/collection.h", "#pragma once\n#include \"solver/base/points.h\"\n");
  write(fs::path(root) / "solver/live/commands.h", "#pragma once\n#include \"solver/io/collection.h\"\n");
  write(fs::path(root) / "solver/live/engine.h", "#pragma once\n#include \"solver/live/commands.h\"\n");
  write(fs::path(root) / "viewer/scene/map_view.h", "#pragma once\n#include \"solver/live/commands.h\"\n");
  return root;
}

}  // namespace

TEST_CASE("layout: the source tree keeps the include rules") {
  const kith::test::KithRun r = check_tree(KITH_SOURCE_DIR);
  INFO(r.output);
  CHECK(r.code == 0);
  CHECK(r.output.find("include rules hold") != std::string::npos);
}

TEST_CASE("layout: the include check passes a clean tree and catches each kind of forbidden include") {
  {
    const std::string root = clean_tree("layout-clean");
    const kith::test::KithRun r = check_tree(root);
    INFO(r.output);
    CHECK(r.code == 0);
  }
  struct Case {
    const char* file;
    const char* text;
    const char* expected;  // a piece of the message
  } cases[] = {
      // a lower layer including a higher one
      {"solver/base/judgment.h", "#include \"solver/io/collection.h\"\n",
       "solver/base/judgment.h:1: solver/base may not include \"solver/io/collection.h\""},
      // the scene reaching past commands and snapshots into the engine
      {"viewer/scene/camera.h", "// camera\n#include \"solver/live/engine.h\"\n",
       "viewer/scene/camera.h:2: viewer/scene may not include \"solver/live/engine.h\""},
      // a GUI header in the solver
      {"solver/io/npy_file.cpp", "#include <imgui.h>\n", "solver/io may not use <imgui.h>"},
      // SQLite outside solver/session
      {"solver/live/engine.cpp", "#include <sqlite3.h>\n", "solver/live may not use <sqlite3.h>"},
      // a file outside a layer folder
      {"solver/loose.h", "#pragma once\n", "solver/loose.h:1: a source file belongs in a layer folder"},
      // an include of a file that does not exist (e.g. an old flat path)
      {"solver/io/csv_table.h", "#include \"solver/old/points.h\"\n", "includes \"solver/old/points.h\", which does not exist"},
  };
  int n = 0;
  for (const Case& c : cases) {
    const std::string root = clean_tree("layout-bad-" + std::to_string(n++));
    write(fs::path(root) / c.file, c.text);
    const kith::test::KithRun r = check_tree(root);
    INFO(c.file, ": ", r.output);
    CHECK(r.code != 0);
    CHECK(r.output.find(c.expected) != std::string::npos);
  }
}
