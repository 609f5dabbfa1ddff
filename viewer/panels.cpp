#include "panels.h"

#include <imgui.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <cstdio>
#include <filesystem>
#include <utility>

#include "export.h"
#include "machcut/common/errors.h"
#include "machcut/output/writers.h"
#include "machcut/sections/plane_and_slope.h"

namespace machcut::view {

namespace {

// ---- Palette (the viewer's own) ---------------------------------------------------------------
constexpr ImU32 kPlotBg = IM_COL32(18, 22, 30, 255);
constexpr ImU32 kGrid = IM_COL32(48, 56, 70, 255);
constexpr ImU32 kAxisText = IM_COL32(150, 162, 182, 255);
constexpr ImU32 kCurve = IM_COL32(72, 206, 190, 255);
constexpr ImU32 kCurveStale = IM_COL32(72, 206, 190, 110);
constexpr ImU32 kHaack = IM_COL32(186, 160, 236, 255);
constexpr ImU32 kClosed = IM_COL32(120, 170, 250, 230);
constexpr ImU32 kSlope = IM_COL32(214, 222, 110, 220);
constexpr ImU32 kCursor = IM_COL32(250, 166, 60, 255);
constexpr ImU32 kStep = IM_COL32(240, 92, 92, 255);
constexpr ImU32 kKink = IM_COL32(240, 150, 70, 255);
constexpr ImU32 kCautionColour = IM_COL32(250, 196, 92, 255);
constexpr ImU32 kMuted = IM_COL32(130, 140, 158, 255);

constexpr ImGuiWindowFlags kPanelFlags = ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoResize |
                                         ImGuiWindowFlags_NoCollapse | ImGuiWindowFlags_NoSavedSettings |
                                         ImGuiWindowFlags_NoBringToFrontOnFocus;

bool begin_panel(const char* title, float x, float y, float w, float h, ImGuiWindowFlags extra = 0) {
  ImGui::SetNextWindowPos(ImVec2(x, y));
  ImGui::SetNextWindowSize(ImVec2(w, h));
  return ImGui::Begin(title, nullptr, kPanelFlags | extra);
}

ImU32 with_alpha(const float c[3], int a) {
  return IM_COL32(int(c[0] * 255), int(c[1] * 255), int(c[2] * 255), a);
}

std::string fmt(const char* f, double v) {
  char b[160];
  std::snprintf(b, sizeof b, f, v);
  return b;
}

// ---- A small plot frame on the draw list ------------------------------------------------------

struct Plot {
  ImDrawList* dl = nullptr;
  ImVec2 lo, hi;   // plot area in pixels (inside the axes)
  AxisMap x, y;
  bool hovered = false;
  ImVec2 mouse;
};

// Draws background, grid, ticks and axis titles; returns the mapping. The rectangle is the whole
// widget; margins for labels are taken inside it.
Plot begin_plot(ImVec2 p0, ImVec2 size, double x0, double x1, double y0, double y1,
                const char* xtitle, const char* ytitle, float right_margin = 14.0f) {
  Plot p;
  p.dl = ImGui::GetWindowDrawList();
  const float left = 64.0f, bottom = 38.0f, top = 24.0f;
  p.lo = ImVec2(p0.x + left, p0.y + top);
  p.hi = ImVec2(p0.x + size.x - right_margin, p0.y + size.y - bottom);
  nice_range(y0, y1, 6);
  if (!(x1 > x0)) {
    x0 -= 0.5;
    x1 += 0.5;
  }
  p.x = AxisMap{x0, x1, p.lo.x, p.hi.x};
  p.y = AxisMap{y0, y1, p.hi.y, p.lo.y};
  p.dl->AddRectFilled(p.lo, p.hi, kPlotBg, 3.0f);
  char b[48];
  for (double t : nice_ticks(x0, x1, std::max(3, int((p.hi.x - p.lo.x) / 80)))) {
    const float px = p.x.to_px(t);
    p.dl->AddLine(ImVec2(px, p.lo.y), ImVec2(px, p.hi.y), kGrid);
    std::snprintf(b, sizeof b, "%g", t);
    const ImVec2 ts = ImGui::CalcTextSize(b);
    p.dl->AddText(ImVec2(px - ts.x / 2, p.hi.y + 3), kAxisText, b);
  }
  for (double t : nice_ticks(y0, y1, std::max(3, int((p.hi.y - p.lo.y) / 40)))) {
    const float py = p.y.to_px(t);
    p.dl->AddLine(ImVec2(p.lo.x, py), ImVec2(p.hi.x, py), kGrid);
    std::snprintf(b, sizeof b, "%g", t);
    const ImVec2 ts = ImGui::CalcTextSize(b);
    p.dl->AddText(ImVec2(p.lo.x - ts.x - 5, py - ts.y / 2), kAxisText, b);
  }
  const ImVec2 xs = ImGui::CalcTextSize(xtitle);
  p.dl->AddText(ImVec2(0.5f * (p.lo.x + p.hi.x) - xs.x / 2, p.hi.y + 19), kAxisText, xtitle);
  p.dl->AddText(ImVec2(p0.x + 2, p0.y + 2), kAxisText, ytitle);
  p.mouse = ImGui::GetIO().MousePos;
  p.hovered = ImGui::IsWindowHovered() && p.mouse.x >= p.lo.x && p.mouse.x <= p.hi.x &&
              p.mouse.y >= p.lo.y && p.mouse.y <= p.hi.y;
  return p;
}

void plot_line(const Plot& p, const std::vector<double>& xs, const std::vector<double>& ys, ImU32 col,
               float thick, bool dashed = false, const AxisMap* ymap = nullptr) {
  const AxisMap& ym = ymap ? *ymap : p.y;
  p.dl->PushClipRect(p.lo, p.hi, true);
  ImVec2 prev;
  bool have = false;
  for (std::size_t i = 0; i < std::min(xs.size(), ys.size()); ++i) {
    if (!std::isfinite(ys[i])) {
      have = false;
      continue;
    }
    const ImVec2 q(p.x.to_px(xs[i]), ym.to_px(ys[i]));
    if (have && (!dashed || i % 2 == 0)) p.dl->AddLine(prev, q, col, thick);
    prev = q;
    have = true;
  }
  p.dl->PopClipRect();
}

void centred_note(ImVec2 p0, ImVec2 size, const char* text, ImU32 col = kMuted) {
  const ImVec2 ts = ImGui::CalcTextSize(text, nullptr, false, size.x - 20);
  ImGui::GetWindowDrawList()->AddText(ImGui::GetFont(), ImGui::GetFontSize(),
                                      ImVec2(p0.x + 0.5f * (size.x - ts.x), p0.y + 0.5f * (size.y - ts.y)), col,
                                      text, nullptr, size.x - 20);
}

// ---- Geometry for the overlays -----------------------------------------------------------------

MachPlanes current_planes(const AppState& s) { return planes_of(curve_key(s.controls, s.model.united)); }

std::array<Vec3, 4> plane_quad(const AppState& s) {
  const MachPlanes planes = current_planes(s);
  const Box3& b = s.model.box;
  const Vec3 centre = 0.5 * (b.lo + b.hi);
  const auto uv = plane_coordinates(Vec3{s.station, centre.y, centre.z}, planes, s.station);
  const double r = 0.62 * std::max(b.hi.y - b.lo.y, b.hi.z - b.lo.z) + 0.05 * (b.hi.x - b.lo.x);
  return {plane_point(planes, s.station, uv[0] - r, uv[1] - r), plane_point(planes, s.station, uv[0] + r, uv[1] - r),
          plane_point(planes, s.station, uv[0] + r, uv[1] + r), plane_point(planes, s.station, uv[0] - r, uv[1] + r)};
}

bool section_matches_planes(const AppState& s) {
  if (!s.section) return false;
  const MachPlanes p = current_planes(s);
  return s.section->planes.mach == p.mach && s.section->planes.roll_deg == p.roll_deg;
}

std::vector<float> outline_xyz(const AppState& s) {
  std::vector<float> v;
  if (!section_matches_planes(s)) return v;
  v.reserve(s.section->segments.size() * 6);
  for (const auto& seg : s.section->segments)
    for (const Vec3& q : seg) v.insert(v.end(), {float(q.x), float(q.y), float(q.z)});
  return v;
}

// The drag result belongs to the Mach number of the controls (features are per Mach).
bool drag_current(const AppState& s) {
  return s.drag && s.drag->available && std::fabs(s.drag->mach - current_planes(s).mach) < 1e-9;
}

// A colour swatch and its text on one line (legends).
void swatch_line(ImDrawList* dl, ImVec2 at, const float rgba[4], bool line, const char* text) {
  const ImU32 col = IM_COL32(int(rgba[0] * 255), int(rgba[1] * 255), int(rgba[2] * 255), 255);
  if (line)
    dl->AddLine(ImVec2(at.x, at.y + 8), ImVec2(at.x + 16, at.y + 8), col, 2.5f);
  else
    dl->AddRectFilled(ImVec2(at.x + 2, at.y + 3), ImVec2(at.x + 14, at.y + 14), col, 2.0f);
  dl->AddText(ImVec2(at.x + 22, at.y), IM_COL32(225, 230, 238, 255), text);
}

float scene_radius(const AppState& s) {
  const Box3& b = s.model.box;
  if (is_empty(b)) return 1.0f;
  return static_cast<float>(0.5 * norm(b.hi - b.lo));
}

// Screen-space motion (pixels) of a 1 m move along +x at the camera target.
ImVec2 x_axis_on_screen(const Camera& cam, float w, float h) {
  const Mat4 mvp = multiply(projection_matrix(cam, w / h, 1.0f), view_matrix(cam));
  auto project = [&](float x, float y, float z) {
    const float cx = mvp.m[0] * x + mvp.m[4] * y + mvp.m[8] * z + mvp.m[12];
    const float cy = mvp.m[1] * x + mvp.m[5] * y + mvp.m[9] * z + mvp.m[13];
    const float cw = mvp.m[3] * x + mvp.m[7] * y + mvp.m[11] * z + mvp.m[15];
    return ImVec2(0.5f * w * (cx / cw), -0.5f * h * (cy / cw));
  };
  const float* t = cam.target;
  const float step = std::max(cam.distance * 0.01f, 1e-6f);
  const ImVec2 a = project(t[0], t[1], t[2]), b = project(t[0] + step, t[1], t[2]);
  return ImVec2((b.x - a.x) / step, (b.y - a.y) / step);
}

void save_text(UiContext& ctx, const std::string& path, const std::string& content) {
  try {
    write_output(path, content, ctx.s.files);
    ctx.message = "saved " + path;
  } catch (const InputError& e) {
    ctx.s.error = e.what();
  } catch (const std::exception& e) {
    ctx.s.error = path + ": " + e.what();
  }
}

void run_picker_action(UiContext& ctx, const std::string& path) {
  AppState& s = ctx.s;
  switch (ctx.picker.mode) {
    case PickerMode::save_curve:
      if (s.curve) save_text(ctx, path, curve_csv(*s.curve));
      break;
    case PickerMode::save_drag_csv:
      if (s.drag) save_text(ctx, path, drag_csv(*s.drag));
      break;
    case PickerMode::save_drag_json:
      if (s.drag) save_text(ctx, path, drag_json(*s.drag, s.files));
      break;
    case PickerMode::save_png:
      ctx.png_request = path;
      break;
    default:
      break;
  }
}

void open_picker(UiContext& ctx, PickerMode mode, const char* default_name) {
  ctx.picker.mode = mode;
  if (ctx.picker.dir.empty()) ctx.picker.dir = std::filesystem::current_path().string();
  ctx.picker.name = default_name;
  ctx.picker.chosen.clear();
  ctx.picker.path.clear();
  ctx.picker.focus_path = mode == PickerMode::open;
}

bool mesh_extension(const std::filesystem::path& p) {
  std::string e = p.extension().string();
  std::transform(e.begin(), e.end(), e.begin(), [](unsigned char c) { return std::tolower(c); });
  return e == ".stl" || e == ".obj" || e == ".ply" || e == ".off" || e == ".gltf" || e == ".glb" || e == ".dae" ||
         e == ".amf" || e == ".x3d";
}

}  // namespace

// ---- Worker synchronisation -------------------------------------------------------------------

void open_model(UiContext& ctx, std::vector<std::string> files) {
  LoadJob job;
  job.files = files;
  job.controls = ctx.s.controls;
  job.generated_triangles = ctx.generated_triangles;
  ctx.s.files = std::move(files);
  ctx.s.error.clear();
  ctx.sent_curve.reset();
  ctx.sent_section.reset();
  ctx.sent_drag.reset();
  ctx.sent_sensitivity.reset();
  ctx.worker.load(std::move(job));
}

namespace {
void accept_load(UiContext& ctx, LoadOutcome& o) {
  AppState& s = ctx.s;
  if (!o.ok) {
    s.error = o.error;
    return;
  }
  s.model_loaded = true;
  s.model = o.summary;
  s.health = std::move(o.health);
  // A model the core cannot analyse is still shown, with its health; the reason stays on top.
  if (!s.model.analysable) s.error = "model not usable: " + s.model.reason;
  s.shells = std::move(o.shells);
  s.notes = std::move(o.notes);
  s.warnings = std::move(o.warnings);
  s.curves.clear();
  s.curve.reset();
  s.section.reset();
  s.drag.reset();
  s.sensitivity.reset();
  s.station = 0.5 * (s.model.box.lo.x + s.model.box.hi.x);
  ctx.renderer.upload(*o.display);
  fit(s.camera, s.model.box);
}
}  // namespace

bool sync_worker(UiContext& ctx) {
  AppState& s = ctx.s;
  WorkerOutput out = ctx.worker.take();
  bool changed = false;
  if (out.load) {
    accept_load(ctx, *out.load);
    changed = true;
  }
  for (auto& c : out.curves) {
    accept_curve(s, std::move(c));
    changed = true;
  }
  if (out.section) {
    s.section = std::move(out.section);
    changed = true;
  }
  if (out.drag) {
    s.drag = std::move(out.drag);
    changed = true;
  }
  if (out.sensitivity) {
    s.sensitivity = std::move(out.sensitivity);
    changed = true;
  }
  const WorkerStatus st = ctx.worker.status();
  s.busy = st.busy;
  s.progress = st.progress;
  s.busy_label = st.label;
  s.sensitivity_busy = st.sensitivity_busy;
  if (!s.model_loaded || !s.model.analysable) return changed;
  // Requests: the curve (cache first), the outline at the cursor, the drag at this Mach.
  const CurveKey key = curve_key(s.controls, s.model.united);
  if (curve_stale(s) && !use_cached_curve(s) && ctx.sent_curve != key) {
    ctx.worker.request_curve(key);
    ctx.sent_curve = key;
  }
  if (s.curve && !curve_stale(s)) set_station(s, s.station);
  const auto want = std::make_pair(planes_of(key), s.station);
  const bool same_section = ctx.sent_section && ctx.sent_section->first.mach == want.first.mach &&
                            ctx.sent_section->first.roll_deg == want.first.roll_deg &&
                            ctx.sent_section->second == want.second;
  if (section_stale(s) && !same_section) {
    ctx.worker.request_section(want.first, want.second);
    ctx.sent_section = want;
  }
  const auto drag_want = std::make_pair(planes_of(key).mach, std::clamp(s.controls.stations, 21, 201));
  if (ctx.compute_drag && Worker::drag_available() && ctx.sent_drag != drag_want) {
    ctx.worker.request_drag(drag_want.first, drag_want.second);
    ctx.sent_drag = drag_want;
  }
  // The sensitivity only while its overlay is on, at the Mach of the controls.
  const double sens_mach = planes_of(key).mach;
  if (s.controls.show_sensitivity && ctx.sent_sensitivity != sens_mach) {
    ctx.worker.request_sensitivity(sens_mach);
    ctx.sent_sensitivity = sens_mach;
  }
  return changed;
}

bool frame_complete(const UiContext& ctx) {
  const AppState& s = ctx.s;
  if (!s.model_loaded) return !s.error.empty() && !s.busy;
  if (!s.model.analysable) return !s.busy;
  const bool drag_done = !Worker::drag_available() || (s.drag && s.drag->mach_sweep_done);
  const bool sensitivity_done = !s.controls.show_sensitivity || sensitivity_current(s);
  return !curve_stale(s) && s.section && !section_stale(s) && drag_done && sensitivity_done;
}

bool sensitivity_current(const AppState& s) {
  return s.sensitivity && std::fabs(s.sensitivity->mach - planes_of(curve_key(s.controls, s.model.united)).mach) < 1e-9;
}

// ---- Theme ------------------------------------------------------------------------------------

void apply_theme() {
  ImGuiStyle& st = ImGui::GetStyle();
  ImGui::StyleColorsDark(&st);
  st.WindowRounding = 4.0f;
  st.FrameRounding = 3.0f;
  st.GrabRounding = 3.0f;
  st.WindowBorderSize = 0.0f;
  st.WindowPadding = ImVec2(10, 8);
  st.ItemSpacing = ImVec2(8, 6);
  ImVec4* c = st.Colors;
  c[ImGuiCol_WindowBg] = ImVec4(0.105f, 0.122f, 0.153f, 1.0f);
  c[ImGuiCol_TitleBg] = ImVec4(0.075f, 0.090f, 0.115f, 1.0f);
  c[ImGuiCol_TitleBgActive] = ImVec4(0.090f, 0.140f, 0.170f, 1.0f);
  c[ImGuiCol_FrameBg] = ImVec4(0.150f, 0.175f, 0.215f, 1.0f);
  c[ImGuiCol_FrameBgHovered] = ImVec4(0.190f, 0.240f, 0.290f, 1.0f);
  c[ImGuiCol_FrameBgActive] = ImVec4(0.200f, 0.300f, 0.340f, 1.0f);
  c[ImGuiCol_SliderGrab] = ImVec4(0.98f, 0.65f, 0.24f, 1.0f);
  c[ImGuiCol_SliderGrabActive] = ImVec4(1.00f, 0.75f, 0.35f, 1.0f);
  c[ImGuiCol_CheckMark] = ImVec4(0.28f, 0.81f, 0.75f, 1.0f);
  c[ImGuiCol_Button] = ImVec4(0.160f, 0.260f, 0.290f, 1.0f);
  c[ImGuiCol_ButtonHovered] = ImVec4(0.210f, 0.360f, 0.390f, 1.0f);
  c[ImGuiCol_ButtonActive] = ImVec4(0.260f, 0.450f, 0.470f, 1.0f);
  c[ImGuiCol_Header] = ImVec4(0.160f, 0.260f, 0.290f, 1.0f);
  c[ImGuiCol_HeaderHovered] = ImVec4(0.210f, 0.360f, 0.390f, 1.0f);
  c[ImGuiCol_PlotHistogram] = ImVec4(0.28f, 0.81f, 0.75f, 1.0f);
  c[ImGuiCol_Separator] = ImVec4(0.22f, 0.26f, 0.32f, 1.0f);
}

// ---- Panels -----------------------------------------------------------------------------------

void draw_top_bar(UiContext& ctx, float x, float y, float w, float h) {
  begin_panel("##top", x, y, w, h, ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_NoScrollbar);
  ImGui::TextColored(ImVec4(0.28f, 0.81f, 0.75f, 1.0f), "machcut-view");
  ImGui::SameLine();
  if (ImGui::Button("Open...")) open_picker(ctx, PickerMode::open, "");
  ImGui::SameLine();
  ImGui::BeginDisabled(!ctx.s.curve);
  if (ImGui::Button("Curve CSV...")) open_picker(ctx, PickerMode::save_curve, "area_curve.csv");
  ImGui::EndDisabled();
  ImGui::SameLine();
  ImGui::BeginDisabled(!ctx.s.drag || !ctx.s.drag->available);
  if (ImGui::Button("Drag CSV...")) open_picker(ctx, PickerMode::save_drag_csv, "drag.csv");
  ImGui::SameLine();
  if (ImGui::Button("Drag JSON...")) open_picker(ctx, PickerMode::save_drag_json, "drag.json");
  ImGui::EndDisabled();
  ImGui::SameLine();
  if (ImGui::Button("PNG...")) open_picker(ctx, PickerMode::save_png, "machcut-view.png");
  // The core's caution (common/limits.h), the same words as the CLI and the report; the bar
  // shows its first sentence, the whole text on hover.
  const char* caution = "Preliminary design estimate: confirm with validated analysis and test (hover)";
  const float cw = ImGui::CalcTextSize(caution).x;
  ImGui::SameLine(std::max(ImGui::GetCursorPosX() + 10, w - cw - 14));
  ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kCautionColour), "%s", caution);
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", machcut::kCaution);
  ImGui::End();
}

