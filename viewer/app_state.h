// The viewer's application state and its update rules. GL-free and ImGui-free: everything here
// is unit-tested (tests/test_viewer_state.cpp). Panels read and edit this struct; the worker
// (worker.h) fills in results; the GL module (gl_render.h) draws from it.
#pragma once

#include <array>
#include <compare>
#include <cstdint>
#include <cstddef>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "machcut/sections/area_curve.h"
#include "machcut/common/geometry.h"
#include "machcut/common/limits.h"
#include "machcut/common/mesh.h"
#include "machcut/design/jumps.h"
#include "machcut/sections/section.h"

namespace machcut::view {

// ---- Controls the user sets ---------------------------------------------------------------

struct Controls {
  double mach = 1.2;        // >= 1 (1 = normal cuts)
  double roll_deg = 0.0;    // roll angle θ, degrees, kept in [0, 360)
  int stations = 101;       // stations per curve, 2 .. kMaxStations
  bool unite = true;        // unite overlapping closed shells (false: plain sum)
  std::string units = "m";  // length unit of the input files (outputs are SI)
  std::string flow = "+x";  // file axis from nose to tail
  std::string up = "+z";    // file axis pointing up
  std::vector<std::string> captures;  // flow-through shells for wave drag ("FILE" or "FILE#k")
  bool show_slope = false;        // S′(x) on the curve plot
  bool show_sears_haack = true;   // Sears–Haack body of the same length and volume
  bool show_jumps = true;         // mark area jumps (steps and kinks)
  bool show_features = true;      // paint the validity features on the model
  bool show_health = true;        // draw open and non-manifold edges on the model
  bool show_left_out = true;      // draw the parts left out of the analysis (grey wireframe)
  bool show_sensitivity = false;  // paint the drag sensitivity ∂(D/q)/∂V on the model
  std::vector<std::string> skip;  // parts left out (as --skip of the CLI)
  std::vector<std::string> only;  // the only parts used (as --only; empty: all)
};

// The Mach range is the core's (common/limits.h: kMinMach, kMaxMach), as in the CLI.
constexpr int kMinStations = 2;
constexpr int kMaxStations = 2001;

// Clamp setters: each returns true when the stored value changed.
bool set_mach(Controls& c, double mach);          // clamps to [1, kMaxMach]
bool set_roll(Controls& c, double roll_deg);      // wraps into [0, 360)
bool set_stations(Controls& c, int n);            // clamps to [kMinStations, kMaxStations]

// What a curve depends on: the cache key. Mach and roll are quantised (1e-4, 1e-3 degree) so
// that a value typed twice hits the cache.
struct CurveKey {
  long mach_e4 = 0;
  long roll_e3 = 0;
  int stations = 0;
  bool united = true;
  auto operator<=>(const CurveKey&) const = default;
};
CurveKey curve_key(const Controls& c, bool model_united);
MachPlanes planes_of(const CurveKey& k);

// ---- Results handed back by the worker ----------------------------------------------------

// A curve and what the viewer shows with it (all from the core).
struct CurveResult {
  CurveKey key;
  AreaCurve curve;            // x in m, area in m²
  StationRange range;         // m
  double volume = 0.0;        // ∫S dX over the curve, m³ (trapezoid)
  std::vector<double> closed;       // m², same stations: the curve the drag integrates (wakes
                                    // added, captured tubes subtracted); empty when no ends
  std::vector<double> sears_haack;  // m², same stations; empty when not available
  double sears_haack_dq = -1.0;     // D/q of that body, m²; < 0: not available
  std::vector<double> slope;        // dS/dX, m²/m
  std::vector<AreaJump> jumps;      // steps and kinks of the curve (core: find_jumps)
  double compute_ms = 0.0;
};

// One validity feature as the drag panel lists it (numbers from the core's ValidityFeature).
struct FeatureView {
  std::string part;
  double x_from = 0.0, x_to = 0.0;   // m, along the flow
  double frontal_area = 0.0;         // m²
  double drag_share = 0.0;           // fraction of D/q (NaN: no D/q)
  double growth = 0.0;               // m²: its part of the growth per halving
  std::size_t triangles = 0;
  std::size_t first_painted = 0;     // its triangles in DragResult::feature_xyz: first, count
  std::size_t painted = 0;
};

// The triangles `tris` of `mesh` (indices into mesh.triangles; out-of-range ones skipped) as
// 9 floats each (three corners, m): what the GL module paints. The features' indices refer to
// the study's analysis mesh (PreparedModel::analysis), so pass that mesh, whatever is shown.
std::vector<float> triangle_soup(const Mesh& mesh, const std::vector<std::uint32_t>& tris);

// What the model's health shows on the model and in its panel (all from the core's intake).
struct HealthView {
  std::vector<std::string> lines;       // the core's health lines (study.h: health_lines)
  std::size_t boundary_edges = 0;       // open edges in the file (holes closed or not)
  std::size_t nonmanifold_edges = 0;
  std::vector<float> boundary_xyz;      // segments, 6 floats each, m
  std::vector<float> nonmanifold_xyz;   // segments, 6 floats each, m
  struct Part {
    std::string name;
    std::string state;                  // "wrapped", "refused"
    std::string why;
  };
  std::vector<Part> parts;              // parts repaired by wrapping or refused, with the reason
  struct LeftOut {
    std::string name;
    std::string why;                    // the core's words (PreparedModel::left_out)
    std::size_t triangles = 0;
  };
  std::vector<LeftOut> left_out;        // parts not analysed (--skip/--only, flat, failed wrap)
  std::vector<float> set_aside_xyz;     // their triangles, 9 floats each, m (drawn translucent)
  std::vector<float> set_aside_edges;   // their edges, 6 floats each, m (drawn as wireframe)
};

// The distinct edges of all triangles of `mesh` as segments (6 floats each, m): the wireframe
// of the parts left out.
std::vector<float> wireframe_segments(const Mesh& mesh);

// Segments (6 floats each, m) of `edges` (vertex pairs into mesh.positions; pairs out of range
// skipped).
std::vector<float> edge_segments(const Mesh& mesh, const std::vector<std::array<std::uint32_t, 2>>& edges);

// D/q results when the core has a drag module (eminton_lord.h); `available` false otherwise.
struct DragResult {
  bool available = false;
  std::string note;                  // why not, or how it was made
  double mach = 0.0;
  std::vector<double> roll_deg;      // per-roll D/q
  std::vector<double> roll_dq;       // m²
  double total_dq = -1.0;            // roll-averaged, m²
  std::vector<double> mach_values;   // D/q against Mach
  std::vector<double> mach_dq;       // m² (NaN: no value; mach_problem says why)
  std::vector<std::string> mach_problem;  // "" where there is a value
  bool mach_sweep_done = false;      // false: the D/q-against-Mach sweep is still running
  std::vector<bool> mach_limited;    // per Mach: the value is resolution-limited
  // Resolution at the current Mach (wave_drag.h: MachDrag).
  bool resolution_limited = false;   // the value at the length floor, still growing
  bool time_limited = false;         // the time budget stopped the refinement
  double growth_per_halving = 0.0;   // m²: D(h) − D(2h) at the final cells
  double length_floor = 0.0;         // m
  // Validity features at the current Mach (validity.h): surface steeper than the Mach angle.
  std::vector<FeatureView> features;
  std::string advice;                // the core's sentence for the designer; empty: none
  std::vector<float> feature_xyz;    // the features' triangles, 9 floats each (m), for painting
};

// ---- Drag sensitivity painted on the model --------------------------------------------------

// The colours of the diverging map (RGB, 0..1), shared with the legend: s > 0 (adding volume
// there raises D/q: push the surface in), s < 0 (push it out), and s = 0.
inline constexpr float kPushIn[3] = {0.86f, 0.36f, 0.12f};
inline constexpr float kPushOut[3] = {0.13f, 0.50f, 0.58f};
inline constexpr float kNeutral[3] = {0.90f, 0.89f, 0.84f};
// The colours saturate at this quantile of |s| over the vertices used: robust to the vertices
// at sharp edges and small details with extreme values (on the demo aircraft at M 1.4 the
// largest |s| is 16 times the 98th percentile and 500 times the median).
inline constexpr double kSensitivityClipQuantile = 0.90;

// The `quantile` (0..1, nearest rank) of |v| over the finite values; 0 when there is none.
double robust_clip(const std::vector<double>& values, double quantile);
// The colour of value `v` (1/m) with the map saturating at ±clip: kNeutral at 0, towards
// kPushIn for v > 0 and kPushOut for v < 0 by the fraction t = √(|v|/clip) (a square-root ramp,
// so that the many small values are not all near-neutral), the end colour at and beyond ±clip.
// clip <= 0 or a non-finite v gives kNeutral.
void diverging_colour(double v, double clip, float out[3]);
// The triangles of `mesh` with a colour per corner from `per_vertex` (one value per vertex of
// `mesh`): 6 floats per corner (x, y, z in m, then r, g, b), 18 per triangle. Empty when the
// sizes disagree (values of another mesh's numbering are never painted).
std::vector<float> paint_per_vertex(const Mesh& mesh, const std::vector<double>& per_vertex, double clip);

// The sensitivity at one Mach as the viewer shows it (numbers from Study::sensitivity).
struct SensitivityView {
  double mach = 0.0;
  bool ok = false;
  std::string problem;              // why there is none (the core's words) when !ok
  std::string how;                  // the core's one line
  double drag_area = 0.0;           // m², D/q on the sensitivity's grids
  double clip = 0.0;                // 1/m: kSensitivityClipQuantile of |s|
  double max_abs = 0.0;             // 1/m: largest |s|
  std::vector<float> paint;         // paint_per_vertex on the engine's mesh
};

struct ShellView {
  std::string name;
  std::size_t triangles = 0;
  float colour[3] = {0.7f, 0.7f, 0.7f};
  bool visible = true;
  bool wrapped = false;   // replaced by its alpha wrap (tinted; `why` says what was wrong)
  std::string why;
};

// The tint of a part replaced by its alpha wrap (RGB, 0..1): one colour for all, unlike the
// per-shell colours, so a wrapped part stands out.
void wrapped_colour(float out[3]);

// ---- Camera (orbit about a target; z up) --------------------------------------------------

struct Camera {
  float yaw_deg = 128.0f;   // azimuth about +z of the eye, from +x (front-right quarter)
  float pitch_deg = 24.0f;  // elevation, degrees, clamped to ±89
  float distance = 10.0f;   // eye to target, m
  float target[3] = {0, 0, 0};
  float fov_deg = 35.0f;
};

struct Mat4 {
  float m[16] = {1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1};  // column-major
};

Mat4 view_matrix(const Camera& cam);
Mat4 projection_matrix(const Camera& cam, float aspect, float scene_radius);
Mat4 multiply(const Mat4& a, const Mat4& b);
void eye_position(const Camera& cam, float out[3]);

// Mouse conventions: left-drag orbits, right/middle-drag pans, the wheel zooms.
void orbit(Camera& cam, float dx_px, float dy_px);
void pan(Camera& cam, float dx_px, float dy_px, float viewport_h_px);
void zoom(Camera& cam, float wheel_steps);
// Frames the box (fit-to-view), keeping the direction of view.
void fit(Camera& cam, const Box3& box);

// ---- Plot mapping ------------------------------------------------------------------------

// Linear map between data [d0, d1] and pixels [p0, p1] (p1 < p0 allowed: y grows down).
struct AxisMap {
  double d0 = 0, d1 = 1;
  float p0 = 0, p1 = 1;
  float to_px(double d) const;
  double to_data(float p) const;
};

// "Nice" tick values (1, 2, 5 × 10^k) covering [lo, hi] with at most max_ticks ticks.
std::vector<double> nice_ticks(double lo, double hi, int max_ticks);
// Extends [lo, hi] outwards to the nice tick grid; lo == hi gets a unit span.
void nice_range(double& lo, double& hi, int max_ticks);

// ---- The whole application state ----------------------------------------------------------

struct ModelSummary {
  std::size_t triangles = 0;
  std::size_t analysis_triangles = 0;
  Box3 box;
  double volume = 0.0;       // m³ of the analysis mesh
  bool united = false;       // analysis is a union of overlapping shells
  bool analysable = true;    // false: the mesh is shown, but no curve or drag (`reason`)
  std::string reason;        // why it cannot be analysed (the core's words)
  double load_ms = 0.0;
};

struct AppState {
  std::vector<std::string> files;
  Controls controls;
  Camera camera;

