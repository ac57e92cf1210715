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

}  // namespace

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

std::string json_string(const std::string& text) {
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
