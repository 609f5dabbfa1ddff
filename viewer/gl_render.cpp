#include "gl_render.h"

#define GL_GLEXT_PROTOTYPES 1
#include <GL/gl.h>
#include <GL/glext.h>
#include <cairo.h>

#include <cstring>
#include <tuple>
#include <utility>
#include <stdexcept>

namespace machcut::view {

namespace {

// The status of a shader or program object; on failure its log goes into `error` and the
// object is deleted. One function for both kinds: only the GL entry points differ.
bool check_status(GLuint object, GLenum status, void (*get_iv)(GLuint, GLenum, GLint*),
                  void (*get_log)(GLuint, GLsizei, GLsizei*, GLchar*), void (*destroy)(GLuint),
                  const char* what, std::string* error) {
  GLint ok = 0;
  get_iv(object, status, &ok);
  if (ok) return true;
  char log[1024] = {};
  get_log(object, sizeof log, nullptr, log);
  *error = std::string(what) + log;
  destroy(object);
  return false;
}

unsigned compile(GLenum type, const char* src, std::string* error) {
  const GLuint s = glCreateShader(type);
  glShaderSource(s, 1, &src, nullptr);
  glCompileShader(s);
  if (!check_status(s, GL_COMPILE_STATUS, glGetShaderiv, glGetShaderInfoLog, glDeleteShader,
                    "shader compile failed: ", error))
    return 0;
  return s;
}

unsigned link(const char* vs_src, const char* fs_src, std::string* error) {
  const unsigned vs = compile(GL_VERTEX_SHADER, vs_src, error);
  const unsigned fs = vs ? compile(GL_FRAGMENT_SHADER, fs_src, error) : 0;
  if (!vs || !fs) return 0;
  const GLuint p = glCreateProgram();
  glAttachShader(p, vs);
  glAttachShader(p, fs);
  glLinkProgram(p);
  glDeleteShader(vs);
  glDeleteShader(fs);
  if (!check_status(p, GL_LINK_STATUS, glGetProgramiv, glGetProgramInfoLog, glDeleteProgram,
                    "shader link failed: ", error))
    return 0;
  return p;
}

void set_matrices(unsigned prog, const Mat4& view, const Mat4& proj) {
  glUniformMatrix4fv(glGetUniformLocation(prog, "u_view"), 1, GL_FALSE, view.m);
  glUniformMatrix4fv(glGetUniformLocation(prog, "u_proj"), 1, GL_FALSE, proj.m);
}

// The key of the cached model image's shell state: colour and visibility of each shell.
std::vector<float> shell_key(const std::vector<ShellView>* shells) {
  std::vector<float> k;
  if (!shells) return k;
  for (const ShellView& s : *shells) k.insert(k.end(), {s.colour[0], s.colour[1], s.colour[2], s.visible ? 1.f : 0.f});
  return k;
}

void free_target(unsigned& fbo, unsigned& colour, unsigned& depth, bool colour_is_texture) {
  if (fbo) glDeleteFramebuffers(1, &fbo);
  if (colour) colour_is_texture ? glDeleteTextures(1, &colour) : glDeleteRenderbuffers(1, &colour);
  if (depth) glDeleteRenderbuffers(1, &depth);
  fbo = colour = depth = 0;
}

constexpr float kBackground[3] = {0.085f, 0.098f, 0.125f};

}  // namespace

Renderer::~Renderer() {
  // The context may already be gone at exit; GL objects die with it.
}

bool Renderer::init(std::string* error) {
  model_prog_ = link(kModelVert, kModelFrag, error);
  overlay_prog_ = model_prog_ ? link(kOverlayVert, kOverlayFrag, error) : 0;
  paint_prog_ = overlay_prog_ ? link(kPaintVert, kPaintFrag, error) : 0;
  if (!paint_prog_) return false;
  glGenVertexArrays(1, &vao_);
  glGenBuffers(1, &vbo_);
  glGenBuffers(1, &ebo_);
  glGenBuffers(1, &lod_ebo_);
  glGenVertexArrays(1, &overlay_vao_);
  glGenBuffers(1, &overlay_vbo_);
  glBindVertexArray(overlay_vao_);
  glBindBuffer(GL_ARRAY_BUFFER, overlay_vbo_);
  glEnableVertexAttribArray(0);
  glVertexAttribPointer(0, 3, GL_FLOAT, GL_FALSE, 3 * sizeof(float), nullptr);
  glBindVertexArray(0);
  return true;
}

void Renderer::upload(const DisplayMesh& mesh) {
  glBindVertexArray(vao_);
  glBindBuffer(GL_ARRAY_BUFFER, vbo_);
  glBufferData(GL_ARRAY_BUFFER, static_cast<GLsizeiptr>(mesh.positions.size() * sizeof(float)),
               mesh.positions.data(), GL_STATIC_DRAW);
  glEnableVertexAttribArray(0);
  glVertexAttribPointer(0, 3, GL_FLOAT, GL_FALSE, 3 * sizeof(float), nullptr);
  glBindBuffer(GL_ELEMENT_ARRAY_BUFFER, ebo_);
  glBufferData(GL_ELEMENT_ARRAY_BUFFER, static_cast<GLsizeiptr>(mesh.indices.size() * 4),
               mesh.indices.data(), GL_STATIC_DRAW);
  glBindVertexArray(0);
  glBindBuffer(GL_ELEMENT_ARRAY_BUFFER, lod_ebo_);
  glBufferData(GL_ELEMENT_ARRAY_BUFFER, static_cast<GLsizeiptr>(mesh.lod_indices.size() * 4),
               mesh.lod_indices.empty() ? nullptr : mesh.lod_indices.data(), GL_STATIC_DRAW);
  glBindBuffer(GL_ELEMENT_ARRAY_BUFFER, 0);
  index_count_ = mesh.indices.size();
  lod_count_ = mesh.lod_indices.size();
  shells_ = mesh.shells;
  lod_shells_ = mesh.lod_shells;
  cache_ok_ = false;
  for (CachedOverlay* c : {&features_, &boundary_, &nonmanifold_, &set_aside_, &set_aside_edges_, &paint_})
    c->data = nullptr;  // a new model
}

void Renderer::ensure_targets(int w, int h) {
  if (model_.w == w && model_.h == h && model_.fbo) return;
  free_target(model_.fbo, model_.colour, model_.depth, false);
  free_target(scene_.fbo, scene_.colour, scene_.depth, true);
  // Model cache: colour and depth renderbuffers (blitted, never sampled).
  model_ = make_frame_target(w, h, /*with_stencil=*/false);
  // Scene: a texture the UI shows, depth of the same format so the blit copies it.
  glGenFramebuffers(1, &scene_.fbo);
  glBindFramebuffer(GL_FRAMEBUFFER, scene_.fbo);
  glGenTextures(1, &scene_.colour);
  glBindTexture(GL_TEXTURE_2D, scene_.colour);
  glTexImage2D(GL_TEXTURE_2D, 0, GL_RGBA8, w, h, 0, GL_RGBA, GL_UNSIGNED_BYTE, nullptr);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MIN_FILTER, GL_LINEAR);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MAG_FILTER, GL_LINEAR);
  glFramebufferTexture2D(GL_FRAMEBUFFER, GL_COLOR_ATTACHMENT0, GL_TEXTURE_2D, scene_.colour, 0);
  glGenRenderbuffers(1, &scene_.depth);
  glBindRenderbuffer(GL_RENDERBUFFER, scene_.depth);
  glRenderbufferStorage(GL_RENDERBUFFER, GL_DEPTH_COMPONENT24, w, h);
  glFramebufferRenderbuffer(GL_FRAMEBUFFER, GL_DEPTH_ATTACHMENT, GL_RENDERBUFFER, scene_.depth);
  glBindFramebuffer(GL_FRAMEBUFFER, 0);
  scene_.w = w;
  scene_.h = h;
  cache_ok_ = false;
}

