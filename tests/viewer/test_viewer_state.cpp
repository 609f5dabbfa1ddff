// Tests of the viewer's GL-free state and update logic (viewer/app_state.cpp, worker.cpp,
// display_mesh.cpp, export.cpp). No window or GL context is needed.
#include <catch2/catch.hpp>

#include <chrono>
#include <nlohmann/json.hpp>
#include <cmath>
#include <numbers>
#include <thread>

#include "app_state.h"
#include "display_mesh.h"
#include "export.h"
#include "machcut/intake/holes.h"
#include "machcut/sections/section.h"
#include "model_source.h"
#include "test_support.h"
#include "worker.h"

using namespace machcut;
using namespace machcut::view;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// A curve result on the stations 0, 1, ..., 10 (m) for the controls' key.
std::shared_ptr<const CurveResult> grid_curve(const Controls& c) {
  auto r = std::make_shared<CurveResult>();
  r->key = curve_key(c, false);
  for (int i = 0; i <= 10; ++i) {
    r->curve.x.push_back(i);
    r->curve.area.push_back(i * (10 - i));
  }
  r->range = {0.0, 10.0};
  return r;
}

// Column-major 4×4 times (x, y, z, 1).
std::array<float, 4> apply(const Mat4& m, float x, float y, float z) {
  std::array<float, 4> o{};
  for (int r = 0; r < 4; ++r) o[r] = m.m[r] * x + m.m[4 + r] * y + m.m[8 + r] * z + m.m[12 + r];
  return o;
}

template <class Pred>
bool wait_for(Worker& w, Pred pred, WorkerOutput& acc, double seconds = 60) {
  const auto t0 = std::chrono::steady_clock::now();
  while (std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() < seconds) {
    WorkerOutput o = w.take();
    if (o.load) acc.load = std::move(o.load);
    for (auto& c : o.curves) acc.curves.push_back(c);
    if (o.section) acc.section = o.section;
    if (pred(acc)) return true;
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  return false;
}
}  // namespace

TEST_CASE("controls clamp Mach, wrap roll and clamp the station count", "[viewer]") {
  Controls c;
  CHECK(set_mach(c, 0.5));
  CHECK(c.mach == 1.0);  // Mach planes need M >= 1 (docs/method.md §3.1)
  CHECK_FALSE(set_mach(c, 1.0));
  CHECK_FALSE(set_mach(c, NAN));
  CHECK(set_mach(c, 100.0));
  CHECK(c.mach == kMaxMach);
  CHECK(set_roll(c, -30.0));
  CHECK(c.roll_deg == 330.0);
  CHECK(set_roll(c, 720.0));
  CHECK(c.roll_deg == 0.0);
  CHECK(set_stations(c, 1));
  CHECK(c.stations == kMinStations);
}

TEST_CASE("curve keys quantise Mach and roll so retyped values hit the cache", "[viewer]") {
  Controls a, b;
  set_mach(a, 1.2);
  set_mach(b, 1.2 + 1e-9);
  CHECK(curve_key(a, true) == curve_key(b, true));
  CHECK_FALSE(curve_key(a, true) == curve_key(a, false));
  set_roll(b, 0.5);
  CHECK_FALSE(curve_key(a, true) == curve_key(b, true));
  const MachPlanes p = planes_of(curve_key(b, true));
  CHECK_THAT(p.mach, WithinAbs(1.2, 1e-12));
  CHECK_THAT(p.roll_deg, WithinAbs(0.5, 1e-12));
}

TEST_CASE("results are cached per Mach and roll and reused without the worker", "[viewer]") {
  AppState s;
  s.model_loaded = true;
  s.model.box = {{0, -1, -1}, {10, 1, 1}};
  Controls first = s.controls;
  accept_curve(s, grid_curve(first));
  REQUIRE(s.curve);
  CHECK_FALSE(curve_stale(s));
  CHECK(s.station == 5.0);  // first curve: cursor at mid-range
  set_mach(s.controls, 2.0);
  CHECK(curve_stale(s));
  CHECK_FALSE(use_cached_curve(s));
  // A result for another key is stored but not shown.
  Controls other = first;
  set_roll(other, 45.0);
  accept_curve(s, grid_curve(other));
  CHECK(s.curves.size() == 2);
  CHECK(curve_stale(s));
  // Back to the first Mach: the cache answers at once.
  set_mach(s.controls, first.mach);
  CHECK(use_cached_curve(s));
  CHECK_FALSE(curve_stale(s));
}

