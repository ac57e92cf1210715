// Helpers shared by the session tests (tests/test_sessions_*.cpp and others): an invented
// collection, byte-level file comparisons, and running the built kith binary.
#pragma once
#include <sys/wait.h>

#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "solver/io/collection.h"

namespace kith::test {

// An invented collection: N swatches of a textile sample box, F features, two tag columns,
// optional pictures (paths under `picture_dir`, not created here).
inline Collection swatch_collection(size_t n, int f, uint32_t seed, const std::string& picture_dir = "") {
  Collection c;
  c.source = "swatches.csv";
  std::mt19937 rng(seed);
  std::normal_distribution<double> g(0.0, 1.0);
  c.features.resize(Eigen::Index(n), f);
  for (int j = 0; j < f; ++j) c.feature_names.push_back("f" + std::to_string(j));
  static const char* kWeaves[] = {"twill", "satin", "plain", "basket"};
  TagColumn weave{"weave", {}}, mill{"mill", {}};
  for (size_t i = 0; i < n; ++i) {
    c.ids.push_back("swatch-" + std::to_string(i));
    for (int j = 0; j < f; ++j) c.features(Eigen::Index(i), j) = g(rng) * 1e3 + 1.0 / 3.0;
    weave.values.push_back(kWeaves[i % 4]);
    mill.values.push_back(i % 7 == 0 ? "" : "mill \"" + std::to_string(i % 3) + "\", north");
  }
  c.tags = {weave, mill};
  if (!picture_dir.empty()) {
    c.picture_column = "photo";
    for (size_t i = 0; i < n; ++i) c.pictures.push_back(picture_dir + "/swatch-" + std::to_string(i) + ".png");
  }
  return c;
}

inline std::string file_bytes(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return std::string(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
}

inline void write_bytes(const std::string& path, const std::string& bytes) {
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out.write(bytes.data(), std::streamsize(bytes.size()));
}

// An invented collection file: N fabric swatches of a sample box, DIR/swatches.csv (id, weave,
// three numeric features).
inline std::string write_swatches_csv(const std::string& dir, size_t n) {
  std::ostringstream s;
  s << "id,weave,warmth,gloss,weight\n";
  for (size_t i = 0; i < n; ++i)
    s << "sw" << i << ","
      << (i % 3 == 0   ? "twill"
          : i % 3 == 1 ? "satin"
                       : "plain")
      << "," << double(i % 3) + 0.01 * i << "," << double((i * 7) % 5) << "," << 2.0 * double(i % 3) - 0.02 * i << "\n";
  const std::string path = dir + "/swatches.csv";
  write_bytes(path, s.str());
  return path;
}

// Names of the files in a folder (to see that nothing appeared, e.g. -wal or -shm).
inline std::vector<std::string> folder_listing(const std::string& dir) {
  std::vector<std::string> names;
  for (const auto& e : std::filesystem::directory_iterator(dir)) names.push_back(e.path().filename().string());
  std::sort(names.begin(), names.end());
  return names;
}

// Runs COMMAND through the shell; its stdout and stderr together.
struct KithRun {
  int code = -1;       // exit code, -1 if it did not exit normally
  std::string output;
};
inline KithRun run_shell(const std::string& command) {
  KithRun r;
  FILE* pipe = popen((command + " 2>&1").c_str(), "r");
  if (!pipe) return r;
  char buf[4096];
  size_t got;
  while ((got = fread(buf, 1, sizeof buf, pipe)) > 0) r.output.append(buf, got);
  const int status = pclose(pipe);
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return r;
}

// Runs the built kith (KITH_BINARY) with ARGUMENTS.
inline KithRun run_kith(const std::string& arguments) { return run_shell(std::string(KITH_BINARY) + " " + arguments); }

}  // namespace kith::test
