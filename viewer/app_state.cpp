#include "app_state.h"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <set>

namespace machcut::view {

namespace {
constexpr float kDeg = std::numbers::pi_v<float> / 180.0f;

void normalize3(float v[3]) {
  const float n = std::sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
  if (n > 0) {
    v[0] /= n;
    v[1] /= n;
    v[2] /= n;
  }
}
void cross3(const float a[3], const float b[3], float out[3]) {
  out[0] = a[1] * b[2] - a[2] * b[1];
  out[1] = a[2] * b[0] - a[0] * b[2];
  out[2] = a[0] * b[1] - a[1] * b[0];
}
// Unit vector from the target towards the eye.
void view_dir(const Camera& cam, float d[3]) {
  const float yaw = cam.yaw_deg * kDeg, pitch = cam.pitch_deg * kDeg;
  d[0] = std::cos(pitch) * std::cos(yaw);
  d[1] = std::cos(pitch) * std::sin(yaw);
  d[2] = std::sin(pitch);
}
}  // namespace

bool set_mach(Controls& c, double mach) {
  if (!std::isfinite(mach)) return false;
  const double v = std::clamp(mach, kMinMach, kMaxMach);
  if (v == c.mach) return false;
  c.mach = v;
  return true;
}

bool set_roll(Controls& c, double roll_deg) {
  if (!std::isfinite(roll_deg)) return false;
  double v = std::fmod(roll_deg, 360.0);
  if (v < 0) v += 360.0;
  if (v >= 360.0) v = 0.0;  // fmod of −tiny + 360 can round to 360
  if (v == c.roll_deg) return false;
  c.roll_deg = v;
  return true;
}

bool set_stations(Controls& c, int n) {
  const int v = std::clamp(n, kMinStations, kMaxStations);
  if (v == c.stations) return false;
  c.stations = v;
  return true;
}

CurveKey curve_key(const Controls& c, bool model_united) {
  CurveKey k;
  k.mach_e4 = std::lround(c.mach * 1e4);
  k.roll_e3 = std::lround(c.roll_deg * 1e3) % 360000;
  k.stations = c.stations;
  k.united = model_united;
  return k;
}

MachPlanes planes_of(const CurveKey& k) {
  return MachPlanes{static_cast<double>(k.mach_e4) * 1e-4, static_cast<double>(k.roll_e3) * 1e-3};
}

// ---- Camera -------------------------------------------------------------------------------

void eye_position(const Camera& cam, float out[3]) {
  float d[3];
  view_dir(cam, d);
  for (int i = 0; i < 3; ++i) out[i] = cam.target[i] + cam.distance * d[i];
}

Mat4 view_matrix(const Camera& cam) {
  float f[3], eye[3];
  view_dir(cam, f);  // towards the eye: camera +z
  eye_position(cam, eye);
  const float up[3] = {0, 0, 1};
  float r[3], u[3];
  cross3(up, f, r);
  normalize3(r);
  cross3(f, r, u);
  Mat4 m;
  const float* rows[3] = {r, u, f};
  for (int i = 0; i < 3; ++i) {
    m.m[0 + i] = rows[i][0];
    m.m[4 + i] = rows[i][1];
    m.m[8 + i] = rows[i][2];
    m.m[12 + i] = -(rows[i][0] * eye[0] + rows[i][1] * eye[1] + rows[i][2] * eye[2]);
  }
  return m;
}

Mat4 projection_matrix(const Camera& cam, float aspect, float scene_radius) {
  // Near and far planes bracket the scene sphere around the target (depth precision).
  const float r = std::max(scene_radius, 1e-6f);
  const float n = std::max(cam.distance - 2.0f * r, cam.distance * 1e-3f);
  const float f = cam.distance + 2.0f * r;
  const float t = 1.0f / std::tan(0.5f * cam.fov_deg * kDeg);
  Mat4 m;
  m.m[0] = t / std::max(aspect, 1e-6f);
  m.m[5] = t;
  m.m[10] = -(f + n) / (f - n);
  m.m[11] = -1.0f;
  m.m[14] = -2.0f * f * n / (f - n);
  m.m[15] = 0.0f;
  return m;
}

Mat4 multiply(const Mat4& a, const Mat4& b) {
  Mat4 c;
  for (int col = 0; col < 4; ++col)
    for (int row = 0; row < 4; ++row) {
      float s = 0;
      for (int k = 0; k < 4; ++k) s += a.m[k * 4 + row] * b.m[col * 4 + k];
      c.m[col * 4 + row] = s;
    }
  return c;
}

void orbit(Camera& cam, float dx_px, float dy_px) {
  cam.yaw_deg = std::fmod(cam.yaw_deg - 0.4f * dx_px, 360.0f);
  cam.pitch_deg = std::clamp(cam.pitch_deg + 0.4f * dy_px, -89.0f, 89.0f);
}

void pan(Camera& cam, float dx_px, float dy_px, float viewport_h_px) {
  // One pixel moves the target by the size of a pixel at the target's depth.
  const float px = 2.0f * cam.distance * std::tan(0.5f * cam.fov_deg * kDeg) /
                   std::max(viewport_h_px, 1.0f);
  const Mat4 v = view_matrix(cam);
  const float r[3] = {v.m[0], v.m[4], v.m[8]};
  const float u[3] = {v.m[1], v.m[5], v.m[9]};
  for (int i = 0; i < 3; ++i) cam.target[i] += px * (-dx_px * r[i] + dy_px * u[i]);
}

void zoom(Camera& cam, float wheel_steps) {
  cam.distance = std::clamp(cam.distance * std::pow(0.87f, wheel_steps), 1e-4f, 1e7f);
}

void fit(Camera& cam, const Box3& box) {
  if (is_empty(box)) return;
  cam.target[0] = static_cast<float>(0.5 * (box.lo.x + box.hi.x));
  cam.target[1] = static_cast<float>(0.5 * (box.lo.y + box.hi.y));
  cam.target[2] = static_cast<float>(0.5 * (box.lo.z + box.hi.z));
  const double r = 0.5 * norm(box.hi - box.lo);
  const float half = 0.5f * cam.fov_deg * kDeg;
  // The bounding sphere is loose for long thin aircraft: frame down to 85 % of it, the more the
  // longer the box is against its second extent; a compact or flat-square model gets all of it.
  double e[3] = {box.hi.x - box.lo.x, box.hi.y - box.lo.y, box.hi.z - box.lo.z};
  std::sort(e, e + 3);
  const double slender = e[2] > 0.0 ? 1.0 - e[1] / e[2] : 0.0;  // 0 compact .. 1 a line
  const double frame = 1.0 - 0.15 * std::min(1.0, 2.0 * slender);
  cam.distance = static_cast<float>(std::max(r, 1e-6) / std::sin(half) * frame);
}

// ---- Plot mapping ---------------------------------------------------------------------------

float AxisMap::to_px(double d) const {
  const double span = d1 - d0;
  const double t = span != 0.0 ? (d - d0) / span : 0.0;
  return static_cast<float>(p0 + t * (p1 - p0));
}

double AxisMap::to_data(float p) const {
  const double span = static_cast<double>(p1) - p0;
  const double t = span != 0.0 ? (p - p0) / span : 0.0;
  return d0 + t * (d1 - d0);
}

namespace {
double nice_step(double span, int max_ticks) {
  const double raw = span / std::max(1, max_ticks - 1);
  const double mag = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * mag >= raw) return m * mag;
  return 10.0 * mag;
}
}  // namespace

