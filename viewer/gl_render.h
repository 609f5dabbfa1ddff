// The viewer's GL module: compiles the shaders, uploads the display mesh, and renders the 3-D
// view into an off-screen image. The shaded model is kept in its own colour + depth buffers and
// redrawn only when the camera, the size or the shell colours change; moving the station only
// re-composes the cached image with the translucent Mach plane and the section outline.
// Needs a current OpenGL 3.3 core context.
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <vector>

#include "app_state.h"
#include "display_mesh.h"
#include "platform.h"

namespace machcut::view {

struct ViewParams {
  int width = 0, height = 0;        // pixels
  Mat4 view, proj;
  const std::vector<ShellView>* shells = nullptr;
  bool use_lod = false;             // draw the simplified mesh (while orbiting)
  bool show_plane = false;
  std::array<Vec3, 4> plane{};      // corners, in order around the quad, m
  std::vector<float> outline;       // segments: 6 floats (two points) each, m
  const std::vector<float>* features = nullptr;     // triangles, 9 floats each, m (tinted)
  std::size_t highlight_first = 0, highlight_count = 0;  // features' triangles drawn brighter
  const std::vector<float>* boundary = nullptr;     // open edges, 6 floats each, m
  const std::vector<float>* nonmanifold = nullptr;  // non-manifold edges, 6 floats each, m
  // Drag sensitivity: triangles with a colour per corner, 6 floats per corner (xyz m, rgb).
  const std::vector<float>* paint = nullptr;
  // Parts left out of the analysis: translucent triangles (9 floats each) and their edges.
  const std::vector<float>* set_aside = nullptr;
  const std::vector<float>* set_aside_edges = nullptr;
};

// Overlay colours on the model (RGBA), shared with the legend in the model panel.
inline constexpr float kFeatureTint[4] = {1.00f, 0.16f, 0.72f, 0.80f};
inline constexpr float kFeatureHighlight[4] = {1.00f, 0.92f, 0.98f, 0.95f};  // the hovered one
inline constexpr float kBoundaryEdge[4] = {1.00f, 0.24f, 0.18f, 1.00f};
inline constexpr float kNonManifoldEdge[4] = {0.10f, 0.92f, 1.00f, 1.00f};
inline constexpr float kSetAsideFill[4] = {0.62f, 0.64f, 0.68f, 0.16f};
inline constexpr float kSetAsideEdge[4] = {0.70f, 0.72f, 0.76f, 0.75f};

struct RenderStats {
  bool model_redrawn = false;       // the cached model image was redrawn this call
  bool lod_drawn = false;           // ... with the simplified mesh
  std::size_t triangles_drawn = 0;
};

class Renderer {
 public:
  Renderer() = default;
  ~Renderer();
  Renderer(const Renderer&) = delete;
  Renderer& operator=(const Renderer&) = delete;

  // Compiles the shaders. Returns false and sets `error` when the context cannot.
  bool init(std::string* error);
  void upload(const DisplayMesh& mesh);
  bool has_mesh() const { return index_count_ > 0; }
  bool has_lod() const { return lod_count_ > 0; }

  // Renders the view; returns the GL texture holding the image (bottom-up rows).
  unsigned render(const ViewParams& p, RenderStats* stats = nullptr);

 private:
  using Target = FrameTarget;
  void ensure_targets(int w, int h);
  void draw_model(const ViewParams& p, RenderStats* stats);
  void draw_overlays(const ViewParams& p);
  void draw_lines(const std::vector<float>& xyz, unsigned mode, const float colour[4], float pull);
  // Feature and edge overlays change only with a new result or model: kept in buffers of their
  // own, uploaded again when the vector they come from changes (its storage or its size).
  struct CachedOverlay {
    unsigned vao = 0, vbo = 0;
    const float* data = nullptr;
    std::size_t size = 0;
  };
  // Binds c's vertex array, made on first use with `attributes` interleaved vec3 attributes
  // (position, then colour), and uploads v when it is not the array uploaded last.
  static void bind_cached(CachedOverlay& c, const std::vector<float>& v, int attributes);
  // Draws vertices [first, first + count) of the buffer (count 0: all of them).
  void draw_cached(CachedOverlay& c, const std::vector<float>& xyz, unsigned mode, const float colour[4],
                   float pull, std::size_t first = 0, std::size_t count = 0);
  bool model_cache_valid(const ViewParams& p) const;

  unsigned model_prog_ = 0, overlay_prog_ = 0;
  unsigned vao_ = 0, vbo_ = 0, ebo_ = 0, lod_ebo_ = 0;
  unsigned overlay_vao_ = 0, overlay_vbo_ = 0;
  CachedOverlay features_, boundary_, nonmanifold_, set_aside_, set_aside_edges_;
  void draw_paint(const std::vector<float>& xyzrgb);
  unsigned paint_prog_ = 0;
  CachedOverlay paint_;
  std::size_t index_count_ = 0, lod_count_ = 0;
  std::vector<IndexRange> shells_, lod_shells_;
  Target model_, scene_;
  // What the cached model image shows.
  Mat4 cached_view_, cached_proj_;
  std::vector<float> cached_shells_;
  bool cached_lod_ = false;
  bool cache_ok_ = false;
};

// Reads the currently bound read framebuffer (w × h, bottom-up) into top-down BGRA rows
// (Cairo's ARGB32 in memory) and encodes it as PNG. Returns the PNG bytes.
std::string read_png(int w, int h);

// Embedded shader sources (generated from shaders/ at build time).
extern const char* const kModelVert;
extern const char* const kModelFrag;
extern const char* const kOverlayVert;
extern const char* const kOverlayFrag;
extern const char* const kPaintVert;
extern const char* const kPaintFrag;

}  // namespace machcut::view