bool Renderer::model_cache_valid(const ViewParams& p) const {
  return cache_ok_ && cached_lod_ == (p.use_lod && has_lod()) &&
         std::memcmp(cached_view_.m, p.view.m, sizeof p.view.m) == 0 &&
         std::memcmp(cached_proj_.m, p.proj.m, sizeof p.proj.m) == 0 &&
         cached_shells_ == shell_key(p.shells);
}

void Renderer::draw_model(const ViewParams& p, RenderStats* stats) {
  glBindFramebuffer(GL_FRAMEBUFFER, model_.fbo);
  glViewport(0, 0, p.width, p.height);
  glClearColor(kBackground[0], kBackground[1], kBackground[2], 1.0f);
  glClear(GL_COLOR_BUFFER_BIT | GL_DEPTH_BUFFER_BIT);
  const bool lod = p.use_lod && has_lod();
  std::size_t drawn = 0;
  if (has_mesh()) {
    glEnable(GL_DEPTH_TEST);
    glDepthFunc(GL_LESS);
    glUseProgram(model_prog_);
    set_matrices(model_prog_, p.view, p.proj);
    const GLint colour = glGetUniformLocation(model_prog_, "u_colour");
    glBindVertexArray(vao_);
    glBindBuffer(GL_ELEMENT_ARRAY_BUFFER, lod ? lod_ebo_ : ebo_);
    const std::vector<IndexRange>& ranges = lod ? lod_shells_ : shells_;
    for (std::size_t s = 0; s < ranges.size(); ++s) {
      const ShellView* v = p.shells && s < p.shells->size() ? &(*p.shells)[s] : nullptr;
      if (v && !v->visible) continue;
      const float grey[3] = {0.75f, 0.75f, 0.78f};
      glUniform3fv(colour, 1, v ? v->colour : grey);
      glDrawElements(GL_TRIANGLES, static_cast<GLsizei>(ranges[s].count), GL_UNSIGNED_INT,
                     reinterpret_cast<const void*>(static_cast<std::uintptr_t>(ranges[s].first) * 4));
      drawn += ranges[s].count / 3;
    }
    glBindVertexArray(0);
  }
  cached_view_ = p.view;
  cached_proj_ = p.proj;
  cached_shells_ = shell_key(p.shells);
  cached_lod_ = lod;
  cache_ok_ = true;
  if (stats) {
    stats->model_redrawn = true;
    stats->lod_drawn = lod;
    stats->triangles_drawn = drawn;
  }
}

