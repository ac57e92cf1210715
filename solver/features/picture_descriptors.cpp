// Picture descriptors: see picture_descriptors.h for the blocks and the weighting.
#include "solver/features/picture_descriptors.h"

#include <stb_image.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <filesystem>
#include <memory>
#include <thread>

#include "solver/base/portable_math.h"
#include "solver/features/colour.h"
#include "solver/features/picture_file.h"

namespace kith {
namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr int kHistBins = 4;                   // per CIELAB axis
constexpr int kScales = 3;                     // texture scales 1, 2, 4
constexpr int kOrientationBins = 8;            // over [0, 180) degrees
constexpr int kThumb = 4;                      // layout thumbnail is kThumb x kThumb cells
// Uniform prior mass of the orientation histogram, as a mean gradient magnitude of L*/100 per
// pixel: 0.005 is half an L* unit per pixel, below what a printed pattern shows.
constexpr double kOrientationPrior = 0.005;

// ==== resampling ==============================================================================

// Area-average weights of a 1-D resampling from n to m samples: for each output sample, the
// (source index, weight) pairs of the overlapped source samples, weights summing to 1.
std::vector<std::vector<std::pair<int, double>>> area_weights(int n, int m) {
  std::vector<std::vector<std::pair<int, double>>> out(m);
  const double step = double(n) / m;
  for (int j = 0; j < m; ++j) {
    const double lo = j * step, hi = (j + 1) * step;
    double total = 0.0;
    for (int i = int(std::floor(lo)); i < int(std::ceil(hi)) && i < n; ++i) {
      const double w = std::min(hi, double(i + 1)) - std::max(lo, double(i));
      if (w > 1e-12) {
        out[j].push_back({i, w});
        total += w;
      }
    }
    for (auto& p : out[j]) p.second /= total;
  }
  return out;
}

// Resamples a row-major image of `c` floats per pixel to (w2, h2) by area averaging.
std::vector<float> resample(const std::vector<float>& in, int w, int h, int c, int w2, int h2) {
  if (w == w2 && h == h2) return in;
  const auto wx = area_weights(w, w2), wy = area_weights(h, h2);
  std::vector<float> rows(size_t(w2) * h * c, 0.0f);
  for (int y = 0; y < h; ++y)
    for (int x = 0; x < w2; ++x)
      for (const auto& [i, wt] : wx[x])
        for (int k = 0; k < c; ++k) rows[(size_t(y) * w2 + x) * c + k] += float(wt) * in[(size_t(y) * w + i) * c + k];
  std::vector<float> out(size_t(w2) * h2 * c, 0.0f);
  for (int y = 0; y < h2; ++y)
    for (const auto& [i, wt] : wy[y])
      for (int x = 0; x < w2; ++x)
        for (int k = 0; k < c; ++k) out[(size_t(y) * w2 + x) * c + k] += float(wt) * rows[(size_t(i) * w2 + x) * c + k];
  return out;
}

// ==== pixel conversion =========================================================================

// Composites one pixel given as normalised components in [0, 1].
void composite(const double* v, int channels, const std::array<double, 3>& background_linear, float* out) {
  double rgb[3], alpha = 1.0;
  if (channels <= 2) {
    rgb[0] = rgb[1] = rgb[2] = v[0];
    if (channels == 2) alpha = v[1];
  } else {
    rgb[0] = v[0], rgb[1] = v[1], rgb[2] = v[2];
    if (channels == 4) alpha = v[3];
  }
  for (int k = 0; k < 3; ++k)
    out[k] = float(alpha * srgb_decode(rgb[k]) + (1.0 - alpha) * background_linear[k]);
}

std::array<double, 3> linear_background(const DescriptorOptions& o) {
  return {srgb_decode(o.background[0]), srgb_decode(o.background[1]), srgb_decode(o.background[2])};
}

template <typename T>
LinearImage to_linear(const T* pixels, int width, int height, int channels, double scale,
                      const DescriptorOptions& options) {
  LinearImage image;
  image.width = width;
  image.height = height;
  image.rgb.resize(size_t(width) * height * 3);
  const auto bg = linear_background(options);
  double v[4];
  for (size_t p = 0; p < size_t(width) * height; ++p) {
    for (int k = 0; k < channels; ++k) v[k] = pixels[p * channels + k] / scale;
    composite(v, channels, bg, &image.rgb[p * 3]);
  }
  return image;
}

// ==== blocks ===================================================================================

struct LabImage {
  int w = 0, h = 0;
  std::vector<float> lab;  // 3 per pixel
};

LabImage working_lab(const LinearImage& image, int working_size) {
  const int longest = std::max(image.width, image.height);
  const double s = double(working_size) / longest;
  LabImage out;
  out.w = std::max(1, int(std::lround(image.width * s)));
  out.h = std::max(1, int(std::lround(image.height * s)));
  const auto lin = resample(image.rgb, image.width, image.height, 3, out.w, out.h);
  out.lab.resize(lin.size());
  for (size_t p = 0; p < lin.size() / 3; ++p) {
    const Lab c = xyz_to_lab(linear_rgb_to_xyz(lin[p * 3], lin[p * 3 + 1], lin[p * 3 + 2]));
    out.lab[p * 3] = float(c.L), out.lab[p * 3 + 1] = float(c.a), out.lab[p * 3 + 2] = float(c.b);
  }
  return out;
}

void colour_stats(const LabImage& im, double* out) {
  const size_t n = size_t(im.w) * im.h;
  double sum[3] = {0, 0, 0}, sq[3] = {0, 0, 0};
  for (size_t p = 0; p < n; ++p)
    for (int k = 0; k < 3; ++k) sum[k] += im.lab[p * 3 + k];
  for (int k = 0; k < 3; ++k) sum[k] /= n;
  for (size_t p = 0; p < n; ++p)
    for (int k = 0; k < 3; ++k) sq[k] += (im.lab[p * 3 + k] - sum[k]) * (im.lab[p * 3 + k] - sum[k]);
  for (int k = 0; k < 3; ++k) out[k] = sum[k], out[3 + k] = std::sqrt(sq[k] / n);
}

// Soft vote position along one axis: the lower bin and the weight of the upper one.
void soft_bin(double value, double first_centre, double width, int bins, int* lower, double* upper_weight) {
  double t = (value - first_centre) / width;
  t = std::clamp(t, 0.0, double(bins - 1));
  *lower = std::min(int(std::floor(t)), bins - 2);
  *upper_weight = t - *lower;
}

void colour_hist(const LabImage& im, double* out) {
  const int nb = kHistBins;
  std::fill(out, out + nb * nb * nb, 0.0);
  const size_t n = size_t(im.w) * im.h;
  for (size_t p = 0; p < n; ++p) {
    int i[3];
    double u[3];
    soft_bin(im.lab[p * 3], 12.5, 25.0, nb, &i[0], &u[0]);
    soft_bin(im.lab[p * 3 + 1], -48.0, 32.0, nb, &i[1], &u[1]);
    soft_bin(im.lab[p * 3 + 2], -48.0, 32.0, nb, &i[2], &u[2]);
    for (int c = 0; c < 8; ++c) {
      const int dl = c & 1, da = (c >> 1) & 1, db = (c >> 2) & 1;
      const double w = (dl ? u[0] : 1 - u[0]) * (da ? u[1] : 1 - u[1]) * (db ? u[2] : 1 - u[2]);
      out[((i[0] + dl) * nb + (i[1] + da)) * nb + (i[2] + db)] += w;
    }
  }
  for (int b = 0; b < nb * nb * nb; ++b) out[b] = std::sqrt(out[b] / n);
}

// Texture at three scales from L*/100: energy[s] and orientation histogram[s][8].
void texture(const LabImage& im, double* energy, double* orientation) {
  int w = im.w, h = im.h;
  std::vector<float> g(size_t(w) * h);
  for (size_t p = 0; p < g.size(); ++p) g[p] = im.lab[p * 3] / 100.0f;
  for (int s = 0; s < kScales; ++s) {
    double* hist = orientation + s * kOrientationBins;
    std::fill(hist, hist + kOrientationBins, 0.0);
    double total = 0.0;
    size_t count = 0;
    for (int y = 1; y + 1 < h; ++y)
      for (int x = 1; x + 1 < w; ++x) {
        const double gx = 0.5 * (g[size_t(y) * w + x + 1] - g[size_t(y) * w + x - 1]);
        const double gy = 0.5 * (g[size_t(y + 1) * w + x] - g[size_t(y - 1) * w + x]);
        const double m = pm::hypot(gx, gy);
        ++count;
        if (m == 0.0) continue;
        total += m;
        double theta = pm::atan2(gy, gx);
        if (theta < 0) theta += kPi;
        double t = theta / (kPi / kOrientationBins);  // bin centres at integers, cyclic
        const int lo = int(std::floor(t));
        const double u = t - lo;
        hist[lo % kOrientationBins] += m * (1.0 - u);
        hist[(lo + 1) % kOrientationBins] += m * u;
      }
    energy[s] = count ? total / count : 0.0;
    const double prior = kOrientationPrior * double(count);
    for (int b = 0; b < kOrientationBins; ++b) hist[b] = (hist[b] + prior / kOrientationBins) / (total + prior);
    if (s + 1 < kScales) {  // halve for the next scale
      const int w2 = std::max(1, w / 2), h2 = std::max(1, h / 2);
      g = resample(g, w, h, 1, w2, h2);
      w = w2, h = h2;
    }
  }
}

void layout(const LabImage& im, double* out) {
  const auto cells = resample(im.lab, im.w, im.h, 3, kThumb, kThumb);
  for (int i = 0; i < kThumb * kThumb * 3; ++i) out[i] = cells[i];
}

}  // namespace

