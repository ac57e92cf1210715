// ThreadSanitizer check of the picture loader (viewer/scene/picture_loader.h): a render thread
// takes a budget of finished slots a "frame" while the loader decodes, an atlas is destroyed
// mid-load, and a load of more slots than the loader's queue holds is finished. Not in ctest (it
// needs its own -fsanitize=thread build); run with tests/tsan/picture_loader.sh.
//   picture_loader_race DIR   (DIR/p-0.png .. p-299.png, e.g. from bench_picture_collection)
#include <chrono>
#include <cstdio>
#include <thread>

#include "viewer/scene/picture_atlas.h"

namespace {
using namespace kith;
struct Recorder : Renderer {
  size_t set = 0;
  void set_points(const std::vector<PointVertex>&) override {}
  void set_highlights(const std::vector<PointVertex>&) override {}
  void set_lines(const std::vector<LineVertex>&) override {}
  void set_grid(const std::vector<LineVertex>&) override {}
  void set_picture_slots(int) override {}
  void set_slot(int, const SlotPixels& p) override { set += p.rgba.size() == SlotPixels::bytes(); }
  void draw(const FrameParams&) override {}
  Picture read_pixels(int, int) override { return {}; }
};
}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) return 2;
  std::vector<std::string> paths;
  for (int i = 0; i < 300; ++i) paths.push_back(std::string(argv[1]) + "/p-" + std::to_string(i) + ".png");
  Recorder r;
  int bad = 0;
  {
    PictureAtlas a(paths);
    while (a.loading()) {
      a.pump(r, 7);
      std::this_thread::sleep_for(std::chrono::microseconds(300));
    }
    bad += a.ready_count() != 300 || r.set != 300;
  }
  {
    PictureAtlas b(paths);  // destroyed mid-load: the loader stops and joins
    b.pump(r, 3);
  }
  std::vector<std::string> many(3000, paths[0]);
  {
    PictureAtlas d(many);  // more than PictureLoader::kMaxWaiting: the loader pauses and resumes
    d.finish(r);
    bad += d.ready_count() != 3000;
  }
  std::printf(bad ? "picture loader: wrong counts\n" : "picture loader: all slots in\n");
  return bad ? 1 : 0;
}