void Renderer::draw_lines(const std::vector<float>& xyz, unsigned mode, const float colour[4], float pull) {
  if (xyz.empty()) return;
  glBindVertexArray(overlay_vao_);
  glBindBuffer(GL_ARRAY_BUFFER, overlay_vbo_);
  glBufferData(GL_ARRAY_BUFFER, static_cast<GLsizeiptr>(xyz.size() * sizeof(float)), xyz.data(), GL_STREAM_DRAW);
  glUniform4fv(glGetUniformLocation(overlay_prog_, "u_colour"), 1, colour);
  glUniform1f(glGetUniformLocation(overlay_prog_, "u_depth_pull"), pull);
  glDrawArrays(mode, 0, static_cast<GLsizei>(xyz.size() / 3));
  glBindVertexArray(0);
}

void Renderer::bind_cached(CachedOverlay& c, const std::vector<float>& v, int attributes) {
  if (!c.vao) {
    glGenVertexArrays(1, &c.vao);
    glGenBuffers(1, &c.vbo);
    glBindVertexArray(c.vao);
    glBindBuffer(GL_ARRAY_BUFFER, c.vbo);
    const GLsizei stride = static_cast<GLsizei>(3 * attributes * sizeof(float));
    for (int a = 0; a < attributes; ++a) {
      glEnableVertexAttribArray(static_cast<GLuint>(a));
      glVertexAttribPointer(static_cast<GLuint>(a), 3, GL_FLOAT, GL_FALSE, stride,
                            reinterpret_cast<const void*>(3 * a * sizeof(float)));
    }
  }
  glBindVertexArray(c.vao);
  if (c.data != v.data() || c.size != v.size()) {
    glBindBuffer(GL_ARRAY_BUFFER, c.vbo);
    glBufferData(GL_ARRAY_BUFFER, static_cast<GLsizeiptr>(v.size() * sizeof(float)), v.data(), GL_STATIC_DRAW);
    c.data = v.data();
    c.size = v.size();
  }
}