TEST_CASE("the cursor steps along the station grid and stays in range", "[viewer]") {
  AppState s;
  s.model_loaded = true;
  accept_curve(s, grid_curve(s.controls));
  REQUIRE(set_station(s, 3.4));
  CHECK(step_station(s, 1));
  CHECK(s.station == 4.0);
  CHECK(step_station(s, -1));
  CHECK(s.station == 3.0);
  CHECK(step_station(s, -10));
  CHECK(s.station == 0.0);
  CHECK_FALSE(step_station(s, -1));  // already at the nose
  CHECK(step_station(s, 25));
  CHECK(s.station == 10.0);
  CHECK_FALSE(set_station(s, 42.0));  // clamped to the end: no change
  CHECK(set_station(s, -3.0));
  CHECK(s.station == 0.0);
  CHECK_THAT(curve_area_at(*s.curve, 2.5), WithinAbs(0.5 * (16 + 21), 1e-12));  // linear between 2 and 3
}

TEST_CASE("the section is stale when the cursor, Mach or roll moves", "[viewer]") {
  AppState s;
  s.model_loaded = true;
  accept_curve(s, grid_curve(s.controls));
  auto sec = std::make_shared<Section>();
  sec->planes = planes_of(curve_key(s.controls, false));
  sec->station = s.station;
  s.section = sec;
  CHECK_FALSE(section_stale(s));
  set_station(s, 2.0);
  CHECK(section_stale(s));
  sec->station = 2.0;
  CHECK_FALSE(section_stale(s));
  set_roll(s.controls, 10.0);
  CHECK(section_stale(s));
}

TEST_CASE("camera: the view puts the target straight ahead at the orbit distance", "[viewer]") {
  // Source: definition of a look-at view matrix (camera at the origin looking down −z).
  Camera cam;
  cam.target[0] = 3;
  cam.target[1] = -1;
  cam.target[2] = 2;
  cam.distance = 7;
  for (float yaw : {0.f, 45.f, 128.f, -100.f})
    for (float pitch : {-60.f, 0.f, 24.f, 80.f}) {
      cam.yaw_deg = yaw;
      cam.pitch_deg = pitch;
      const auto t = apply(view_matrix(cam), 3, -1, 2);
      CHECK_THAT(t[0], WithinAbs(0.0, 1e-4));
      CHECK_THAT(t[1], WithinAbs(0.0, 1e-4));
      CHECK_THAT(t[2], WithinAbs(-7.0, 1e-4));
    }
  orbit(cam, 0, 1e6);
  CHECK(cam.pitch_deg <= 89.0f);
  const float before = cam.distance;
  zoom(cam, 1);
  CHECK(cam.distance < before);
}

TEST_CASE("camera: fit centres the box and keeps it in front of the near plane", "[viewer]") {
  Camera cam;
  const Box3 box{{-2, -1, 0}, {10, 1, 1}};
  fit(cam, box);
  CHECK(cam.target[0] == 4.0f);
  CHECK(cam.target[2] == 0.5f);
  const Mat4 mvp = multiply(projection_matrix(cam, 1.6f, 6.2f), view_matrix(cam));
  const auto c = apply(mvp, 4, 0, 0.5);
  CHECK_THAT(c[0] / c[3], WithinAbs(0.0, 1e-5));  // centre of the screen
  CHECK_THAT(c[1] / c[3], WithinAbs(0.0, 1e-5));
  for (double x : {box.lo.x, box.hi.x})
    for (double y : {box.lo.y, box.hi.y})
      for (double z : {box.lo.z, box.hi.z}) {
        const auto q = apply(mvp, float(x), float(y), float(z));
        CHECK(q[2] / q[3] > -1.0f);  // between the near and far planes
        CHECK(q[2] / q[3] < 1.0f);
      }
}

