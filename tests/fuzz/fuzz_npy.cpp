// libFuzzer target for the .npy reader (solver/io/npy_file.cpp) through the collection loader.
// Any input must either load into finite features of the declared shape or throw LoadError.
// Build and run: see DEVELOPERS.md ("Fuzzing").
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "solver/io/collection.h"
#include "solver/io/npy_file.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view bytes(reinterpret_cast<const char*>(data), size);
  try {
    const kith::Points p = kith::parse_npy(bytes, "x.npy");
    // Every element comes from the file: at least 4 bytes each after a 10-byte preamble.
    if (size_t(p.size()) * 4 > size) std::abort();
    for (Eigen::Index k = 0; k < p.size(); ++k)
      if (!std::isfinite(p.data()[k])) std::abort();
  } catch (const kith::LoadError& e) {
    if (e.problem().message.empty()) std::abort();
  }
  kith::LoadOptions options;
  options.min_items = 1;
  options.allow_no_features = true;
  try {
    const kith::Collection c = kith::load_collection_from_memory(std::string(bytes), "x.npy", options);
    if (c.ids.size() != size_t(c.features.rows())) std::abort();
  } catch (const kith::LoadError&) {
  }
  return 0;
}
