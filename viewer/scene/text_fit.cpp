#include "viewer/scene/text_fit.h"

#include <vector>

namespace kith {

std::string fit_text(const std::string& text, float width, const std::function<float(const std::string&)>& measure) {
  if (measure(text) <= width) return text;
  if (measure(kEllipsis) > width) return "";
  // Where each code point starts (continuation bytes are 10xxxxxx).
  std::vector<size_t> starts;
  for (size_t k = 0; k < text.size(); ++k)
    if ((static_cast<unsigned char>(text[k]) & 0xC0) != 0x80) starts.push_back(k);
  auto shortened = [&](size_t n) {  // the first n code points and the ellipsis
    std::string head = text.substr(0, n < starts.size() ? starts[n] : text.size());
    while (!head.empty() && head.back() == ' ') head.pop_back();
    return head + kEllipsis;
  };
  // The widest that fits: measure grows with n, so search for the last n that fits.
  size_t lo = 0, hi = starts.size();  // shortened(lo) fits; shortened(hi) is the whole text, which does not
  while (hi - lo > 1) {
    const size_t mid = (lo + hi) / 2;
    if (measure(shortened(mid)) <= width)
      lo = mid;
    else
      hi = mid;
  }
  return shortened(lo);
}

}  // namespace kith
