#include "app.h"

#define GL_GLEXT_PROTOTYPES 1
#include <GL/gl.h>
#include <GLFW/glfw3.h>
#include <imgui.h>
#include <backends/imgui_impl_glfw.h>
#include <backends/imgui_impl_opengl3.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <iostream>
#include <thread>

#include "gl_render.h"
#include "machcut/common/errors.h"
#include "machcut/output/writers.h"
#include "panels.h"
#include "platform.h"

namespace machcut::view {

namespace {

using Clock = std::chrono::steady_clock;
double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

// The font: DejaVu Sans when the system has it (Greek, primes and superscripts for the
// labels), otherwise ImGui's built-in font.
void load_font() {
  ImGuiIO& io = ImGui::GetIO();
  static const ImWchar ranges[] = {0x0020, 0x00FF, 0x0370, 0x03FF, 0x2010, 0x2044, 0x2070, 0x209F,
                                   0x2190, 0x21FF, 0x2200, 0x22FF, 0x25A0, 0x25FF, 0};
  for (const char* f : {"/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf", "/usr/share/fonts/TTF/DejaVuSans.ttf"}) {
    std::error_code ec;
    if (std::filesystem::exists(f, ec) && io.Fonts->AddFontFromFileTTF(f, 15.0f, nullptr, ranges)) return;
  }
  io.Fonts->AddFontDefault();
}

void init_imgui(GLFWwindow* window) {
  IMGUI_CHECKVERSION();
  ImGui::CreateContext();
  ImGui::GetIO().IniFilename = nullptr;
  load_font();
  apply_theme();
  if (window) ImGui_ImplGlfw_InitForOpenGL(window, true);
  ImGui_ImplOpenGL3_Init("#version 330");
}

void shutdown_imgui(bool glfw) {
  ImGui_ImplOpenGL3_Shutdown();
  if (glfw) ImGui_ImplGlfw_Shutdown();
  ImGui::DestroyContext();
}

void apply_options(AppState& s, const AppOptions& o) {
  s.controls = o.controls;
  set_mach(s.controls, o.controls.mach);
  set_roll(s.controls, o.controls.roll_deg);
  set_stations(s.controls, o.controls.stations);
}

// One frame into an off-screen target (no window system input).
void offscreen_frame(UiContext& ctx, const FrameTarget& ft, float dt) {
  ImGuiIO& io = ImGui::GetIO();
  io.DisplaySize = ImVec2(float(ft.w), float(ft.h));
  io.DeltaTime = std::max(dt, 1e-4f);
  ImGui_ImplOpenGL3_NewFrame();
  ImGui::NewFrame();
  draw_frame(ctx, float(ft.w), float(ft.h));
  ImGui::Render();
  bind_frame_target(ft);
  glClearColor(0.06f, 0.07f, 0.09f, 1.0f);
  glClear(GL_COLOR_BUFFER_BIT);
  ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());
}

void save_png(UiContext& ctx, int w, int h, const std::string& path) {
  try {
    write_output(path, read_png(w, h), ctx.s.files);
    ctx.message = "saved " + path;
  } catch (const std::exception& e) {
    ctx.s.error = e.what();
  }
}

// Waits (polling the worker) until the frame's results are all present, or the timeout.
bool wait_complete(UiContext& ctx, bool has_station, double station, double timeout_s) {
  const auto t0 = Clock::now();
  while (seconds_since(t0) < timeout_s) {
    sync_worker(ctx);
    if (has_station && ctx.s.curve && !curve_stale(ctx.s)) {
      set_station(ctx.s, station);
      has_station = false;
      continue;
    }
    if (!has_station && frame_complete(ctx) && ctx.worker.idle()) return true;
    std::this_thread::sleep_for(std::chrono::milliseconds(4));
  }
  return false;
}

// The window system's key presses as the viewer's key queue (panels.h: KeyQueue).
void take_keys(Platform& pf, KeyQueue& q) {
  for (const Platform::Key& k : pf.keys) {
    const int steps = (k.mods & GLFW_MOD_SHIFT) ? 10 : 1;
    if (k.key == GLFW_KEY_RIGHT) q.station_steps += steps;
    if (k.key == GLFW_KEY_LEFT) q.station_steps -= steps;
    if (k.key == GLFW_KEY_O && (k.mods & GLFW_MOD_CONTROL)) q.open = true;
    if (k.key == GLFW_KEY_F12) q.png = true;
  }
  pf.keys.clear();
}

// The state a script checks (README: --state-file), as JSON. Only what the person sees.
std::string state_json(const UiContext& ctx) {
  const AppState& s = ctx.s;
  nlohmann::json j;
  j["files"] = s.files;
  j["model_loaded"] = s.model_loaded;
  j["analysable"] = s.model_loaded && s.model.analysable;
  j["error"] = s.error;
  j["triangles"] = s.model.triangles;
  j["busy"] = s.busy;
  j["mach"] = s.controls.mach;
  j["roll_deg"] = s.controls.roll_deg;
  j["station"] = s.station;  // the cursor, and the Mach plane drawn on the model
  j["curve_ready"] = s.curve && !curve_stale(s);
  j["curve_stations"] = s.curve ? s.curve->curve.x.size() : 0;
  if (s.curve && s.curve->curve.x.size() >= 2) j["station_step"] = s.curve->curve.x[1] - s.curve->curve.x[0];
  j["section_station"] = s.section ? nlohmann::json(s.section->station) : nlohmann::json();
  j["camera"] = {{"yaw_deg", s.camera.yaw_deg}, {"pitch_deg", s.camera.pitch_deg}, {"distance", s.camera.distance}};
  j["drag_ready"] = s.drag && s.drag->mach_sweep_done;
  j["features"] = s.drag ? s.drag->features.size() : 0;
  j["painted_triangles"] = s.drag ? s.drag->feature_xyz.size() / 9 : 0;
  j["health"] = {{"boundary_edges", s.health.boundary_edges},
                 {"nonmanifold_edges", s.health.nonmanifold_edges},
                 {"left_out", s.health.left_out.size()}};
  j["sensitivity"] = {{"shown", s.controls.show_sensitivity},
                      {"ready", sensitivity_current(s)},
                      {"ok", s.sensitivity && s.sensitivity->ok}};
  const ScreenRects& r = ctx.rects;
  j["rects"] = {{"model", {r.model[0], r.model[1], r.model[2], r.model[3]}},
                {"plot", {r.plot[0], r.plot[1], r.plot[2], r.plot[3]}},
                {"plot_x", {r.plot_x0, r.plot_x1}}};
  const ImGuiIO& io = ImGui::GetIO();
  j["mouse"] = {{"x", io.MousePos.x}, {"y", io.MousePos.y}, {"left", io.MouseDown[0]}};
  j["open_dialog"] = ctx.picker.mode == PickerMode::open;
  j["open_path"] = ctx.picker.path;          // the path typed in the open dialog so far
  j["text_input"] = io.WantTextInput;        // a text field has the keyboard
  j["pngs"] = ctx.png_count;
  j["last_png"] = ctx.last_png;
  j["message"] = ctx.message;
  return j.dump(1);
}

// Writes `text` to `path` whole (a reader never sees half a file): a temporary, then a rename.
void write_state(const std::string& path, const std::string& text) {
  const std::string tmp = path + ".tmp";
  {
    std::ofstream f(tmp, std::ios::binary | std::ios::trunc);
    f << text;
    if (!f) return;
  }
  std::error_code ec;
  std::filesystem::rename(tmp, path, ec);
}

struct Session {
  Platform platform;
  Renderer renderer;
  AppState state;
};

bool open_session(Session& ses, bool window, int w, int h) {
  std::string err;
  if (!(window ? open_window(ses.platform, w, h, &err) : open_offscreen(ses.platform, &err))) {
    std::cerr << "machcut-view: " << err << "\n";
    return false;
  }
  init_imgui(window ? ses.platform.window : nullptr);
  if (!ses.renderer.init(&err)) {
    std::cerr << "machcut-view: " << err << "\n";
    return false;
  }
  return true;
}

}  // namespace