TEST_CASE("pan moves the target across the view, not along it", "[viewer]") {
  Camera cam;
  cam.distance = 10;
  const Mat4 v0 = view_matrix(cam);
  pan(cam, 50, 0, 500);
  const auto t = apply(v0, cam.target[0], cam.target[1], cam.target[2]);
  CHECK(t[0] < 0);  // dragging right moves the scene right: the target moves left in view
  CHECK_THAT(t[1], WithinAbs(0.0, 1e-5));
  CHECK_THAT(t[2], WithinAbs(-10.0, 1e-4));
}

TEST_CASE("plot axes: nice ticks and pixel mapping", "[viewer]") {
  // Source: the 1-2-5 tick rule (common practice).
  const auto t = nice_ticks(0.0, 1.0, 6);
  REQUIRE(t.size() == 6);
  CHECK_THAT(t[1], WithinAbs(0.2, 1e-12));
  CHECK(nice_ticks(3.0, 3.0, 5).empty());
  double lo = 0.13, hi = 9.7;
  nice_range(lo, hi, 6);
  CHECK(lo == 0.0);
  CHECK(hi == 10.0);
  const AxisMap m{2.0, 4.0, 100.0f, 0.0f};  // y axis: pixels grow downwards
  CHECK(m.to_px(2.0) == 100.0f);
  CHECK(m.to_px(4.0) == 0.0f);
  CHECK_THAT(m.to_data(25.0f), WithinAbs(3.5, 1e-6));
}

TEST_CASE("display mesh groups triangles by shell and simplifies big meshes", "[viewer]") {
  Mesh a = test::make_sphere({0, 0, 0}, 1.0, 60, 80);
  Mesh b = test::make_box({3, 0, 0}, {4, 1, 1});
  b.shell_names = {"box"};
  a.shell_names = {"sphere"};
  const Mesh m = concatenate({a, b});
  const DisplayMesh d = make_display_mesh(m, 1000);
  REQUIRE(d.shells.size() == 2);
  CHECK(d.indices.size() == 3 * m.triangles.size());
  CHECK(d.shells[0].count == 3 * a.triangles.size());
  CHECK(d.shells[1].first == d.shells[0].count);
  REQUIRE(d.lod_shells.size() == 2);
  CHECK(d.lod_indices.size() < d.indices.size() / 3);
  CHECK(d.lod_shells[1].count == 36);  // the 12-triangle box is kept whole
  CHECK(make_display_mesh(b, 1000).lod_indices.empty());
}

TEST_CASE("compute_curve: sphere areas, Sears-Haack overlay of the same length and volume", "[viewer]") {
  // Source: area of a regular polygon (n/2) r² sin(2π/n) at the sphere's equator ring (the
  // UV sphere's equator is an exact 80-gon); Sears–Haack S_max = 16 V/(3π l) (Sears 1947).
  const Mesh sphere = test::make_sphere({0, 0, 0}, 1.0, 40, 80);
  PreparedModel prepared;
  prepared.mesh = prepared.analysis = sphere;
  prepared.usable = true;
  const Study study(std::move(prepared), EndSetup{});
  Controls c;
  c.mach = 1.0;
  c.stations = 41;  // station 20 is the equator x = 0
  const auto r = compute_curve(study, curve_key(c, false));
  REQUIRE(r->curve.x.size() == 41);
  CHECK_THAT(r->curve.area[20], WithinRel(0.5 * 80 * std::sin(2 * std::numbers::pi / 80), 1e-9));
  REQUIRE(r->sears_haack.size() == 41);
  const double l = r->range.hi - r->range.lo;
  // The overlay uses the model's own volume (divergence theorem) and body length, as
  // `machcut drag` does, not the trapezoid volume of the sampled curve.
  const double v = signed_volume(sphere);
  CHECK_THAT(r->sears_haack[20], WithinRel(16 * v / (3 * std::numbers::pi * l), 1e-9));
  CHECK_THAT(r->volume, WithinRel(signed_volume(sphere), 2e-3));  // trapezoid vs exact
  CHECK(r->sears_haack_dq > 0);
  CHECK_THAT(r->sears_haack_dq, WithinRel(128 * v * v / (std::numbers::pi * std::pow(l, 4)), 1e-9));
  REQUIRE(r->slope.size() == 41);
  CHECK_THAT(r->slope[20], WithinAbs(0.0, 1e-9));  // symmetric about the equator
}

