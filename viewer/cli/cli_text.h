// Small text helpers shared by the subcommands' option parsing. Pure functions; any thread.
#pragma once
#include <string>
#include <vector>

namespace kith {

// "a,b,,c" -> {"a", "b", "c"}: the comma-separated parts of an option value, empty parts dropped.
std::vector<std::string> split_commas(const std::string& text);

}  // namespace kith
