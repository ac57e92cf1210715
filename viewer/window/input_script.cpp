#include "viewer/window/input_script.h"

#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>

#include <algorithm>
#include <fstream>
#include <map>
#include <sstream>
#include <stdexcept>

namespace kith {

int key_from_name(const std::string& raw) {
  std::string name = raw;
  std::transform(name.begin(), name.end(), name.begin(), ::toupper);
  if (name.size() == 1 && name[0] >= 'A' && name[0] <= 'Z') return GLFW_KEY_A + (name[0] - 'A');
  if (name.size() == 1 && name[0] >= '0' && name[0] <= '9') return GLFW_KEY_0 + (name[0] - '0');
  if (name.size() >= 2 && name[0] == 'F') {
    try {
      const int n = std::stoi(name.substr(1));
      if (n >= 1 && n <= 12) return GLFW_KEY_F1 + n - 1;
    } catch (const std::exception&) {
    }
  }
  static const std::map<std::string, int> named = {
      {"SPACE", GLFW_KEY_SPACE},       {"ESCAPE", GLFW_KEY_ESCAPE}, {"ENTER", GLFW_KEY_ENTER},
      {"TAB", GLFW_KEY_TAB},           {"LEFT", GLFW_KEY_LEFT},     {"RIGHT", GLFW_KEY_RIGHT},
      {"UP", GLFW_KEY_UP},             {"DOWN", GLFW_KEY_DOWN},     {"PAGE_UP", GLFW_KEY_PAGE_UP},
      {"PAGE_DOWN", GLFW_KEY_PAGE_DOWN}, {"MINUS", GLFW_KEY_MINUS}, {"EQUAL", GLFW_KEY_EQUAL},
      {"SLASH", GLFW_KEY_SLASH},       {"DELETE", GLFW_KEY_DELETE}, {"LEFT_BRACKET", GLFW_KEY_LEFT_BRACKET},
      {"RIGHT_BRACKET", GLFW_KEY_RIGHT_BRACKET}, {"BACKSPACE", GLFW_KEY_BACKSPACE}};
  auto it = named.find(name);
  return it == named.end() ? -1 : it->second;
}

std::vector<InputEvent> parse_input_script(const std::string& text, const std::string& file) {
  std::vector<InputEvent> out;
  std::istringstream in(text);
  std::string line;
  int line_no = 0;
  auto fail = [&](const std::string& what) {
    throw std::runtime_error(file + ":" + std::to_string(line_no) + ": " + what);
  };
  while (std::getline(in, line)) {
    ++line_no;
    if (auto hash = line.find('#'); hash != std::string::npos) line.resize(hash);
    std::istringstream ls(line);
    std::string frame_text, verb;
    if (!(ls >> frame_text)) continue;
    InputEvent e;
    try {
      size_t used = 0;
      e.frame = std::stoi(frame_text, &used);
      if (used != frame_text.size() || e.frame < 0) throw std::invalid_argument(frame_text);
    } catch (const std::exception&) {
      fail("expected a frame number >= 0 first, found '" + frame_text + "'");
    }
    if (!(ls >> verb)) fail("expected an event after the frame number");
    auto button = [&](const std::string& b) {
      if (b == "left" || b.empty()) return 0;
      if (b == "right") return 1;
      if (b == "middle") return 2;
      fail("expected left, right or middle, found '" + b + "'");
      return 0;
    };
    // "ctrl+shift+X" -> "X", the modifiers' bits added to *mods.
    auto modifiers = [&](std::string name, int* mods) {
      for (;;) {
        const auto plus = name.find('+');
        if (plus == std::string::npos || plus + 1 >= name.size()) break;
        std::string mod = name.substr(0, plus);
        std::transform(mod.begin(), mod.end(), mod.begin(), ::tolower);
        if (mod == "shift") *mods |= GLFW_MOD_SHIFT;
        else if (mod == "ctrl") *mods |= GLFW_MOD_CONTROL;
        else if (mod == "alt") *mods |= GLFW_MOD_ALT;
        else fail("unknown modifier '" + mod + "' (shift, ctrl, alt)");
        name = name.substr(plus + 1);
      }
      return name;
    };
    std::string a, b;
    if (verb == "move") {
      if (!(ls >> a)) fail("move needs X Y, @ID or +DX +DY");
      if (a[0] == '@') {
        e.kind = InputEvent::kMoveToItem;
        e.text = a.substr(1);
      } else {
        if (!(ls >> b)) fail("move needs two numbers");
        try {
          e.pos = glm::vec2(std::stof(a), std::stof(b));
        } catch (const std::exception&) {
          fail("move: '" + a + " " + b + "' are not numbers");
        }
        e.kind = (a[0] == '+' || (a[0] == '-' && a.size() > 1)) ? InputEvent::kMoveBy : InputEvent::kMove;
        if (e.kind == InputEvent::kMove && (b[0] == '+' || b[0] == '-')) e.kind = InputEvent::kMoveBy;
      }
    } else if (verb == "press" || verb == "release") {
      ls >> a;
      e.kind = verb == "press" ? InputEvent::kPress : InputEvent::kRelease;
      e.button = button(modifiers(a, &e.mods));
    } else if (verb == "key") {
      if (!(ls >> a)) fail("key needs a key name");
      const std::string name = modifiers(a, &e.mods);
      e.kind = InputEvent::kKey;
      e.key = key_from_name(name);
      if (e.key < 0) fail("unknown key '" + name + "'");
    } else if (verb == "scroll") {
      e.kind = InputEvent::kScroll;
      if (!(ls >> e.amount)) fail("scroll needs a number of steps");
    } else if (verb == "shot" || verb == "dump") {
      e.kind = verb == "shot" ? InputEvent::kShot : InputEvent::kDump;
      if (!(ls >> e.text)) fail(verb + " needs a file name");
    } else if (verb == "wait-settle") {
      e.kind = InputEvent::kWaitIterations;
      if (!(ls >> e.amount) || e.amount < 0) fail("wait-settle needs a number of iterations");
    } else if (verb == "set") {
      e.kind = InputEvent::kSet;
      if (!(ls >> e.text >> a)) fail("set needs a setting and a value (a number, min or max)");
      if (a == "min" || a == "max") {
        e.extreme = a == "min" ? -1 : 1;
      } else {
        try {
          size_t used = 0;
          e.amount = std::stof(a, &used);
          if (used != a.size()) throw std::invalid_argument(a);
        } catch (const std::exception&) {
          fail("set: '" + a + "' is not a number, min or max");
        }
      }
    } else if (verb == "quit") {
      e.kind = InputEvent::kQuit;
    } else {
      fail("unknown event '" + verb + "' (move, press, release, key, scroll, set, shot, dump, wait-settle, quit)");
    }
    out.push_back(e);
  }
  std::stable_sort(out.begin(), out.end(), [](const InputEvent& x, const InputEvent& y) { return x.frame < y.frame; });
  return out;
}

std::vector<InputEvent> load_input_script(const std::string& path) {
  std::ifstream in(path);
  if (!in) throw std::runtime_error(path + ": cannot read the input script");
  std::stringstream ss;
  ss << in.rdbuf();
  return parse_input_script(ss.str(), path);
}

}  // namespace kith