TEST_CASE("worker: load, curve and section arrive off the UI thread", "[viewer]") {
  Worker w;
  LoadJob job;
  job.generated_triangles = 4000;
  w.load(job);
  WorkerOutput acc;
  REQUIRE(wait_for(w, [](const WorkerOutput& o) { return o.load.has_value(); }, acc));
  REQUIRE(acc.load->ok);
  CHECK(acc.load->shells.size() == 3);
  Controls c;
  c.mach = 1.0;
  c.stations = 25;
  w.request_curve(curve_key(c, false));
  w.request_section({1.0, 0.0}, 6.0);
  REQUIRE(wait_for(w, [](const WorkerOutput& o) { return !o.curves.empty() && o.section; }, acc));
  // Independent path: the same generated model straight through the section engine.
  const SectionEngine engine(generated_model(4000).analysis);
  const auto direct = engine.areas({1.0, 0.0}, std::vector<double>{6.0});
  CHECK_THAT(acc.section->area, WithinRel(direct[0], 1e-12));
  CHECK(acc.curves[0]->curve.x.size() == 25);
}

TEST_CASE("worker: a bad file comes back as a message naming it", "[viewer]") {
  Worker w;
  LoadJob job;
  job.files = {test::temp_path("viewer_missing_file.stl")};
  w.load(job);
  WorkerOutput acc;
  REQUIRE(wait_for(w, [](const WorkerOutput& o) { return o.load.has_value(); }, acc));
  CHECK_FALSE(acc.load->ok);
  CHECK(acc.load->error.find("viewer_missing_file.stl") != std::string::npos);
}

TEST_CASE("curve CSV export has one row per station with SI headers", "[viewer]") {
  Controls c;
  auto r = std::make_shared<CurveResult>(*grid_curve(c));
  const std::string csv = curve_csv(*r);
  CHECK(csv.rfind("x_m,area_m2,sears_haack_m2,slope_m2_per_m\n", 0) == 0);
  CHECK(std::count(csv.begin(), csv.end(), '\n') == 12);
}

TEST_CASE("triangle soup and edge segments take their corners from the mesh given", "[viewer]") {
  const Mesh m = test::make_box({0, 0, 0}, {1, 2, 3});
  const std::vector<float> soup = triangle_soup(m, {3, 99, 0});  // 99 does not exist: skipped
  REQUIRE(soup.size() == 18);
  for (int c = 0; c < 3; ++c) {
    const Vec3& p = m.positions[m.triangles[3][c]];
    CHECK(soup[3 * c] == float(p.x));
    CHECK(soup[3 * c + 1] == float(p.y));
    CHECK(soup[3 * c + 2] == float(p.z));
  }
  const std::vector<float> seg = edge_segments(m, {{0, 1}, {0, 1000}});
  REQUIRE(seg.size() == 6);
  CHECK(seg[3] == float(m.positions[1].x));
}

TEST_CASE("health view: a closed hole's loop is drawn as the open boundary", "[viewer]") {
  // A sphere without one triangle: a small hole the intake closes with a fan (holes.h); the
  // boundary the file had is that triangle's three edges.
  Mesh m = test::make_sphere({0, 0, 0}, 1.0, 12, 24);
  const Tri gone = m.triangles[40];
  m.triangles.erase(m.triangles.begin() + 40);
  m.shell.erase(m.shell.begin() + 40);
  const PreparedModel pm = prepare_mesh(m, {}, {"sphere"}, {});
  REQUIRE(pm.usable);
  const HealthView h = health_view(pm);
  CHECK(h.boundary_edges == 3);
  REQUIRE(h.boundary_xyz.size() == 3 * 6);
  // Every drawn end is a corner of the removed triangle.
  for (std::size_t i = 0; i < h.boundary_xyz.size(); i += 3) {
    bool corner = false;
    for (std::uint32_t v : gone)
      corner = corner || (float(m.positions[v].x) == h.boundary_xyz[i] && float(m.positions[v].y) == h.boundary_xyz[i + 1] &&
                          float(m.positions[v].z) == h.boundary_xyz[i + 2]);
    CHECK(corner);
  }
  CHECK(h.nonmanifold_xyz.empty());
  CHECK(h.parts.empty());
  CHECK_FALSE(h.lines.empty());
}

