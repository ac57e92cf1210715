// Renderer: the small drawing interface the map view talks to. The real backend is GlRenderer
// (OpenGL 3.3 core, used by the window and by the windowless EGL path); MockRenderer records what
// it was asked to draw so the viewer's logic (camera, picking, selection, scene building) is
// tested without GL.
//
// The view describes a frame as plain data: point sprites (one per item, each a disc or, when it
// has a picture slot and is large enough on screen, its picture from the picture atlas), line
// segments (judgments, floor grid) and the camera matrices. Upload calls happen only when the
// data changed; draw() every frame.
// Call from the thread that owns the GL context.
#pragma once
#include <cstdint>
#include <glm/glm.hpp>
#include <string>
#include <vector>

namespace kith {

// Per-item flags drawn by the point shader.
enum PointFlag : uint32_t { kPointSelected = 1, kPointPinned = 2, kPointHovered = 4, kPointDragged = 8 };
// Bits 8-9 of the flags: the item's Mark (viewer/scene/colour_code.h): disc, ring, square, diamond.
constexpr uint32_t kPointMarkShift = 8;

struct PointVertex {
  glm::vec3 position;
  uint32_t rgba;      // packed little-endian: r in the low byte
  float size;         // disc diameter in pixels at the camera's target distance
  uint32_t flags;     // PointFlag bits
  int32_t slot = -1;  // picture atlas slot whose pixels are on the renderer, -1 = a disc always
  float aspect = 1.f; // the picture's width / height
};

struct LineVertex {
  glm::vec3 position;
  uint32_t rgba;
};

struct Picture {
  int width = 0, height = 0;
  std::vector<uint8_t> rgba;  // width * height * 4, rows top first
};

// The picture atlas's geometry (viewer/scene/picture_atlas.h): slots of kSlotTexels square with
// kSlotLevels mip levels, kLayerSide x kLayerSide slots to a layer of a 2-D array texture (Mesa
// allows 2,048 layers, so one slot a layer would stop at 2,048 pictures).
constexpr int kSlotTexels = 64;
constexpr int kSlotLevels = 4;  // 64, 32, 16, 8 texels
constexpr int kSlotGuard = 4;   // texels of the picture's edge repeated around it (level 0)
constexpr int kLayerSide = 4;
constexpr int kSlotsPerLayer = kLayerSide * kLayerSide;
constexpr int kMaxPictureSlots = 12288;

// One slot's pixels, every mip level: level l is (kSlotTexels >> l) square RGBA, rows top first,
// the levels one after another from level 0.
struct SlotPixels {
  std::vector<uint8_t> rgba;
  static size_t level_offset(int level);  // bytes before level `level`
  static size_t bytes() { return level_offset(kSlotLevels); }
};

struct FrameParams {
  glm::mat4 view{1.f}, projection{1.f};
  int width = 1, height = 1;            // framebuffer pixels
  glm::vec3 ground{1.f};                // background colour
  glm::vec3 ink{0.f};                   // ring/pin mark colour
  float reference_distance = 10.f;      // distance at which PointVertex::size holds
  float point_scale = 1.f;              // user size multiplier (and DPI)
  float fade_near = 0.f, fade_far = 1.f;  // depth range for the fade toward the ground
  float fade_amount = 0.55f;            // 0 = no fade
  float max_point_size = 48.f;
  size_t point_budget = 0;              // draw only the first this many points (level of detail); 0 = all
  bool grid = true;
  bool lines = true;
  bool pictures = true;                 // items with a slot drawn as their picture when large enough
  float picture_size = 32.f;            // picture side in pixels at the reference distance
  float picture_min_pixels = 8.f;       // smaller on screen than this: a disc (level of detail)
  float max_picture_size = 160.f;
};

uint32_t pack_rgba(float r, float g, float b, float a = 1.f);

class Renderer {
 public:
  virtual ~Renderer() = default;
  virtual void set_points(const std::vector<PointVertex>& points) = 0;
  // Selected, hovered and dragged items again, drawn over everything so they are never hidden.
  virtual void set_highlights(const std::vector<PointVertex>& points) = 0;
  virtual void set_lines(const std::vector<LineVertex>& lines) = 0;   // pairs of vertices
  virtual void set_grid(const std::vector<LineVertex>& grid) = 0;     // pairs of vertices
  // Room for `slots` pictures (at most kMaxPictureSlots); forgets the slots set before.
  virtual void set_picture_slots(int slots) = 0;
  virtual void set_slot(int slot, const SlotPixels& pixels) = 0;
  virtual void draw(const FrameParams& frame) = 0;
  // The framebuffer as RGBA rows, top first.
  virtual Picture read_pixels(int width, int height) = 0;
};

// Records calls; draws nothing.
class MockRenderer : public Renderer {
 public:
  void set_points(const std::vector<PointVertex>& p) override { points = p; ++point_uploads; }
  void set_highlights(const std::vector<PointVertex>& p) override { highlights = p; }
  void set_lines(const std::vector<LineVertex>& l) override { lines = l; }
  void set_grid(const std::vector<LineVertex>& g) override { grid = g; }
  void set_picture_slots(int slots) override { picture_slots = slots, slots_set.clear(); }
  void set_slot(int slot, const SlotPixels&) override { slots_set.push_back(slot); }
  void draw(const FrameParams& f) override { last_frame = f; ++frames; }
  Picture read_pixels(int w, int h) override {
    Picture p;
    p.width = w;
    p.height = h;
    p.rgba.assign(size_t(w) * h * 4, 0);
    return p;
  }
  std::vector<PointVertex> points, highlights;
  std::vector<LineVertex> lines, grid;
  int picture_slots = 0;
  std::vector<int> slots_set;
  FrameParams last_frame;
  int frames = 0, point_uploads = 0;
};

}  // namespace kith
