// See text_fields.h.
#include "solver/io/text_fields.h"

#include <cstdio>
#include <cstdlib>

namespace kith {

namespace {

bool formula_start(char c) { return c == '=' || c == '+' || c == '-' || c == '@' || c == '\t' || c == '\r'; }

bool plain_number(const std::string& text) {
  if (text.empty()) return false;
  char* end = nullptr;
  std::strtod(text.c_str(), &end);
  return end == text.c_str() + text.size();
}

// The length of the well-formed UTF-8 sequence starting at TEXT[i], or 0 (RFC 3629, table 3-7
// of the Unicode standard).
size_t utf8_sequence(std::string_view text, size_t i) {
  const auto b = [&](size_t k) { return i + k < text.size() ? static_cast<unsigned char>(text[i + k]) : 0u; };
  const unsigned c = b(0);
  auto tail = [&](size_t k) { return (b(k) & 0xC0u) == 0x80u; };
  if (c < 0x80) return 1;
  if (c >= 0xC2 && c <= 0xDF) return tail(1) ? 2 : 0;
  if (c >= 0xE0 && c <= 0xEF) {
    const unsigned lo = c == 0xE0 ? 0xA0 : 0x80, hi = c == 0xED ? 0x9F : 0xBF;
    return b(1) >= lo && b(1) <= hi && tail(2) ? 3 : 0;
  }
  if (c >= 0xF0 && c <= 0xF4) {
    const unsigned lo = c == 0xF0 ? 0x90 : 0x80, hi = c == 0xF4 ? 0x8F : 0xBF;
    return b(1) >= lo && b(1) <= hi && tail(2) && tail(3) ? 4 : 0;
  }
  return 0;
}

}  // namespace

size_t first_invalid_utf8(std::string_view text) {
  for (size_t i = 0; i < text.size();) {
    const size_t n = utf8_sequence(text, i);
    if (n == 0) return i;
    i += n;
  }
  return std::string_view::npos;
}

std::string valid_utf8(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (size_t i = 0; i < text.size();) {
    const size_t n = utf8_sequence(text, i);
    if (n == 0) {
      out += "\xEF\xBF\xBD";  // U+FFFD
      ++i;
    } else {
      out.append(text.substr(i, n));
      i += n;
    }
  }
  return out;
}

// The text starts with apostrophes and then a formula character.
bool is_neutralized(std::string_view text) {
  size_t k = 0;
  while (k < text.size() && text[k] == '\'') ++k;
  return k > 0 && k < text.size() && formula_start(text[k]);
}

std::string unneutralized(const std::string& field) {
  return is_neutralized(field) ? field.substr(1) : field;
}

std::string csv_field(const std::string& raw_text, bool raw) {
  std::string text = raw_text;
  if (!raw && !text.empty() && ((formula_start(text[0]) && !plain_number(text)) || is_neutralized(text)))
    text.insert(text.begin(), '\'');
  const bool plain = text.find_first_of(",\"\r\n") == std::string::npos &&
                     (text.empty() || (text.front() != ' ' && text.back() != ' '));
  if (plain) return text;
  std::string out = "\"";
  for (char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + "\"";
}

std::string json_string(const std::string& raw_text) {
  const std::string text = first_invalid_utf8(raw_text) == std::string_view::npos ? raw_text : valid_utf8(raw_text);
  std::string out = "\"";
  for (unsigned char c : text) {
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\n': out += "\\n"; break;
      case '\r': out += "\\r"; break;
      case '\t': out += "\\t"; break;
      default:
        if (c < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          out += buf;
        } else {
          out += char(c);
        }
    }
  }
  return out + "\"";
}

}  // namespace kith
