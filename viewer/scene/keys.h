// Key codes and modifier bits as the window reports them, for the logic that has no window
// system of its own (the asking desk, the window's key table). The values are GLFW 3.3's: letters
// and digits are their ASCII codes; viewer/window/input.cpp checks every constant against
// <GLFW/glfw3.h> at compile time. Constants only; any thread.
#pragma once

namespace kith::keys {

constexpr int k0 = 48, k9 = 57;          // '0'..'9'
constexpr int kA = 65, kZ = 90;          // 'A'..'Z'
constexpr int letter(char c) { return c >= 'a' && c <= 'z' ? c - 'a' + kA : c; }
constexpr int kSpace = 32, kSlash = 47, kMinus = 45, kEqual = 61, kComma = 44, kPeriod = 46;
constexpr int kLeftBracket = 91, kRightBracket = 93;
constexpr int kEscape = 256, kEnter = 257, kTab = 258, kBackspace = 259, kDelete = 261;
constexpr int kRight = 262, kLeft = 263, kDown = 264, kUp = 265, kPageUp = 266, kPageDown = 267;
constexpr int kHome = 268, kEnd = 269;
constexpr int kF1 = 290, kF12 = 301;
constexpr int kKp0 = 320, kKp9 = 329, kKpSubtract = 333, kKpAdd = 334, kKpEnter = 335;

constexpr int kShift = 0x1, kControl = 0x2, kAlt = 0x4, kSuper = 0x8;

}  // namespace kith::keys