int run_window(const AppOptions& o) {
  Session ses;
  if (!open_session(ses, true, o.width, o.height)) return 3;
  Worker worker;
  UiContext ctx(ses.state, worker, ses.renderer);
  apply_options(ses.state, o);
  ctx.generated_triangles = o.generated_triangles;
  if (!o.files.empty() || o.generated_triangles > 0) open_model(ctx, o.files);
  const auto start = Clock::now();
  bool pending_station = o.station.has_value();
  const double wanted_station = o.station.value_or(0.0);
  std::string last_state;
  while (!glfwWindowShouldClose(ses.platform.window)) {
    glfwWaitEventsTimeout(ses.state.busy || !worker.idle() || ctx.now - ctx.last_camera_move < 0.5 ? 0.016 : 0.25);
    // The time a frame takes to draw, not the wait for the next event before it.
    const auto t0 = Clock::now();
    if (!ses.platform.dropped.empty()) {
      ctx.generated_triangles = 0;
      open_model(ctx, std::move(ses.platform.dropped));
      ses.platform.dropped.clear();
    }
    take_keys(ses.platform, ctx.keys);
    sync_worker(ctx);
    if (pending_station && ses.state.curve) {
      set_station(ses.state, wanted_station);
      pending_station = false;
    }
    ctx.now = seconds_since(start);
    ImGui_ImplOpenGL3_NewFrame();
    ImGui_ImplGlfw_NewFrame();
    ImGui::NewFrame();
    const ImVec2 ds = ImGui::GetIO().DisplaySize;
    draw_frame(ctx, ds.x, ds.y);
    ImGui::Render();
    int fw = 0, fh = 0;
    glfwGetFramebufferSize(ses.platform.window, &fw, &fh);
    glBindFramebuffer(GL_FRAMEBUFFER, 0);
    glViewport(0, 0, fw, fh);
    glClearColor(0.06f, 0.07f, 0.09f, 1.0f);
    glClear(GL_COLOR_BUFFER_BIT);
    ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());
    glFinish();  // the drawing itself, not only its submission
    ctx.frame_ms = 1000.0 * seconds_since(t0);
    if (!ctx.png_request.empty()) {  // after the timing: encoding a PNG is not drawing
      glReadBuffer(GL_BACK);
      save_png(ctx, fw, fh, ctx.png_request);
      ctx.png_request.clear();
    }
    glfwSwapBuffers(ses.platform.window);
    if (!o.state_file.empty()) {
      std::string st = state_json(ctx);
      if (st != last_state) write_state(o.state_file, st);
      last_state = std::move(st);
    }
  }
  shutdown_imgui(true);
  close_platform(ses.platform);
  return 0;
}

