// StageLog (see stage_log.h).
#include "solver/base/stage_log.h"

#include <fcntl.h>
#include <sys/resource.h>
#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <fstream>

namespace kith {
namespace {

// A "Name:   1234 kB" line of /proc/self/status, in bytes; -1 if absent.
double status_bytes(const char* key) {
  std::ifstream in("/proc/self/status");
  std::string line;
  const std::string prefix = std::string(key) + ":";
  while (std::getline(in, line))
    if (line.compare(0, prefix.size(), prefix) == 0) return 1024.0 * std::atof(line.c_str() + prefix.size());
  return -1.0;
}

// Not a file kith writes (so not the safe writer's business): /proc/self/clear_refs is the
// kernel's control for this process's page counters, and writing "5" resets the high-water mark.
// Opened without O_CREAT, so this can never create or truncate anything on a disk.
bool reset_peak() {
  const int fd = ::open("/proc/self/clear_refs", O_WRONLY | O_CLOEXEC);
  if (fd < 0) return false;
  const bool ok = ::write(fd, "5", 1) == 1;
  return ::close(fd) == 0 && ok;
}

}  // namespace

double peak_resident_bytes() { return status_bytes("VmHWM"); }
double resident_bytes() { return status_bytes("VmRSS"); }

double process_cpu_seconds() {
  rusage u {};
  if (::getrusage(RUSAGE_SELF, &u) != 0) return 0.0;
  auto secs = [](const timeval& t) { return double(t.tv_sec) + 1e-6 * double(t.tv_usec); };
  return secs(u.ru_utime) + secs(u.ru_stime);
}

void StageLog::begin(const std::string& name) {
  end();
  if (!reset_peak()) cumulative_ = true;
  Stage s;
  s.name = name;
  stages_.push_back(s);
  t0_ = std::chrono::steady_clock::now();
  cpu0_ = process_cpu_seconds();
  running_ = true;
}

void StageLog::end() {
  if (!running_) return;
  Stage& s = stages_.back();
  s.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0_).count();
  s.cpu_seconds = process_cpu_seconds() - cpu0_;
  s.peak_bytes = peak_resident_bytes();
  running_ = false;
}

std::string StageLog::Report() const {
  size_t width = 0;
  for (const Stage& s : stages_) width = std::max(width, s.name.size());
  std::string out;
  for (const Stage& s : stages_) {
    char buf[160];
    if (s.peak_bytes >= 0)
      std::snprintf(buf, sizeof buf, "  %-*s %9.1f s   cpu %9.1f s   peak %.2f GB\n", int(width), s.name.c_str(),
                    s.seconds, s.cpu_seconds, s.peak_bytes / 1e9);
    else
      std::snprintf(buf, sizeof buf, "  %-*s %9.1f s   cpu %9.1f s\n", int(width), s.name.c_str(), s.seconds,
                    s.cpu_seconds);
    out += buf;
  }
  if (cumulative_ && !stages_.empty()) out += "  (peaks are the process's peak so far: this system would not reset it)\n";
  return out;
}

}  // namespace kith
