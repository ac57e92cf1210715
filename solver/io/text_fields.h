// The one writer of CSV fields and JSON strings for every file kith writes (layouts, judgments,
// collections, reports). Pure functions; any thread.
#pragma once
#include <string>
#include <string_view>

namespace kith {

// RFC 4180: quoted when the text holds a comma, quote, CR or LF, or starts or ends with a space
// (kith's readers trim unquoted fields, so a quoted field keeps its spaces through a round trip).
//
// Spreadsheet safety: a spreadsheet runs a field that starts with = + - @ (or a tab or CR before
// one) as a formula. Unless `raw`, such a field that is not a plain number gets a leading
// apostrophe ('=SUM(A1) is shown as text), and so does a field that already starts with an
// apostrophe before one of those, so that unneutralized() gives back exactly what was written.
// Numbers (-3.5, +2e-3) stay numbers.
std::string csv_field(const std::string& text, bool raw = false);

// What kith's readers do with such a field: one leading apostrophe before = + - @ tab CR (or
// before another apostrophe so placed) is removed.
std::string unneutralized(const std::string& field);
bool is_neutralized(std::string_view field);  // unneutralized() would remove an apostrophe

// A JSON string literal: quotes, backslashes and control characters escaped.
std::string json_string(const std::string& text);

}  // namespace kith
