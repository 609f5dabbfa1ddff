// make_demo_aircraft — writes the bundled machcut demo model: an invented slender supersonic
// cruise concept (no real aircraft, company or person), as separate, overlapping, closed
// triangle shells in Wavefront OBJ files, in two variants:
//
//   OUTDIR/baseline/{fuselage,wing,htail,vtail,nacelles}.obj
//   OUTDIR/revised/ {same names}     — fuselage waisted along the wing and nacelles
//                                      ("area-ruled"), volume moved fore and aft.
//
// Usage:  machcut_make_demo OUTDIR        generate, then check what was written
//         machcut_make_demo --check DIR   only check DIR/baseline and DIR/revised
// The committed files in models/demo were made by `machcut_make_demo models/demo`.
//
// Units metres; x from nose to tail, y to starboard, z up. Every shell is closed (each edge
// used exactly twice, in opposite directions), oriented outward (positive signed volume),
// free of degenerate triangles and exactly symmetric under y -> -y. The checks at the end
// re-read each written file and verify those properties. Plain C++20, standard library only.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

namespace {

constexpr double kPi = 3.14159265358979323846;

struct V3 {
  double x, y, z;
};
using Tri = std::array<int, 3>;

// A triangle mesh of one or more closed shells; `shell_start` holds the first triangle of
// each shell (named in `shell_names`).
struct Mesh {
  std::vector<V3> v;
  std::vector<Tri> f;
  std::vector<size_t> shell_start;
  std::vector<std::string> shell_names;
};

int add_vertex(Mesh& m, V3 p) {
  m.v.push_back(p);
  return static_cast<int>(m.v.size()) - 1;
}

// ---------------------------------------------------------------- mesh building blocks

// Quads between two rows of vertex indices of equal length; `closed` wraps the last to the
// first. Edges along row b run b[j] -> b[j+1], along row a a[j+1] -> a[j].
void connect_rows(Mesh& m, const std::vector<int>& a, const std::vector<int>& b, bool closed) {
  const size_t n = a.size();
  const size_t quads = closed ? n : n - 1;
  for (size_t j = 0; j < quads; ++j) {
    const size_t k = (j + 1) % n;
    m.f.push_back({a[j], b[j], b[k]});
    m.f.push_back({a[j], b[k], a[k]});
  }
}

// Fan from a centre vertex to a closed ring; `forward` gives ring edges r[j] -> r[j+1].
void fan(Mesh& m, int centre, const std::vector<int>& r, bool forward) {
  const size_t n = r.size();
  for (size_t j = 0; j < n; ++j) {
    const size_t k = (j + 1) % n;
    if (forward)
      m.f.push_back({centre, r[j], r[k]});
    else
      m.f.push_back({centre, r[k], r[j]});
  }
}

// Flat cap of a lens-shaped ring r = [LE, upper 1..n-1, TE, lower n-1..1] (size 2n) with
// ring edges r[j+1] -> r[j] (matching the last row of connect_rows).
void lens_cap(Mesh& m, const std::vector<int>& r) {
  const size_t n = r.size() / 2;
  auto R = [&](size_t i) { return r[i % r.size()]; };
  m.f.push_back({R(0), R(2 * n - 1), R(1)});
  for (size_t i = 1; i + 1 < n; ++i) {
    m.f.push_back({R(i), R(2 * n - i), R(i + 1)});
    m.f.push_back({R(i + 1), R(2 * n - i), R(2 * n - i - 1)});
  }
  m.f.push_back({R(n - 1), R(n + 1), R(n)});
}

// Flat half-lens cap between row p (p[0], p.back() on y = 0) and new vertices on the centre
// line y = 0 below it; row edges p[j] -> p[j+1]. `centre` gives the centre-line point for
// row index i.
template <class F>
void half_lens_cap(Mesh& m, const std::vector<int>& p, F centre, bool flip) {
  const size_t n = p.size() - 1;
  std::vector<int> c(n + 1);
  c[0] = p[0];
  c[n] = p[n];
  for (size_t i = 1; i < n; ++i) c[i] = add_vertex(m, centre(i));
  const size_t first = m.f.size();
  m.f.push_back({p[0], p[1], c[1]});
  for (size_t i = 1; i + 1 < n; ++i) {
    m.f.push_back({c[i], p[i], p[i + 1]});
    m.f.push_back({c[i], p[i + 1], c[i + 1]});
  }
  m.f.push_back({c[n - 1], p[n - 1], p[n]});
  if (flip)
    for (size_t t = first; t < m.f.size(); ++t) std::swap(m.f[t][1], m.f[t][2]);
}

// Completes a half shell built on y >= 0: vertices with y == 0 exactly are shared, the
// others are reflected, and the reflected triangles get reversed winding.
Mesh mirror_weld(const Mesh& half) {
  Mesh out = half;
  std::vector<int> image(half.v.size());
  for (size_t i = 0; i < half.v.size(); ++i) {
    const V3 p = half.v[i];
    image[i] = p.y == 0.0 ? static_cast<int>(i) : add_vertex(out, {p.x, -p.y, p.z});
  }
  for (const Tri& t : half.f) out.f.push_back({image[t[0]], image[t[2]], image[t[1]]});
  return out;
}

// The reflection y -> -y of a whole mesh, winding reversed so normals stay outward.
Mesh mirror_copy(const Mesh& m) {
  Mesh out = m;
  for (V3& p : out.v) p.y = -p.y;
  for (Tri& t : out.f) std::swap(t[1], t[2]);
  return out;
}

double signed_volume(const std::vector<V3>& v, const std::vector<Tri>& f, size_t b, size_t e) {
  double vol = 0.0;
  for (size_t t = b; t < e; ++t) {
    const V3 a = v[f[t][0]], p = v[f[t][1]], q = v[f[t][2]];
    vol += a.x * (p.y * q.z - p.z * q.y) - a.y * (p.x * q.z - p.z * q.x) + a.z * (p.x * q.y - p.y * q.x);
  }
  return vol / 6.0;
}

// Flips every triangle if the (single-shell) mesh encloses negative volume.
void orient_outward(Mesh& m) {
  if (signed_volume(m.v, m.f, 0, m.f.size()) < 0.0)
    for (Tri& t : m.f) std::swap(t[1], t[2]);
}

// Appends `part` to `m` as a new named shell.
void append_shell(Mesh& m, const Mesh& part, const std::string& name) {
  const int base = static_cast<int>(m.v.size());
  m.shell_start.push_back(m.f.size());
  m.shell_names.push_back(name);
  m.v.insert(m.v.end(), part.v.begin(), part.v.end());
  for (const Tri& t : part.f) m.f.push_back({t[0] + base, t[1] + base, t[2] + base});
}

// ---------------------------------------------------------------- the invented aircraft

// Smooth step 0 -> 1 on t in [0, 1] with zero slope at both ends.
double smoothstep(double t) {
  t = std::clamp(t, 0.0, 1.0);
  return t * t * (3.0 - 2.0 * t);
}

// sin^2 bump on [a, b], peak 1 at the middle, zero value and slope at the ends.
double bump(double x, double a, double b) {
  if (x <= a || x >= b) return 0.0;
  const double s = std::sin(kPi * (x - a) / (b - a));
  return s * s;
}

// Fuselage of revolution: tangent-ogive nose, cylinder, smooth boat-tail to a flat base.
namespace fus {
constexpr double kLength = 36.0;   // nose at x = 0, flat base at x = kLength
constexpr double kRadius = 1.30;   // cylinder radius
constexpr double kNoseEnd = 11.0;  // end of the ogive
constexpr double kTailStart = 24.0;
constexpr double kBaseRadius = 0.45;

double radius(double x) {
  if (x <= kNoseEnd) {  // tangent ogive, pointed at x = 0
    const double rho = (kRadius * kRadius + kNoseEnd * kNoseEnd) / (2.0 * kRadius);
    const double d = kNoseEnd - x;
    return std::sqrt(rho * rho - d * d) + kRadius - rho;
  }
  if (x <= kTailStart) return kRadius;
  const double t = (x - kTailStart) / (kLength - kTailStart);
  return kRadius - (kRadius - kBaseRadius) * smoothstep(t);
}

// Canopy merged into the surface: a radial bulge on the upper side, phi from the top.
double canopy(double x, double phi) {
  const double c = std::cos(phi);
  if (c <= 0.0) return 0.0;
  return 0.36 * bump(x, 3.6, 11.0) * c * c * c * c;
}
}  // namespace fus

// Station positions along the fuselage, clustered towards the pointed nose.
std::vector<double> fuselage_stations(int count) {
  std::vector<double> x(count);
  for (int i = 0; i < count; ++i) {
    const double u = (i + 1.0) / count;
    x[i] = fus::kLength * (0.45 * u * u + 0.55 * u);
  }
  x.back() = fus::kLength;
  return x;
}

// `scale(x)` multiplies the radius at station x (1 for the baseline, the waist for the revision).
template <class Scale>
Mesh make_fuselage(Scale scale) {
  const int half_ring = 96, stations = 150;
  Mesh m;
  const int apex = add_vertex(m, {0.0, 0.0, 0.0});
  std::vector<int> prev;
  for (double x : fuselage_stations(stations)) {
    std::vector<int> ring;
    for (int j = 0; j <= half_ring; ++j) {
      const double phi = kPi * j / half_ring;  // 0 at the top, pi at the bottom
      const double r = scale(x) * (fus::radius(x) + fus::canopy(x, phi));
      const double y = (j == 0 || j == half_ring) ? 0.0 : r * std::sin(phi);
      ring.push_back(add_vertex(m, {x, y, r * std::cos(phi)}));
    }
    if (prev.empty())
      for (int j = 0; j < half_ring; ++j) m.f.push_back({apex, ring[j], ring[j + 1]});
    else
      connect_rows(m, prev, ring, false);
    prev = ring;
  }
  const int base = add_vertex(m, {fus::kLength, 0.0, 0.0});
  for (int j = 0; j < half_ring; ++j) m.f.push_back({base, prev[j + 1], prev[j]});
  Mesh full = mirror_weld(m);
  orient_outward(full);
  return full;
}

// A thin lifting surface: straight-line leading and trailing edges between span breaks,
// parabolic-arc (biconvex) sections with sharp edges, thickness ratio varying linearly.
struct Planform {
  std::vector<double> span;     // span breaks, first 0 (the plane of symmetry / root)
  std::vector<double> x_le;     // leading edge x at each break
  std::vector<double> x_te;     // trailing edge x at each break
  std::vector<int> intervals;   // span intervals between consecutive breaks
  double tau_root, tau_tip;     // thickness / chord at root and tip
  int chord_intervals;
};

struct Section {
  double eta, x_le, chord, tau;
};

std::vector<Section> sections(const Planform& p) {
  std::vector<Section> s;
  const double tip = p.span.back();
  for (size_t k = 0; k + 1 < p.span.size(); ++k)
    for (int i = 0; i < p.intervals[k] + (k + 2 == p.span.size() ? 1 : 0); ++i) {
      const double t = double(i) / p.intervals[k];
      const double eta = p.span[k] + t * (p.span[k + 1] - p.span[k]);
      const double le = p.x_le[k] + t * (p.x_le[k + 1] - p.x_le[k]);
      const double te = p.x_te[k] + t * (p.x_te[k + 1] - p.x_te[k]);
      s.push_back({eta, le, te - le, p.tau_root + (p.tau_tip - p.tau_root) * eta / tip});
    }
  return s;
}

// Chordwise fractions 0..1, cosine-clustered at both sharp edges.
double xi(int i, int n) { return 0.5 * (1.0 - std::cos(kPi * i / n)); }
// Parabolic-arc half-thickness at chord fraction u.
double half_thickness(const Section& s, double u) { return 2.0 * s.tau * s.chord * u * (1.0 - u); }

// Horizontal surface through the plane of symmetry at height z0 (wing, horizontal tail).
Mesh make_horizontal_surface(const Planform& p, double z0) {
  const int n = p.chord_intervals;
  Mesh m;
  std::vector<int> prev;
  const std::vector<Section> secs = sections(p);
  for (const Section& s : secs) {
    std::vector<int> ring(2 * n);
    const double y = s.eta;
    ring[0] = add_vertex(m, {s.x_le, y, z0});
    ring[n] = add_vertex(m, {s.x_le + s.chord, y, z0});
    for (int i = 1; i < n; ++i) {
      const double u = xi(i, n), x = s.x_le + u * s.chord, h = half_thickness(s, u);
      ring[i] = add_vertex(m, {x, y, z0 + h});
      ring[2 * n - i] = add_vertex(m, {x, y, z0 - h});
    }
    if (!prev.empty()) connect_rows(m, prev, ring, true);
    prev = ring;
  }
  lens_cap(m, prev);
  Mesh full = mirror_weld(m);
  orient_outward(full);
  return full;
}

// Vertical surface on the plane of symmetry from height z0 upward (fin), closed by flat
// caps at root and tip; built on y >= 0 and mirrored.
Mesh make_vertical_surface(const Planform& p, double z0) {
  const int n = p.chord_intervals;
  Mesh m;
  std::vector<int> prev;
  const std::vector<Section> secs = sections(p);
  for (size_t k = 0; k < secs.size(); ++k) {
    const Section& s = secs[k];
    const double z = z0 + s.eta;
    std::vector<int> row(n + 1);
    for (int i = 0; i <= n; ++i) {
      const double u = xi(i, n);
      const double y = (i == 0 || i == n) ? 0.0 : half_thickness(s, u);
      row[i] = add_vertex(m, {s.x_le + u * s.chord, y, z});
    }
    auto centre = [&](size_t i) { return V3{s.x_le + xi(int(i), n) * s.chord, 0.0, z}; };
    if (k == 0) half_lens_cap(m, row, centre, false);
    if (!prev.empty()) connect_rows(m, prev, row, false);
    if (k + 1 == secs.size()) half_lens_cap(m, row, centre, true);
    prev = row;
  }
  Mesh full = mirror_weld(m);
  orient_outward(full);
  return full;
}

// Engine pod of revolution about (y_c, z_c) with flat inlet and nozzle faces.
namespace nac {
constexpr double kFront = 22.3, kBack = 31.3, kY = 3.4, kZ = -1.02;
constexpr double kLip = 0.46, kMax = 0.60, kNozzle = 0.50;

double radius(double x) {
  const double up = smoothstep((x - kFront) / 2.6);
  const double down = smoothstep((x - (kBack - 3.2)) / 3.2);
  return kLip + (kMax - kLip) * up - (kMax - kNozzle) * down;
}
}  // namespace nac

Mesh make_nacelle() {
  const int ring_n = 128, stations = 60;
  Mesh m;
  std::vector<int> first, prev;
  for (int i = 0; i <= stations; ++i) {
    const double x = nac::kFront + (nac::kBack - nac::kFront) * i / stations;
    std::vector<int> ring;
    for (int j = 0; j < ring_n; ++j) {
      const double phi = 2.0 * kPi * j / ring_n, r = nac::radius(x);
      ring.push_back(add_vertex(m, {x, nac::kY + r * std::sin(phi), nac::kZ + r * std::cos(phi)}));
    }
    if (prev.empty()) first = ring;
    else connect_rows(m, prev, ring, true);
    prev = ring;
  }
  fan(m, add_vertex(m, {nac::kFront, nac::kY, nac::kZ}), first, true);
  fan(m, add_vertex(m, {nac::kBack, nac::kY, nac::kZ}), prev, false);
  orient_outward(m);
  return m;
}

constexpr double kWingZ = -0.40, kTailZ = -0.05, kFinZ = 0.25;

// Cranked arrow wing: inboard leading edge swept 68 deg to the crank at 3 m, outboard 54 deg.
Planform wing_planform() {
  return {{0.0, 3.0, 8.5}, {14.0, 21.4251, 28.9931}, {30.0, 30.4216, 31.1945},
          {24, 60}, 0.032, 0.028, 80};
}
Planform htail_planform() {  // all-moving tail, 50 deg leading-edge sweep
  return {{0.0, 4.0}, {31.0, 35.7670}, {35.5, 36.9559}, {72}, 0.035, 0.035, 64};
}
Planform fin_planform() {    // fin from inside the fuselage at z = kFinZ up 4.6 m
  return {{0.0, 4.6}, {27.0, 33.5695}, {34.0, 35.6743}, {80}, 0.035, 0.035, 64};
}

// ------------------------------------------- area-rule revision (fuselage waist)
//
// Whitcomb's transonic area rule (NACA Report 1273, 1956) asks for a smooth total
// normal-cut area curve, close to the least-drag Sears–Haack body (Haack 1941; Sears 1947)
// of the same length and volume. The revision reshapes only the fuselage: it moves a
// fraction of the difference between that target and the estimated baseline total into the
// fuselage, which waists it along the nacelles and wing root and fills it ahead of them;
// the change is then corrected to zero net volume.

// Thickness of a horizontal surface at (x, spanwise eta), 0 outside it.
double surface_thickness(const Planform& p, double x, double eta) {
  if (eta < 0.0 || eta > p.span.back()) return 0.0;
  size_t k = 0;
  while (k + 2 < p.span.size() && eta > p.span[k + 1]) ++k;
  const double t = (eta - p.span[k]) / (p.span[k + 1] - p.span[k]);
  const double le = p.x_le[k] + t * (p.x_le[k + 1] - p.x_le[k]);
  const double te = p.x_te[k] + t * (p.x_te[k + 1] - p.x_te[k]);
  const double u = (x - le) / (te - le);
  if (u <= 0.0 || u >= 1.0) return 0.0;
  const double tau = p.tau_root + (p.tau_tip - p.tau_root) * eta / p.span.back();
  return 4.0 * tau * (te - le) * u * (1.0 - u);
}

// Area (m^2) at station x of a surface's section strip from eta0 to its tip (midpoint rule).
double surface_area_from(const Planform& p, double x, double eta0) {
  const int n = 1000;
  const double d = (p.span.back() - eta0) / n;
  double a = 0.0;
  for (int i = 0; i < n && d > 0.0; ++i) a += surface_thickness(p, x, eta0 + (i + 0.5) * d) * d;
  return a;
}

// Normal-cut fuselage area with the canopy (integral of r^2/2 over the full turn).
double fuselage_area(double x) {
  const int n = 720;
  double a = 0.0;
  for (int j = 0; j < n; ++j) {
    const double phi = 2.0 * kPi * (j + 0.5) / n;
    const double r = fus::radius(x) + fus::canopy(x, std::min(phi, 2.0 * kPi - phi));
    a += 0.5 * r * r * 2.0 * kPi / n;
  }
  return a;
}

// Estimated normal-cut area (x = const) of the baseline union: fuselage, plus the parts of
// wing, tails and nacelles outside it (the small wing–nacelle overlap is counted twice).
double baseline_total_area(double x) {
  const double r = fus::radius(x);
  auto half_chord = [&](double z) { return r > std::fabs(z) ? std::sqrt(r * r - z * z) : 0.0; };
  double a = x > 0.0 && x < fus::kLength ? fuselage_area(x) : 0.0;
  const double rin = x < fus::kLength ? 1.0 : 0.0;  // behind the base nothing hides the roots
  a += 2.0 * surface_area_from(wing_planform(), x, rin * half_chord(kWingZ));
  a += 2.0 * surface_area_from(htail_planform(), x, rin * half_chord(kTailZ));
  a += surface_area_from(fin_planform(), x, std::max(0.0, rin * r - kFinZ));
  if (x > nac::kFront && x < nac::kBack) a += 2.0 * kPi * std::pow(nac::radius(x), 2);
  return a;
}

// Change of the fuselage area (m^2) along x, tabulated on a uniform grid.
struct Waist {
  std::vector<double> x, delta;
  double at(double q) const {
    const double h = x[1] - x[0];
    const double t = std::clamp((q - x[0]) / h, 0.0, double(x.size() - 1));
    const size_t i = std::min(size_t(t), x.size() - 2);
    return delta[i] + (t - i) * (delta[i + 1] - delta[i]);
  }
};

// Window where the fuselage may change: 0 before x = 5 m and behind x = 34 m.
double waist_window(double x) { return smoothstep((x - 5.0) / 3.0) * (1.0 - smoothstep((x - 31.0) / 3.0)); }

// Gaussian smoothing (sigma in m) of values on the uniform grid xs.
std::vector<double> smooth(const std::vector<double>& xs, const std::vector<double>& v, double sigma) {
  std::vector<double> out(v.size());
  for (size_t i = 0; i < v.size(); ++i) {
    double s = 0.0, ws = 0.0;
    for (size_t j = 0; j < v.size(); ++j) {
      const double g = std::exp(-0.5 * std::pow((xs[i] - xs[j]) / sigma, 2));
      s += g * v[j];
      ws += g;
    }
    out[i] = s / ws;
  }
  return out;
}

// `fraction` of the way from the baseline total area to the Sears–Haack target
// S = S_max [4 u (1 - u)]^(3/2), u = x / l, S_max = 16 V / (3 pi l), same length and volume.
Waist make_waist(double fraction) {
  const double h = 0.05, length = 37.0;  // the union ends at the horizontal-tail tips
  Waist w;
  std::vector<double> total, afus;
  double volume = 0.0;
  for (double x = 0.0; x <= length + 1e-9; x += h) {
    w.x.push_back(x);
    total.push_back(baseline_total_area(x));
    afus.push_back(x < fus::kLength ? fuselage_area(x) : 0.0);
    volume += total.back() * h;
  }
  const double smax = 16.0 * volume / (3.0 * kPi * length);
  std::vector<double> raw(w.x.size());
  for (size_t i = 0; i < w.x.size(); ++i) {
    const double u = w.x[i] / length;
    const double sears_haack = smax * std::pow(std::max(0.0, 4.0 * u * (1.0 - u)), 1.5);
    raw[i] = fraction * waist_window(w.x[i]) * (sears_haack - total[i]);
  }
  w.delta = smooth(w.x, raw, 1.0);
  double net = 0.0, weight = 0.0;  // zero net volume, correction proportional to the area
  for (size_t i = 0; i < w.x.size(); ++i) {
    net += w.delta[i] * h;
    weight += waist_window(w.x[i]) * afus[i] * h;
  }
  for (size_t i = 0; i < w.x.size(); ++i) w.delta[i] -= net / weight * waist_window(w.x[i]) * afus[i];
  return w;
}

// Radius scale at x so that the fuselage area changes by waist.at(x).
double waist_scale(const Waist& w, double x) {
  const double s = std::sqrt(std::max(0.2, 1.0 + w.at(x) / fuselage_area(x)));
  if (!std::isfinite(s)) throw std::runtime_error("waist scale is not finite");
  return s;
}

// ---------------------------------------------------------------- output

// Rounds to the 8 significant digits written, so the file and the checks see one mesh.
double round8(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.8g", v);
  const double r = std::strtod(buf, nullptr);
  return r == 0.0 ? 0.0 : r;  // no "-0"
}

void write_obj(const std::filesystem::path& path, const Mesh& m, const std::string& title) {
  const std::filesystem::path tmp = path.string() + ".tmp";
  {
    std::ofstream out(tmp);
    if (!out) throw std::runtime_error(tmp.string() + ": cannot write");
    out << "# machcut demo aircraft (an invented concept): " << title << "\n"
        << "# units m; x nose->tail, y starboard, z up; made by models/generator/"
           "make_demo_aircraft.cpp\n";
    char buf[128];
    for (const V3& p : m.v) {
      std::snprintf(buf, sizeof buf, "v %.8g %.8g %.8g\n", round8(p.x), round8(p.y), round8(p.z));
      out << buf;
    }
    for (size_t s = 0; s < m.shell_start.size(); ++s) {
      out << "o " << m.shell_names[s] << "\n";
      const size_t e = s + 1 < m.shell_start.size() ? m.shell_start[s + 1] : m.f.size();
      for (size_t t = m.shell_start[s]; t < e; ++t)
        out << "f " << m.f[t][0] + 1 << ' ' << m.f[t][1] + 1 << ' ' << m.f[t][2] + 1 << '\n';
    }
    if (!out) throw std::runtime_error(tmp.string() + ": write failed");
  }
  std::filesystem::rename(tmp, path);
}

// ---------------------------------------------------------------- checks on the written file

Mesh read_obj(const std::filesystem::path& path) {
  std::ifstream in(path);
  if (!in) throw std::runtime_error("cannot read the file");
  Mesh m;
  std::string line;
  while (std::getline(in, line)) {
    std::istringstream ls(line);
    std::string tag;
    ls >> tag;
    if (tag == "v") {
      V3 p{};
      ls >> p.x >> p.y >> p.z;
      m.v.push_back(p);
    } else if (tag == "o") {
      std::string name;
      ls >> name;
      m.shell_names.push_back(name);
      m.shell_start.push_back(m.f.size());
    } else if (tag == "f") {
      Tri t{};
      ls >> t[0] >> t[1] >> t[2];
      for (int& i : t) --i;
      m.f.push_back(t);
    }
  }
  if (m.shell_start.empty()) {  // no "o" lines: one unnamed shell
    m.shell_start.push_back(0);
    m.shell_names.push_back("(unnamed)");
  }
  return m;
}

using Key = std::array<double, 3>;
Key key(V3 p) { return {p.x, p.y, p.z}; }

// Returns a list of problems (empty = all checks pass) and prints a one-line summary.
std::vector<std::string> check_mesh(const std::string& name, const Mesh& m) {
  std::vector<std::string> bad;
  const int nv = static_cast<int>(m.v.size());
  std::map<Key, int> where;
  for (int i = 0; i < nv; ++i)
    if (!where.emplace(key(m.v[i]), i).second) bad.push_back("duplicate vertex position");
  std::map<std::pair<int, int>, int> edges;
  for (const Tri& t : m.f) {
    for (int i : t)
      if (i < 0 || i >= nv) return {"face index out of range"};
    const V3 a = m.v[t[0]], b = m.v[t[1]], c = m.v[t[2]];
    const V3 u{b.x - a.x, b.y - a.y, b.z - a.z}, w{c.x - a.x, c.y - a.y, c.z - a.z};
    const double cx = u.y * w.z - u.z * w.y, cy = u.z * w.x - u.x * w.z, cz = u.x * w.y - u.y * w.x;
    if (std::sqrt(cx * cx + cy * cy + cz * cz) < 1e-14) bad.push_back("degenerate triangle");
    for (int e = 0; e < 3; ++e) ++edges[{t[e], t[(e + 1) % 3]}];
  }
  for (const auto& [e, count] : edges) {
    const auto rev = edges.find({e.second, e.first});
    if (count != 1 || rev == edges.end() || rev->second != 1) {
      bad.push_back("edge not used exactly once in each direction");
      break;
    }
  }
  // Mirror symmetry: every vertex and every (reversed) triangle has its image under y -> -y.
  std::map<std::array<int, 3>, int> faces;
  auto canon = [](Tri t) {
    std::rotate(t.begin(), std::min_element(t.begin(), t.end()), t.end());
    return t;
  };
  for (const Tri& t : m.f) faces[canon(t)] = 1;
  std::vector<int> image(nv, -1);
  for (int i = 0; i < nv; ++i) {
    const auto it = where.find({m.v[i].x, m.v[i].y == 0.0 ? 0.0 : -m.v[i].y, m.v[i].z});
    if (it == where.end()) {
      bad.push_back("vertex without mirror image");
      break;
    }
    image[i] = it->second;
  }
  if (bad.empty())
    for (const Tri& t : m.f)
      if (!faces.count(canon({image[t[0]], image[t[2]], image[t[1]]}))) {
        bad.push_back("triangle without mirror image");
        break;
      }
  double total = 0.0;
  std::printf("%-30s %7zu triangles %7d vertices  ", name.c_str(), m.f.size(), nv);
  for (size_t s = 0; s < m.shell_start.size(); ++s) {
    const size_t e = s + 1 < m.shell_start.size() ? m.shell_start[s + 1] : m.f.size();
    const double vol = signed_volume(m.v, m.f, m.shell_start[s], e);
    std::printf(" %s %zu tri V=%.4f m^3", m.shell_names[s].c_str(), e - m.shell_start[s], vol);
    if (!(vol > 0.0)) bad.push_back("shell " + m.shell_names[s] + " has volume <= 0");
    total += vol;
  }
  std::printf("  total V=%.4f m^3 %s\n", total, bad.empty() ? "ok" : "FAILED");
  return bad;
}

const std::vector<std::string> kParts = {"fuselage", "wing", "htail", "vtail", "nacelles"};

int check_dir(const std::filesystem::path& dir) {
  int failures = 0;
  for (const char* variant : {"baseline", "revised"})
    for (const std::string& part : kParts) {
      const std::filesystem::path p = dir / variant / (part + ".obj");
      std::vector<std::string> bad;
      try {
        bad = check_mesh(std::string(variant) + "/" + part + ".obj", read_obj(p));
      } catch (const std::exception& e) {
        bad = {e.what()};
      }
      for (const std::string& b : bad) std::fprintf(stderr, "%s: %s\n", p.string().c_str(), b.c_str());
      failures += bad.empty() ? 0 : 1;
    }
  return failures == 0 ? 0 : 1;
}

Mesh single(const Mesh& part, const std::string& name) {
  Mesh m;
  append_shell(m, part, name);
  return m;
}

void generate(const std::filesystem::path& dir) {
  const Mesh wing = single(make_horizontal_surface(wing_planform(), kWingZ), "wing");
  const Mesh htail = single(make_horizontal_surface(htail_planform(), kTailZ), "htail");
  const Mesh vtail = single(make_vertical_surface(fin_planform(), kFinZ), "vtail");
  const Mesh right = make_nacelle();
  Mesh nacelles;
  append_shell(nacelles, right, "nacelle_starboard");
  append_shell(nacelles, mirror_copy(right), "nacelle_port");
  const Waist waist = make_waist(0.5);
  const Mesh fuselage[2] = {single(make_fuselage([](double) { return 1.0; }), "fuselage"),
                            single(make_fuselage([&](double x) { return waist_scale(waist, x); }),
                                   "fuselage")};
  const char* variants[2] = {"baseline", "revised"};
  for (int k = 0; k < 2; ++k) {
    const std::filesystem::path d = dir / variants[k];
    std::filesystem::create_directories(d);
    const std::string v = variants[k];
    write_obj(d / "fuselage.obj", fuselage[k], "fuselage, " + v);
    write_obj(d / "wing.obj", wing, "cranked-arrow wing, " + v);
    write_obj(d / "htail.obj", htail, "horizontal tail, " + v);
    write_obj(d / "vtail.obj", vtail, "vertical tail, " + v);
    write_obj(d / "nacelles.obj", nacelles, "engine nacelles, " + v);
  }
}

}  // namespace

int main(int argc, char** argv) {
  try {
    if (argc == 3 && std::string(argv[1]) == "--check") return check_dir(argv[2]);
    if (argc != 2 || std::string(argv[1]).starts_with("-")) {
      std::fprintf(stderr,
                   "usage: machcut_make_demo OUTDIR       write OUTDIR/{baseline,revised}/*.obj and check them\n"
                   "       machcut_make_demo --check DIR  check DIR/{baseline,revised}/*.obj\n");
      return 2;
    }
    generate(argv[1]);
    return check_dir(argv[1]);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "machcut_make_demo: %s\n", e.what());
    return 3;
  }
}