void Renderer::draw_cached(CachedOverlay& c, const std::vector<float>& xyz, unsigned mode, const float colour[4],
                           float pull, std::size_t first, std::size_t count) {
  if (xyz.empty()) return;
  bind_cached(c, xyz, 1);
  glUniform4fv(glGetUniformLocation(overlay_prog_, "u_colour"), 1, colour);
  glUniform1f(glGetUniformLocation(overlay_prog_, "u_depth_pull"), pull);
  const std::size_t vertices = xyz.size() / 3;
  if (count == 0 || first + count > vertices) first = 0, count = vertices;
  glDrawArrays(mode, static_cast<GLint>(first), static_cast<GLsizei>(count));
  glBindVertexArray(0);
}

void Renderer::draw_paint(const std::vector<float>& v) {
  if (v.empty()) return;
  bind_cached(paint_, v, 2);  // position and colour per corner
  glDrawArrays(GL_TRIANGLES, 0, static_cast<GLsizei>(v.size() / 6));
  glBindVertexArray(0);
}

void Renderer::draw_overlays(const ViewParams& p) {
  // Drag sensitivity: the analysed surface repainted, opaque (its own program: colour per corner).
  if (p.paint && !p.paint->empty()) {
    glUseProgram(paint_prog_);
    set_matrices(paint_prog_, p.view, p.proj);
    glUniform1f(glGetUniformLocation(paint_prog_, "u_depth_pull"), 1e-4f);
    glEnable(GL_DEPTH_TEST);
    glDepthFunc(GL_LEQUAL);
    draw_paint(*p.paint);
    glDepthFunc(GL_LESS);
  }
  glUseProgram(overlay_prog_);
  set_matrices(overlay_prog_, p.view, p.proj);
  glEnable(GL_BLEND);
  glBlendFunc(GL_SRC_ALPHA, GL_ONE_MINUS_SRC_ALPHA);
  if (p.show_plane) {
    std::vector<float> quad;
    for (int i : {0, 1, 2, 0, 2, 3})
      quad.insert(quad.end(), {float(p.plane[i].x), float(p.plane[i].y), float(p.plane[i].z)});
    std::vector<float> rim;
    for (int i : {0, 1, 2, 3})
      rim.insert(rim.end(), {float(p.plane[i].x), float(p.plane[i].y), float(p.plane[i].z)});
    glEnable(GL_DEPTH_TEST);
    glDepthMask(GL_FALSE);
    const float fill[4] = {0.98f, 0.62f, 0.20f, 0.22f};
    draw_lines(quad, GL_TRIANGLES, fill, 0.0f);
    const float edge[4] = {1.0f, 0.70f, 0.30f, 0.85f};
    draw_lines(rim, GL_LINE_LOOP, edge, 0.0f);
    glDepthMask(GL_TRUE);
  }
  // Validity features: their triangles tinted over the model (slightly pulled towards the eye:
  // the analysis mesh lies on the shown surface, a union only cuts it).
  if (p.features && !p.features->empty()) {
    glEnable(GL_DEPTH_TEST);
    glDepthFunc(GL_LEQUAL);
    glDepthMask(GL_FALSE);
    draw_cached(features_, *p.features, GL_TRIANGLES, kFeatureTint, 1e-4f);
    if (p.highlight_count > 0)
      draw_cached(features_, *p.features, GL_TRIANGLES, kFeatureHighlight, 1.5e-4f, 3 * p.highlight_first,
                  3 * p.highlight_count);
    glDepthMask(GL_TRUE);
    glDepthFunc(GL_LESS);
  }
  // Health: open and non-manifold edges, visible ones bright, hidden ones faint.
  for (auto [edges, colour, cache] : {std::tuple{p.boundary, kBoundaryEdge, &boundary_},
                                       std::tuple{p.nonmanifold, kNonManifoldEdge, &nonmanifold_}}) {
    if (!edges || edges->empty()) continue;
    glDisable(GL_DEPTH_TEST);
    const float faint[4] = {colour[0], colour[1], colour[2], 0.30f};
    draw_cached(*cache, *edges, GL_LINES, faint, 0.0f);
    glEnable(GL_DEPTH_TEST);
    glDepthFunc(GL_LEQUAL);
    draw_cached(*cache, *edges, GL_LINES, colour, 2e-4f);
    glDepthFunc(GL_LESS);
  }
  // Parts left out of the analysis: a faint translucent skin and a grey wireframe.
  if (p.set_aside && !p.set_aside->empty()) {
    glEnable(GL_DEPTH_TEST);
    glDepthMask(GL_FALSE);
    draw_cached(set_aside_, *p.set_aside, GL_TRIANGLES, kSetAsideFill, 0.0f);
    glDepthMask(GL_TRUE);
  }
  if (p.set_aside_edges && !p.set_aside_edges->empty()) {
    glEnable(GL_DEPTH_TEST);
    glDepthFunc(GL_LEQUAL);
    draw_cached(set_aside_edges_, *p.set_aside_edges, GL_LINES, kSetAsideEdge, 1e-4f);
    glDepthFunc(GL_LESS);
  }
  // Outline: a faint pass through the model (hidden parts), then the visible part on top.
  glDisable(GL_DEPTH_TEST);
  const float hidden[4] = {1.0f, 0.95f, 0.55f, 0.35f};
  draw_lines(p.outline, GL_LINES, hidden, 0.0f);
  glEnable(GL_DEPTH_TEST);
  glDepthFunc(GL_LEQUAL);
  const float visible[4] = {1.0f, 0.98f, 0.70f, 1.0f};
  draw_lines(p.outline, GL_LINES, visible, 2e-4f);
  glDepthFunc(GL_LESS);
  glDisable(GL_BLEND);
}

