#define DOCTEST_CONFIG_IMPLEMENT
#include <doctest/doctest.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <string>

// The tests (and every kith they start) keep their settings and recent-session lists in a folder
// of their own, never in the user's ~/.config or ~/.local/share.
int main(int argc, char** argv) {
  const std::string home = (std::filesystem::temp_directory_path() / ("kith-test-home-" + std::to_string(::getpid()))).string();
  std::filesystem::create_directories(home + "/config");
  std::filesystem::create_directories(home + "/data");
  ::setenv("XDG_CONFIG_HOME", (home + "/config").c_str(), 1);
  ::setenv("XDG_DATA_HOME", (home + "/data").c_str(), 1);
  doctest::Context context(argc, argv);
  const int code = context.run();
  std::error_code ec;
  std::filesystem::remove_all(home, ec);
  return code;
}
