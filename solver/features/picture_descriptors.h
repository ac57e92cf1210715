// Picture descriptors: a feature vector computed from a PNG or JPEG picture, for people who have
// pictures but no features of their own.
//
// Reading (stb_image): 8- and 16-bit PNG, JPEG; grey, grey+alpha, RGB, RGBA. Pixels are taken as
// sRGB, decoded to linear light (IEC 61966-2-1), composited over the background in linear light
// (c = alpha c + (1 - alpha) background), then area-averaged to a working size (longest side
// `working_size`, aspect kept) and converted to CIELAB (solver/features/colour.h). Embedded colour profiles
// are ignored.
//
// Blocks (in this order; names in feature_names()):
//   colour_stats         mean and standard deviation of L*, a*, b*                      (6)
//   colour_hist          coarse CIELAB histogram: 4 L* x 4 a* x 4 b* bins, soft (trilinear)
//                        votes, bin centres L* 12.5..87.5, a*, b* -48..48 (clamped), normalised
//                        to sum 1, then square-rooted so Euclidean distance is Hellinger-like (64)
//   texture_energy       mean gradient magnitude of L*/100 (central differences) at scales
//                        1, 2 and 4 (the working picture halved 0, 1, 2 times)             (3)
//   texture_orientation  per scale, a histogram of gradient orientation theta = atan2(gy, gx)
//                        mod 180 deg in 8 bins centred on 0, 22.5, ... 157.5 deg, soft
//                        votes weighted by magnitude, plus a small uniform prior (so a plain
//                        picture has a flat histogram), normalised to sum 1                 (24)
//   layout               a 4 x 4 thumbnail: mean L*, a*, b* per cell                        (48)
// Only L* enters the texture blocks, so a change of hue or chroma at equal lightness moves the
// colour blocks and leaves the texture blocks alone.
//
// Weighting (so that no block dominates a Euclidean distance, whatever its length or units): over
// a set of pictures, each block is multiplied by w_b / sqrt(total variance of the block), where
// total variance = sum over the block's columns of the column variance. Every block then
// contributes the same expected squared distance between two random pictures (2 w_b^2), so the
// 64-number histogram does not outweigh the 3 energy numbers. A block that does not vary is left
// at zero spread. w_b are DescriptorOptions::block_weights (default 1 each). describe_picture()
// returns raw (unweighted) numbers; describe_pictures() and describe_collection() weight them.
//
// Pure functions; any thread (stb_image's failure text is thread-local only if built so; the
// reading functions here take a lock around it).
#pragma once
#include <array>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/base/points.h"

namespace kith {

struct DescriptorOptions {
  std::array<double, 3> background = {1.0, 1.0, 1.0};  // sRGB behind transparent pixels (default: white)
  int working_size = 96;                               // longest side of the working picture (default: 96)
  std::array<double, 5> block_weights = {1, 1, 1, 1, 1};  // w_b in block order above (default: 1 each)
  bool weight_blocks = true;  // describe_pictures/describe_collection apply the weighting (default: true)
  bool IsValid(std::string* error) const;
};

// A picture in linear-light RGB after compositing: 3 floats per pixel, row-major.
struct LinearImage {
  int width = 0, height = 0;
  std::vector<float> rgb;
};

class PictureError : public std::runtime_error {
 public:
  PictureError(const std::string& path, const std::string& cause);
  const std::string& path() const { return path_; }
  const std::string& cause() const { return cause_; }

 private:
  std::string path_, cause_;
};

struct DescriptorBlock {
  std::string name;
  int begin = 0;  // first column
  int size = 0;
};

const std::vector<DescriptorBlock>& descriptor_blocks();
int descriptor_size();
std::vector<std::string> descriptor_names();

// Reads and composites a picture; throws PictureError (file and cause) if it cannot.
LinearImage read_picture(const std::string& path, const DescriptorOptions& options = {});
// From 8-bit sRGB pixels with `channels` (1 grey, 2 grey+alpha, 3 RGB, 4 RGBA) per pixel.
LinearImage image_from_srgb8(const uint8_t* pixels, int width, int height, int channels,
                             const DescriptorOptions& options = {});

// Raw descriptor of one picture (descriptor_size() numbers, unweighted).
std::vector<double> describe_image(const LinearImage& image, const DescriptorOptions& options = {});
std::vector<double> describe_picture(const std::string& path, const DescriptorOptions& options = {});

// Applies the block weighting above to the rows of `features` (N x descriptor_size()) in place;
// returns the factor applied to each block.
std::vector<double> weight_descriptor_blocks(Points& features, const DescriptorOptions& options = {});

struct DescribedPictures {
  std::vector<std::string> paths;     // the pictures that were read, in input order
  std::vector<size_t> input_index;    // their positions in the input list
  Points features;                    // paths.size() x descriptor_size()
  std::vector<Problem> skipped;       // pictures that could not be read: file and cause
};
// Reads every picture (skipping broken ones, which are reported in `skipped`), describes and
// weights them. `threads` 0 = hardware concurrency.
DescribedPictures describe_pictures(const std::vector<std::string>& paths, const DescriptorOptions& options = {},
                                    int threads = 0);

// Gives a collection that has pictures but no feature columns its features from the pictures.
// Items whose picture cannot be read are removed (and reported in the returned list and in the
// collection's warnings). Returns the problems; throws LoadError if fewer than 2 items remain.
// Does nothing (returns empty) if the collection already has features or has no pictures.
std::vector<Problem> describe_collection(Collection& collection, const DescriptorOptions& options = {});

}  // namespace kith
