// StageLog: each stage's time and peak memory (solver/base/stage_log.h).
#include <doctest/doctest.h>

#include <chrono>
#include <cstring>
#include <thread>
#include <vector>

#include "solver/base/stage_log.h"

TEST_CASE("stage log: stages in order, with their time and their own peak memory") {
  kith::StageLog log;
  log.begin("big");
  {
    // 300 MB touched page by page, then freed before the next stage begins.
    std::vector<char> block(300u << 20);
    std::memset(block.data(), 1, block.size());
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  log.begin("small");
  std::this_thread::sleep_for(std::chrono::milliseconds(5));
  log.begin("busy");
  volatile double sum = 0;  // about 50 ms of arithmetic on this thread
  for (const auto t0 = std::chrono::steady_clock::now();
       std::chrono::steady_clock::now() - t0 < std::chrono::milliseconds(50);)
    for (int i = 0; i < 1000; ++i) sum = sum + 1e-9 * i;
  log.end();
  log.end();  // a second end is a no-op
  REQUIRE(log.stages().size() == 3);
  CHECK(log.stages()[0].name == "big");
  CHECK(log.stages()[0].seconds >= 0.015);
  CHECK(log.stages()[1].seconds >= 0.004);
  // Sleeping takes no processor time; the busy loop takes some (how much depends on how busy the
  // machine is, so only that it shows, and never more than the wall clock on one thread allows).
  CHECK(log.stages()[1].cpu_seconds < 0.004);
  CHECK(log.stages()[2].cpu_seconds > 0.005);
  CHECK(log.stages()[2].cpu_seconds <= log.stages()[2].seconds + 0.01);
  CHECK(log.Report().find("cpu") != std::string::npos);
  const double big = log.stages()[0].peak_bytes, small = log.stages()[1].peak_bytes;
  REQUIRE(big > 0);
  CHECK(big >= 300e6 * 1.048);  // at least the block (MiB) on top of the process itself
  if (log.peaks_are_cumulative()) {
    MESSAGE("this system refuses to reset the resident peak; each stage shows the peak so far");
    CHECK(small >= big);
  } else {
    CHECK(small < big - 200e6);  // the block was gone before 'small' began
  }
  CHECK(log.Report().find("big") != std::string::npos);
  CHECK(log.Report().find(" GB") != std::string::npos);
}
