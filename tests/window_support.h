// Helpers shared by the tests that run the real window under Xvfb (tests/test_*_window.cpp and
// others): the xvfb-run prefix, whether it is installed, and running a shell command.
#pragma once
#include <stb_image.h>
#include <sys/wait.h>

#include <cstdlib>
#include <fstream>
#include <string>
#include <vector>

namespace kith::test {

// A 1280x800 virtual screen, as the README's window instructions use.
constexpr const char* kXvfb = "xvfb-run -a -s '-screen 0 1280x800x24' ";

// A PNG read back as 8-bit RGB, row by row from the top.
struct Image {
  int w = 0, h = 0;
  std::vector<unsigned char> rgb;
  const unsigned char* at(int x, int y) const { return &rgb[(size_t(y) * w + x) * 3]; }
};

inline Image load_png(const std::string& path) {
  Image im;
  int channels = 0;
  unsigned char* data = stbi_load(path.c_str(), &im.w, &im.h, &channels, 3);
  REQUIRE_MESSAGE(data != nullptr, "cannot read " << path);
  im.rgb.assign(data, data + size_t(im.w) * im.h * 3);
  stbi_image_free(data);
  return im;
}

inline bool have_xvfb() { return std::system("command -v xvfb-run >/dev/null 2>&1") == 0; }

// At the top of a window test: without xvfb-run, say so and skip the rest of the test.
#define KITH_SKIP_WITHOUT_XVFB()                               \
  do {                                                         \
    if (!kith::test::have_xvfb()) {                            \
      MESSAGE("xvfb-run not installed: window test skipped");  \
      return;                                                  \
    }                                                          \
  } while (0)

// Runs `kith open ARGS --script DIR/NAME.txt` under Xvfb with SCRIPT written to that file, its
// output in DIR/NAME.log; the exit code.
inline int open_with_script(const std::string& args, const std::string& dir, const std::string& name,
                            const std::string& script);

// Runs COMMAND through the shell; its exit code, -1 if it did not exit normally.
inline int run_command(const std::string& command) {
  const int status = std::system(command.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

inline int open_with_script(const std::string& args, const std::string& dir, const std::string& name,
                            const std::string& script) {
  std::ofstream(dir + "/" + name + ".txt") << script;
  return run_command(std::string(kXvfb) + KITH_BINARY + " open " + args + " --script " + dir + "/" + name + ".txt > " +
                     dir + "/" + name + ".log 2>&1");
}

}  // namespace kith::test