// ==== public ===================================================================================

bool DescriptorOptions::IsValid(std::string* error) const {
  for (double c : background)
    if (!(c >= 0.0 && c <= 1.0)) {
      if (error) *error = "background components must be in [0, 1]";
      return false;
    }
  if (working_size < 16 || working_size > 4096) {
    if (error) *error = "working size must be between 16 and 4096 pixels, got " + std::to_string(working_size);
    return false;
  }
  for (double w : block_weights)
    if (!(w >= 0.0) || !std::isfinite(w)) {
      if (error) *error = "block weights must be finite and >= 0";
      return false;
    }
  return true;
}

PictureError::PictureError(const std::string& path, const std::string& cause)
    : std::runtime_error(path + ": " + cause), path_(path), cause_(cause) {}

const std::vector<DescriptorBlock>& descriptor_blocks() {
  static const std::vector<DescriptorBlock> blocks = [] {
    std::vector<DescriptorBlock> b = {{"colour_stats", 0, 6},
                                      {"colour_hist", 0, kHistBins * kHistBins * kHistBins},
                                      {"texture_energy", 0, kScales},
                                      {"texture_orientation", 0, kScales * kOrientationBins},
                                      {"layout", 0, kThumb * kThumb * 3}};
    for (size_t i = 1; i < b.size(); ++i) b[i].begin = b[i - 1].begin + b[i - 1].size;
    return b;
  }();
  return blocks;
}

