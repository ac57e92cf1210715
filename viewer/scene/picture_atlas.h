// PictureAtlas: every item's picture in one array texture, so the whole map draws as pictures in
// one GL_POINTS call (viewer/gl/gl_renderer.h samples it; this file has no GL).
//
//   slots      one per item with a picture, in item order, up to a capacity (at most
//              kMaxPictureSlots = 12,288, renderer.h); items past it, and items whose picture
//              cannot be read, stay discs.
//   pixels     a picture decoded at most kSlotTexels (64) a side, fitted inside the slot less a
//              guard of kSlotGuard texels on each side, the guard filled with the picture's own
//              edge (so filtering never mixes in a neighbour's colours), and kSlotLevels mip levels
//              made by averaging 2 x 2 texels (64, 32, 16, 8; a level never crosses slots).
//   loading    a PictureLoader thread decodes in a fixed shuffled order (any prefix is spread over
//              the map); pump() hands at most a budget of finished slots a frame to the renderer.
//   detail     an item is drawn as its picture when the picture is at least DetailThreshold::
//              pixels() on screen, else as its disc. The threshold is kMinPixels (8) at rest and
//              rises toward kMovingPixels (64) while the view moves and frames are slower than the
//              target, so a big collection keeps its frame rate; it comes back down at rest.
// Render thread only (the loader is its own thread, behind PictureLoader's queue).
#pragma once
#include <memory>
#include <string>
#include <vector>

#include "viewer/scene/picture_loader.h"
#include "viewer/scene/renderer.h"

namespace kith {

// The slot's pixels of PICTURE (any size; scaled by nearest texel to fit kSlotTexels - 2 *
// kSlotGuard), and the picture's width / height in *ASPECT.
SlotPixels make_slot_pixels(const Picture& picture, float* aspect);

// The part of a square sprite the picture covers, as fractions of its side (width, height):
// the longer side fills it.
inline float picture_extent_x(float aspect) { return aspect >= 1.f ? 1.f : aspect; }
inline float picture_extent_y(float aspect) { return aspect >= 1.f ? 1.f / aspect : 1.f; }

class DetailThreshold {
 public:
  static constexpr float kMinPixels = 8.f;      // smaller pictures are discs, always
  static constexpr float kMovingPixels = 64.f;  // the most it rises to while moving
  float pixels() const { return pixels_; }
  // After each frame: its time, whether the view or the map moved, the frame-time target.
  void note(float frame_seconds, bool moving, float target_seconds);
  // Whether a picture SIDE pixels across on screen is drawn as the picture (the shader's rule).
  bool shows_picture(float side) const { return side >= pixels_; }

 private:
  float pixels_ = kMinPixels;
  float smoothed_ = 0.f;
};

class PictureAtlas {
 public:
  // PATHS: per item, "" = no picture. CAPACITY: most slots (clamped to kMaxPictureSlots).
  explicit PictureAtlas(const std::vector<std::string>& paths, int capacity = kMaxPictureSlots);
  ~PictureAtlas();

  int slots() const { return int(slot_item_.size()); }
  int slot_of(int item) const { return item >= 0 && size_t(item) < slot_.size() ? slot_[item] : -1; }
  int item_in(int slot) const { return slot >= 0 && slot < slots() ? slot_item_[slot] : -1; }
  // The item's picture is on the renderer: draw it from slot_of(item).
  bool ready(int item) const { return slot_of(item) >= 0 && state_[slot_of(item)] == kReady; }
  float aspect(int item) const { return ready(item) ? aspect_[slot_of(item)] : 1.f; }
  int ready_count() const { return ready_; }
  int failed_count() const { return failed_; }
  bool loading() const;  // some slot is neither ready nor failed yet

  // Starts the loader (once) and sizes RENDERER's texture for slots(); then hands it at most
  // BUDGET finished slots. Returns how many became ready (the caller redraws its points then).
  int pump(Renderer& renderer, size_t budget);
  // Every picture decoded and on RENDERER (the windowless path, which draws one frame).
  void finish(Renderer& renderer);

 private:
  enum State : uint8_t { kWaiting, kReady, kFailed };
  std::vector<PictureJob> jobs_;  // until the loader starts
  std::vector<int> slot_;         // per item, -1 = none
  std::vector<int> slot_item_;    // per slot
  std::vector<State> state_;      // per slot
  std::vector<float> aspect_;     // per slot
  int ready_ = 0, failed_ = 0;
  std::unique_ptr<PictureLoader> loader_;
};

}  // namespace kith