std::vector<double> nice_ticks(double lo, double hi, int max_ticks) {
  std::vector<double> t;
  if (!(hi > lo) || !std::isfinite(lo) || !std::isfinite(hi) || max_ticks < 2) return t;
  const double step = nice_step(hi - lo, max_ticks);
  const double first = std::ceil(lo / step - 1e-9) * step;
  for (double v = first; v <= hi + 1e-9 * step && t.size() < 100; v += step)
    t.push_back(std::fabs(v) < 1e-12 * step ? 0.0 : v);
  return t;
}

void nice_range(double& lo, double& hi, int max_ticks) {
  if (!std::isfinite(lo) || !std::isfinite(hi)) {
    lo = 0;
    hi = 1;
    return;
  }
  if (hi <= lo) {
    const double c = lo;
    lo = c - 0.5 * std::max(1.0, std::fabs(c));
    hi = c + 0.5 * std::max(1.0, std::fabs(c));
  }
  const double step = nice_step(hi - lo, max_ticks);
  lo = std::floor(lo / step + 1e-9) * step;
  hi = std::ceil(hi / step - 1e-9) * step;
}

// ---- Station, cache ---------------------------------------------------------------------------

StationRange station_range(const AppState& s) {
  if (s.curve && !s.curve->curve.x.empty()) return s.curve->range;
  if (s.model_loaded && !is_empty(s.model.box)) return {s.model.box.lo.x, s.model.box.hi.x};
  return {0.0, 0.0};
}

