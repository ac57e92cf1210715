// Text that must fit a width: shortened visibly, never dropped and never cut mid-character.
// fit_text returns `text` when measure(text) <= width; otherwise the longest run of its leading
// characters (whole UTF-8 code points, trailing spaces dropped) followed by an ellipsis "…"
// (U+2026) that fits; and "" only when not even the ellipsis fits.
// Pure; any thread (the caller's `measure` decides which font it measures in).
#pragma once
#include <functional>
#include <string>

namespace kith {

inline constexpr const char* kEllipsis = "\xe2\x80\xa6";

std::string fit_text(const std::string& text, float width, const std::function<float(const std::string&)>& measure);

}  // namespace kith
