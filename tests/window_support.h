// Helpers shared by the tests that run the real window under Xvfb (tests/test_*_window.cpp and
// others): the xvfb-run prefix, whether it is installed, and running a shell command.
#pragma once
#include <sys/wait.h>

#include <cstdlib>
#include <string>

namespace kith::test {

// A 1280x800 virtual screen, as the README's window instructions use.
constexpr const char* kXvfb = "xvfb-run -a -s '-screen 0 1280x800x24' ";

inline bool have_xvfb() { return std::system("command -v xvfb-run >/dev/null 2>&1") == 0; }

// Runs COMMAND through the shell; its exit code, -1 if it did not exit normally.
inline int run_command(const std::string& command) {
  const int status = std::system(command.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace kith::test
