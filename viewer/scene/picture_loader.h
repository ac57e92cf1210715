// PictureLoader: decodes a collection's pictures on a thread of its own, so the render thread
// never waits on a file or a decoder. Each job (an item, its atlas slot and its picture's path)
// is decoded at most kSlotTexels a side (load_picture, solver/features/picture_file.h) and made
// into the slot's pixels with every mip level (make_slot_pixels, picture_atlas.h). Finished slots
// wait in a queue guarded by a mutex; the render thread takes a few each frame (take()). The
// loader stops decoding while kMaxWaiting slots wait, so memory stays bounded however slowly they
// are taken.
// Thread-safety: construct, take(), waiting() and wait_decoded() from one thread (the render
// thread); the loader's own thread touches only the queue, under the mutex. The destructor stops
// the thread and joins it.
#pragma once
#include <condition_variable>
#include <deque>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "viewer/scene/renderer.h"

namespace kith {

// Decodes a PNG/JPEG shrunk to at most MAX_SIDE pixels a side (solver/features/picture_file.h);
// false (and an empty picture, with the reason in *WHY) if it cannot. Any thread.
bool load_picture(const std::string& path, Picture* out, int max_side = 256, std::string* why = nullptr);

struct PictureJob {
  int item = -1;
  int slot = -1;
  std::string path;
};

struct LoadedPicture {
  int item = -1;
  int slot = -1;
  bool ok = false;     // false: unreadable (the item stays a disc)
  float aspect = 1.f;  // width / height of the picture as decoded
  SlotPixels pixels;
};

class PictureLoader {
 public:
  static constexpr size_t kMaxWaiting = 1024;  // finished slots held before the loader pauses

  explicit PictureLoader(std::vector<PictureJob> jobs);
  ~PictureLoader();
  PictureLoader(const PictureLoader&) = delete;
  PictureLoader& operator=(const PictureLoader&) = delete;

  // Up to `most` finished pictures, in the order they were decoded.
  std::vector<LoadedPicture> take(size_t most);
  // Jobs not yet taken (decoding or waiting).
  size_t remaining() const;
  // Blocks until every job is decoded or the queue is full (take() more, then call again).
  void wait_decoded() const;

 private:
  void run();

  const std::vector<PictureJob> jobs_;
  mutable std::mutex mutex_;
  mutable std::condition_variable changed_;
  std::deque<LoadedPicture> done_;  // guarded by mutex_
  size_t decoded_ = 0;              // guarded by mutex_
  size_t taken_ = 0;                // guarded by mutex_
  bool stop_ = false;               // guarded by mutex_
  std::thread thread_;              // last: starts once the members above are made
};

}  // namespace kith