namespace {
void section_title(const char* text) {
  ImGui::Spacing();
  ImGui::TextColored(ImVec4(0.28f, 0.81f, 0.75f, 1.0f), "%s", text);
  ImGui::Separator();
}

void combo_text(const char* label, std::string& value, std::initializer_list<const char*> options) {
  if (ImGui::BeginCombo(label, value.c_str())) {
    for (const char* o : options)
      if (ImGui::Selectable(o, value == o)) value = o;
    ImGui::EndCombo();
  }
}

void controls_analysis(UiContext& ctx) {
  AppState& s = ctx.s;
  Controls& c = s.controls;
  double mach = c.mach, roll = c.roll_deg;
  const double mlo = 1.0, mhi = 4.0, rlo = 0.0, rhi = 359.0;
  ImGui::SetNextItemWidth(-70);
  if (ImGui::SliderScalar("Mach", ImGuiDataType_Double, &mach, &mlo, &mhi, "%.3f")) set_mach(c, mach);
  ImGui::SetNextItemWidth(-70);
  if (ImGui::SliderScalar("roll θ°", ImGuiDataType_Double, &roll, &rlo, &rhi, "%.1f")) set_roll(c, roll);
  int n = c.stations;
  ImGui::SetNextItemWidth(-70);
  if (ImGui::SliderInt("stations", &n, 11, 801)) set_stations(c, n);
  const StationRange r = station_range(s);
  double x = s.station;
  ImGui::SetNextItemWidth(-70);
  ImGui::BeginDisabled(!s.model_loaded);
  if (ImGui::SliderScalar("X (m)", ImGuiDataType_Double, &x, &r.lo, &r.hi, "%.4f")) set_station(s, x);
  ImGui::EndDisabled();
  ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "μ = %.2f°   ← → step, Shift ×10",
                     c.mach > 1.0 ? std::asin(1.0 / c.mach) * 180.0 / std::numbers::pi : 90.0);
}

