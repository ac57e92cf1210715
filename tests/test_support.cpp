// Definitions for tests/approx.h helpers (kept out of the header so each test file compiles fast).
#include <cstdlib>
#include <filesystem>
#include <memory>
#include <unistd.h>

#include "tests/approx.h"

namespace kith::test {

kith::Points central_differences(kith::ObjectiveTerm& term, const kith::Points& y, double h) {
  kith::Points g(y.rows(), y.cols());
  kith::Points z = y;
  for (Eigen::Index i = 0; i < y.rows(); ++i)
    for (Eigen::Index c = 0; c < y.cols(); ++c) {
      z(i, c) = y(i, c) + h;
      const double up = term.evaluate(z, nullptr);
      z(i, c) = y(i, c) - h;
      const double down = term.evaluate(z, nullptr);
      z(i, c) = y(i, c);
      g(i, c) = (up - down) / (2 * h);
    }
  return g;
}

bool reference_python_available() {
  static const bool ok =
      std::system("/usr/bin/python3 -c 'import numpy, sklearn, skimage' >/dev/null 2>&1") == 0;
  return ok;
}

std::string run_reference(const std::string& script, const std::string& args) {
  const std::string command = "/usr/bin/python3 " + std::string(KITH_TESTS_DIR) + "/reference/" + script + " " + args;
  std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(command.c_str(), "r"), pclose);
  REQUIRE_MESSAGE(pipe != nullptr, "could not run " << command);
  std::string out;
  char buf[65536];
  size_t got;
  while ((got = fread(buf, 1, sizeof buf, pipe.get())) > 0) out.append(buf, got);
  const int status = pclose(pipe.release());
  REQUIRE_MESSAGE(status == 0, command << " exited with status " << status);
  return out;
}

std::string temp_dir(const std::string& name) {
  namespace fs = std::filesystem;
  const fs::path dir = fs::temp_directory_path() / ("kith-test-" + std::to_string(::getpid()) + "-" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir.string();
}

}  // namespace kith::test
