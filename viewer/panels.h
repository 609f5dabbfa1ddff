// The viewer's panels: one draw function per panel, each reading and editing the AppState.
// Panels never compute areas or drag: they ask the worker (through sync_worker) and show what
// comes back.
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "app_state.h"
#include "gl_render.h"
#include "worker.h"

namespace machcut::view {

enum class PickerMode { none, open, save_curve, save_drag_csv, save_drag_json, save_png };

struct FilePicker {
  PickerMode mode = PickerMode::none;
  std::string dir;                 // folder shown
  std::string name;                // file name typed or selected
  std::vector<std::string> chosen; // selected files (open mode)
  std::string path;                // a path typed in the open dialog (Enter opens it)
  bool focus_path = false;         // give the path field the keyboard on the next frame
};

// Keys taken from the window system's key events rather than from ImGui's per-frame key
// state, which in ImGui 1.86 misses a press and release that arrive between two frames (a
// quick tap on a slow software-rendered frame).
struct KeyQueue {
  int station_steps = 0;   // → +1, ← −1 (Shift: ±10), summed
  bool open = false;       // Ctrl+O: the open dialog
  bool png = false;        // F12: save the window as PNG in the current folder
};

// Where the interactive parts are on screen (pixels, window coordinates), for the state file.
struct ScreenRects {
  float model[4] = {0, 0, 0, 0};  // x0, y0, x1, y1 of the 3-D view
  float plot[4] = {0, 0, 0, 0};   // the area plot's data rectangle
  double plot_x0 = 0, plot_x1 = 0;  // station X at plot[0] and plot[2], m
};

struct UiContext {
  UiContext(AppState& state, Worker& w, Renderer& r) : s(state), worker(w), renderer(r) {}
  AppState& s;
  Worker& worker;
  Renderer& renderer;
  bool headless = false;
  double now = 0.0;                 // seconds since start
  double last_camera_move = -1e9;   // the simplified mesh is drawn until 0.3 s after this
  bool orbit_lod = true;            // use the simplified mesh while the camera moves
  bool compute_drag = true;         // request D/q (the benchmark turns it off to time the UI path)
  std::optional<CurveKey> sent_curve;
  std::optional<std::pair<MachPlanes, double>> sent_section;
  std::optional<std::pair<double, int>> sent_drag;
  std::optional<double> sent_sensitivity;  // Mach of the last sensitivity request
  std::size_t generated_triangles = 0;  // > 0: the model is the generated configuration
  FilePicker picker;
  std::string message;              // last export result, shown in the status bar
  std::string png_request;          // save a PNG of the next frame here (UI-thread job)
  RenderStats last_render;
  double frame_ms = 0.0;
  KeyQueue keys;
  ScreenRects rects;
  int hovered_feature = -1;         // the validity feature under the pointer in the drag panel
  int png_count = 0;                // F12 PNGs saved
  std::string last_png;
};

// Applies the queued keys to the state (called once per frame by draw_frame).
void apply_keys(UiContext& ctx);

// Starts loading `files` (or the generated configuration when ctx.generated_triangles > 0).
void open_model(UiContext& ctx, std::vector<std::string> files);
// Takes the worker's results into the state and sends the requests the state needs now.
// Returns true when something changed.
bool sync_worker(UiContext& ctx);
// True when the model, curve, section and (when available) drag for the controls are present.
bool frame_complete(const UiContext& ctx);
// The sensitivity shown belongs to the Mach number of the controls.
bool sensitivity_current(const AppState& s);

// Lays the panels out over a width × height frame and draws them all.
void draw_frame(UiContext& ctx, float width, float height);

// Individual panels (called by draw_frame; the rectangle is position + size in pixels).
void draw_top_bar(UiContext& ctx, float x, float y, float w, float h);
void draw_controls_panel(UiContext& ctx, float x, float y, float w, float h);
void draw_model_view(UiContext& ctx, float x, float y, float w, float h);
void draw_curve_view(UiContext& ctx, float x, float y, float w, float h);
void draw_section_view(UiContext& ctx, float x, float y, float w, float h);
void draw_drag_views(UiContext& ctx, float x, float y, float w, float h);
void draw_status_bar(UiContext& ctx, float x, float y, float w, float h);
void draw_file_picker(UiContext& ctx);

// Colours and spacing of the viewer's own look.
void apply_theme();

}  // namespace machcut::view
