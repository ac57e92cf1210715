// The kith command line: one function per subcommand, each in its own file (cmd_NAME.cpp).
// Each takes the arguments after the subcommand name and returns the process exit code:
//   0 success, 1 internal error, 2 bad usage, 3 bad input data.
#pragma once
#include <string>
#include <vector>

#include "viewer/scene/exit_code.h"

namespace kith {


using Args = std::vector<std::string>;

int cmd_check(const Args& args);     // load a collection and report what was found
int cmd_fit(const Args& args);       // headless fit, writes a layout
int cmd_open(const Args& args);      // the window
int cmd_render(const Args& args);    // a PNG of the map with no display (EGL surfaceless)
int cmd_demo(const Args& args);      // the demo collection: window, or PNG with no display
int cmd_new(const Args& args);       // create a session file
int cmd_judge(const Args& args);     // add or import judgments into a session
int cmd_export(const Args& args);    // layouts, judgments, pictures from a session
int cmd_report(const Args& args);    // self-contained HTML report
int cmd_describe(const Args& args);  // picture descriptors -> features CSV

}  // namespace kith