int run_screenshot(const AppOptions& o) {
  Session ses;
  if (!open_session(ses, false, o.width, o.height)) return 3;
  int code = 0;
  {
    Worker worker;
    UiContext ctx(ses.state, worker, ses.renderer);
    ctx.headless = true;
    apply_options(ses.state, o);
    ctx.generated_triangles = o.generated_triangles;
    open_model(ctx, o.files);
    if (!wait_complete(ctx, o.station.has_value(), o.station.value_or(0.0), o.timeout_s))
      std::cerr << "machcut-view: warning: results not complete after " << o.timeout_s << " s; saving what is there\n";
    const FrameTarget ft = make_frame_target(o.width, o.height);
    // ImGui settles window sizes over the first frames.
    for (int i = 0; i < 3; ++i) {
      ctx.now += 1.0;
      offscreen_frame(ctx, ft, 1.0f / 30.0f);
    }
    glFinish();
    glBindFramebuffer(GL_READ_FRAMEBUFFER, ft.fbo);
    try {
      write_output(o.screenshot, read_png(ft.w, ft.h), o.files);
    } catch (const InputError& e) {
      std::cerr << "machcut-view: " << e.what() << "\n";
      code = 2;
    }
    // Unreadable, or read but not analysable (the PNG shows its mesh and health): exit 2.
    if ((!ses.state.model_loaded || !ses.state.model.analysable) && !ses.state.error.empty()) {
      std::cerr << "machcut-view: " << ses.state.error << "\n";
      code = 2;
    }
    if (code == 0)
      std::cerr << "machcut-view: " << o.screenshot << " (" << ft.w << "x" << ft.h << ", " << ses.platform.kind << ")\n";
  }
  shutdown_imgui(false);
  close_platform(ses.platform);
  return code;
}

namespace {
struct Timing {
  double mean = 0, p95 = 0, max = 0;
};
Timing summarise(std::vector<double> ms) {
  Timing t;
  if (ms.empty()) return t;
  std::sort(ms.begin(), ms.end());
  for (double v : ms) t.mean += v;
  t.mean /= double(ms.size());
  t.p95 = ms[std::min(ms.size() - 1, std::size_t(0.95 * double(ms.size())))];
  t.max = ms.back();
  return t;
}
void print_timing(const char* name, const Timing& t) {
  std::printf("%-38s mean %7.2f ms  p95 %7.2f ms  max %7.2f ms  (%5.1f fps)\n", name, t.mean, t.p95, t.max,
              t.mean > 0 ? 1000.0 / t.mean : 0.0);
}
}  // namespace

