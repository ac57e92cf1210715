#include "viewer/window/offscreen_render.h"

#include <backends/imgui_impl_opengl3.h>
#include <epoxy/egl.h>
#include <epoxy/gl.h>
#include <imgui.h>

#include <filesystem>
#include <memory>
#include <stdexcept>

#include "solver/io/png_file.h"
#include "viewer/gl/gl_renderer.h"
#include "viewer/panels/ui_style.h"
#include "viewer/scene/map_feed.h"

namespace kith {

std::string RenderOptions::IsValid() const {
  if (width < 16 || height < 16 || width > 8192 || height > 8192)
    return "size must be between 16x16 and 8192x8192 pixels, got " + std::to_string(width) + "x" +
           std::to_string(height);
  return view.IsValid();
}

std::string write_png(const std::string& path, const Picture& pic, const SafeWriteOptions& file) {
  if (pic.width <= 0 || pic.height <= 0) return "nothing to write";
  return write_png_file(path, pic.rgba.data(), pic.width, pic.height, 4, file);
}

namespace {

// An EGL surfaceless display with a current OpenGL 3.3 core context; released on destruction.
class SurfacelessContext {
 public:
  SurfacelessContext() {
    auto get_platform_display =
        reinterpret_cast<PFNEGLGETPLATFORMDISPLAYEXTPROC>(eglGetProcAddress("eglGetPlatformDisplayEXT"));
    if (get_platform_display)
      display_ = get_platform_display(EGL_PLATFORM_SURFACELESS_MESA, EGL_DEFAULT_DISPLAY, nullptr);
    if (display_ == EGL_NO_DISPLAY) display_ = eglGetDisplay(EGL_DEFAULT_DISPLAY);
    if (display_ == EGL_NO_DISPLAY) throw std::runtime_error("no EGL display (is Mesa's libegl-mesa0 installed?)");
    EGLint major = 0, minor = 0;
    if (!eglInitialize(display_, &major, &minor))
      throw std::runtime_error("EGL did not initialize on the surfaceless platform");
    if (!eglBindAPI(EGL_OPENGL_API)) throw std::runtime_error("EGL has no desktop OpenGL");
    const EGLint config_attribs[] = {EGL_RENDERABLE_TYPE, EGL_OPENGL_BIT, EGL_NONE};
    EGLConfig config = nullptr;
    EGLint count = 0;
    eglChooseConfig(display_, config_attribs, &config, 1, &count);
    const EGLint context_attribs[] = {EGL_CONTEXT_MAJOR_VERSION, 3, EGL_CONTEXT_MINOR_VERSION, 3,
                                      EGL_CONTEXT_OPENGL_PROFILE_MASK, EGL_CONTEXT_OPENGL_CORE_PROFILE_BIT, EGL_NONE};
    context_ = eglCreateContext(display_, count > 0 ? config : EGL_NO_CONFIG_KHR, EGL_NO_CONTEXT, context_attribs);
    if (context_ == EGL_NO_CONTEXT) {
      eglTerminate(display_);
      throw std::runtime_error("EGL could not create an OpenGL 3.3 core context");
    }
    if (!eglMakeCurrent(display_, EGL_NO_SURFACE, EGL_NO_SURFACE, context_)) {
      eglDestroyContext(display_, context_);
      eglTerminate(display_);
      throw std::runtime_error("EGL could not make the context current without a surface");
    }
  }
  ~SurfacelessContext() {
    eglMakeCurrent(display_, EGL_NO_SURFACE, EGL_NO_SURFACE, EGL_NO_CONTEXT);
    eglDestroyContext(display_, context_);
    eglTerminate(display_);
  }