int descriptor_size() {
  const auto& b = descriptor_blocks().back();
  return b.begin + b.size;
}

std::vector<std::string> descriptor_names() {
  std::vector<std::string> names;
  const char* lab = "Lab";
  for (const char* stat : {"mean", "sd"})
    for (int k = 0; k < 3; ++k) names.push_back(std::string("colour_") + stat + "_" + lab[k]);
  for (int l = 0; l < kHistBins; ++l)
    for (int a = 0; a < kHistBins; ++a)
      for (int b = 0; b < kHistBins; ++b)
        names.push_back("hist_L" + std::to_string(l) + "a" + std::to_string(a) + "b" + std::to_string(b));
  for (int s = 0; s < kScales; ++s) names.push_back("texture_energy_s" + std::to_string(1 << s));
  for (int s = 0; s < kScales; ++s)
    for (int o = 0; o < kOrientationBins; ++o)
      names.push_back("orientation_s" + std::to_string(1 << s) + "_" + std::to_string(o * 180 / kOrientationBins));
  for (int y = 0; y < kThumb; ++y)
    for (int x = 0; x < kThumb; ++x)
      for (int k = 0; k < 3; ++k)
        names.push_back("layout_r" + std::to_string(y) + "c" + std::to_string(x) + "_" + lab[k]);
  return names;
}

LinearImage image_from_srgb8(const uint8_t* pixels, int width, int height, int channels,
                             const DescriptorOptions& options) {
  return to_linear(pixels, width, height, channels, 255.0, options);
}

LinearImage read_picture(const std::string& path, const DescriptorOptions& options) {
  // Decoded samples (up to 4 channels of 1 or 2 bytes) and the linear RGB floats made from them.
  PictureHeader header;
  if (const std::string problem = read_picture_header(path, 8.0 + 3 * sizeof(float), &header); !problem.empty())
    throw PictureError(path, problem);
  int w = 0, h = 0, channels = 0;
  const bool sixteen = header.sixteen_bit;
  LinearImage image;
  if (sixteen) {
    std::unique_ptr<stbi_us, void (*)(void*)> data(stbi_load_16(path.c_str(), &w, &h, &channels, 0), stbi_image_free);
    if (!data) throw PictureError(path, std::string("could not decode: ") + stbi_failure_reason());
    image = to_linear(data.get(), w, h, channels, 65535.0, options);
  } else {
    std::unique_ptr<stbi_uc, void (*)(void*)> data(stbi_load(path.c_str(), &w, &h, &channels, 0), stbi_image_free);
    if (!data) throw PictureError(path, std::string("could not decode: ") + stbi_failure_reason());
    image = to_linear(data.get(), w, h, channels, 255.0, options);
  }
  return image;
}

