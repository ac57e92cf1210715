// GlRenderer: the OpenGL 3.3 core backend of Renderer (viewer/scene/renderer.h). Points are GL_POINTS
// with a round sprite (much faster than instanced quads on Mesa's llvmpipe); an item with a picture
// slot is, in the same draw, a square sprite sampling a GL_TEXTURE_2D_ARRAY (kSlotsPerLayer slots of
// kSlotTexels a layer, kSlotLevels mip levels) when large enough on screen. Judgment lines and the
// floor grid are GL_LINES.
// Shaders are read at run time from shader_directory(). Works in a GLFW window or in the EGL
// surfaceless context of the windowless path. Use from the thread owning the current GL context;
// construct after the context is current and destroy before it goes.
#pragma once
#include <memory>
#include <string>

#include "viewer/scene/renderer.h"

namespace kith {

// KITH_SHADERS if set, else <executable>/../share/kith/shaders, else the source tree's shaders/.
std::string shader_directory();

class GlRenderer : public Renderer {
 public:
  // Throws std::runtime_error with the shader log if a shader does not compile.
  GlRenderer();
  ~GlRenderer() override;
  GlRenderer(const GlRenderer&) = delete;
  GlRenderer& operator=(const GlRenderer&) = delete;

  void set_points(const std::vector<PointVertex>& points) override;
  void set_highlights(const std::vector<PointVertex>& points) override;
  void set_lines(const std::vector<LineVertex>& lines) override;
  void set_grid(const std::vector<LineVertex>& grid) override;
  void set_picture_slots(int slots) override;
  void set_slot(int slot, const SlotPixels& pixels) override;
  void draw(const FrameParams& frame) override;
  Picture read_pixels(int width, int height) override;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace kith
