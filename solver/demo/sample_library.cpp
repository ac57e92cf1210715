// The demo's sample library: see sample_library.h.
#include "solver/demo/sample_library.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include "solver/base/portable_math.h"
#include "solver/features/picture_descriptors.h"
#include "solver/io/png_file.h"
#include "solver/io/safe_file.h"

namespace kith {
namespace {

namespace fs = std::filesystem;
constexpr double kPi = 3.14159265358979323846;
constexpr const char* kStampVersion = "kith sample library v2";

// splitmix64: a small, fully specified generator, so the library is the same on every platform
// (the distributions of <random> are not specified bit for bit); sines and cosines come from
// solver/base/portable_math.h for the same reason (libm's differ between CPUs in the last bit).
struct Rng {
  uint64_t s;
  uint64_t next() {
    uint64_t z = (s += 0x9e3779b97f4a7c15ull);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
    return z ^ (z >> 31);
  }
  double uniform() { return (next() >> 11) * (1.0 / 9007199254740992.0); }
  double range(double lo, double hi) { return lo + (hi - lo) * uniform(); }
  int index(int n) { return int(next() % uint64_t(n)); }
};

uint64_t hash3(uint64_t seed, int64_t a, int64_t b) {
  Rng r{seed ^ (uint64_t(a) * 0x9e3779b97f4a7c15ull) ^ (uint64_t(b) * 0xc2b2ae3d27d4eb4full)};
  return r.next();
}
double hash01(uint64_t seed, int64_t a, int64_t b) { return (hash3(seed, a, b) >> 11) * (1.0 / 9007199254740992.0); }

struct HueRange {
  double lo, hi;  // degrees; hi may exceed 360 to wrap
};
struct PatternShare {
  SwatchPattern pattern;
  double weight;
};
struct LineSpec {
  const char* name;
  const char* slug;
  double l_lo, l_hi, c_lo, c_hi;
  std::vector<HueRange> hues;
  std::vector<PatternShare> patterns;
};

// Six invented collection lines, each with its own colours and patterns.
const std::vector<LineSpec>& lines() {
  using P = SwatchPattern;
  static const std::vector<LineSpec> specs = {
      {"Saltmarsh Linen", "saltmarsh", 55, 85, 5, 20, {{60, 140}},
       {{P::kPlain, 2}, {P::kWeave, 3}, {P::kStripes, 2}}},
      {"Ember Wool", "ember", 30, 60, 25, 55, {{15, 60}}, {{P::kChecks, 3}, {P::kWeave, 2}, {P::kSpeckle, 2}}},
      {"Tidewater Cotton", "tidewater", 35, 75, 15, 40, {{190, 250}},
       {{P::kStripes, 3}, {P::kDots, 2}, {P::kPlain, 1}}},
      {"Quarry Paint", "quarry", 40, 92, 0, 10, {{0, 360}}, {{P::kPlain, 4}, {P::kSpeckle, 2}}},
      {"Orchard Print", "orchard", 55, 85, 35, 65, {{90, 110}, {120, 150}, {340, 380}},
       {{P::kDots, 3}, {P::kChecks, 2}, {P::kStripes, 2}}},
      {"Nightjar Velvet", "nightjar", 15, 35, 10, 35, {{260, 320}, {150, 180}},
       {{P::kPlain, 3}, {P::kWeave, 2}}},
  };
  return specs;
}

const char* kAdjectives[] = {"Hushed", "Bright", "Smoky", "Pale",  "Deep",   "Warm",  "Still", "Sunlit",
                             "Misty",  "Dusky",  "Salted", "Quiet", "Wild",  "Soft",  "Faded", "Rich"};
const char* kNouns[] = {"Kelp",  "Flint",     "Heather", "Clay",   "Moss",    "Harbour", "Ember", "Lichen",
                        "Barley", "Slate",    "Juniper", "Pebble", "Rosehip", "Tide",    "Fern",  "Driftwood",
                        "Thistle", "Cinder", "Plum",    "Reed",   "Quince",  "Larch",   "Shale", "Bracken"};

bool in_gamut(const Lab& lab) {
  double r, g, b;
  bool ok = false;
  lab_to_srgb(lab, &r, &g, &b, &ok);
  return ok;
}

// Pulls a colour towards the grey axis until it fits in sRGB.
Lab into_gamut(Lab lab) {
  for (int i = 0; i < 60 && !in_gamut(lab); ++i) lab.a *= 0.93, lab.b *= 0.93;
  lab.L = std::clamp(lab.L, 1.0, 99.0);
  return lab;
}

double square_wave(double u) { return std::clamp(0.5 + 2.0 * pm::sin(2.0 * kPi * u), 0.0, 1.0); }

// Mixing factor towards the accent colour at (x, y), in [0, 1].
double pattern_value(const Swatch& s, double x, double y, uint64_t seed) {
  const double p = s.period;
  switch (s.pattern) {
    case SwatchPattern::kPlain:
      return 0.0;
    case SwatchPattern::kStripes: {
      const double t = s.angle * kPi / 180.0;
      return square_wave((x * pm::cos(t) + y * pm::sin(t)) / p);
    }
    case SwatchPattern::kChecks:
      return 0.5 * (square_wave(x / p) + square_wave(y / p));
    case SwatchPattern::kDots: {
      const double row = std::floor(y / p);
      const double ox = std::fmod(row, 2.0) == 0.0 ? 0.0 : 0.5 * p;
      const double cx = (std::floor((x - ox) / p) + 0.5) * p + ox, cy = (row + 0.5) * p;
      const double d = pm::hypot(x - cx, y - cy);
      return std::clamp(0.28 * p - d + 0.5, 0.0, 1.0);
    }
    case SwatchPattern::kSpeckle: {
      const double cell = std::max(1.0, p / 5.0);
      const double h = hash01(seed, int64_t(std::floor(x / cell)), int64_t(std::floor(y / cell)));
      return h < 0.22 ? 1.0 : 0.0;
    }
    case SwatchPattern::kWeave: {
      const double w = std::max(2.0, p / 3.0);
      const int64_t cx = int64_t(std::floor(x / w)), cy = int64_t(std::floor(y / w));
      const bool warp = ((cx + cy) & 1) == 0;
      const double shade = warp ? hash01(seed, cx, -1) : hash01(seed, -1, cy);
      const double along = warp ? pm::sin(2 * kPi * (y / w) * 0.5) : pm::sin(2 * kPi * (x / w) * 0.5);
      return std::clamp(0.25 + 0.6 * shade + 0.15 * along * along, 0.0, 1.0);
    }
  }
  return 0.0;
}

std::string stamp_text(const SampleLibraryOptions& o) {
  std::ostringstream s;
  s << kStampVersion << " count=" << o.count << " seed=" << o.seed << " size=" << o.picture_size << "\n";
  return s.str();
}

std::string read_file(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

void write_text(const fs::path& p, const std::string& text) {
  if (const std::string problem = write_file_safely(p.string(), text); !problem.empty())
    throw std::runtime_error(problem);
}

}  // namespace

const char* to_string(SwatchPattern pattern) {
  switch (pattern) {
    case SwatchPattern::kPlain: return "plain";
    case SwatchPattern::kStripes: return "stripes";
    case SwatchPattern::kChecks: return "checks";
    case SwatchPattern::kDots: return "dots";
    case SwatchPattern::kSpeckle: return "speckle";
    case SwatchPattern::kWeave: return "weave";
  }
  return "?";
}

std::string Swatch::scale_name() const { return period < 9.0 ? "fine" : period < 17.0 ? "medium" : "large"; }

bool SampleLibraryOptions::IsValid(std::string* error) const {
  if (count < 6 || count > 100000) {
    if (error) *error = "the sample library needs between 6 and 100000 swatches, got " + std::to_string(count);
    return false;
  }
  if (picture_size < 16 || picture_size > 1024) {
    if (error) *error = "picture size must be between 16 and 1024 pixels, got " + std::to_string(picture_size);
    return false;
  }
  return true;
}

std::vector<Swatch> make_swatches(const SampleLibraryOptions& options) {
  Rng rng{options.seed};
  const auto& specs = lines();
  std::vector<Swatch> out;
  out.reserve(size_t(options.count));
  for (int i = 0; i < options.count; ++i) {
    const LineSpec& line = specs[size_t(i) % specs.size()];
    const int number = i / int(specs.size()) + 1;
    Swatch s;
    char id[64];
    std::snprintf(id, sizeof id, "%s-%03d", line.slug, number);
    s.id = id;
    s.line = line.name;
    s.name = std::string(kAdjectives[rng.index(16)]) + " " + kNouns[rng.index(24)];
    const HueRange& hr = line.hues[size_t(rng.index(int(line.hues.size())))];
    const double h = std::fmod(rng.range(hr.lo, hr.hi), 360.0) * kPi / 180.0;
    const double c = rng.range(line.c_lo, line.c_hi);
    s.base = into_gamut({rng.range(line.l_lo, line.l_hi), c * pm::cos(h), c * pm::sin(h)});
    double total = 0.0;
    for (const auto& ps : line.patterns) total += ps.weight;
    double pick = rng.uniform() * total;
    s.pattern = line.patterns.back().pattern;
    for (const auto& ps : line.patterns) {
      if (pick < ps.weight) {
        s.pattern = ps.pattern;
        break;
      }
      pick -= ps.weight;
    }
    const double scales[] = {6.0, 12.0, 22.0};
    s.period = scales[rng.index(3)] * rng.range(0.85, 1.15);
    s.contrast = s.pattern == SwatchPattern::kPlain ? rng.range(0.03, 0.08) : rng.range(0.2, 0.7);
    const double angles[] = {0.0, 90.0, 45.0, 135.0};
    s.angle = angles[rng.index(4)];
    // Accent: lighter on dark grounds, darker on light ones, a little less chroma, hue turned.
    const double dl = (s.base.L > 55.0 ? -1.0 : 1.0) * s.contrast * 45.0;
    const double turn = rng.range(-0.25, 0.25);
    const double k = 1.0 - 0.3 * s.contrast;
    s.accent = into_gamut({s.base.L + dl, k * (s.base.a * pm::cos(turn) - s.base.b * pm::sin(turn)),
                           k * (s.base.a * pm::sin(turn) + s.base.b * pm::cos(turn))});
    out.push_back(std::move(s));
  }
  return out;
}

std::vector<uint8_t> draw_swatch(const Swatch& s, int size, uint64_t seed) {
  std::vector<uint8_t> rgb(size_t(size) * size * 3);
  const double scale = 80.0 / size;  // periods are given at 80 px
  uint64_t fnv = 1469598103934665603ull;  // FNV-1a of the id: the same on every platform
  for (unsigned char ch : s.id) fnv = (fnv ^ ch) * 1099511628211ull;
  const uint64_t own = hash3(seed, int64_t(fnv & 0x7fffffffffffll), 7);
  for (int y = 0; y < size; ++y)
    for (int x = 0; x < size; ++x) {
      double v = 0.0;
      for (int sy = 0; sy < 2; ++sy)  // 2 x 2 supersampling against jagged edges
        for (int sx = 0; sx < 2; ++sx)
          v += pattern_value(s, (x + 0.25 + 0.5 * sx) * scale, (y + 0.25 + 0.5 * sy) * scale, own);
      v *= 0.25;
      const double grain = (hash01(own, x, y) - 0.5) * 0.12;  // fibre or brush grain
      const double t = std::clamp(v + grain, -0.2, 1.2);
      const Lab c{s.base.L + t * (s.accent.L - s.base.L), s.base.a + t * (s.accent.a - s.base.a),
                  s.base.b + t * (s.accent.b - s.base.b)};
      double r, g, b;
      lab_to_srgb(c, &r, &g, &b);
      uint8_t* p = &rgb[(size_t(y) * size + x) * 3];
      p[0] = uint8_t(std::lround(r * 255)), p[1] = uint8_t(std::lround(g * 255)), p[2] = uint8_t(std::lround(b * 255));
    }
  return rgb;
}

std::string default_sample_folder() {
  if (const char* xdg = std::getenv("XDG_CACHE_HOME"); xdg && *xdg) return (fs::path(xdg) / "kith" / "demo").string();
  if (const char* home = std::getenv("HOME"); home && *home)
    return (fs::path(home) / ".cache" / "kith" / "demo").string();
  return (fs::temp_directory_path() / "kith-demo").string();
}

SampleLibrary ensure_sample_library(const SampleLibraryOptions& options_in) {
  SampleLibraryOptions options = options_in;
  if (options.folder.empty()) options.folder = default_sample_folder();
  std::string error;
  if (!options.IsValid(&error)) throw std::runtime_error(error);
  SampleLibrary lib;
  lib.folder = options.folder;
  lib.items_csv = (fs::path(options.folder) / "items.csv").string();
  lib.hidden_csv = (fs::path(options.folder) / "hidden.csv").string();
  lib.swatches = make_swatches(options);
  const fs::path folder(options.folder), pictures = folder / "pictures", stamp = folder / "library.txt";

  std::error_code ec;
  bool complete = fs::exists(stamp, ec) && read_file(stamp) == stamp_text(options) && fs::exists(lib.items_csv, ec) &&
                  fs::exists(lib.hidden_csv, ec);
  for (size_t i = 0; complete && i < lib.swatches.size(); ++i)
    complete = fs::exists(pictures / (lib.swatches[i].id + ".png"), ec);
  if (complete) return lib;

  fs::create_directories(pictures, ec);
  if (ec) throw std::runtime_error(pictures.string() + ": cannot create the folder (" + ec.message() + ")");
  fs::remove(stamp, ec);
  std::ostringstream items, hidden;
  items << "id,name,line,pattern,scale,picture\n";
  hidden << "id,base_L,base_a,base_b,accent_L,accent_a,accent_b,pattern,period,contrast,angle\n";
  char buf[256];
  for (const auto& s : lib.swatches) {
    const fs::path png = pictures / (s.id + ".png");
    const auto rgb = draw_swatch(s, options.picture_size, options.seed);
    if (const std::string problem =
            write_png_file(png.string(), rgb.data(), options.picture_size, options.picture_size, 3);
        !problem.empty())
      throw std::runtime_error(problem);
    items << s.id << ',' << s.name << ',' << s.line << ',' << to_string(s.pattern) << ',' << s.scale_name()
          << ",pictures/" << s.id << ".png\n";
    std::snprintf(buf, sizeof buf, "%s,%.4f,%.4f,%.4f,%.4f,%.4f,%.4f,%s,%.3f,%.3f,%.0f\n", s.id.c_str(), s.base.L,
                  s.base.a, s.base.b, s.accent.L, s.accent.a, s.accent.b, to_string(s.pattern), s.period, s.contrast,
                  s.angle);
    hidden << buf;
  }
  write_text(lib.items_csv, items.str());
  write_text(lib.hidden_csv, hidden.str());
  write_text(stamp, stamp_text(options));
  lib.generated = true;
  return lib;
}

Points swatch_features(const std::vector<Swatch>& swatches, const SampleLibraryOptions& options) {
  const int size = options.picture_size;
  Points f(Eigen::Index(swatches.size()), descriptor_size());
  for (size_t i = 0; i < swatches.size(); ++i) {
    const auto px = draw_swatch(swatches[i], size, options.seed);
    const auto v = describe_image(image_from_srgb8(px.data(), size, size, 3));
    for (int c = 0; c < descriptor_size(); ++c) f(Eigen::Index(i), c) = v[size_t(c)];
  }
  weight_descriptor_blocks(f);
  return f;
}

}  // namespace kith
