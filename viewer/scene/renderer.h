// Renderer: the small drawing interface the map view talks to. The real backend is GlRenderer
// (OpenGL 3.3 core, used by the window and by the windowless EGL path); MockRenderer records what
// it was asked to draw so the viewer's logic (camera, picking, selection, scene building) is
// tested without GL.
//
// The view describes a frame as plain data: point sprites (one per item), line segments
// (judgments, floor grid), picture cards (point sprites sampling a texture atlas) and the
// camera matrices. Upload calls happen only when the data changed; draw() every frame.
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
  float size;         // pixels at the camera's target distance
  uint32_t flags;     // PointFlag bits
};

struct LineVertex {
  glm::vec3 position;
  uint32_t rgba;
};

struct CardSprite {
  glm::vec3 position;
  float size;         // pixels, fixed on screen
  int slot;           // atlas slot holding the picture
  uint32_t frame_rgba;
};

struct Picture {
  int width = 0, height = 0;
  std::vector<uint8_t> rgba;  // width * height * 4, rows top first
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
  bool cards = true;
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
  virtual void set_cards(const std::vector<CardSprite>& cards) = 0;
  // Atlas slots: kAtlasSlots pictures of kSlotPixels square; the picture is fitted inside.
  static constexpr int kSlotPixels = 128;
  static constexpr int kAtlasSide = 8;  // 8 x 8 slots
  static constexpr int kAtlasSlots = kAtlasSide * kAtlasSide;
  virtual void set_slot(int slot, const Picture& picture) = 0;
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
  void set_cards(const std::vector<CardSprite>& c) override { cards = c; }
  void set_slot(int slot, const Picture&) override { slots_set.push_back(slot); }
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
  std::vector<CardSprite> cards;
  std::vector<int> slots_set;
  FrameParams last_frame;
  int frames = 0, point_uploads = 0;
};

}  // namespace kith
