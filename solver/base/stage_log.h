// StageLog: the wall-clock time and the peak memory of each stage of a long job (reading the
// items, finding neighbours, affinities, the start, the optimization, the measures), so a run at
// a million items says where its time and memory went.
//
// Peak memory is the process's resident high-water mark (Linux: VmHWM in /proc/self/status).
// At the start of each stage the mark is reset to the current resident size (writing "5" to
// /proc/self/clear_refs, Linux 4.0 and later), so each stage's figure is its own peak; where the
// reset is refused the figure is the peak so far and `peaks_are_cumulative()` says so.
// Not thread-safe: one StageLog belongs to the thread running the job.
#pragma once
#include <chrono>
#include <string>
#include <vector>

namespace kith {

struct Stage {
  std::string name;
  double seconds = 0.0;      // wall clock
  double cpu_seconds = 0.0;  // user + system time of the whole process (every thread) during the stage
  double peak_bytes = -1.0;  // resident high-water mark during the stage; -1 if unknown
};

class StageLog {
 public:
  // Ends the running stage, if any, and starts NAME.
  void begin(const std::string& name);
  // Ends the running stage (no-op if none).
  void end();
  const std::vector<Stage>& stages() const { return stages_; }
  bool peaks_are_cumulative() const { return cumulative_; }
  // One line a stage: "  neighbours (HNSW)   412.3 s   cpu 410.1 s   peak 1.90 GB".
  std::string Report() const;

 private:
  std::vector<Stage> stages_;
  std::chrono::steady_clock::time_point t0_;
  double cpu0_ = 0.0;
  bool running_ = false;
  bool cumulative_ = false;
};

// The resident high-water mark of this process in bytes (-1 if unknown), and the current
// resident size.
double peak_resident_bytes();
double resident_bytes();
// User + system processor seconds of this process so far, every thread.
double process_cpu_seconds();

}  // namespace kith