  bool model_loaded = false;
  ModelSummary model;
  std::vector<ShellView> shells;
  std::vector<std::string> notes;     // from loading
  std::vector<std::string> warnings;  // from loading
  HealthView health;
  std::string error;                  // last error, shown in the window until dismissed

  double station = 0.0;               // cursor / plane station X, m
  std::map<CurveKey, std::shared_ptr<const CurveResult>> curves;  // cache per Mach and roll
  std::shared_ptr<const CurveResult> curve;   // the one shown (may lag the controls)
  std::shared_ptr<const Section> section;     // outline at (about) the cursor
  std::shared_ptr<const DragResult> drag;     // may be null (not computed)
  std::shared_ptr<const SensitivityView> sensitivity;  // null: not asked for or not yet back

  // Work in progress, as reported by the worker.
  bool busy = false;
  float progress = 0.0f;
  std::string busy_label;
  bool sensitivity_busy = false;
};

// Station range of the current curve (or of the model box when there is none).
StationRange station_range(const AppState& s);
// Sets the cursor station, clamped to the station range. Returns true when it changed.
bool set_station(AppState& s, double x);
// Moves the cursor by `steps` curve stations (negative: upstream). Snaps to the station grid.
bool step_station(AppState& s, int steps);
// The shown curve is out of date for the controls.
bool curve_stale(const AppState& s);
// Looks the controls' curve up in the cache; makes it current when present. Returns true when
// the cache answered (no computation needed).
bool use_cached_curve(AppState& s);
// Stores a result from the worker; makes it current when it matches the controls.
void accept_curve(AppState& s, std::shared_ptr<const CurveResult> r);
// The section is out of date for the cursor or the controls.
bool section_stale(const AppState& s);

// Area of the shown curve at the cursor by linear interpolation between stations, m².
// Display only (the exact value is section->area). Returns 0 outside.
double curve_area_at(const CurveResult& c, double x);

// Distinct, light-on-dark colour for shell i (RGB, 0..1).
void shell_colour(std::size_t i, float out[3]);

}  // namespace machcut::view
