// InputScript: a replayable list of input events that drives the real window (tests, demos,
// benchmarks). One event per line, "FRAME EVENT ARGS", '#' starts a comment:
//   10 move 400 300        pointer to pixel (400, 300) (top-left origin, window pixels)
//   10 move @s00012        pointer to where item s00012 is drawn in that frame
//   11 move +30 -10        pointer moved relative to where it is
//   12 press left          mouse button down at the pointer (left | right | middle; ctrl+left etc.)
//   20 release left
//   21 key P               a key press (letters, digits, SPACE, ESCAPE, ENTER, TAB, F1..F12,
//   21 key shift+R         LEFT, RIGHT, UP, DOWN, PAGE_UP, PAGE_DOWN, MINUS, EQUAL, SLASH),
//                          optional shift+/ctrl+/alt+ prefixes
//   25 scroll 2            wheel steps (> 0 zooms in)
//   26 set blend 4         a setting's control let go at this value (blend, perplexity, theta), or
//   26 set theta max       at the end of its range (min, max): the slider's own path (MapSettings)
//   30 shot out.png        save the frame as PNG
//   30 dump state.json     write the view's state as JSON (camera, projections, selection, log)
//   40 wait-settle 200     hold the frame counter until the map is this many iterations on (max 10 s)
//   60 quit
// Events of one frame apply in file order. Parsing reports file:line and what was expected.
#pragma once
#include <glm/glm.hpp>
#include <string>
#include <vector>

namespace kith {

struct InputEvent {
  enum Kind { kMove, kMoveToItem, kMoveBy, kPress, kRelease, kScroll, kKey, kSet, kShot, kDump, kWaitIterations, kQuit };
  int frame = 0;
  Kind kind = kMove;
  glm::vec2 pos{0.f};
  std::string text;   // item id, file path, setting name
  int button = 0;     // 0 left, 1 right, 2 middle
  int key = 0;        // GLFW key code
  int mods = 0;       // GLFW modifier bits
  float amount = 0.f;  // scroll steps, iterations, a setting's value
  int extreme = 0;     // set: -1 the control's minimum, +1 its maximum, 0 amount
};

// Throws std::runtime_error("FILE:LINE: ...") on a malformed line.
std::vector<InputEvent> parse_input_script(const std::string& text, const std::string& file_name);
std::vector<InputEvent> load_input_script(const std::string& path);

// GLFW key code for a name like "P", "F1", "SPACE"; -1 if unknown.
int key_from_name(const std::string& name);

}  // namespace kith
