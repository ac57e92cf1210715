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
// Invalid UTF-8 never makes a JSON output fail: each byte that is not part of a well-formed UTF-8
// sequence (RFC 3629: no overlong forms, no surrogates, nothing above U+10FFFF) is written as
// U+FFFD, the replacement character, so a Latin-1 id "caf\xE9" becomes "caf\uFFFD" (as the
// UTF-8 bytes EF BF BD). kith's other JSON (layouts, state files, events) is written by
// nlohmann::json with error_handler_t::replace, which does the same.
std::string json_string(const std::string& text);

// The offset of the first byte of TEXT that is not well-formed UTF-8, or npos.
size_t first_invalid_utf8(std::string_view text);
// TEXT with every such byte replaced by U+FFFD.
std::string valid_utf8(std::string_view text);

}  // namespace kith