std::vector<double> describe_image(const LinearImage& image, const DescriptorOptions& options) {
  const LabImage lab = working_lab(image, options.working_size);
  std::vector<double> out(descriptor_size());
  const auto& b = descriptor_blocks();
  colour_stats(lab, &out[b[0].begin]);
  colour_hist(lab, &out[b[1].begin]);
  texture(lab, &out[b[2].begin], &out[b[3].begin]);
  layout(lab, &out[b[4].begin]);
  return out;
}

std::vector<double> describe_picture(const std::string& path, const DescriptorOptions& options) {
  return describe_image(read_picture(path, options), options);
}

std::vector<double> weight_descriptor_blocks(Points& features, const DescriptorOptions& options) {
  std::vector<double> factors;
  const auto& blocks = descriptor_blocks();
  const Eigen::Index n = features.rows();
  for (size_t bi = 0; bi < blocks.size(); ++bi) {
    const auto& b = blocks[bi];
    auto block = features.middleCols(b.begin, b.size);
    double total_variance = 0.0;
    if (n > 1) {
      const Eigen::RowVectorXd mean = block.colwise().mean();
      total_variance = (block.rowwise() - mean).squaredNorm() / double(n);
    }
    const double factor = total_variance > 1e-24 ? options.block_weights[bi] / std::sqrt(total_variance) : 0.0;
    if (total_variance > 1e-24) block *= factor;
    else block.setZero();  // a block that does not vary carries no information
    factors.push_back(factor);
  }
  return factors;
}

DescribedPictures describe_pictures(const std::vector<std::string>& paths, const DescriptorOptions& options,
                                    int threads) {
  const size_t n = paths.size();
  std::vector<std::vector<double>> rows(n);
  std::vector<std::string> errors(n);
  std::atomic<size_t> next{0};
  auto work = [&] {
    for (size_t i; (i = next++) < n;) {
      try {
        rows[i] = describe_picture(paths[i], options);
      } catch (const PictureError& e) {
        errors[i] = e.cause();
      } catch (const std::exception& e) {
        errors[i] = e.what();
      }
    }
  };
  int t = threads > 0 ? threads : int(std::max(1u, std::thread::hardware_concurrency()));
  t = int(std::min<size_t>(size_t(t), std::max<size_t>(1, n)));
  std::vector<std::thread> pool;
  for (int k = 1; k < t; ++k) pool.emplace_back(work);
  work();
  for (auto& th : pool) th.join();

  DescribedPictures out;
  for (size_t i = 0; i < n; ++i) {
    if (!errors[i].empty()) {
      out.skipped.push_back(Problem{paths[i], 0, 0, errors[i]});
      continue;
    }
    out.paths.push_back(paths[i]);
    out.input_index.push_back(i);
  }
  out.features.resize(Eigen::Index(out.paths.size()), descriptor_size());
  for (size_t r = 0; r < out.paths.size(); ++r)
    for (int c = 0; c < descriptor_size(); ++c) out.features(Eigen::Index(r), c) = rows[out.input_index[r]][c];
  if (options.weight_blocks) weight_descriptor_blocks(out.features, options);
  return out;
}

std::vector<Problem> describe_collection(Collection& collection, const DescriptorOptions& options) {
  if (collection.features.cols() > 0 || collection.pictures.empty()) return {};
  DescribedPictures d = describe_pictures(collection.pictures, options);
  if (d.paths.size() < 2)
    throw LoadError(Problem{collection.source, 0, 0,
                            "only " + std::to_string(d.paths.size()) + " of the collection's " +
                                std::to_string(collection.pictures.size()) +
                                " pictures could be read; at least 2 are needed"});
  Collection out;
  out.source = collection.source;
  out.picture_column = collection.picture_column;
  out.feature_names = descriptor_names();
  out.features = std::move(d.features);
  out.warnings = collection.warnings;
  for (const auto& tag : collection.tags) out.tags.push_back(TagColumn{tag.name, {}});
  for (size_t r = 0; r < d.paths.size(); ++r) {
    const size_t i = d.input_index[r];
    out.ids.push_back(collection.ids[i]);
    out.pictures.push_back(collection.pictures[i]);
    for (size_t t = 0; t < collection.tags.size(); ++t) out.tags[t].values.push_back(collection.tags[t].values[i]);
  }
  for (auto& p : d.skipped) {
    p.message = "picture skipped, item left out: " + p.message;
    out.warnings.push_back(p);
  }
  collection = std::move(out);
  return d.skipped;
}

}  // namespace kith