TEST_CASE("worker: a model that cannot be analysed still loads its mesh and health", "[viewer]") {
  // One flat square (two triangles): it reads, but encloses no volume.
  Mesh sheet;
  sheet.positions = {{0, 0, 0}, {0, 1, 0}, {0, 1, 1}, {0, 0, 1}};
  sheet.triangles = {{0, 1, 2}, {0, 2, 3}};
  sheet.shell = {0, 0};
  sheet.shell_names = {"sheet"};
  const std::string path = test::write_obj(sheet, "viewer_flat_sheet.obj");
  Worker w;
  LoadJob job;
  job.files = {path};
  w.load(job);
  WorkerOutput acc;
  REQUIRE(wait_for(w, [](const WorkerOutput& o) { return o.load.has_value(); }, acc));
  REQUIRE(acc.load->ok);
  CHECK_FALSE(acc.load->summary.analysable);
  // The reason is the core's own (independent call of prepare_model on the same file).
  const PreparedModel direct = prepare_model({path}, {});
  REQUIRE_FALSE(direct.usable);
  CHECK(acc.load->summary.reason == direct.reason);
  REQUIRE(acc.load->display);
  CHECK(acc.load->display->indices.size() == 3 * direct.mesh.triangles.size());
  CHECK(acc.load->health.parts.size() == 1);
  CHECK(acc.load->health.parts[0].state == "refused");
  // The sheet is left out as flat (model.h: set_aside): listed and drawn from its triangles.
  REQUIRE(acc.load->health.left_out.size() == direct.left_out.size());
  CHECK(acc.load->health.set_aside_xyz.size() == 9 * direct.set_aside.triangles.size());
  CHECK(acc.load->health.set_aside_xyz.size() + 9 * direct.mesh.triangles.size() == 9 * sheet.triangles.size());
  CHECK(w.study() == nullptr);  // nothing to compute on
}