void controls_model(UiContext& ctx) {
  Controls& c = ctx.s.controls;
  // Three narrow combos on one line: they fit the narrowest side panel (270 px).
  ImGui::SetNextItemWidth(50);
  combo_text("units", c.units, {"m", "mm", "cm", "in", "ft"});
  ImGui::SameLine(0, 6);
  ImGui::SetNextItemWidth(46);
  combo_text("flow", c.flow, {"+x", "-x", "+y", "-y", "+z", "-z"});
  ImGui::SameLine(0, 6);
  ImGui::SetNextItemWidth(46);
  combo_text("up", c.up, {"+x", "-x", "+y", "-y", "+z", "-z"});
  bool unite = c.unite;
  if (ImGui::Checkbox("unite overlapping shells", &unite)) c.unite = unite;
  ImGui::BeginDisabled(ctx.s.files.empty() && ctx.generated_triangles == 0);
  if (ImGui::Button("Reload with these settings")) open_model(ctx, ctx.s.files);
  ImGui::EndDisabled();
}

void controls_shells(UiContext& ctx) {
  AppState& s = ctx.s;
  ImGui::BeginChild("##shells", ImVec2(0, std::min(160.0f, 26.0f * s.shells.size() + 8)), false);
  for (std::size_t i = 0; i < s.shells.size(); ++i) {
    ShellView& v = s.shells[i];
    ImGui::PushID(static_cast<int>(i));
    ImGui::Checkbox("##vis", &v.visible);
    ImGui::SameLine();
    ImGui::ColorEdit3("##col", v.colour, ImGuiColorEditFlags_NoInputs | ImGuiColorEditFlags_NoLabel);
    ImGui::SameLine();
    if (v.wrapped) {
      ImGui::TextColored(ImVec4(0.85f, 0.68f, 0.50f, 1.0f), "%s", v.name.c_str());
      if (ImGui::IsItemHovered())
        ImGui::SetTooltip("%s: %zu triangles; %s, so it was replaced by its alpha wrap", v.name.c_str(), v.triangles,
                          v.why.c_str());
    } else {
      ImGui::Text("%s", v.name.c_str());
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s: %zu triangles", v.name.c_str(), v.triangles);
    }
    ImGui::PopID();
  }
  ImGui::EndChild();
}
// The model's health (intake): the core's summary lines, the flawed edges drawn on the model,
// the parts wrapped or refused with the reason.
void controls_health(UiContext& ctx) {
  AppState& s = ctx.s;
  const HealthView& h = s.health;
  section_title("Model health");
  if (!s.model.analysable)
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kStep), "cannot be analysed: shown as read");
  ImGui::Checkbox("draw flawed edges on the model", &s.controls.show_health);
  ImDrawList* dl = ImGui::GetWindowDrawList();
  auto edge_line = [&](const float rgba[4], std::size_t count, const char* what) {
    const ImVec2 at = ImGui::GetCursorScreenPos();
    swatch_line(dl, at, rgba, true, "");
    ImGui::Dummy(ImVec2(18, 16));
    ImGui::SameLine();
    ImGui::Text("%zu %s", count, what);
  };
  edge_line(kBoundaryEdge, h.boundary_edges, "open (boundary) edge(s)");
  // A wrapped part's surface is replaced, its non-manifold edges with it: then they are counted
  // (as read) but not drawn.
  edge_line(kNonManifoldEdge, h.nonmanifold_edges,
            h.nonmanifold_edges > 0 && h.nonmanifold_xyz.empty() ? "non-manifold edge(s) (wrapped)"
                                                                 : "non-manifold edge(s)");
  for (const HealthView::Part& p : h.parts) {
    const ImVec4 col = p.state == "refused" ? ImGui::ColorConvertU32ToFloat4(kStep) : ImVec4(0.80f, 0.64f, 0.48f, 1.0f);
    ImGui::PushStyleColor(ImGuiCol_Text, col);
    ImGui::TextWrapped("%s %s: %s", p.name.c_str(), p.state.c_str(), p.why.c_str());
    ImGui::PopStyleColor();
  }
  if (!h.left_out.empty()) {
    ImGui::Checkbox("draw parts left out (grey)", &s.controls.show_left_out);
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "%zu part(s) left out of the analysis:", h.left_out.size());
    const ImVec4 grey(kSetAsideEdge[0], kSetAsideEdge[1], kSetAsideEdge[2], 1.0f);
    for (const HealthView::LeftOut& l : h.left_out) {
      ImGui::PushStyleColor(ImGuiCol_Text, grey);
      ImGui::TextWrapped("%s (%zu triangles): %s", l.name.c_str(), l.triangles, l.why.c_str());
      ImGui::PopStyleColor();
    }
  }
  for (std::size_t i = 0; i < h.lines.size(); ++i) {
    const bool warning = h.lines[i].rfind("warning: ", 0) == 0;
    if (warning) ImGui::PushStyleColor(ImGuiCol_Text, ImVec4(1, 0.75f, 0.4f, 1));
    ImGui::TextWrapped("%s", h.lines[i].c_str());
    if (warning) ImGui::PopStyleColor();
  }
  for (const std::string& n : s.notes)
    if (n.rfind("wave drag: ", 0) == 0) ImGui::TextWrapped("%s", n.c_str());
}
}  // namespace

void draw_controls_panel(UiContext& ctx, float x, float y, float w, float h) {
  AppState& s = ctx.s;
  begin_panel("Set-up", x, y, w, h);
  section_title("Cutting planes");
  controls_analysis(ctx);
  section_title("Curve overlays");
  ImGui::Checkbox("Sears–Haack body", &s.controls.show_sears_haack);
  ImGui::Checkbox("slope S′(X)", &s.controls.show_slope);
  ImGui::SameLine();
  ImGui::Checkbox("jumps", &s.controls.show_jumps);
  ImGui::Checkbox("steep surface on the model", &s.controls.show_features);
  if (ImGui::IsItemHovered())
    ImGui::SetTooltip("Paint the surface that faces the flow more steeply than the Mach angle (outside linear theory)");
  ImGui::Checkbox("drag sensitivity on the model", &s.controls.show_sensitivity);
  if (ImGui::IsItemHovered())
    ImGui::SetTooltip("Paint where adding volume raises D/q at the current Mach (push the surface in) or lowers it "
                      "(push it out): ∂(D/q)/∂V per vertex, 1/m");
  if (s.controls.show_sensitivity && s.sensitivity_busy) {
    ImGui::SameLine();
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "computing…");
  }
  section_title("Model input");
  controls_model(ctx);
  section_title("Shells");
  controls_shells(ctx);
  if (s.model_loaded) {
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "%zu triangles, V = %.4g m³%s", s.model.triangles,
                       s.model.volume, s.model.united ? ", united" : "");
    controls_health(ctx);
  }
  ImGui::End();
}