 private:
  EGLDisplay display_ = EGL_NO_DISPLAY;
  EGLContext context_ = EGL_NO_CONTEXT;
};

class Framebuffer {
 public:
  Framebuffer(int w, int h) {
    glGenFramebuffers(1, &fbo_);
    glBindFramebuffer(GL_FRAMEBUFFER, fbo_);
    glGenRenderbuffers(2, rb_);
    glBindRenderbuffer(GL_RENDERBUFFER, rb_[0]);
    glRenderbufferStorage(GL_RENDERBUFFER, GL_RGBA8, w, h);
    glFramebufferRenderbuffer(GL_FRAMEBUFFER, GL_COLOR_ATTACHMENT0, GL_RENDERBUFFER, rb_[0]);
    glBindRenderbuffer(GL_RENDERBUFFER, rb_[1]);
    glRenderbufferStorage(GL_RENDERBUFFER, GL_DEPTH_COMPONENT24, w, h);
    glFramebufferRenderbuffer(GL_FRAMEBUFFER, GL_DEPTH_ATTACHMENT, GL_RENDERBUFFER, rb_[1]);
    if (glCheckFramebufferStatus(GL_FRAMEBUFFER) != GL_FRAMEBUFFER_COMPLETE)
      throw std::runtime_error("the offscreen framebuffer is incomplete");
  }
  ~Framebuffer() {
    glBindFramebuffer(GL_FRAMEBUFFER, 0);
    glDeleteRenderbuffers(2, rb_);
    glDeleteFramebuffers(1, &fbo_);
  }

 private:
  GLuint fbo_ = 0, rb_[2] = {0, 0};
};

void draw_overlay(const MapView& view, const RenderOptions& o) {
  IMGUI_CHECKVERSION();
  ImGuiContext* ctx = ImGui::CreateContext();
  ImGuiIO& io = ImGui::GetIO();
  io.IniFilename = nullptr;
  io.DisplaySize = ImVec2(float(o.width), float(o.height));
  io.DeltaTime = 1.f / 60.f;
  const float scale = std::clamp(float(o.height) / 800.f, 0.75f, 2.5f);
  load_ui_font(16.f * scale);
  apply_ui_style(o.view.dark);
  ImGui::GetStyle().ScaleAllSizes(scale);
  ImGui_ImplOpenGL3_Init("#version 330");
  // Two passes: ImGui sizes auto-resizing windows on their first frame.
  for (int pass = 0; pass < 2; ++pass) {
    ImGui_ImplOpenGL3_NewFrame();
    ImGui::NewFrame();
    std::string title = o.title;
    if (title.empty()) title = std::filesystem::path(view.collection().source).filename().string();
    draw_legend(view, title, std::to_string(view.collection().size()) + " items", false);
    ImGui::Render();
  }
  ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());
  ImGui_ImplOpenGL3_Shutdown();
  ImGui::DestroyContext(ctx);
}

}  // namespace

std::string render_map_pixels(const Collection& collection, const Points& positions, const RenderOptions& o,
                              Picture* out) {
  if (std::string e = o.IsValid(); !e.empty()) return e;
  if (size_t(positions.rows()) != collection.size())
    return "the layout has " + std::to_string(positions.rows()) + " rows but the collection has " +
           std::to_string(collection.size()) + " items";
  try {
    SurfacelessContext context;
    Framebuffer fb(o.width, o.height);
    GlRenderer renderer;
    MapView view(collection, renderer);
    ViewOptions vo = o.view;
    vo.moving_budget = 0;  // a picture is never in motion: every item, always
    view.set_options(vo);
    StillFeed still(collection.ids, positions, o.judgments);
    for (size_t i = 0; i < o.pinned.size() && i < collection.size(); ++i)
      if (o.pinned[i]) still.post(cmd::Pin{int32_t(i), {}});
    view.camera().set_viewport(o.width, o.height);
    view.set_snapshot(still.latest());
    for (int i : o.selected) view.selection().add(i);
    view.selection_changed();
    view.fit_all(false);
    if (o.camera) {
      CameraPose pose = *o.camera;
      if (o.camera_at_centre) pose.target = view.camera().pose().target;
      view.camera().set_pose(pose);
    }
    view.finish_pictures();  // every picture decoded and uploaded before the one frame
    view.frame(0.f, o.width, o.height);
    if (o.legend) draw_overlay(view, o);
    glFinish();
    *out = renderer.read_pixels(o.width, o.height);
  } catch (const std::exception& e) {
    return std::string("windowless drawing failed: ") + e.what();
  }
  return "";
}

std::string render_map_png(const Collection& collection, const Points& positions, const RenderOptions& options,
                           const std::string& png_path, const SafeWriteOptions& file) {
  if (std::string e = check_write_target(png_path, file); !e.empty()) return e;
  Picture pic;
  if (std::string e = render_map_pixels(collection, positions, options, &pic); !e.empty()) return e;
  return write_png(png_path, pic, file);
}

}  // namespace kith
