#include "viewer/scene/picture_atlas.h"

#include <algorithm>
#include <random>

namespace kith {

size_t SlotPixels::level_offset(int level) {
  size_t bytes = 0;
  for (int l = 0; l < level; ++l) bytes += size_t(kSlotTexels >> l) * size_t(kSlotTexels >> l) * 4;
  return bytes;
}

// ============================================================================ [pixels]

SlotPixels make_slot_pixels(const Picture& pic, float* aspect) {
  SlotPixels out;
  out.rgba.assign(SlotPixels::bytes(), 0);
  if (pic.width <= 0 || pic.height <= 0) return out;
  *aspect = float(pic.width) / float(pic.height);
  // The picture fitted inside the box less the guard, centred; every texel of the slot takes the
  // picture texel nearest to it (clamped), which repeats the edge over the guard and the margin.
  const int box = kSlotTexels - 2 * kSlotGuard;
  const float scale = std::min(float(box) / pic.width, float(box) / pic.height);
  const float w = pic.width * scale, h = pic.height * scale;
  const float ox = (kSlotTexels - w) * 0.5f, oy = (kSlotTexels - h) * 0.5f;
  uint8_t* level0 = out.rgba.data();
  for (int y = 0; y < kSlotTexels; ++y)
    for (int x = 0; x < kSlotTexels; ++x) {
      const int sx = std::clamp(int((x + 0.5f - ox) / scale), 0, pic.width - 1);
      const int sy = std::clamp(int((y + 0.5f - oy) / scale), 0, pic.height - 1);
      const uint8_t* s = &pic.rgba[(size_t(sy) * pic.width + sx) * 4];
      uint8_t* d = &level0[(size_t(y) * kSlotTexels + x) * 4];
      std::copy(s, s + 3, d);
      d[3] = 255;  // the shader cuts the picture's rectangle out; transparency would show the guard
    }
  for (int l = 1; l < kSlotLevels; ++l) {
    const int side = kSlotTexels >> l, above = side * 2;
    const uint8_t* a = out.rgba.data() + SlotPixels::level_offset(l - 1);
    uint8_t* d = out.rgba.data() + SlotPixels::level_offset(l);
    for (int y = 0; y < side; ++y)
      for (int x = 0; x < side; ++x)
        for (int c = 0; c < 4; ++c) {
          const int sum = a[((2 * y) * above + 2 * x) * 4 + c] + a[((2 * y) * above + 2 * x + 1) * 4 + c] +
                          a[((2 * y + 1) * above + 2 * x) * 4 + c] + a[((2 * y + 1) * above + 2 * x + 1) * 4 + c];
          d[(y * side + x) * 4 + c] = uint8_t((sum + 2) / 4);
        }
  }
  return out;
}

// ============================================================================ [detail]

void DetailThreshold::note(float frame_seconds, bool moving, float target_seconds) {
  if (!(frame_seconds > 0.f)) return;
  smoothed_ = smoothed_ == 0.f ? frame_seconds : 0.8f * smoothed_ + 0.2f * frame_seconds;
  if (!moving) {
    pixels_ = kMinPixels;  // at rest every picture large enough to read is drawn
    return;
  }
  // Fewer pictures (more discs, which cost fewer fragments) while frames are slow; more again
  // once they are comfortably fast.
  if (smoothed_ > target_seconds)
    pixels_ = std::min(kMovingPixels, pixels_ * 1.25f);
  else if (smoothed_ < 0.7f * target_seconds)
    pixels_ = std::max(kMinPixels, pixels_ / 1.25f);
}

// ============================================================================ [atlas]

PictureAtlas::PictureAtlas(const std::vector<std::string>& paths, int capacity) {
  capacity = std::clamp(capacity, 0, kMaxPictureSlots);
  slot_.assign(paths.size(), -1);
  for (size_t i = 0; i < paths.size() && int(slot_item_.size()) < capacity; ++i) {
    if (paths[i].empty()) continue;
    slot_[i] = int(slot_item_.size());
    slot_item_.push_back(int(i));
    jobs_.push_back({int(i), slot_[i], paths[i]});
  }
  state_.assign(slot_item_.size(), kWaiting);
  aspect_.assign(slot_item_.size(), 1.f);
  // A fixed shuffle: while loading, the pictures already in are spread over the whole map.
  std::mt19937 rng(4242);
  std::shuffle(jobs_.begin(), jobs_.end(), rng);
}

PictureAtlas::~PictureAtlas() = default;

bool PictureAtlas::loading() const { return ready_ + failed_ < slots(); }

int PictureAtlas::pump(Renderer& renderer, size_t budget) {
  if (!loader_) {
    renderer.set_picture_slots(slots());
    loader_ = std::make_unique<PictureLoader>(std::move(jobs_));
    jobs_.clear();
  }
  int now_ready = 0;
  for (LoadedPicture& p : loader_->take(budget)) {
    if (p.slot < 0 || p.slot >= slots() || state_[p.slot] != kWaiting) continue;
    if (!p.ok) {
      state_[p.slot] = kFailed;
      ++failed_;
      continue;
    }
    renderer.set_slot(p.slot, p.pixels);
    aspect_[p.slot] = p.aspect;
    state_[p.slot] = kReady;
    ++ready_;
    ++now_ready;
  }
  return now_ready;
}

void PictureAtlas::finish(Renderer& renderer) {
  pump(renderer, 0);
  while (loading()) {
    loader_->wait_decoded();
    pump(renderer, PictureLoader::kMaxWaiting);
  }
}

}  // namespace kith