namespace {
// The sensitivity's legend, bottom right of the model view (`corner` its bottom-right): the
// colour bar with its ends in the designer's words and the scale, or why there is no map
// (wrapped to fit `max_w` pixels).
void sensitivity_legend(const AppState& s, ImDrawList* dl, ImVec2 corner, float max_w) {
  const ImU32 text = IM_COL32(225, 230, 238, 255);
  const ImU32 muted = IM_COL32(170, 178, 190, 255);
  const ImU32 bg = IM_COL32(14, 17, 24, 215);
  const bool current = sensitivity_current(s);
  std::vector<std::string> lines;
  if (!current) {
    lines.push_back(fmt("drag sensitivity at M %.3g: computing…", s.controls.mach));
  } else if (!s.sensitivity->ok) {
    lines.push_back(fmt("no drag sensitivity at M %.3g:", s.sensitivity->mach));
    lines.push_back(s.sensitivity->problem);
  }
  if (!lines.empty()) {
    const float wrap = std::max(120.0f, std::min(520.0f, max_w - 28.0f));
    float w = 0, h = 8;
    std::vector<ImVec2> sizes;
    for (const std::string& l : lines) {
      sizes.push_back(ImGui::CalcTextSize(l.c_str(), nullptr, false, wrap));
      w = std::max(w, sizes.back().x);
      h += sizes.back().y + 2;
    }
    const ImVec2 a(corner.x - w - 16, corner.y - h);
    dl->AddRectFilled(a, corner, bg, 3.0f);
    float y = a.y + 4;
    for (std::size_t i = 0; i < lines.size(); ++i) {
      dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), ImVec2(a.x + 8, y), i == 0 ? text : IM_COL32(255, 190, 120, 255),
                  lines[i].c_str(), nullptr, wrap);
      y += sizes[i].y + 2;
    }
    return;
  }
  const SensitivityView& v = *s.sensitivity;
  const float pad = 8.0f;
  char title[128], lo[48], hi[48], scale[160];
  std::snprintf(title, sizeof title, "drag sensitivity ∂(D/q)/∂V at M %.3g, 1/m", v.mach);
  std::snprintf(lo, sizeof lo, "−%.3g push out", v.clip);
  std::snprintf(hi, sizeof hi, "push in +%.3g", v.clip);
  std::snprintf(scale, sizeof scale, "clipped at the %.0fth percentile of |s| (largest %.3g); colour ∝ √|s|",
                100.0 * kSensitivityClipQuantile, v.max_abs);
  const float w = std::max({ImGui::CalcTextSize(title).x, ImGui::CalcTextSize(scale).x,
                            ImGui::CalcTextSize(lo).x + ImGui::CalcTextSize(hi).x + 40.0f});
  const float h = 17 + 14 + 17 + 17 + 2 * pad;
  const ImVec2 a(corner.x - w - 2 * pad, corner.y - h);
  dl->AddRectFilled(a, corner, bg, 3.0f);
  dl->AddText(ImVec2(a.x + pad, a.y + pad), text, title);
  // The bar: −clip … 0 … +clip in 48 steps, coloured by the same map as the model.
  const float bx = a.x + pad, by = a.y + pad + 18, bar_w = w;
  const int n = 48;
  for (int i = 0; i < n; ++i) {
    const double val = v.clip * (-1.0 + 2.0 * (i + 0.5) / n);
    float c[3];
    diverging_colour(val, v.clip, c);
    dl->AddRectFilled(ImVec2(bx + bar_w * float(i) / n, by), ImVec2(bx + bar_w * float(i + 1) / n + 0.5f, by + 11),
                      IM_COL32(int(c[0] * 255), int(c[1] * 255), int(c[2] * 255), 255));
  }
  dl->AddLine(ImVec2(bx + 0.5f * bar_w, by - 2), ImVec2(bx + 0.5f * bar_w, by + 13), IM_COL32(20, 20, 20, 255));
  auto light = [](const float c[3]) {
    return IM_COL32(std::min(255, int(c[0] * 255) + 50), std::min(255, int(c[1] * 255) + 50),
                    std::min(255, int(c[2] * 255) + 50), 255);
  };
  const float y = by + 14;
  dl->AddText(ImVec2(bx, y), light(kPushOut), lo);
  dl->AddText(ImVec2(bx + 0.5f * bar_w - 0.5f * ImGui::CalcTextSize("0").x, y), muted, "0");
  dl->AddText(ImVec2(bx + bar_w - ImGui::CalcTextSize(hi).x, y), light(kPushIn), hi);
  dl->AddText(ImVec2(a.x + pad, y + 17), muted, scale);
}
}  // namespace

void draw_model_view(UiContext& ctx, float x, float y, float w, float h) {
  AppState& s = ctx.s;
  begin_panel("Model and Mach plane", x, y, w, h, ImGuiWindowFlags_NoScrollbar | ImGuiWindowFlags_NoScrollWithMouse);
  const ImVec2 p0 = ImGui::GetCursorScreenPos();
  const ImVec2 avail = ImGui::GetContentRegionAvail();
  const int vw = std::max(1, int(avail.x)), vh = std::max(1, int(avail.y - 22));
  ctx.rects.model[0] = p0.x, ctx.rects.model[1] = p0.y, ctx.rects.model[2] = p0.x + vw, ctx.rects.model[3] = p0.y + vh;
  ImGui::InvisibleButton("##view", ImVec2(float(vw), float(vh)),
                         ImGuiButtonFlags_MouseButtonLeft | ImGuiButtonFlags_MouseButtonRight |
                             ImGuiButtonFlags_MouseButtonMiddle);
  const ImGuiIO& io = ImGui::GetIO();
  if (ImGui::IsItemActive()) {
    const ImVec2 d = io.MouseDelta;
    if (d.x != 0 || d.y != 0) {
      if (ImGui::IsMouseDown(ImGuiMouseButton_Left) && io.KeyShift) {
        // Shift-drag moves the plane: the mouse motion along the model's x axis on screen.
        const ImVec2 ax = x_axis_on_screen(s.camera, float(vw), float(vh));
        const float len2 = ax.x * ax.x + ax.y * ax.y;
        if (len2 > 1e-9f) set_station(s, s.station + (d.x * ax.x + d.y * ax.y) / len2);
      } else if (ImGui::IsMouseDown(ImGuiMouseButton_Left)) {
        orbit(s.camera, d.x, d.y);
        ctx.last_camera_move = ctx.now;
      } else {
        pan(s.camera, d.x, d.y, float(vh));
        ctx.last_camera_move = ctx.now;
      }
    }
  }
  if (ImGui::IsItemHovered() && io.MouseWheel != 0) {
    zoom(s.camera, io.MouseWheel);
    ctx.last_camera_move = ctx.now;
  }
  if (ImGui::IsItemHovered() && ImGui::IsMouseDoubleClicked(ImGuiMouseButton_Left)) fit(s.camera, s.model.box);
  ImDrawList* dl = ImGui::GetWindowDrawList();
  if (s.model_loaded && (ctx.renderer.has_mesh() || !s.health.set_aside_xyz.empty())) {
    ViewParams vp;
    vp.width = vw;
    vp.height = vh;
    vp.view = view_matrix(s.camera);
    vp.proj = projection_matrix(s.camera, float(vw) / float(vh), scene_radius(s));
    vp.shells = &s.shells;
    vp.use_lod = ctx.orbit_lod && ctx.now - ctx.last_camera_move < 0.3;
    vp.show_plane = s.model.analysable;
    vp.plane = plane_quad(s);
    vp.outline = outline_xyz(s);
    const bool features = s.controls.show_features && drag_current(s) && !s.drag->feature_xyz.empty();
    if (features) {
      vp.features = &s.drag->feature_xyz;
      if (ctx.hovered_feature >= 0 && std::size_t(ctx.hovered_feature) < s.drag->features.size()) {
        vp.highlight_first = s.drag->features[ctx.hovered_feature].first_painted;
        vp.highlight_count = s.drag->features[ctx.hovered_feature].painted;
      }
    }
    if (s.controls.show_health) {
      vp.boundary = &s.health.boundary_xyz;
      vp.nonmanifold = &s.health.nonmanifold_xyz;
    }
    const bool paint = s.controls.show_sensitivity && s.model.analysable && sensitivity_current(s) &&
                       s.sensitivity->ok;
    if (paint) vp.paint = &s.sensitivity->paint;
    if (s.controls.show_left_out) {
      vp.set_aside = &s.health.set_aside_xyz;
      vp.set_aside_edges = &s.health.set_aside_edges;
    }
    const unsigned tex = ctx.renderer.render(vp, &ctx.last_render);
    dl->AddImage(reinterpret_cast<ImTextureID>(static_cast<std::uintptr_t>(tex)), p0,
                 ImVec2(p0.x + vw, p0.y + vh), ImVec2(0, 1), ImVec2(1, 0));
    char b[160];
    std::snprintf(b, sizeof b, "X = %.4f m   M %.3f   θ %.1f°%s", s.station, s.controls.mach, s.controls.roll_deg,
                  ctx.last_render.lod_drawn ? "   (simplified while moving)" : "");
    dl->AddText(ImVec2(p0.x + 8, p0.y + 6), IM_COL32(235, 238, 245, 230), b);
    // Legend of what is painted on the model, bottom left, only the entries present.
    std::vector<std::pair<const float*, std::pair<bool, std::string>>> legend;
    if (features)
      legend.push_back({kFeatureTint, {false, fmt("steeper than the Mach angle at M %.3g (outside linear theory)", s.drag->mach)}});
    if (s.controls.show_health && !s.health.boundary_xyz.empty()) legend.push_back({kBoundaryEdge, {true, "open edge (boundary)"}});
    if (s.controls.show_health && !s.health.nonmanifold_xyz.empty()) legend.push_back({kNonManifoldEdge, {true, "non-manifold edge"}});
    static float wrapped_rgba[4] = {0, 0, 0, 1};
    wrapped_colour(wrapped_rgba);
    if (std::any_of(s.shells.begin(), s.shells.end(), [](const ShellView& v) { return v.wrapped; }))
      legend.push_back({wrapped_rgba, {false, "part replaced by its alpha wrap"}});
    if (s.controls.show_left_out && !s.health.set_aside_edges.empty())
      legend.push_back({kSetAsideEdge, {true, "part left out of the analysis (see Model health)"}});
    if (!legend.empty()) {
      float lw = 0;
      for (const auto& e : legend) lw = std::max(lw, ImGui::CalcTextSize(e.second.second.c_str()).x);
      const float lh = 18.0f * float(legend.size()) + 6;
      const float bottom = s.error.empty() ? p0.y + vh - 6 : p0.y + vh - 58;
      const ImVec2 l0(p0.x + 6, bottom - lh);
      dl->AddRectFilled(l0, ImVec2(l0.x + lw + 32, bottom), IM_COL32(14, 17, 24, 215), 3.0f);
      float ly = l0.y + 3;
      for (const auto& e : legend) {
        swatch_line(dl, ImVec2(l0.x + 5, ly), e.first, e.second.first, e.second.second.c_str());
        ly += 18;
      }
    }
    if (s.controls.show_sensitivity && s.model.analysable)
      sensitivity_legend(s, dl, ImVec2(p0.x + vw - 6, s.error.empty() ? p0.y + vh - 6 : p0.y + vh - 58), float(vw));
  } else {
    dl->AddRectFilled(p0, ImVec2(p0.x + vw, p0.y + vh), kPlotBg);
    centred_note(p0, ImVec2(float(vw), float(vh)),
                 s.busy ? "loading…" : "No model. Open mesh files with Open... (Ctrl+O), "
                                       "drop them on the window, or name them on the command line.");
  }
  if (!s.error.empty()) {
    const ImVec2 q0(p0.x + 6, p0.y + vh - 52), q1(p0.x + vw - 6, p0.y + vh - 6);
    dl->AddRectFilled(q0, q1, IM_COL32(120, 30, 36, 235), 4.0f);
    dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), ImVec2(q0.x + 8, q0.y + 6), IM_COL32(255, 235, 235, 255),
                s.error.c_str(), nullptr, q1.x - q0.x - 80);
    ImGui::SetCursorScreenPos(ImVec2(q1.x - 64, q0.y + 8));
    if (ImGui::SmallButton("dismiss")) s.error.clear();
  }
  ImGui::SetCursorScreenPos(ImVec2(p0.x, p0.y + vh + 2));
  ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted),
                     "drag orbit · right-drag pan · wheel zoom · Shift-drag plane");
  ImGui::SameLine();
  if (ImGui::SmallButton("Fit")) fit(s.camera, s.model.box);
  ImGui::End();
}

