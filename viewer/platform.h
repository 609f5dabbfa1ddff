// OpenGL 3.3 core contexts: a GLFW window for interactive use, or an off-screen context for
// screenshots and benchmarks — a hidden GLFW window when an X display answers, otherwise Mesa's
// EGL surfaceless platform (no X server at all).
#pragma once

#include <string>
#include <vector>

struct GLFWwindow;

namespace machcut::view {

struct Platform {
  GLFWwindow* window = nullptr;
  void* egl_display = nullptr;
  void* egl_context = nullptr;
  std::string kind;  // "window", "hidden window", "EGL surfaceless"
  std::vector<std::string> dropped;  // paths dropped on the window since the last frame
  struct Key {
    int key = 0, mods = 0;  // GLFW key code and modifier bits
  };
  std::vector<Key> keys;             // key presses and repeats since the last frame
};

bool open_window(Platform& p, int width, int height, std::string* error);
bool open_offscreen(Platform& p, std::string* error);
void close_platform(Platform& p);

// An off-screen frame buffer of the given size: RGBA8 colour and depth renderbuffers. Whole
// frames use depth with stencil (ImGui clips with it); the renderer's model cache uses plain
// 24-bit depth so that it can be blitted into its scene target. Leaves the buffer bound.
struct FrameTarget {
  unsigned fbo = 0, colour = 0, depth = 0;
  int w = 0, h = 0;
};
FrameTarget make_frame_target(int w, int h, bool with_stencil = true);
void bind_frame_target(const FrameTarget& t);

}  // namespace machcut::view