bool set_station(AppState& s, double x) {
  if (!std::isfinite(x)) return false;
  const StationRange r = station_range(s);
  const double v = std::clamp(x, r.lo, std::max(r.lo, r.hi));
  if (v == s.station) return false;
  s.station = v;
  return true;
}

bool step_station(AppState& s, int steps) {
  if (!s.curve || s.curve->curve.x.size() < 2 || steps == 0) return false;
  const std::vector<double>& x = s.curve->curve.x;
  const double eps = 1e-9 * std::max(1.0, x.back() - x.front());
  // The first step lands on the next grid station in the step's direction, the rest count
  // whole stations.
  long i = 0;
  if (steps > 0) {
    i = static_cast<long>(std::upper_bound(x.begin(), x.end(), s.station + eps) - x.begin());
    i += steps - 1;
  } else {
    i = static_cast<long>(std::lower_bound(x.begin(), x.end(), s.station - eps) - x.begin()) - 1;
    i += steps + 1;
  }
  i = std::clamp(i, 0L, static_cast<long>(x.size()) - 1);
  return set_station(s, x[static_cast<std::size_t>(i)]);
}

bool curve_stale(const AppState& s) {
  return !s.curve || s.curve->key != curve_key(s.controls, s.model.united);
}

bool use_cached_curve(AppState& s) {
  const auto it = s.curves.find(curve_key(s.controls, s.model.united));
  if (it == s.curves.end()) return false;
  s.curve = it->second;
  return true;
}

void accept_curve(AppState& s, std::shared_ptr<const CurveResult> r) {
  if (!r) return;
  s.curves[r->key] = r;
  if (r->key == curve_key(s.controls, s.model.united)) {
    const bool first = !s.curve;
    s.curve = std::move(r);
    // Keep the cursor inside the new range (the range depends on Mach and roll).
    if (first) s.station = 0.5 * (s.curve->range.lo + s.curve->range.hi);
    set_station(s, s.station);
  }
}

bool section_stale(const AppState& s) {
  if (!s.model_loaded) return false;
  if (!s.section) return true;
  const MachPlanes p = planes_of(curve_key(s.controls, s.model.united));
  return s.section->station != s.station || s.section->planes.mach != p.mach ||
         s.section->planes.roll_deg != p.roll_deg;
}

double curve_area_at(const CurveResult& c, double x) {
  const std::vector<double>& xs = c.curve.x;
  const std::vector<double>& a = c.curve.area;
  if (xs.size() < 2 || x < xs.front() || x > xs.back()) return 0.0;
  const auto it = std::upper_bound(xs.begin(), xs.end(), x);
  const std::size_t i = std::min<std::size_t>(static_cast<std::size_t>(it - xs.begin()), xs.size() - 1);
  const std::size_t j = i - 1;
  const double t = (x - xs[j]) / (xs[i] - xs[j]);
  return a[j] + t * (a[i] - a[j]);
}

void shell_colour(std::size_t i, float out[3]) {
  // Hand-picked muted palette, cycled with a small lightness shift per round.
  static const float kPalette[][3] = {
      {0.78f, 0.80f, 0.84f}, {0.55f, 0.74f, 0.90f}, {0.93f, 0.73f, 0.45f},
      {0.62f, 0.85f, 0.62f}, {0.88f, 0.58f, 0.62f}, {0.74f, 0.66f, 0.90f},
      {0.52f, 0.84f, 0.82f}, {0.90f, 0.86f, 0.52f},
  };
  constexpr std::size_t n = sizeof(kPalette) / sizeof(kPalette[0]);
  const float shade = 1.0f - 0.12f * static_cast<float>((i / n) % 3);
  for (int k = 0; k < 3; ++k) out[k] = kPalette[i % n][k] * shade;
}

}  // namespace machcut::view