namespace {
void curve_hover(const Plot& p, const CurveResult& c, const AxisMap& slope_map, bool show_slope) {
  if (!p.hovered) return;
  const double xd = p.x.to_data(p.mouse.x);
  p.dl->AddLine(ImVec2(p.mouse.x, p.lo.y), ImVec2(p.mouse.x, p.hi.y), IM_COL32(200, 205, 215, 90));
  const auto& xs = c.curve.x;
  const auto it = std::lower_bound(xs.begin(), xs.end(), xd);
  std::size_t i = std::min<std::size_t>(static_cast<std::size_t>(it - xs.begin()), xs.size() - 1);
  if (i > 0 && std::fabs(xs[i - 1] - xd) < std::fabs(xs[i] - xd)) --i;
  ImGui::BeginTooltip();
  ImGui::Text("station %zu: X = %.4f m", i, xs[i]);
  ImGui::Text("S = %.5g m²", c.curve.area[i]);
  if (i < c.sears_haack.size()) ImGui::Text("Sears–Haack: %.5g m²", c.sears_haack[i]);
  if (show_slope && i < c.slope.size()) ImGui::Text("S′ = %.4g m²/m", c.slope[i]);
  for (const AreaJump& j : c.jumps)
    if (std::fabs(p.x.to_px(j.x) - p.mouse.x) < 6)
      ImGui::Text("%s at X = %.4f m: ΔS = %.4g m², ΔS′ = %.4g m", j.kind.c_str(), j.x, j.step, j.slope_change);
  ImGui::EndTooltip();
  (void)slope_map;
}
}  // namespace

void draw_curve_view(UiContext& ctx, float x, float y, float w, float h) {
  AppState& s = ctx.s;
  char title[128];
  std::snprintf(title, sizeof title, "Area distribution S(X)  —  M %.3f, θ %.1f°###curve", s.controls.mach,
                s.controls.roll_deg);
  begin_panel(title, x, y, w, h, ImGuiWindowFlags_NoScrollbar | ImGuiWindowFlags_NoScrollWithMouse);
  const ImVec2 p0 = ImGui::GetCursorScreenPos();
  const ImVec2 size = ImGui::GetContentRegionAvail();
  ImGui::InvisibleButton("##plot", size);
  const bool dragging = ImGui::IsItemActive() && ImGui::IsMouseDown(ImGuiMouseButton_Left);
  if (!s.curve) {
    ImGui::GetWindowDrawList()->AddRectFilled(p0, ImVec2(p0.x + size.x, p0.y + size.y), kPlotBg);
    centred_note(p0, size, !s.model_loaded         ? "no curve: no model loaded"
                           : !s.model.analysable ? "no curve: the model cannot be analysed (see Model health)"
                                                 : "computing the area curve…");
    ImGui::End();
    return;
  }
  const CurveResult& c = *s.curve;
  double ymax = 0.0;
  for (double a : c.curve.area) ymax = std::max(ymax, a);
  for (double a : c.closed) ymax = std::max(ymax, a);
  if (s.controls.show_sears_haack)
    for (double a : c.sears_haack) ymax = std::max(ymax, a);
  const bool slope = s.controls.show_slope && !c.slope.empty();
  // Legend entries first: the plot leaves room above the curves for them.
  std::vector<std::pair<ImU32, std::string>> items{{kCurve, "S(X), projected normal to flow"}};
  if (!c.closed.empty()) items.emplace_back(kClosed, "S(X) with wakes and captures, as the drag sees it");
  if (s.controls.show_sears_haack && !c.sears_haack.empty())
    items.emplace_back(kHaack, "Sears–Haack, same l and V" +
                                   (c.sears_haack_dq >= 0 ? fmt(", D/q %.4g m²", c.sears_haack_dq) : ""));
  if (slope) items.emplace_back(kSlope, "S′(X)");
  if (s.controls.show_jumps && !c.jumps.empty()) items.emplace_back(kStep, "area jump (red step, orange kink)");
  const float legend_h = 17.0f * static_cast<float>(items.size()) + 10.0f;
  const float plot_h = std::max(40.0f, size.y - 50.0f);
  const double headroom = std::min(3.0, static_cast<double>(plot_h / std::max(20.0f, plot_h - legend_h)));
  Plot p = begin_plot(p0, size, c.range.lo, c.range.hi, 0.0, ymax * 1.03 * headroom + 1e-12, "station X [m]",
                      "area S [m²]", slope ? 64.0f : 14.0f);
  ctx.rects.plot[0] = p.lo.x, ctx.rects.plot[1] = p.lo.y, ctx.rects.plot[2] = p.hi.x, ctx.rects.plot[3] = p.hi.y;
  ctx.rects.plot_x0 = p.x.d0, ctx.rects.plot_x1 = p.x.d1;
  AxisMap slope_map;
  if (slope) {
    double smin = 0, smax = 0;
    for (double v : c.slope) {
      smin = std::min(smin, v);
      smax = std::max(smax, v);
    }
    nice_range(smin, smax, 6);
    slope_map = AxisMap{smin, smax, p.hi.y, p.lo.y};
    char b[48];
    for (double t : nice_ticks(smin, smax, 6)) {
      std::snprintf(b, sizeof b, "%g", t);
      p.dl->AddText(ImVec2(p.hi.x + 5, slope_map.to_px(t) - 7), kSlope, b);
    }
    p.dl->AddText(ImVec2(p.hi.x - 40, p0.y + 2), kSlope, "S′ [m²/m]");
    p.dl->AddLine(ImVec2(p.lo.x, slope_map.to_px(0)), ImVec2(p.hi.x, slope_map.to_px(0)), IM_COL32(214, 222, 110, 70));
    plot_line(p, c.curve.x, c.slope, kSlope, 1.2f, false, &slope_map);
  }
  if (s.controls.show_sears_haack && !c.sears_haack.empty()) plot_line(p, c.curve.x, c.sears_haack, kHaack, 1.6f, true);
  if (!c.closed.empty()) plot_line(p, c.curve.x, c.closed, kClosed, 1.5f);
  plot_line(p, c.curve.x, c.curve.area, curve_stale(s) ? kCurveStale : kCurve, 2.2f);
  if (s.controls.show_jumps)
    for (const AreaJump& j : c.jumps) {
      const float px = p.x.to_px(j.x);
      const ImU32 col = j.kind == "step" ? kStep : kKink;
      p.dl->AddTriangleFilled(ImVec2(px - 5, p.lo.y), ImVec2(px + 5, p.lo.y), ImVec2(px, p.lo.y + 8), col);
      p.dl->AddLine(ImVec2(px, p.lo.y + 8), ImVec2(px, p.hi.y), (col & 0x00FFFFFF) | 0x50000000);
    }
  // Cursor: moves with the plane; clicking or dragging on the plot moves the plane.
  if (dragging) set_station(s, p.x.to_data(ImGui::GetIO().MousePos.x));
  const float cx = p.x.to_px(s.station);
  p.dl->AddLine(ImVec2(cx, p.lo.y), ImVec2(cx, p.hi.y), kCursor, 2.0f);
  const double a_here = s.section && section_matches_planes(s) && s.section->station == s.station
                            ? s.section->area
                            : curve_area_at(c, s.station);
  p.dl->AddCircleFilled(ImVec2(cx, p.y.to_px(a_here)), 4.5f, kCursor);
  // Legend, in the room left above the curves.
  float lw = 0;
  for (const auto& it : items) lw = std::max(lw, ImGui::CalcTextSize(it.second.c_str()).x);
  const float lx = std::max(p.lo.x + 4, p.hi.x - lw - 40);
  float ly = p.lo.y + 6;
  p.dl->AddRectFilled(ImVec2(lx - 4, ly - 3), ImVec2(p.hi.x - 4, ly + 17.0f * items.size() + 1), IM_COL32(18, 22, 30, 210), 3);
  for (const auto& [col, text] : items) {
    p.dl->AddLine(ImVec2(lx, ly + 8), ImVec2(lx + 20, ly + 8), col, 2.5f);
    p.dl->AddText(ImVec2(lx + 26, ly), IM_COL32(210, 215, 225, 255), text.c_str());
    ly += 17;
  }
  if (curve_stale(s)) p.dl->AddText(ImVec2(p.lo.x + 8, p.lo.y + 6), kCursor, "updating…");
  curve_hover(p, c, slope_map, slope);
  ImGui::End();
}

