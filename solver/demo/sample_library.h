// SampleLibrary: the demo scenario, a textile and paint sample library for an interior studio.
// About 600 swatches generated procedurally from a fixed seed: six collection lines (invented
// names), each with its own range of colours (CIELAB lightness, chroma and hue) and its own
// patterns (plain, stripes, checks, dots, speckle, weave), a pattern scale and a contrast. Every
// swatch is drawn as a small PNG (stb_image_write) into a cache folder at first use, with
// items.csv (id, name, line, pattern, scale, picture -- no numeric columns, so the machine's
// features come from the pictures, as for a user's own folder) and hidden.csv (the generator's
// parameters, which only the simulated people looks at). Deterministic: the same options give the
// same files, byte for byte. Pure functions except ensure_sample_library (writes files); any thread.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "solver/base/points.h"
#include "solver/features/colour.h"

namespace kith {

enum class SwatchPattern : int { kPlain = 0, kStripes, kChecks, kDots, kSpeckle, kWeave };
const char* to_string(SwatchPattern pattern);
constexpr int kSwatchPatternCount = 6;

struct Swatch {
  std::string id;        // e.g. "tidewater-017"
  std::string name;      // an invented colour name, e.g. "Hushed Kelp"
  std::string line;      // collection line, e.g. "Tidewater Cotton"
  SwatchPattern pattern = SwatchPattern::kPlain;
  Lab base;              // ground colour
  Lab accent;            // second colour of the pattern (lighter or darker than base)
  double period = 12.0;  // pattern repeat in pixels at 80 px (fine ~6, large ~22)
  double contrast = 0.3; // 0..1, how far the accent is from the base
  double angle = 0.0;    // stripes direction, degrees
  std::string scale_name() const;  // "fine", "medium", "large"
};

struct SampleLibraryOptions {
  int count = 600;          // swatches, spread evenly over the lines (default: 600)
  uint64_t seed = 20261201; // (default: 20261201)
  int picture_size = 80;    // pixels per side (default: 80)
  std::string folder;       // (default: default_sample_folder())
  bool IsValid(std::string* error) const;
};

std::vector<Swatch> make_swatches(const SampleLibraryOptions& options = {});

// Draws one swatch: size x size RGB, 8 bits per channel, row-major.
std::vector<uint8_t> draw_swatch(const Swatch& swatch, int size, uint64_t seed);

// The swatches' picture features computed in memory from the same drawings the PNG files hold
// (PNG is lossless, so these equal what `kith demo` reads from disk), blocks weighted as
// describe_collection does (solver/features/picture_descriptors.h): one row per swatch.
Points swatch_features(const std::vector<Swatch>& swatches, const SampleLibraryOptions& options = {});

// $XDG_CACHE_HOME/kith/demo, else $HOME/.cache/kith/demo, else <temp>/kith-demo.
std::string default_sample_folder();

struct SampleLibrary {
  std::string folder;
  std::string items_csv;   // folder/items.csv
  std::string hidden_csv;  // folder/hidden.csv
  std::vector<Swatch> swatches;
  bool generated = false;  // true if the files were (re)written by this call
};

// Writes the library into options.folder unless an identical one is already there (checked by a
// stamp file naming the options and by every picture being present). Throws std::runtime_error
// with the path and cause if it cannot write.
SampleLibrary ensure_sample_library(const SampleLibraryOptions& options = {});

}  // namespace kith