namespace machcut::view {

void wrapped_colour(float out[3]) {
  // Clay brown: outside the shell palette above, so a wrapped part reads as "changed".
  out[0] = 0.66f;
  out[1] = 0.50f;
  out[2] = 0.36f;
}

std::vector<float> triangle_soup(const Mesh& mesh, const std::vector<std::uint32_t>& tris) {
  std::vector<float> v;
  v.reserve(tris.size() * 9);
  for (std::uint32_t t : tris) {
    if (t >= mesh.triangles.size()) continue;
    for (std::uint32_t i : mesh.triangles[t]) {
      if (i >= mesh.positions.size()) break;
      const Vec3& p = mesh.positions[i];
      v.insert(v.end(), {static_cast<float>(p.x), static_cast<float>(p.y), static_cast<float>(p.z)});
    }
    v.resize(v.size() - v.size() % 9);  // a triangle with a bad vertex index is dropped whole
  }
  return v;
}

std::vector<float> edge_segments(const Mesh& mesh, const std::vector<std::array<std::uint32_t, 2>>& edges) {
  std::vector<float> v;
  v.reserve(edges.size() * 6);
  for (const auto& e : edges) {
    if (e[0] >= mesh.positions.size() || e[1] >= mesh.positions.size()) continue;
    for (std::uint32_t i : e) {
      const Vec3& p = mesh.positions[i];
      v.insert(v.end(), {static_cast<float>(p.x), static_cast<float>(p.y), static_cast<float>(p.z)});
    }
  }
  return v;
}

std::vector<float> wireframe_segments(const Mesh& mesh) {
  std::set<std::array<std::uint32_t, 2>> edges;
  for (const auto& t : mesh.triangles)
    for (int k = 0; k < 3; ++k) {
      const std::uint32_t a = t[k], b = t[(k + 1) % 3];
      if (a != b) edges.insert({std::min(a, b), std::max(a, b)});
    }
  return edge_segments(mesh, std::vector<std::array<std::uint32_t, 2>>(edges.begin(), edges.end()));
}

double robust_clip(const std::vector<double>& values, double quantile) {
  std::vector<double> a;
  a.reserve(values.size());
  for (double v : values)
    if (std::isfinite(v)) a.push_back(std::fabs(v));
  if (a.empty()) return 0.0;
  const double q = std::clamp(quantile, 0.0, 1.0);
  // Nearest rank: the smallest value with at least q of the values at or below it.
  const std::size_t rank = std::max<std::size_t>(1, static_cast<std::size_t>(std::ceil(q * double(a.size()) - 1e-9)));
  const auto nth = a.begin() + static_cast<std::ptrdiff_t>(std::min(rank, a.size()) - 1);
  std::nth_element(a.begin(), nth, a.end());
  return *nth;
}

void diverging_colour(double v, double clip, float out[3]) {
  const bool neutral = !(clip > 0.0) || !std::isfinite(v) || v == 0.0;
  const double t = neutral ? 0.0 : std::sqrt(std::min(1.0, std::fabs(v) / clip));
  const float* end = v > 0.0 ? kPushIn : kPushOut;
  for (int k = 0; k < 3; ++k)
    out[k] = t >= 1.0 ? end[k] : static_cast<float>(double(kNeutral[k]) + t * (double(end[k]) - double(kNeutral[k])));
}

std::vector<float> paint_per_vertex(const Mesh& mesh, const std::vector<double>& per_vertex, double clip) {
  std::vector<float> v;
  if (per_vertex.size() != mesh.positions.size()) return v;
  v.reserve(mesh.triangles.size() * 18);
  for (const auto& t : mesh.triangles) {
    if (t[0] >= mesh.positions.size() || t[1] >= mesh.positions.size() || t[2] >= mesh.positions.size()) continue;
    for (std::uint32_t i : t) {
      const Vec3& p = mesh.positions[i];
      float c[3];
      diverging_colour(per_vertex[i], clip, c);
      v.insert(v.end(), {static_cast<float>(p.x), static_cast<float>(p.y), static_cast<float>(p.z), c[0], c[1], c[2]});
    }
  }
  return v;
}

}  // namespace machcut::view
