// The one writer of CSV fields and JSON strings for every file kith writes (layouts, judgments,
// collections, reports). Pure functions; any thread.
#pragma once
#include <string>

namespace kith {

// RFC 4180: quoted when the text holds a comma, quote, CR or LF, or starts or ends with a space
// (kith's readers trim unquoted fields, so a quoted field keeps its spaces through a round trip).
std::string csv_field(const std::string& text);

// A JSON string literal: quotes, backslashes and control characters escaped.
std::string json_string(const std::string& text);

}  // namespace kith
