#include "viewer/scene/picture_loader.h"

#include "solver/features/picture_file.h"
#include "viewer/scene/picture_atlas.h"

namespace kith {

bool load_picture(const std::string& path, Picture* out, int max_side, std::string* why) {
  Rgba8Picture pic;
  const std::string problem = decode_picture_rgba8(path, max_side, &pic);
  if (why) *why = problem;
  if (!problem.empty()) {
    *out = Picture{};
    return false;
  }
  out->width = pic.width;
  out->height = pic.height;
  out->rgba = std::move(pic.rgba);
  return true;
}

PictureLoader::PictureLoader(std::vector<PictureJob> jobs) : jobs_(std::move(jobs)), thread_([this] { run(); }) {}

PictureLoader::~PictureLoader() {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    stop_ = true;
  }
  changed_.notify_all();
  thread_.join();
}

void PictureLoader::run() {
  for (const PictureJob& job : jobs_) {
    {
      std::unique_lock<std::mutex> lock(mutex_);
      changed_.wait(lock, [this] { return stop_ || done_.size() < kMaxWaiting; });
      if (stop_) return;
    }
    // Decoding happens outside the lock: take() never waits on a decoder.
    LoadedPicture out;
    out.item = job.item;
    out.slot = job.slot;
    Picture picture;
    out.ok = load_picture(job.path, &picture, kSlotTexels) && picture.width > 0 && picture.height > 0;
    if (out.ok) out.pixels = make_slot_pixels(picture, &out.aspect);
    {
      std::lock_guard<std::mutex> lock(mutex_);
      done_.push_back(std::move(out));
      ++decoded_;
    }
    changed_.notify_all();
  }
}

std::vector<LoadedPicture> PictureLoader::take(size_t most) {
  std::vector<LoadedPicture> out;
  {
    std::lock_guard<std::mutex> lock(mutex_);
    while (!done_.empty() && out.size() < most) {
      out.push_back(std::move(done_.front()));
      done_.pop_front();
    }
    taken_ += out.size();
  }
  if (!out.empty()) changed_.notify_all();
  return out;
}

size_t PictureLoader::remaining() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return jobs_.size() - taken_;
}

void PictureLoader::wait_decoded() const {
  std::unique_lock<std::mutex> lock(mutex_);
  changed_.wait(lock, [this] { return decoded_ == jobs_.size() || done_.size() >= kMaxWaiting; });
}

}  // namespace kith
