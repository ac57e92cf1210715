#include "viewer/gl/gl_renderer.h"

#include <epoxy/gl.h>
#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <glm/gtc/type_ptr.hpp>
#include <sstream>
#include <stdexcept>

namespace kith {

uint32_t pack_rgba(float r, float g, float b, float a) {
  auto byte = [](float x) { return uint32_t(std::clamp(x, 0.f, 1.f) * 255.f + 0.5f); };
  return byte(r) | (byte(g) << 8) | (byte(b) << 16) | (byte(a) << 24);
}

std::string shader_directory() {
  namespace fs = std::filesystem;
  if (const char* env = std::getenv("KITH_SHADERS"); env && *env) return env;
  std::error_code ec;
  const fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  if (!ec) {
    const fs::path installed = exe.parent_path().parent_path() / "share" / "kith" / "shaders";
    if (fs::exists(installed / "points.vert", ec)) return installed.string();
  }
  return std::string(KITH_SOURCE_DIR) + "/shaders";
}

namespace {

std::string read_text(const std::string& path) {
  std::ifstream in(path);
  if (!in) throw std::runtime_error("cannot read shader " + path + " (set KITH_SHADERS to the shaders folder)");
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

GLuint compile(GLenum kind, const std::string& path) {
  const std::string text = read_text(path);
  const char* src = text.c_str();
  GLuint s = glCreateShader(kind);
  glShaderSource(s, 1, &src, nullptr);
  glCompileShader(s);
  GLint ok = 0;
  glGetShaderiv(s, GL_COMPILE_STATUS, &ok);
  if (!ok) {
    char log[4096];
    glGetShaderInfoLog(s, sizeof log, nullptr, log);
    glDeleteShader(s);
    throw std::runtime_error("shader " + path + " does not compile:\n" + log);
  }
  return s;
}

GLuint program(const std::string& name) {
  const std::string dir = shader_directory();
  GLuint vs = compile(GL_VERTEX_SHADER, dir + "/" + name + ".vert");
  GLuint fs = compile(GL_FRAGMENT_SHADER, dir + "/" + name + ".frag");
  GLuint p = glCreateProgram();
  glAttachShader(p, vs);
  glAttachShader(p, fs);
  glLinkProgram(p);
  glDeleteShader(vs);
  glDeleteShader(fs);
  GLint ok = 0;
  glGetProgramiv(p, GL_LINK_STATUS, &ok);
  if (!ok) {
    char log[4096];
    glGetProgramInfoLog(p, sizeof log, nullptr, log);
    throw std::runtime_error("shader program " + name + " does not link:\n" + log);
  }
  return p;
}

struct Buffer {
  GLuint vao = 0, vbo = 0;
  GLsizei count = 0;
};

}  // namespace

struct GlRenderer::Impl {
  GLuint points_program = 0, lines_program = 0;
  Buffer points, highlights, lines, grid;
  GLuint pictures = 0;  // GL_TEXTURE_2D_ARRAY, kSlotsPerLayer slots a layer
  int picture_layers = 0;
};

GlRenderer::GlRenderer() : impl_(std::make_unique<Impl>()) {
  Impl& m = *impl_;
  m.points_program = program("points");
  m.lines_program = program("lines");
  for (Buffer* b : {&m.points, &m.highlights, &m.lines, &m.grid}) {
    glGenVertexArrays(1, &b->vao);
    glGenBuffers(1, &b->vbo);
  }
  for (Buffer* b : {&m.points, &m.highlights}) {
    glBindVertexArray(b->vao);
    glBindBuffer(GL_ARRAY_BUFFER, b->vbo);
    glEnableVertexAttribArray(0);
    glVertexAttribPointer(0, 3, GL_FLOAT, GL_FALSE, sizeof(PointVertex), (void*)offsetof(PointVertex, position));
    glEnableVertexAttribArray(1);
    glVertexAttribPointer(1, 4, GL_UNSIGNED_BYTE, GL_TRUE, sizeof(PointVertex), (void*)offsetof(PointVertex, rgba));
    glEnableVertexAttribArray(2);
    glVertexAttribPointer(2, 1, GL_FLOAT, GL_FALSE, sizeof(PointVertex), (void*)offsetof(PointVertex, size));
    glEnableVertexAttribArray(3);
    glVertexAttribIPointer(3, 1, GL_UNSIGNED_INT, sizeof(PointVertex), (void*)offsetof(PointVertex, flags));
    glEnableVertexAttribArray(4);
    glVertexAttribIPointer(4, 1, GL_INT, sizeof(PointVertex), (void*)offsetof(PointVertex, slot));
    glEnableVertexAttribArray(5);
    glVertexAttribPointer(5, 1, GL_FLOAT, GL_FALSE, sizeof(PointVertex), (void*)offsetof(PointVertex, aspect));
  }
  for (Buffer* b : {&m.lines, &m.grid}) {
    glBindVertexArray(b->vao);
    glBindBuffer(GL_ARRAY_BUFFER, b->vbo);
    glEnableVertexAttribArray(0);
    glVertexAttribPointer(0, 3, GL_FLOAT, GL_FALSE, sizeof(LineVertex), (void*)offsetof(LineVertex, position));
    glEnableVertexAttribArray(1);
    glVertexAttribPointer(1, 4, GL_UNSIGNED_BYTE, GL_TRUE, sizeof(LineVertex), (void*)offsetof(LineVertex, rgba));
  }
  glBindVertexArray(0);
  glGenTextures(1, &m.pictures);
}

GlRenderer::~GlRenderer() {
  Impl& m = *impl_;
  for (Buffer* b : {&m.points, &m.highlights, &m.lines, &m.grid}) {
    glDeleteBuffers(1, &b->vbo);
    glDeleteVertexArrays(1, &b->vao);
  }
  glDeleteTextures(1, &m.pictures);
  glDeleteProgram(m.points_program);
  glDeleteProgram(m.lines_program);
}

namespace {
template <typename T>
void upload(Buffer& b, const std::vector<T>& data) {
  glBindBuffer(GL_ARRAY_BUFFER, b.vbo);
  glBufferData(GL_ARRAY_BUFFER, GLsizeiptr(data.size() * sizeof(T)), data.data(), GL_DYNAMIC_DRAW);
  b.count = GLsizei(data.size());
}
}  // namespace

void GlRenderer::set_points(const std::vector<PointVertex>& p) { upload(impl_->points, p); }
void GlRenderer::set_highlights(const std::vector<PointVertex>& p) { upload(impl_->highlights, p); }
void GlRenderer::set_lines(const std::vector<LineVertex>& l) { upload(impl_->lines, l); }
void GlRenderer::set_grid(const std::vector<LineVertex>& g) { upload(impl_->grid, g); }

void GlRenderer::set_picture_slots(int slots) {
  Impl& m = *impl_;
  slots = std::clamp(slots, 0, kMaxPictureSlots);
  m.picture_layers = (slots + kSlotsPerLayer - 1) / kSlotsPerLayer;
  if (m.picture_layers == 0) return;
  glBindTexture(GL_TEXTURE_2D_ARRAY, m.pictures);
  const int side = kSlotTexels * kLayerSide;
  for (int l = 0; l < kSlotLevels; ++l)
    glTexImage3D(GL_TEXTURE_2D_ARRAY, l, GL_RGBA8, side >> l, side >> l, m.picture_layers, 0, GL_RGBA,
                 GL_UNSIGNED_BYTE, nullptr);
  glTexParameteri(GL_TEXTURE_2D_ARRAY, GL_TEXTURE_BASE_LEVEL, 0);
  glTexParameteri(GL_TEXTURE_2D_ARRAY, GL_TEXTURE_MAX_LEVEL, kSlotLevels - 1);
  // Mip levels chosen per pixel, nearest level (half the texture reads of trilinear on llvmpipe).
  glTexParameteri(GL_TEXTURE_2D_ARRAY, GL_TEXTURE_MIN_FILTER, GL_LINEAR_MIPMAP_NEAREST);
  glTexParameteri(GL_TEXTURE_2D_ARRAY, GL_TEXTURE_MAG_FILTER, GL_LINEAR);
  glTexParameteri(GL_TEXTURE_2D_ARRAY, GL_TEXTURE_WRAP_S, GL_CLAMP_TO_EDGE);
  glTexParameteri(GL_TEXTURE_2D_ARRAY, GL_TEXTURE_WRAP_T, GL_CLAMP_TO_EDGE);
}

void GlRenderer::set_slot(int slot, const SlotPixels& pixels) {
  Impl& m = *impl_;
  if (slot < 0 || slot >= m.picture_layers * kSlotsPerLayer || pixels.rgba.size() != SlotPixels::bytes()) return;
  const int layer = slot / kSlotsPerLayer, cell = slot % kSlotsPerLayer;
  glBindTexture(GL_TEXTURE_2D_ARRAY, m.pictures);
  glPixelStorei(GL_UNPACK_ALIGNMENT, 1);
  for (int l = 0; l < kSlotLevels; ++l) {
    const int side = kSlotTexels >> l;
    glTexSubImage3D(GL_TEXTURE_2D_ARRAY, l, (cell % kLayerSide) * side, (cell / kLayerSide) * side, layer, side, side,
                    1, GL_RGBA, GL_UNSIGNED_BYTE, pixels.rgba.data() + SlotPixels::level_offset(l));
  }
}

void GlRenderer::draw(const FrameParams& f) {
  Impl& m = *impl_;
  glViewport(0, 0, f.width, f.height);
  glClearColor(f.ground.r, f.ground.g, f.ground.b, 1.f);
  glClearDepth(1.0);
  glClear(GL_COLOR_BUFFER_BIT | GL_DEPTH_BUFFER_BIT);
  glEnable(GL_DEPTH_TEST);
  glDepthFunc(GL_LEQUAL);
  glEnable(GL_BLEND);
  glBlendFunc(GL_SRC_ALPHA, GL_ONE_MINUS_SRC_ALPHA);
  glEnable(GL_PROGRAM_POINT_SIZE);

  auto set_camera = [&](GLuint p) {
    glUseProgram(p);
    glUniformMatrix4fv(glGetUniformLocation(p, "u_view"), 1, GL_FALSE, glm::value_ptr(f.view));
    glUniformMatrix4fv(glGetUniformLocation(p, "u_projection"), 1, GL_FALSE, glm::value_ptr(f.projection));
  };

  if ((f.grid && m.grid.count) || (f.lines && m.lines.count)) {
    set_camera(m.lines_program);
    if (f.grid && m.grid.count) {
      glDepthMask(GL_FALSE);  // the floor never hides an item
      glBindVertexArray(m.grid.vao);
      glDrawArrays(GL_LINES, 0, m.grid.count);
      glDepthMask(GL_TRUE);
    }
  }
  if (m.points.count) {
    const GLuint p = m.points_program;
    set_camera(p);
    glUniform1f(glGetUniformLocation(p, "u_reference_distance"), f.reference_distance);
    glUniform1f(glGetUniformLocation(p, "u_point_scale"), f.point_scale);
    glUniform1f(glGetUniformLocation(p, "u_max_point_size"), f.max_point_size);
    glUniform3f(glGetUniformLocation(p, "u_ground"), f.ground.r, f.ground.g, f.ground.b);
    glUniform3f(glGetUniformLocation(p, "u_ink"), f.ink.r, f.ink.g, f.ink.b);
    glUniform1f(glGetUniformLocation(p, "u_fade_near"), f.fade_near);
    glUniform1f(glGetUniformLocation(p, "u_fade_far"), f.fade_far);
    glUniform1f(glGetUniformLocation(p, "u_fade_amount"), f.fade_amount);
    const bool pictures = f.pictures && m.picture_layers > 0;
    glUniform1i(glGetUniformLocation(p, "u_pictures"), pictures ? 1 : 0);
    glUniform1f(glGetUniformLocation(p, "u_picture_size"), f.picture_size);
    glUniform1f(glGetUniformLocation(p, "u_picture_min"), f.picture_min_pixels);
    glUniform1f(glGetUniformLocation(p, "u_max_picture_size"), f.max_picture_size);
    glUniform1i(glGetUniformLocation(p, "u_atlas"), 0);
    glActiveTexture(GL_TEXTURE0);
    glBindTexture(GL_TEXTURE_2D_ARRAY, m.pictures);
    glDisable(GL_BLEND);  // discs are opaque; blending would make llvmpipe read every covered pixel back
    glBindVertexArray(m.points.vao);
    const GLsizei count = f.point_budget > 0 ? std::min<GLsizei>(m.points.count, GLsizei(f.point_budget)) : m.points.count;
    glDrawArrays(GL_POINTS, 0, count);
    if (m.highlights.count) {
      glDisable(GL_DEPTH_TEST);
      glBindVertexArray(m.highlights.vao);
      glDrawArrays(GL_POINTS, 0, m.highlights.count);
      glEnable(GL_DEPTH_TEST);
    }
    glEnable(GL_BLEND);
  }
  if (f.lines && m.lines.count) {
    set_camera(m.lines_program);
    glDisable(GL_DEPTH_TEST);  // judgments of the selection stay visible through other items
    glBindVertexArray(m.lines.vao);
    glDrawArrays(GL_LINES, 0, m.lines.count);
    glEnable(GL_DEPTH_TEST);
  }
  glBindVertexArray(0);
  glUseProgram(0);
}

Picture GlRenderer::read_pixels(int width, int height) {
  Picture pic;
  pic.width = width;
  pic.height = height;
  pic.rgba.resize(size_t(width) * height * 4);
  glPixelStorei(GL_PACK_ALIGNMENT, 1);
  glReadPixels(0, 0, width, height, GL_RGBA, GL_UNSIGNED_BYTE, pic.rgba.data());
  // GL rows run bottom-up; pictures are top-first.
  const size_t row = size_t(width) * 4;
  std::vector<uint8_t> tmp(row);
  for (int y = 0; y < height / 2; ++y) {
    uint8_t* a = &pic.rgba[size_t(y) * row];
    uint8_t* b = &pic.rgba[size_t(height - 1 - y) * row];
    std::copy(a, a + row, tmp.data());
    std::copy(b, b + row, a);
    std::copy(tmp.data(), tmp.data() + row, b);
  }
  for (size_t i = 3; i < pic.rgba.size(); i += 4) pic.rgba[i] = 255;
  return pic;
}

}  // namespace kith
