#include "platform.h"

#define GL_GLEXT_PROTOTYPES 1
#include <EGL/egl.h>
#include <EGL/eglext.h>
#include <GL/gl.h>
#include <GL/glext.h>
#include <GLFW/glfw3.h>

#include <cstdlib>

namespace machcut::view {

namespace {
std::string g_glfw_error;
void glfw_error(int, const char* text) { g_glfw_error = text; }

void on_drop(GLFWwindow* w, int count, const char** paths) {
  auto* p = static_cast<Platform*>(glfwGetWindowUserPointer(w));
  for (int i = 0; i < count; ++i) p->dropped.emplace_back(paths[i]);
}

void on_key(GLFWwindow* w, int key, int /*scancode*/, int action, int mods) {
  if (action == GLFW_RELEASE) return;
  auto* p = static_cast<Platform*>(glfwGetWindowUserPointer(w));
  p->keys.push_back({key, mods});
}

bool glfw_context(Platform& p, int w, int h, bool visible, std::string* error) {
  glfwSetErrorCallback(glfw_error);
  if (!glfwInit()) {
    *error = "no display: " + g_glfw_error;
    return false;
  }
  glfwWindowHint(GLFW_CONTEXT_VERSION_MAJOR, 3);
  glfwWindowHint(GLFW_CONTEXT_VERSION_MINOR, 3);
  glfwWindowHint(GLFW_OPENGL_PROFILE, GLFW_OPENGL_CORE_PROFILE);
  glfwWindowHint(GLFW_OPENGL_FORWARD_COMPAT, GLFW_TRUE);
  glfwWindowHint(GLFW_VISIBLE, visible ? GLFW_TRUE : GLFW_FALSE);
  p.window = glfwCreateWindow(w, h, "machcut-view", nullptr, nullptr);
  if (!p.window) {
    *error = "cannot create an OpenGL 3.3 window: " + g_glfw_error;
    glfwTerminate();
    return false;
  }
  glfwMakeContextCurrent(p.window);
  glfwSetWindowUserPointer(p.window, &p);
  glfwSetDropCallback(p.window, on_drop);
  glfwSetKeyCallback(p.window, on_key);  // ImGui's backend, installed after, chains to it
  p.kind = visible ? "window" : "hidden window";
  return true;
}

bool egl_surfaceless(Platform& p, std::string* error) {
  EGLDisplay dpy = eglGetPlatformDisplay(EGL_PLATFORM_SURFACELESS_MESA, EGL_DEFAULT_DISPLAY, nullptr);
  if (dpy == EGL_NO_DISPLAY || !eglInitialize(dpy, nullptr, nullptr)) {
    *error = "EGL surfaceless platform not available";
    return false;
  }
  const EGLint config_attr[] = {EGL_RENDERABLE_TYPE, EGL_OPENGL_BIT, EGL_SURFACE_TYPE, EGL_PBUFFER_BIT, EGL_NONE};
  EGLConfig config = nullptr;
  EGLint n = 0;
  eglBindAPI(EGL_OPENGL_API);
  if (!eglChooseConfig(dpy, config_attr, &config, 1, &n) || n < 1) config = nullptr;  // surfaceless needs none
  const EGLint ctx_attr[] = {EGL_CONTEXT_MAJOR_VERSION, 3, EGL_CONTEXT_MINOR_VERSION, 3,
                             EGL_CONTEXT_OPENGL_PROFILE_MASK, EGL_CONTEXT_OPENGL_CORE_PROFILE_BIT, EGL_NONE};
  EGLContext ctx = eglCreateContext(dpy, config, EGL_NO_CONTEXT, ctx_attr);
  if (ctx == EGL_NO_CONTEXT || !eglMakeCurrent(dpy, EGL_NO_SURFACE, EGL_NO_SURFACE, ctx)) {
    *error = "cannot create an OpenGL 3.3 core context with EGL (surfaceless)";
    eglTerminate(dpy);
    return false;
  }
  p.egl_display = dpy;
  p.egl_context = ctx;
  p.kind = "EGL surfaceless";
  return true;
}
}  // namespace

bool open_window(Platform& p, int width, int height, std::string* error) {
  if (!glfw_context(p, width, height, true, error)) return false;
  glfwSwapInterval(1);
  return true;
}

bool open_offscreen(Platform& p, std::string* error) {
  const char* display = std::getenv("DISPLAY");
  std::string glfw_err;
  if (display && *display && glfw_context(p, 64, 64, false, &glfw_err)) return true;
  if (egl_surfaceless(p, error)) return true;
  if (!glfw_err.empty()) *error += "; " + glfw_err;
  return false;
}

void close_platform(Platform& p) {
  if (p.window) {
    glfwDestroyWindow(p.window);
    glfwTerminate();
    p.window = nullptr;
  }
  if (p.egl_display) {
    eglMakeCurrent(p.egl_display, EGL_NO_SURFACE, EGL_NO_SURFACE, EGL_NO_CONTEXT);
    eglDestroyContext(p.egl_display, p.egl_context);
    eglTerminate(p.egl_display);
    p.egl_display = p.egl_context = nullptr;
  }
}

FrameTarget make_frame_target(int w, int h, bool with_stencil) {
  FrameTarget t;
  t.w = w;
  t.h = h;
  glGenFramebuffers(1, &t.fbo);
  glBindFramebuffer(GL_FRAMEBUFFER, t.fbo);
  glGenRenderbuffers(1, &t.colour);
  glBindRenderbuffer(GL_RENDERBUFFER, t.colour);
  glRenderbufferStorage(GL_RENDERBUFFER, GL_RGBA8, w, h);
  glFramebufferRenderbuffer(GL_FRAMEBUFFER, GL_COLOR_ATTACHMENT0, GL_RENDERBUFFER, t.colour);
  glGenRenderbuffers(1, &t.depth);
  glBindRenderbuffer(GL_RENDERBUFFER, t.depth);
  glRenderbufferStorage(GL_RENDERBUFFER, with_stencil ? GL_DEPTH24_STENCIL8 : GL_DEPTH_COMPONENT24,
                        w, h);
  glFramebufferRenderbuffer(GL_FRAMEBUFFER,
                            with_stencil ? GL_DEPTH_STENCIL_ATTACHMENT : GL_DEPTH_ATTACHMENT,
                            GL_RENDERBUFFER, t.depth);
  return t;
}

void bind_frame_target(const FrameTarget& t) {
  glBindFramebuffer(GL_FRAMEBUFFER, t.fbo);
  glViewport(0, 0, t.w, t.h);
}

}  // namespace machcut::view