int run_bench(const AppOptions& o) {
  Session ses;
  if (!open_session(ses, false, o.width, o.height)) return 3;
  {
    Worker worker;
    UiContext ctx(ses.state, worker, ses.renderer);
    ctx.headless = true;
    apply_options(ses.state, o);
    ctx.generated_triangles = o.files.empty() && o.generated_triangles == 0 ? 1000000 : o.generated_triangles;
    ctx.compute_drag = false;  // D/q would compete for the cores; the frame path is timed alone
    const auto t_load = Clock::now();
    open_model(ctx, o.files);
    // Drag is not needed for frame times; wait for model, curve and outline only.
    while (!(ses.state.model_loaded && ses.state.curve && ses.state.section) && seconds_since(t_load) < o.timeout_s) {
      sync_worker(ctx);
      if (!ses.state.error.empty()) {
        std::cerr << "machcut-view: " << ses.state.error << "\n";
        return 2;
      }
      std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
    const FrameTarget ft = make_frame_target(o.width, o.height);
    std::printf("machcut-view benchmark: %zu triangles (%s), %dx%d, %s\n", ses.state.model.triangles,
                ctx.renderer.has_lod() ? "with simplified copy" : "no simplified copy", ft.w, ft.h,
                ses.platform.kind.c_str());
    std::printf("load + first curve + outline: %.0f ms\n", 1000.0 * seconds_since(t_load));
    const auto start = Clock::now();
    auto frame = [&] {
      const auto t0 = Clock::now();
      ctx.now = seconds_since(start);
      sync_worker(ctx);
      offscreen_frame(ctx, ft, 1.0f / 60.0f);
      glFinish();
      return 1000.0 * seconds_since(t0);
    };
    for (int i = 0; i < 3; ++i) frame();
    const StationRange r = station_range(ses.state);
    std::vector<double> scrub, orbit_lod, orbit_full;
    for (int i = 0; i < o.bench_frames; ++i) {
      set_station(ses.state, r.lo + (r.hi - r.lo) * (0.1 + 0.8 * (i % 50) / 49.0));
      scrub.push_back(frame());
    }
    print_timing("move station (plane + outline + cursor)", summarise(scrub));
    for (int i = 0; i < o.bench_frames; ++i) {
      orbit(ses.state.camera, 6.0f, 0.0f);
      ctx.last_camera_move = seconds_since(start);
      orbit_lod.push_back(frame());
    }
    print_timing("orbit, simplified model", summarise(orbit_lod));
    ctx.orbit_lod = false;
    for (int i = 0; i < std::max(3, o.bench_frames / 4); ++i) {
      orbit(ses.state.camera, 6.0f, 0.0f);
      orbit_full.push_back(frame());
    }
    print_timing("orbit, full model", summarise(orbit_full));
    ctx.orbit_lod = true;
    // Mach and roll changes: from the change to the new curve on screen.
    std::vector<double> latency, compute;
    const double machs[] = {1.3, 1.6, 2.0, 1.1, 1.45};
    for (int i = 0; i < 5; ++i) {
      set_mach(ses.state.controls, machs[i]);
      set_roll(ses.state.controls, 30.0 * i + 15.0);
      const auto t0 = Clock::now();
      while (curve_stale(ses.state) && seconds_since(t0) < 30) frame();
      latency.push_back(1000.0 * seconds_since(t0));
      compute.push_back(ses.state.curve->compute_ms);
    }
    print_timing("Mach/roll change to new curve shown", summarise(latency));
    print_timing("  of which curve computation (worker)", summarise(compute));
    // Section outline latency while scrubbing: from the move to the outline on screen.
    std::vector<double> outline;
    for (int i = 0; i < 10; ++i) {
      set_station(ses.state, r.lo + (r.hi - r.lo) * (0.15 + 0.07 * i));
      const auto t0 = Clock::now();
      while (section_stale(ses.state) && seconds_since(t0) < 30) frame();
      outline.push_back(1000.0 * seconds_since(t0));
    }
    print_timing("station move to exact outline shown", summarise(outline));
  }
  shutdown_imgui(false);
  close_platform(ses.platform);
  return 0;
}

}  // namespace machcut::view