void draw_section_view(UiContext& ctx, float x, float y, float w, float h) {
  AppState& s = ctx.s;
  begin_panel("Section at the cursor (true shape)", x, y, w, h, ImGuiWindowFlags_NoScrollbar);
  const ImVec2 p0 = ImGui::GetCursorScreenPos();
  ImVec2 size = ImGui::GetContentRegionAvail();
  size.y -= 20;
  ImGui::Dummy(size);
  if (!s.section || !section_matches_planes(s)) {
    ImGui::GetWindowDrawList()->AddRectFilled(p0, ImVec2(p0.x + size.x, p0.y + size.y), kPlotBg);
    centred_note(p0, size, s.model_loaded && s.model.analysable ? "cutting…" : "no section");
    ImGui::End();
    return;
  }
  const Section& sec = *s.section;
  // In-plane coordinates of every segment end (core: plane_coordinates).
  std::vector<std::array<double, 4>> segs;
  double ulo = HUGE_VAL, uhi = -HUGE_VAL, vlo = HUGE_VAL, vhi = -HUGE_VAL;
  for (const auto& sg : sec.segments) {
    const auto a = plane_coordinates(sg[0], sec.planes, sec.station);
    const auto b = plane_coordinates(sg[1], sec.planes, sec.station);
    segs.push_back({a[0], a[1], b[0], b[1]});
    ulo = std::min({ulo, a[0], b[0]});
    uhi = std::max({uhi, a[0], b[0]});
    vlo = std::min({vlo, a[1], b[1]});
    vhi = std::max({vhi, a[1], b[1]});
  }
  if (segs.empty()) {
    const Box3& b = s.model.box;
    ulo = b.lo.y, uhi = b.hi.y, vlo = b.lo.z, vhi = b.hi.z;
  }
  // Equal scales on both axes: widen the shorter span.
  const double pw = size.x - 78, ph = size.y - 46;
  const double scale = std::min(pw / std::max(uhi - ulo, 1e-9), ph / std::max(vhi - vlo, 1e-9)) * 0.92;
  const double uc = 0.5 * (ulo + uhi), vc = 0.5 * (vlo + vhi);
  Plot p = begin_plot(p0, size, uc - 0.5 * pw / scale, uc + 0.5 * pw / scale, vc - 0.5 * ph / scale,
                      vc + 0.5 * ph / scale, "u [m] (in the plane)", "v [m]");
  p.dl->PushClipRect(p.lo, p.hi, true);
  for (std::size_t i = 0; i < segs.size(); ++i) {
    const auto& g = segs[i];
    const std::size_t sh = i < sec.segment_shell.size() ? sec.segment_shell[i] : 0;
    const ImU32 col = sh < s.shells.size() ? with_alpha(s.shells[sh].colour, 255) : kCurve;
    p.dl->AddLine(ImVec2(p.x.to_px(g[0]), p.y.to_px(g[1])), ImVec2(p.x.to_px(g[2]), p.y.to_px(g[3])), col, 1.6f);
  }
  p.dl->PopClipRect();
  if (segs.empty()) centred_note(p0, size, "the plane misses the model here");
  if (p.hovered)
    ImGui::SetTooltip("u = %.4f m, v = %.4f m", p.x.to_data(p.mouse.x), p.y.to_data(p.mouse.y));
  ImGui::Text("S = %.5g m² (projected)   in-plane %.5g m²", sec.area, sec.cut_area);
  ImGui::End();
}

