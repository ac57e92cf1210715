// libFuzzer target for the CSV/TSV collection loader (solver/io/csv_table.cpp, solver/io/collection.cpp).
// Any input must either load into a consistent collection or throw LoadError; anything else
// (a crash, a sanitizer report, another exception, a broken invariant) is a finding.
// Build and run: see DEVELOPERS.md ("Fuzzing").
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "solver/io/collection.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  // The first byte picks how the name looks, so both separators and sniffing are covered. The
  // folder does not exist, so picture paths never touch real files.
  static const char* const kNames[] = {"/nonexistent-fuzz/x.csv", "/nonexistent-fuzz/x.tsv",
                                       "/nonexistent-fuzz/x.txt"};
  const char* name = kNames[size ? data[0] % 3 : 0];
  std::string text(reinterpret_cast<const char*>(data), size);
  kith::LoadOptions options;
  options.min_items = 1;
  if (size && (data[0] & 0x10)) options.allow_no_features = true;
  try {
    const kith::Collection c = kith::load_collection_from_memory(std::move(text), name, options);
    const size_t n = c.size();
    if (size_t(c.features.rows()) != n || c.feature_names.size() != size_t(c.features.cols())) std::abort();
    if (!c.pictures.empty() && c.pictures.size() != n) std::abort();
    for (const auto& t : c.tags)
      if (t.values.size() != n) std::abort();
    for (Eigen::Index k = 0; k < c.features.size(); ++k)
      if (!std::isfinite(c.features.data()[k])) std::abort();
    for (size_t i = 0; i < n; ++i)
      if (c.index_of(c.ids[i]) != i) std::abort();  // ids unique and indexed
  } catch (const kith::LoadError& e) {
    if (e.problem().message.empty()) std::abort();
  }
  return 0;
}
