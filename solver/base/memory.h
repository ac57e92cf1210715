// How much memory kith lets one input take: half of the machine's physical memory, so a file or
// a picture that would not fit is refused with an estimate instead of being read until the
// machine swaps or the allocator fails.
#pragma once
#include <unistd.h>

#include <cstdio>
#include <string>

namespace kith {

// Half of the physical memory in bytes (8 GB when the system will not say).
inline double memory_budget_bytes() {
  const double pages = double(::sysconf(_SC_PHYS_PAGES)), page = double(::sysconf(_SC_PAGESIZE));
  return pages > 0 && page > 0 ? 0.5 * pages * page : 8e9;
}

// "3.2 GB"
inline std::string gigabytes(double bytes) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f GB", bytes / 1e9);
  return buf;
}

// "" when NEEDED bytes fit the budget, else "WHAT needs about 3.2 GB, more than half of this
// machine's 8.0 GB of memory".
inline std::string memory_problem(const std::string& what, double needed) {
  const double budget = memory_budget_bytes();
  if (needed <= budget) return "";
  return what + " needs about " + gigabytes(needed) + ", more than half of this machine's " + gigabytes(2 * budget) +
         " of memory";
}

}  // namespace kith