namespace {
// `text` cut to fit `width` pixels, ending in "…" when cut (whole text in a tooltip).
std::string fit_text(const std::string& text, float width) {
  if (ImGui::CalcTextSize(text.c_str()).x <= width) return text;
  std::string t = text;
  while (!t.empty() && ImGui::CalcTextSize((t + "…").c_str()).x > width) {
    std::size_t start = t.size() - 1;  // the last whole UTF-8 code point goes
    while (start > 0 && (static_cast<unsigned char>(t[start]) & 0xC0) == 0x80) --start;
    t.erase(start);
  }
  return t + "…";
}

// The factor on a plot's data maximum that keeps `rows` text rows at the top of the plot free
// of data (labels there never cover the curves, and the curves never run through them).
double label_headroom(ImVec2 size, int rows) {
  const float plot_h = std::max(40.0f, size.y - 62.0f);  // begin_plot's margins: 24 top, 38 bottom
  const float reserved = rows * (ImGui::GetTextLineHeight() + 3.0f) + 6.0f;
  return std::min(3.0, static_cast<double>(plot_h / std::max(20.0f, plot_h - reserved)));
}

void drag_placeholder(ImVec2 p0, ImVec2 size, const char* text) {
  ImGui::GetWindowDrawList()->AddRectFilled(p0, ImVec2(p0.x + size.x, p0.y + size.y), kPlotBg, 3.0f);
  centred_note(p0, size, text);
}

void roll_plot(UiContext& ctx, ImVec2 p0, ImVec2 size) {
  const DragResult& d = *ctx.s.drag;
  double ymax = 0;
  for (double v : d.roll_dq)
    if (std::isfinite(v)) ymax = std::max(ymax, v);
  Plot p = begin_plot(p0, size, 0.0, 360.0, 0.0, ymax * 1.02 * label_headroom(size, d.resolution_limited ? 2 : 1) + 1e-12, "roll angle θ [°]",
                      "D/q [m²]");
  if (d.total_dq >= 0) {
    const float py = p.y.to_px(d.total_dq);
    p.dl->AddLine(ImVec2(p.lo.x, py), ImVec2(p.hi.x, py), kHaack, 1.5f);
  }
  // The sampled roll angles (the quadrature's nodes; a symmetric model samples part of the turn).
  plot_line(p, d.roll_deg, d.roll_dq, kCurve, 2.0f);
  for (std::size_t i = 0; i < d.roll_deg.size(); ++i)
    if (std::isfinite(d.roll_dq[i])) p.dl->AddCircleFilled(ImVec2(p.x.to_px(d.roll_deg[i]), p.y.to_px(d.roll_dq[i])), 2.0f, kCurve);
  if (d.total_dq >= 0) {
    // The label over the curves, on its own background, at the top left of the plot.
    // A resolution-limited value says so on a second row, in amber (the panel's text below
    // gives the length floor).
    std::vector<std::pair<ImU32, std::string>> rows{{kHaack, fmt("roll average %.4g m²", d.total_dq)}};
    if (d.resolution_limited)
      rows.emplace_back(kCautionColour, fmt("resolution-limited, +%.2g m²/halving", d.growth_per_halving));
    ImVec2 at(p.lo.x + 6, p.lo.y + 4);
    for (const auto& [col, text] : rows) {
      const std::string t = fit_text(text, p.hi.x - at.x - 8);
      const ImVec2 ts = ImGui::CalcTextSize(t.c_str());
      p.dl->AddRectFilled(ImVec2(at.x - 3, at.y - 1), ImVec2(at.x + ts.x + 3, at.y + ts.y + 1), IM_COL32(18, 22, 30, 220), 3);
      p.dl->AddText(at, col, t.c_str());
      at.y += ts.y + 3;
    }
  }
  const float cx = p.x.to_px(ctx.s.controls.roll_deg);
  p.dl->AddLine(ImVec2(cx, p.lo.y), ImVec2(cx, p.hi.y), kCursor, 1.5f);
  if (p.hovered) ImGui::SetTooltip("θ = %.1f°", p.x.to_data(p.mouse.x));
}

void mach_plot(UiContext& ctx, ImVec2 p0, ImVec2 size) {
  const DragResult& d = *ctx.s.drag;
  if (d.mach_values.empty()) {
    drag_placeholder(p0, size, "D/q against Mach: computing…");
    return;
  }
  double ymax = 0;
  for (double v : d.mach_dq)
    if (std::isfinite(v)) ymax = std::max(ymax, v);
  // Rows of the key drawn at the top right (below): sweeping, no value, resolution-limited.
  const int key_rows = int(!d.mach_sweep_done) +
                       int(std::any_of(d.mach_dq.begin(), d.mach_dq.end(), [](double v) { return !std::isfinite(v); })) +
                       int(std::find(d.mach_limited.begin(), d.mach_limited.end(), true) != d.mach_limited.end());
  Plot p = begin_plot(p0, size, d.mach_values.front(), d.mach_values.back(), 0.0,
                      ymax * 1.02 * label_headroom(size, std::max(1, key_rows)) + 1e-12, "Mach M", "D/q [m²]");
  plot_line(p, d.mach_values, d.mach_dq, kCurve, 2.0f);
  bool any_limited = false, any_missing = false;
  for (std::size_t i = 0; i < d.mach_values.size(); ++i) {
    if (!std::isfinite(d.mach_dq[i])) {
      any_missing = true;
      continue;
    }
    const ImVec2 c(p.x.to_px(d.mach_values[i]), p.y.to_px(d.mach_dq[i]));
    // A resolution-limited value (still growing at the length floor): a hollow amber ring.
    if (i < d.mach_limited.size() && d.mach_limited[i]) {
      any_limited = true;
      p.dl->AddCircleFilled(c, 4.5f, kPlotBg);
      p.dl->AddCircle(c, 4.5f, kCautionColour, 0, 2.0f);
    } else {
      p.dl->AddCircleFilled(c, 3.0f, kCurve);
    }
  }
  // A Mach number without a value gets a red cross on the axis; hovering says why.
  for (std::size_t i = 0; i < d.mach_values.size(); ++i)
    if (!std::isfinite(d.mach_dq[i])) {
      const ImVec2 c(p.x.to_px(d.mach_values[i]), p.hi.y - 7);
      p.dl->AddLine(ImVec2(c.x - 5, c.y - 5), ImVec2(c.x + 5, c.y + 5), kStep, 2.0f);
      p.dl->AddLine(ImVec2(c.x - 5, c.y + 5), ImVec2(c.x + 5, c.y - 5), kStep, 2.0f);
    }
  const float cx = p.x.to_px(ctx.s.controls.mach);
  p.dl->AddLine(ImVec2(cx, p.lo.y), ImVec2(cx, p.hi.y), kCursor, 1.5f);
  // Key for the marks, top right, on its own background.
  std::vector<std::pair<ImU32, std::string>> key;
  if (any_limited) key.emplace_back(kCautionColour, "○ resolution-limited");
  if (any_missing) key.emplace_back(kStep, "× no value (hover: why)");
  if (!d.mach_sweep_done) key.emplace_back(kMuted, "sweeping…");
  float ky = p.lo.y + 4;
  for (const auto& [col, text] : key) {
    const ImVec2 ts = ImGui::CalcTextSize(text.c_str());
    const ImVec2 at(p.hi.x - ts.x - 6, ky);
    p.dl->AddRectFilled(ImVec2(at.x - 3, at.y - 1), ImVec2(at.x + ts.x + 3, at.y + ts.y + 1), IM_COL32(18, 22, 30, 220), 3);
    p.dl->AddText(at, col, text.c_str());
    ky += ts.y + 3;
  }
  if (p.hovered) {
    const double m = p.x.to_data(p.mouse.x);
    std::size_t best = 0;
    for (std::size_t i = 1; i < d.mach_values.size(); ++i)
      if (std::fabs(d.mach_values[i] - m) < std::fabs(d.mach_values[best] - m)) best = i;
    if (std::isfinite(d.mach_dq[best]))
      ImGui::SetTooltip("M = %.2f: D/q = %.4g m²%s", d.mach_values[best], d.mach_dq[best],
                        best < d.mach_limited.size() && d.mach_limited[best]
                            ? " (resolution-limited: the value at the length floor, still growing)"
                            : "");
    else
      ImGui::SetTooltip("M = %.2f: no value: %s", d.mach_values[best],
                        best < d.mach_problem.size() ? d.mach_problem[best].c_str() : "");
  }
}
}  // namespace

namespace {
// The validity block under the drag plots: the core's advice sentence and the features (part,
// where, share of D/q) at the current Mach, in a scrolling table.
void validity_block(UiContext& ctx, const DragResult& d, float height) {
  ctx.hovered_feature = -1;
  ImGui::BeginChild("##validity", ImVec2(0, height), false);
  if (!d.advice.empty()) {
    ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(kCautionColour));
    ImGui::TextWrapped("%s", d.advice.c_str());
    ImGui::PopStyleColor();
  }
  if (d.resolution_limited) {
    ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(kCautionColour));
    ImGui::TextWrapped("D/q %.4g m² is resolution-limited: the value at the length floor %.3g m, growing %.2g m² per "
                       "halving of the cells%s",
                       d.total_dq, d.length_floor, d.growth_per_halving, d.time_limited ? " (time budget reached)" : "");
    ImGui::PopStyleColor();
  }
  if (!d.features.empty() &&
      ImGui::BeginTable("##features", 4, ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerV | ImGuiTableFlags_SizingStretchProp)) {
    ImGui::TableSetupColumn("steeper than the Mach angle: part", ImGuiTableColumnFlags_WidthStretch, 3.0f);
    ImGui::TableSetupColumn("X [m]", ImGuiTableColumnFlags_WidthStretch, 2.0f);
    ImGui::TableSetupColumn("frontal [m²]", ImGuiTableColumnFlags_WidthStretch, 1.4f);
    ImGui::TableSetupColumn("share of D/q", ImGuiTableColumnFlags_WidthStretch, 1.4f);
    ImGui::TableHeadersRow();
    // Largest share of D/q first (the core lists them by frontal area).
    std::vector<const FeatureView*> rows;
    for (const FeatureView& f : d.features) rows.push_back(&f);
    std::stable_sort(rows.begin(), rows.end(), [](const FeatureView* a, const FeatureView* b) {
      const double sa = std::isfinite(a->drag_share) ? a->drag_share : -1.0;
      const double sb = std::isfinite(b->drag_share) ? b->drag_share : -1.0;
      return sa > sb;
    });
    for (const FeatureView* fp : rows) {
      const FeatureView& f = *fp;
      ImGui::TableNextRow();
      ImGui::TableNextColumn();
      ImGui::TextColored(ImVec4(kFeatureTint[0], kFeatureTint[1], kFeatureTint[2], 1.0f), "■");
      ImGui::SameLine();
      // The whole row is hoverable: its triangles light up on the model.
      ImGui::PushID(fp);
      ImGui::Selectable(f.part.c_str(), false, ImGuiSelectableFlags_SpanAllColumns);
      ImGui::PopID();
      if (ImGui::IsItemHovered()) {
        ctx.hovered_feature = static_cast<int>(fp - d.features.data());
        ImGui::SetTooltip("%s: %zu triangles (lit on the model), growth %.3g m² per halving", f.part.c_str(),
                          f.triangles, f.growth);
      }
      ImGui::TableNextColumn();
      ImGui::Text("%.3f – %.3f", f.x_from, f.x_to);
      ImGui::TableNextColumn();
      ImGui::Text("%.4g", f.frontal_area);
      ImGui::TableNextColumn();
      if (std::isfinite(f.drag_share)) ImGui::Text("%.1f %%", 100.0 * f.drag_share);
      else ImGui::TextUnformatted("—");
    }
    ImGui::EndTable();
  }
  if (d.features.empty() && !d.resolution_limited)
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "no surface steeper than the Mach angle at M %.3g", d.mach);
  ImGui::EndChild();
}
}  // namespace

void draw_drag_views(UiContext& ctx, float x, float y, float w, float h) {
  AppState& s = ctx.s;
  begin_panel("Wave drag D/q", x, y, w, h, ImGuiWindowFlags_NoScrollbar);
  const ImVec2 p0 = ImGui::GetCursorScreenPos();
  ImVec2 size = ImGui::GetContentRegionAvail();
  const float line_h = ImGui::GetTextLineHeightWithSpacing();
  // Room under the plots for the note line and, with a drag result, the validity block.
  const bool validity = s.drag && s.drag->available;
  const float validity_h = validity ? std::clamp(size.y * 0.36f, 3.0f * line_h, 8.0f * line_h) : 0.0f;
  size.y -= line_h + validity_h;
  const ImVec2 half(0.5f * size.x - 4, size.y);
  const ImVec2 p1(p0.x + half.x + 8, p0.y);
  ImGui::Dummy(size);
  const WorkerStatus st = ctx.worker.status();
  if (!Worker::drag_available()) {
    drag_placeholder(p0, half, "D/q per roll angle: not computed (no drag module in this build)");
    drag_placeholder(p1, half, "D/q against Mach: not computed (no drag module in this build)");
  } else if (!s.drag) {
    const std::string t = !s.model_loaded ? std::string("not computed: no model")
                          : !s.model.analysable
                              ? std::string("not computed: the model cannot be analysed")
                              : "computing " + st.drag_label + fmt("… %.0f%%", 100.0 * st.drag_progress);
    drag_placeholder(p0, half, t.c_str());
    drag_placeholder(p1, half, t.c_str());
  } else if (!s.drag->available) {
    drag_placeholder(p0, half, s.drag->note.c_str());
    drag_placeholder(p1, half, s.drag->note.c_str());
  } else {
    roll_plot(ctx, p0, half);
    mach_plot(ctx, p1, half);
  }
  if (s.drag && s.drag->available) {
    const std::string line = fmt("M %.3f: ", s.drag->mach) + s.drag->note + (st.drag_busy ? "  (updating)" : "");
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "%s", fit_text(line, ImGui::GetContentRegionAvail().x).c_str());
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", line.c_str());
    validity_block(ctx, *s.drag, validity_h);
  } else {
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "zero-lift wave drag, linear theory");
  }
  ImGui::End();
}

