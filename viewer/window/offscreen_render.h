// Windowless pictures of a map: an OpenGL 3.3 core context on EGL's Mesa surfaceless platform
// (no display, no window system; works with llvmpipe), a framebuffer object, the same GlRenderer
// and MapView as the window, then a PNG. Used by `kith render`, `kith demo` with no display and
// `kith export --picture`. Any thread, one call at a time per thread.
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "solver/base/judgment.h"
#include "solver/base/points.h"
#include "solver/io/collection.h"
#include "solver/io/safe_file.h"
#include "viewer/scene/camera.h"
#include "viewer/scene/map_view.h"

namespace kith {

struct RenderOptions {
  int width = 1280;                   // (default: 1280)
  int height = 800;                   // (default: 800)
  std::optional<CameraPose> camera;   // (default: fit the whole map, from a three-quarter view)
  bool camera_at_centre = false;      // look at the map's centre instead of camera->target (default: off)
  ViewOptions view;                   // colours, sizes, grid, fade, pictures (default: ViewOptions{})
  std::vector<int> selected;          // items drawn selected, framed (default: none)
  std::vector<uint8_t> pinned;        // per item, 1 = drawn pinned (default: none)
  std::vector<Judgment> judgments;    // lines for the selected items' judgments (default: none)
  bool legend = true;                 // title and colour legend in the corner (default: on)
  std::string title;                  // (default: the collection's file name)
  std::string IsValid() const;        // "" when valid
};

// Draws `positions` (N x 2 or N x 3, collection order) and writes a PNG to `png_path` through
// write_file_safely with `file` (checked before drawing too, so a refused path costs nothing).
// Returns "" on success, else a message saying what went wrong (no EGL, no GL 3.3, cannot write).
std::string render_map_png(const Collection& collection, const Points& positions, const RenderOptions& options,
                           const std::string& png_path, const SafeWriteOptions& file);

// The same, returning the pixels instead of writing a file.
std::string render_map_pixels(const Collection& collection, const Points& positions, const RenderOptions& options,
                              Picture* out);

// Writes RGBA pixels as PNG through write_file_safely; "" or a message.
std::string write_png(const std::string& path, const Picture& picture, const SafeWriteOptions& file);

}  // namespace kith