TEST_CASE("worker: validity features are painted from the analysis mesh", "[viewer]") {
  // Two overlapping boxes: the analysis mesh is their union (other triangles than the mesh
  // shown), and their flat faces across the flow are steeper than any Mach angle.
  const Mesh a = test::make_box({0, 0, 0}, {2, 1, 1});
  const Mesh b = test::make_box({1, 0.5, 0.5}, {3, 1.5, 1.5});
  const std::string pa = test::write_obj(a, "viewer_box_a.obj"), pb = test::write_obj(b, "viewer_box_b.obj");
  Worker w;
  LoadJob job;
  job.files = {pa, pb};
  w.load(job);
  WorkerOutput acc;
  REQUIRE(wait_for(w, [](const WorkerOutput& o) { return o.load.has_value(); }, acc));
  REQUIRE(acc.load->ok);
  REQUIRE(acc.load->summary.united);
  w.request_drag(1.5, 101);
  std::shared_ptr<const DragResult> d;
  const auto t0 = std::chrono::steady_clock::now();
  while (!d && std::chrono::steady_clock::now() - t0 < std::chrono::seconds(240)) {
    WorkerOutput o = w.take();
    if (o.drag) d = o.drag;
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  REQUIRE(d);
  REQUIRE(d->available);
  REQUIRE_FALSE(d->features.empty());
  REQUIRE(d->feature_xyz.size() % 9 == 0);
  REQUIRE_FALSE(d->feature_xyz.empty());
  // Each painted triangle is one of the faces across the flow (its corners share x: the box
  // faces are the only steep surface), and the painted area projected on the y-z plane equals
  // the features' frontal areas from the core (a wrong mesh would give other triangles).
  double painted = 0.0, frontal = 0.0;
  for (std::size_t i = 0; i < d->feature_xyz.size(); i += 9) {
    const float* t = &d->feature_xyz[i];
    CHECK(t[0] == t[3]);
    CHECK(t[0] == t[6]);
    painted += 0.5 * std::fabs(double(t[4] - t[1]) * (t[8] - t[2]) - double(t[7] - t[1]) * (t[5] - t[2]));
  }
  std::size_t tris = 0;
  for (const FeatureView& f : d->features) {
    frontal += f.frontal_area;
    tris += f.triangles;
  }
  CHECK(tris == d->feature_xyz.size() / 9);
  // Each feature's painted range follows the one before (hovering a row lights exactly its own).
  std::size_t next = 0;
  for (const FeatureView& f : d->features) {
    CHECK(f.first_painted == next);
    CHECK(f.painted == f.triangles);
    next += f.painted;
  }
  CHECK_THAT(painted, WithinRel(frontal, 1e-5));  // float corners against the core's doubles
}

TEST_CASE("drag JSON export carries the validity features and the resolution state", "[viewer]") {
  DragResult d;
  d.available = true;
  d.mach = 1.6;
  d.total_dq = 2.5;
  d.resolution_limited = true;
  d.growth_per_halving = 0.125;
  d.length_floor = 0.002;
  d.advice = "fair the fin leading edge";
  d.features.push_back({"fin.obj", 9.0, 9.5, 0.04, 0.375, 0.1, 12});
  d.features.push_back({"body.obj", 0.0, 0.2, 0.3, NAN, 0.0, 40});
  d.mach_values = {1.2, 1.6};
  d.mach_dq = {3.0, 2.5};
  d.mach_limited = {false, true};
  const nlohmann::json j = nlohmann::json::parse(drag_json(d, {"a.obj"}));
  CHECK(j["resolution_limited"] == true);
  CHECK(j["growth_per_halving_m2"] == 0.125);
  CHECK(j["length_floor_m"] == 0.002);
  REQUIRE(j["validity"]["features"].size() == 2);
  CHECK(j["validity"]["features"][0]["part"] == "fin.obj");
  CHECK(j["validity"]["features"][0]["x_to"] == 9.5);
  CHECK(j["validity"]["features"][0]["drag_share"] == 0.375);
  CHECK(j["validity"]["features"][1]["drag_share"].is_null());  // no D/q share: null, not NaN
  CHECK(j["validity"]["advice"] == d.advice);
  CHECK(j["against_mach"][1]["resolution_limited"] == true);
  CHECK(j["against_mach"][0]["resolution_limited"] == false);
}

// ---- Drag sensitivity on the model and the parts left out ----------------------------------

namespace {
// The fraction t of the way from kNeutral to `end` that colour c lies (least squares over RGB).
double fraction_towards(const float c[3], const float end[3]) {
  double num = 0.0, den = 0.0;
  for (int k = 0; k < 3; ++k) {
    num += double(c[k] - kNeutral[k]) * double(end[k] - kNeutral[k]);
    den += double(end[k] - kNeutral[k]) * double(end[k] - kNeutral[k]);
  }
  return num / den;
}
bool same_colour(const float a[3], const float b[3]) { return a[0] == b[0] && a[1] == b[1] && a[2] == b[2]; }
}  // namespace

TEST_CASE("sensitivity colours: symmetric about zero, neutral at zero, saturated beyond the clip", "[viewer]") {
  float c[3], d[3];
  diverging_colour(0.0, 2.0, c);
  CHECK(same_colour(c, kNeutral));
  // ±v lie the same fraction √(|v|/clip) of the way towards their own end (the map is
  // symmetric; app_state.h gives the ramp), positive towards "push in", negative "push out".
  for (double v : {0.05, 0.5, 1.3, 1.99}) {
    diverging_colour(v, 2.0, c);
    diverging_colour(-v, 2.0, d);
    CHECK_THAT(fraction_towards(c, kPushIn), WithinAbs(std::sqrt(v / 2.0), 1e-6));   // float colours
    CHECK_THAT(fraction_towards(d, kPushOut), WithinAbs(std::sqrt(v / 2.0), 1e-6));
    CHECK_THAT(fraction_towards(c, kPushIn), WithinAbs(fraction_towards(d, kPushOut), 1e-6));
  }
  // The two ends differ (a diverging map), and distance from neutral grows with |v|.
  CHECK_FALSE(same_colour(kPushIn, kPushOut));
  diverging_colour(0.4, 2.0, c);
  diverging_colour(0.8, 2.0, d);
  CHECK(fraction_towards(d, kPushIn) > fraction_towards(c, kPushIn));
  // Clipped: beyond ±clip the end colours; no clip or no value: neutral.
  diverging_colour(7.0, 2.0, c);
  CHECK(same_colour(c, kPushIn));
  diverging_colour(-7.0, 2.0, c);
  CHECK(same_colour(c, kPushOut));
  diverging_colour(1.0, 0.0, c);
  CHECK(same_colour(c, kNeutral));
  diverging_colour(std::nan(""), 2.0, c);
  CHECK(same_colour(c, kNeutral));
}

TEST_CASE("robust clip: nearest-rank quantile of |s|, outliers and non-finite values ignored", "[viewer]") {
  // |v| = 1 … 100, signs alternating: the 98th percentile by nearest rank (rank ⌈0.98·100⌉ =
  // 98; the nearest-rank definition, common practice) is 98.
  std::vector<double> v;
  for (int i = 1; i <= 100; ++i) v.push_back(i % 2 ? -double(i) : double(i));
  CHECK(robust_clip(v, 0.98) == 98.0);
  v[99] = 1e9;  // one extreme vertex does not move the scale
  v[98] = -1e9;
  CHECK(robust_clip(v, 0.98) == 98.0);
  v.push_back(std::nan(""));
  v.push_back(INFINITY);
  CHECK(robust_clip(v, 0.98) == 98.0);
  CHECK(robust_clip(v, 0.5) == 50.0);
  CHECK(robust_clip({}, 0.98) == 0.0);
  CHECK(robust_clip({-3.0}, 0.98) == 3.0);
}

TEST_CASE("paint_per_vertex: each corner takes its own vertex's position and value", "[viewer]") {
  Mesh m;
  m.positions = {{0, 0, 0}, {1, 0, 0}, {1, 1, 0}, {0, 1, 2}};
  m.triangles = {{0, 1, 2}, {0, 2, 3}};
  const std::vector<double> s = {-2.0, 0.0, 1.0, 4.0};
  const std::vector<float> p = paint_per_vertex(m, s, 2.0);
  REQUIRE(p.size() == 2 * 3 * 6);
  for (std::size_t t = 0; t < 2; ++t)
    for (int k = 0; k < 3; ++k) {
      const std::uint32_t i = m.triangles[t][k];
      const float* corner = &p[(3 * t + k) * 6];
      CHECK(corner[0] == float(m.positions[i].x));
      CHECK(corner[1] == float(m.positions[i].y));
      CHECK(corner[2] == float(m.positions[i].z));
      float c[3];
      diverging_colour(s[i], 2.0, c);
      CHECK(same_colour(corner + 3, c));
    }
  // Values numbered for another mesh (one more vertex) are never painted.
  CHECK(paint_per_vertex(m, {1.0, 2.0, 3.0, 4.0, 5.0}, 2.0).empty());
}

TEST_CASE("compute_sensitivity: painted on the engine's mesh with the core's values", "[viewer]") {
  // A pointed body of revolution, given to the study with an unused vertex first: the engine
  // renumbers its vertices (sensitivity.h), so the analysis mesh's numbering would be wrong.
  std::vector<double> x, r;
  for (int i = 0; i <= 24; ++i) {
    const double u = i / 24.0;
    x.push_back(10.0 * u);
    r.push_back(0.8 * std::pow(4.0 * u * (1.0 - u), 0.75));
  }
  Mesh body = test::make_body_of_revolution(x, r, 24);
  body.positions.insert(body.positions.begin(), Vec3{50.0, 50.0, 50.0});
  for (auto& t : body.triangles)
    for (auto& i : t) ++i;
  PreparedModel prepared;
  prepared.mesh = prepared.analysis = body;
  prepared.usable = true;
  const Study study(std::move(prepared), EndSetup{});
  const auto v = compute_sensitivity(study, 1.4);
  REQUIRE(v->ok);
  CHECK(v->problem.empty());
  const Mesh& mesh = study.engine().mesh();
  REQUIRE(v->paint.size() == mesh.triangles.size() * 18);
  // Independent: the core's result straight from the study, mapped corner by corner.
  const SurfaceSensitivity s = study.sensitivity(1.4);
  std::vector<double> used;
  for (std::size_t i = 0; i < s.per_volume.size(); ++i)
    if (s.vertex_area[i] > 0) used.push_back(s.per_volume[i]);
  CHECK(v->clip == robust_clip(used, kSensitivityClipQuantile));
  CHECK(v->clip > 0.0);
  std::size_t mismatched = 0;
  for (std::size_t t = 0; t < mesh.triangles.size(); ++t)
    for (int k = 0; k < 3; ++k) {
      const std::uint32_t i = mesh.triangles[t][k];
      const float* corner = &v->paint[(3 * t + k) * 6];
      float c[3];
      diverging_colour(s.per_volume[i], v->clip, c);
      if (corner[0] != float(mesh.positions[i].x) || corner[1] != float(mesh.positions[i].y) ||
          corner[2] != float(mesh.positions[i].z) || !same_colour(corner + 3, c))
        ++mismatched;
      // No painted corner is the unused vertex (it is not on the surface).
      CHECK(corner[0] < 40.0f);
    }
  CHECK(mismatched == 0);
}

TEST_CASE("compute_sensitivity: no finite drag gives the core's reason, not a map", "[viewer]") {
  // A box at M 1: its flat front face lies in a normal cut, so D/q has no finite value.
  PreparedModel prepared;
  prepared.mesh = prepared.analysis = test::make_box({0, 0, 0}, {4, 1, 1});
  prepared.usable = true;
  const Study study(std::move(prepared), EndSetup{});
  std::string core;
  try {
    (void)study.sensitivity(1.0);
  } catch (const std::exception& e) {
    core = e.what();
  }
  REQUIRE_FALSE(core.empty());
  const auto v = compute_sensitivity(study, 1.0);
  CHECK_FALSE(v->ok);
  CHECK(v->paint.empty());
  CHECK(v->problem == core);
}

TEST_CASE("health view: parts left out are listed with the core's reason and drawn from set_aside", "[viewer]") {
  Mesh quad;  // a flat part: two triangles in the plane z = 0.5, five distinct edges
  quad.positions = {{1, -2, 0.5}, {3, -2, 0.5}, {3, -1, 0.5}, {1, -1, 0.5}};
  quad.triangles = {{0, 1, 2}, {0, 2, 3}};
  quad.shell = {0, 0};
  quad.shell_names = {"plate"};
  const std::string pq = test::write_obj(quad, "viewer_flat_plate.obj");
  const std::string pa = test::write_obj(test::make_box({0, 0, 0}, {4, 1, 1}), "viewer_left_box.obj");
  const std::string pb = test::write_obj(test::make_box({0, 3, 0}, {2, 4, 1}), "viewer_skipped_box.obj");
  ModelSetup setup;
  setup.skip = {"viewer_skipped_box.obj"};
  const PreparedModel m = prepare_model({pa, pq, pb}, setup);
  REQUIRE(m.usable);
  REQUIRE(m.left_out.size() == 2);
  const HealthView h = health_view(m);
  REQUIRE(h.left_out.size() == 2);
  for (std::size_t i = 0; i < 2; ++i) {
    CHECK(h.left_out[i].name == m.left_out[i].name);
    CHECK(h.left_out[i].why == m.left_out[i].why);
    CHECK(h.left_out[i].triangles == m.left_out[i].triangles);
  }
  // The core's reasons name the flat part and the --skip (model.h: LeftOut::why).
  const bool flat = h.left_out[0].why.find("flat") != std::string::npos || h.left_out[1].why.find("flat") != std::string::npos;
  const bool skip = h.left_out[0].why.find("--skip") != std::string::npos || h.left_out[1].why.find("--skip") != std::string::npos;
  CHECK(flat);
  CHECK(skip);
  // Drawn: every set-aside triangle (2 of the plate + 12 of the box), and the wireframe's
  // distinct edges: 5 for the plate, 18 for a box of 12 triangles (12 box edges + 6 diagonals).
  CHECK(m.set_aside.triangles.size() == 14);
  CHECK(h.set_aside_xyz.size() == 14 * 9);
  CHECK(h.set_aside_edges.size() == (5 + 18) * 6);
  // The plate's corners are drawn where the file has them (z = 0.5, y in [−2, −1]).
  std::size_t at_plate = 0;
  for (std::size_t i = 0; i < h.set_aside_xyz.size(); i += 3)
    if (h.set_aside_xyz[i + 2] == 0.5f && h.set_aside_xyz[i + 1] <= -1.0f) ++at_plate;
  CHECK(at_plate == 6);
}