void draw_status_bar(UiContext& ctx, float x, float y, float w, float h) {
  AppState& s = ctx.s;
  begin_panel("##status", x, y, w, h, ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_NoScrollbar);
  if (s.busy) {
    ImGui::SetNextItemWidth(160);
    ImGui::ProgressBar(s.progress, ImVec2(160, 0), s.busy_label.c_str());
    ImGui::SameLine();
  }
  std::string files;
  for (const std::string& f : s.files) files += (files.empty() ? "" : ", ") + std::filesystem::path(f).filename().string();
  if (files.empty() && ctx.generated_triangles > 0) files = "generated test configuration";
  if (files.empty()) files = "no files";
  // Everything on one line: the file names give way (cut, whole list on hover) to the curve
  // figures, the last message and the frame time.
  std::string info;
  if (s.curve) {
    char b[160];
    std::snprintf(b, sizeof b, "| curve %.0f ms, %zu stations, l = %.4g m, V = %.4g m³", s.curve->compute_ms,
                  s.curve->curve.x.size(), s.curve->range.hi - s.curve->range.lo, s.curve->volume);
    info = b;
  }
  const std::string msg = ctx.message.empty() ? std::string() : "| " + ctx.message;
  // The time the last frame took to draw (not the wait for the next event before it).
  const std::string ft = ctx.headless ? std::string() : fmt("%.1f ms/frame", ctx.frame_ms);
  const float sp = ImGui::GetStyle().ItemSpacing.x;
  const float fixed = ImGui::CalcTextSize(info.c_str()).x + ImGui::CalcTextSize(msg.c_str()).x +
                      ImGui::CalcTextSize(ft.c_str()).x + 4 * sp + 24;
  const float room = std::max(60.0f, ImGui::GetContentRegionAvail().x - fixed);
  ImGui::TextUnformatted(fit_text(files, room).c_str());
  if (ImGui::IsItemHovered() && ImGui::CalcTextSize(files.c_str()).x > room) ImGui::SetTooltip("%s", files.c_str());
  if (!info.empty()) {
    ImGui::SameLine();
    ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "%s", info.c_str());
  }
  if (!msg.empty()) {
    ImGui::SameLine();
    ImGui::TextColored(ImVec4(0.5f, 0.9f, 0.6f, 1), "%s", msg.c_str());
  }
  ImGui::SameLine(std::max(ImGui::GetCursorPosX() + 10, w - ImGui::CalcTextSize(ft.c_str()).x - 14));
  ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(kMuted), "%s", ft.c_str());
  ImGui::End();
}

void draw_file_picker(UiContext& ctx) {
  FilePicker& fp = ctx.picker;
  if (fp.mode == PickerMode::none) return;
  const bool open_mode = fp.mode == PickerMode::open;
  const ImVec2 ds = ImGui::GetIO().DisplaySize;
  ImGui::SetNextWindowPos(ImVec2(ds.x * 0.5f, ds.y * 0.5f), ImGuiCond_Appearing, ImVec2(0.5f, 0.5f));
  ImGui::SetNextWindowSize(ImVec2(560, 420), ImGuiCond_Appearing);
  bool keep = true;
  ImGui::Begin(open_mode ? "Open mesh files" : "Save as", &keep, ImGuiWindowFlags_NoCollapse | ImGuiWindowFlags_NoSavedSettings);
  namespace fs = std::filesystem;
  if (open_mode) {
    // A path typed or pasted: Enter opens a file, or shows a folder.
    char pbuf[1024];
    std::snprintf(pbuf, sizeof pbuf, "%s", fp.path.c_str());
    if (fp.focus_path) {
      ImGui::SetKeyboardFocusHere();
      fp.focus_path = false;
    }
    ImGui::SetNextItemWidth(-60);
    const bool enter = ImGui::InputText("path", pbuf, sizeof pbuf, ImGuiInputTextFlags_EnterReturnsTrue);
    fp.path = pbuf;
    if (enter && !fp.path.empty()) {
      std::error_code ec;
      if (fs::is_directory(fp.path, ec)) {
        fp.dir = fp.path;
        fp.path.clear();
      } else {
        ctx.generated_triangles = 0;
        open_model(ctx, {fp.path});
        fp.mode = PickerMode::none;
        ImGui::End();
        return;
      }
    }
  }
  ImGui::TextWrapped("%s", fp.dir.c_str());
  if (ImGui::Button("Up")) fp.dir = fs::path(fp.dir).parent_path().string();
  ImGui::BeginChild("##list", ImVec2(0, -60), true);
  std::error_code ec;
  std::vector<fs::directory_entry> dirs, files;
  for (const auto& e : fs::directory_iterator(fp.dir, fs::directory_options::skip_permission_denied, ec)) {
    std::error_code ec2;
    if (e.is_directory(ec2)) dirs.push_back(e);
    else if (!open_mode || mesh_extension(e.path())) files.push_back(e);
  }
  auto by_name = [](const fs::directory_entry& a, const fs::directory_entry& b) { return a.path().filename() < b.path().filename(); };
  std::sort(dirs.begin(), dirs.end(), by_name);
  std::sort(files.begin(), files.end(), by_name);
  if (ec) ImGui::TextColored(ImVec4(1, 0.5f, 0.5f, 1), "cannot list this folder: %s", ec.message().c_str());
  std::string next_dir;
  for (const auto& d : dirs)
    if (ImGui::Selectable(("[folder] " + d.path().filename().string()).c_str(), false, ImGuiSelectableFlags_AllowDoubleClick) &&
        ImGui::IsMouseDoubleClicked(ImGuiMouseButton_Left))
      next_dir = d.path().string();
  for (const auto& f : files) {
    const std::string path = f.path().string();
    const bool sel = std::find(fp.chosen.begin(), fp.chosen.end(), path) != fp.chosen.end();
    if (ImGui::Selectable(f.path().filename().string().c_str(), sel)) {
      if (!open_mode) {
        fp.name = f.path().filename().string();
      } else if (ImGui::GetIO().KeyCtrl) {
        if (sel) fp.chosen.erase(std::find(fp.chosen.begin(), fp.chosen.end(), path));
        else fp.chosen.push_back(path);
      } else {
        fp.chosen = {path};
      }
    }
  }
  ImGui::EndChild();
  if (!next_dir.empty()) fp.dir = next_dir;
  if (open_mode) {
    ImGui::Text("%zu selected (Ctrl-click for several parts)", fp.chosen.size());
    ImGui::BeginDisabled(fp.chosen.empty());
    if (ImGui::Button("Open")) {
      ctx.generated_triangles = 0;
      open_model(ctx, fp.chosen);
      keep = false;
    }
    ImGui::EndDisabled();
  } else {
    char buf[512];
    std::snprintf(buf, sizeof buf, "%s", fp.name.c_str());
    ImGui::SetNextItemWidth(-80);
    if (ImGui::InputText("file name", buf, sizeof buf)) fp.name = buf;
    ImGui::BeginDisabled(fp.name.empty());
    if (ImGui::Button("Save")) {
      run_picker_action(ctx, (fs::path(fp.dir) / fp.name).string());
      keep = false;
    }
    ImGui::EndDisabled();
  }
  ImGui::SameLine();
  if (ImGui::Button("Cancel")) keep = false;
  ImGui::End();
  if (!keep) fp.mode = PickerMode::none;
}

void apply_keys(UiContext& ctx) {
  AppState& s = ctx.s;
  KeyQueue k = std::exchange(ctx.keys, KeyQueue{});
  // Arrows step the station (Shift: ten stations) unless a text field has the keyboard.
  if (k.station_steps != 0 && !ImGui::GetIO().WantTextInput && s.model_loaded) step_station(s, k.station_steps);
  if (k.open && ctx.picker.mode == PickerMode::none) open_picker(ctx, PickerMode::open, "");
  if (k.png) {
    ctx.png_request = fmt("machcut-view-%.0f.png", double(++ctx.png_count));
    ctx.last_png = ctx.png_request;
  }
}

void draw_frame(UiContext& ctx, float width, float height) {
  AppState& s = ctx.s;
  (void)s;
  apply_keys(ctx);
  const float top = 34.0f, status = 28.0f, side = std::clamp(width * 0.22f, 270.0f, 340.0f);
  const float gap = 4.0f;
  const float main_w = width - side - gap;
  const float main_h = height - top - status - 2 * gap;
  const float upper_h = std::floor(main_h * 0.56f);
  const float lower_h = main_h - upper_h - gap;
  const float model_w = std::floor(main_w * 0.50f);
  const float x0 = side + gap, y0 = top + gap;
  draw_top_bar(ctx, 0, 0, width, top);
  draw_controls_panel(ctx, 0, y0, side, main_h);
  draw_model_view(ctx, x0, y0, model_w, upper_h);
  draw_curve_view(ctx, x0 + model_w + gap, y0, main_w - model_w - gap, upper_h);
  const float sec_w = std::floor(main_w * 0.34f);
  draw_section_view(ctx, x0, y0 + upper_h + gap, sec_w, lower_h);
  draw_drag_views(ctx, x0 + sec_w + gap, y0 + upper_h + gap, main_w - sec_w - gap, lower_h);
  draw_status_bar(ctx, 0, height - status, width, status);
  draw_file_picker(ctx);
}

}  // namespace machcut::view