unsigned Renderer::render(const ViewParams& p, RenderStats* stats) {
  if (p.width <= 0 || p.height <= 0) return 0;
  ensure_targets(p.width, p.height);
  if (stats) *stats = RenderStats{};
  if (!model_cache_valid(p)) draw_model(p, stats);
  // Compose: cached model colour and depth, then the overlays on top.
  glBindFramebuffer(GL_READ_FRAMEBUFFER, model_.fbo);
  glBindFramebuffer(GL_DRAW_FRAMEBUFFER, scene_.fbo);
  glBlitFramebuffer(0, 0, p.width, p.height, 0, 0, p.width, p.height,
                    GL_COLOR_BUFFER_BIT | GL_DEPTH_BUFFER_BIT, GL_NEAREST);
  glBindFramebuffer(GL_FRAMEBUFFER, scene_.fbo);
  glViewport(0, 0, p.width, p.height);
  draw_overlays(p);
  glDisable(GL_DEPTH_TEST);
  glUseProgram(0);
  glBindFramebuffer(GL_FRAMEBUFFER, 0);
  return scene_.colour;
}

std::string read_png(int w, int h) {
  cairo_surface_t* surf = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
  const int stride = cairo_image_surface_get_stride(surf);
  std::vector<unsigned char> rows(static_cast<std::size_t>(w) * h * 4);
  glPixelStorei(GL_PACK_ALIGNMENT, 1);
  glReadPixels(0, 0, w, h, GL_BGRA, GL_UNSIGNED_BYTE, rows.data());
  cairo_surface_flush(surf);
  unsigned char* dst = cairo_image_surface_get_data(surf);
  for (int y = 0; y < h; ++y) {
    unsigned char* d = dst + static_cast<std::size_t>(y) * stride;
    std::memcpy(d, rows.data() + static_cast<std::size_t>(h - 1 - y) * w * 4, static_cast<std::size_t>(w) * 4);
    for (int x = 0; x < w; ++x) d[4 * x + 3] = 255;  // opaque frame
  }
  cairo_surface_mark_dirty(surf);
  std::string png;
  const auto sink = [](void* closure, const unsigned char* data, unsigned int length) {
    static_cast<std::string*>(closure)->append(reinterpret_cast<const char*>(data), length);
    return CAIRO_STATUS_SUCCESS;
  };
  const cairo_status_t st = cairo_surface_write_to_png_stream(surf, sink, &png);
  cairo_surface_destroy(surf);
  if (st != CAIRO_STATUS_SUCCESS) throw std::runtime_error("PNG encoding failed");
  return png;
}

}  // namespace machcut::view
