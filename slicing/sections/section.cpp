#include "machcut/sections/section.h"

#include <tbb/combinable.h>
#include <tbb/parallel_for.h>

#include <algorithm>
#include <cassert>
#include <cstdlib>
#include <stdexcept>
#include <string>
#include <cmath>
#include <numbers>
#include <numeric>

namespace machcut {

namespace {

// The plane function f(p) = x − β (y cos θ + z sin θ) in a form cheap to evaluate.
struct PlaneFn {
  double beta = 0.0;
  double cos_t = 1.0;
  double sin_t = 0.0;
  double by = 0.0;  // β cos θ
  double bz = 0.0;  // β sin θ
};

PlaneFn plane_fn(const MachPlanes& planes) {
  assert(planes.mach >= 1.0 && "Mach planes need M >= 1");
  PlaneFn pf;
  pf.beta = std::sqrt(std::max(0.0, planes.mach * planes.mach - 1.0));
  const double t = planes.roll_deg * std::numbers::pi / 180.0;
  pf.cos_t = std::cos(t);
  pf.sin_t = std::sin(t);
  pf.by = pf.beta * pf.cos_t;
  pf.bz = pf.beta * pf.sin_t;
  return pf;
}

inline double f_of(const Vec3& p, const PlaneFn& pf) { return p.x - (pf.by * p.y + pf.bz * p.z); }

// f at every vertex, into `f` (resized).
void vertex_stations(const std::vector<Vec3>& pos, const PlaneFn& pf, std::vector<double>& f) {
  f.resize(pos.size());
  for (std::size_t i = 0; i < pos.size(); ++i) f[i] = f_of(pos[i], pf);
}

// Sorted stations with a bucket table so that "first station greater than v" is O(1) on
// average for any spacing. The answer is exact: the buckets only give a starting guess.
class StationIndex {
 public:
  explicit StationIndex(std::span<const double> stations) : order_(stations.size()) {
    std::iota(order_.begin(), order_.end(), 0u);
    std::sort(order_.begin(), order_.end(),
              [&](std::uint32_t a, std::uint32_t b) { return stations[a] < stations[b]; });
    sorted_.reserve(stations.size());
    for (std::uint32_t i : order_) sorted_.push_back(stations[i]);
    if (sorted_.empty()) return;
    lo_ = sorted_.front();
    const double span = sorted_.back() - lo_;
    const std::size_t buckets = std::min<std::size_t>(4 * sorted_.size() + 1, 1u << 20);
    inv_h_ = span > 0.0 ? static_cast<double>(buckets) / span : 0.0;
    first_.resize(buckets + 1);
    std::size_t k = 0;
    for (std::size_t b = 0; b <= buckets; ++b) {
      const double edge = lo_ + static_cast<double>(b) / (inv_h_ > 0.0 ? inv_h_ : 1.0);
      while (k < sorted_.size() && sorted_[k] <= edge) ++k;
      first_[b] = static_cast<std::uint32_t>(k);
    }
  }

  std::size_t size() const { return sorted_.size(); }
  double sorted(std::size_t k) const { return sorted_[k]; }
  std::uint32_t original(std::size_t k) const { return order_[k]; }

  // Index of the first sorted station strictly greater than v.
  std::size_t first_greater(double v) const {
    const std::size_t n = sorted_.size();
    if (n == 0 || v < lo_) return 0;
    double b = (v - lo_) * inv_h_;
    std::size_t k =
        b >= static_cast<double>(first_.size() - 1) ? n : first_[static_cast<std::size_t>(b)];
    while (k > 0 && sorted_[k - 1] > v) --k;
    while (k < n && sorted_[k] <= v) ++k;
    return k;
  }

 private:
  std::vector<std::uint32_t> order_;
  std::vector<double> sorted_;
  std::vector<std::uint32_t> first_;
  double lo_ = 0.0;
  double inv_h_ = 0.0;
};

// The point where the plane f = X crosses edge (i, j). Computed from the lower index so both
// triangles sharing the edge produce the identical point.
inline Vec3 edge_point(std::uint32_t i, std::uint32_t j, const double* f, const Vec3* p,
                       double X) {
  if (i > j) std::swap(i, j);
  const double t = (X - f[i]) / (f[j] - f[i]);
  const Vec3 a = p[i];
  const Vec3 b = p[j];
  return {a.x + t * (b.x - a.x), a.y + t * (b.y - a.y), a.z + t * (b.z - a.z)};
}

// The oriented crossing segment of triangle t with the plane f = X, for a triangle known to
// have vertices on both sides (below: f < X; on or above: f >= X). The segment runs along
// ∇f × N (N the outward normal), which is counter-clockwise in the (y, z) projection seen
// from +x for the section of a solid.
inline std::array<Vec3, 2> crossing_segment(const Tri& t, const double* f, const Vec3* p,
                                            double X) {
  const bool below[3] = {f[t[0]] < X, f[t[1]] < X, f[t[2]] < X};
  const int count = below[0] + below[1] + below[2];
  // The isolated vertex is the one alone on its side.
  int k = 0;
  if (count == 1) {
    k = below[0] ? 0 : (below[1] ? 1 : 2);
  } else {
    k = !below[0] ? 0 : (!below[1] ? 1 : 2);
  }
  const std::uint32_t a = t[k], b = t[(k + 1) % 3], c = t[(k + 2) % 3];
  const Vec3 pab = edge_point(a, b, f, p, X);
  const Vec3 pac = edge_point(a, c, f, p, X);
  if (count == 1) return {pac, pab};  // isolated vertex upstream: from edge (a,c) to (a,b)
  return {pab, pac};
}

// The same crossing as crossing_segment, for the area alone: only the (y, z) coordinates of
// the two points matter to the shoelace term, so x is not interpolated. Returns twice the
// signed (y, z) area term. Identical arithmetic to crossing_segment for y and z.
inline double crossing_shoelace(const Tri& t, const double* f, const Vec3* p, double X) {
  const bool below[3] = {f[t[0]] < X, f[t[1]] < X, f[t[2]] < X};
  const int count = below[0] + below[1] + below[2];
  const bool lone_below = count == 1;
  const int k = lone_below ? (below[0] ? 0 : (below[1] ? 1 : 2))
                           : (!below[0] ? 0 : (!below[1] ? 1 : 2));
  const std::uint32_t a = t[k], b = t[(k + 1) % 3], c = t[(k + 2) % 3];
  auto yz = [&](std::uint32_t i, std::uint32_t j, double& y, double& z) {
    if (i > j) std::swap(i, j);
    const double u = (X - f[i]) / (f[j] - f[i]);
    y = p[i].y + u * (p[j].y - p[i].y);
    z = p[i].z + u * (p[j].z - p[i].z);
  };
  double yb, zb, yc, zc;
  yz(a, b, yb, zb);
  yz(a, c, yc, zc);
  // Lone vertex upstream: segment (a,c) → (a,b); otherwise (a,b) → (a,c).
  const double twice = yc * zb - zc * yb;
  return lone_below ? twice : -twice;
}

// Twice the signed area swept in the (y, z) projection by segment s (shoelace term).
inline double shoelace(const std::array<Vec3, 2>& s) {
  return s[0].y * s[1].z - s[0].z * s[1].y;
}

// For every vertex, the index of the first sorted station strictly greater than f(v). A
// triangle with vertices a, b, c then crosses exactly the stations k with
// min(k_a, k_b, k_c) <= k < max(k_a, k_b, k_c), because "first station > f" is monotone in f:
// the stations X with f_min < X <= f_max. One lookup per vertex instead of two per triangle.
void vertex_station_index(const std::vector<double>& f, const StationIndex& index,
                          std::vector<std::uint32_t>& k) {
  k.resize(f.size());
  for (std::size_t i = 0; i < f.size(); ++i)
    k[i] = static_cast<std::uint32_t>(index.first_greater(f[i]));
}

// Accumulates the projected area for triangles [begin, end) into acc (sorted-station order),
// and per shell into shell_acc when non-null (shell_acc[s * n + k]).
void accumulate(const Mesh& mesh, const std::vector<double>& f,
                const std::vector<std::uint32_t>& kv, const StationIndex& index,
                std::size_t begin, std::size_t end, double* acc, double* shell_acc) {
  const double* fv = f.data();
  const std::uint32_t* kp = kv.data();
  const Vec3* p = mesh.positions.data();
  const Tri* tris = mesh.triangles.data();
  const std::size_t n = index.size();
  for (std::size_t i = begin; i < end; ++i) {
    const Tri& t = tris[i];
    const std::uint32_t k0 = kp[t[0]], k1 = kp[t[1]], k2 = kp[t[2]];
    const std::uint32_t lo = std::min(k0, std::min(k1, k2));
    const std::uint32_t hi = std::max(k0, std::max(k1, k2));
    for (std::uint32_t k = lo; k < hi; ++k) {
      const double c = 0.5 * crossing_shoelace(t, fv, p, index.sorted(k));
      acc[k] += c;
      if (shell_acc) shell_acc[mesh.shell[i] * n + k] += c;
    }
  }
}

// Compacts away vertices no triangle uses (so the station range is that of the surface).
Mesh compact(Mesh mesh) {
  std::vector<std::uint32_t> remap(mesh.positions.size(), UINT32_MAX);
  std::vector<Vec3> pos;
  pos.reserve(mesh.positions.size());
  for (Tri& t : mesh.triangles)
    for (std::uint32_t& v : t) {
      if (remap[v] == UINT32_MAX) {
        remap[v] = static_cast<std::uint32_t>(pos.size());
        pos.push_back(mesh.positions[v]);
      }
      v = remap[v];
    }
  mesh.positions = std::move(pos);
  return mesh;
}

}  // namespace

double station_of(const Vec3& p, const MachPlanes& planes) { return f_of(p, plane_fn(planes)); }

std::vector<double> make_stations(const StationRange& range, int n, Spacing spacing) {
  assert(n >= 2);
  std::vector<double> x(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i) {
    const double s = static_cast<double>(i) / (n - 1);
    const double u = spacing == Spacing::uniform ? s : 0.5 * (1.0 - std::cos(std::numbers::pi * s));
    x[static_cast<std::size_t>(i)] = range.lo + u * (range.hi - range.lo);
  }
  x.back() = range.hi;
  return x;
}

std::array<double, 2> plane_coordinates(const Vec3& p, const MachPlanes& planes,
                                        double station) {
  const PlaneFn pf = plane_fn(planes);
  const Vec3 d{p.x - station, p.y, p.z};
  const Vec3 eu = (1.0 / planes.mach) * Vec3{pf.beta, pf.cos_t, pf.sin_t};
  const Vec3 ev{0.0, -pf.sin_t, pf.cos_t};
  return {dot(d, eu), dot(d, ev)};
}

bool section_checks_enabled() {
  static const bool on = [] {
    const char* e = std::getenv("MACHCUT_CHECK_SECTIONS");
    if (e) return std::string(e) == "1";
#ifdef NDEBUG
    return false;
#else
    return true;
#endif
  }();
  return on;
}

namespace {

// Every edge used once in each direction (closed, oriented) and every shell's volume > 0.
bool closed_and_positive(const Mesh& m) {
  if (m.triangles.empty()) return false;
  std::vector<std::pair<std::uint64_t, int>> half;
  half.reserve(3 * m.triangles.size());
  for (const Tri& t : m.triangles)
    for (int c = 0; c < 3; ++c) {
      const std::uint32_t a = t[c], b = t[(c + 1) % 3];
      half.push_back({(std::uint64_t{std::min(a, b)} << 32) | std::max(a, b), a < b ? 1 : -1});
    }
  std::sort(half.begin(), half.end());
  for (std::size_t i = 0; i < half.size();) {
    std::size_t j = i;
    int sum = 0;
    while (j < half.size() && half[j].first == half[i].first) sum += half[j++].second;
    if (j - i != 2 || sum != 0) return false;
    i = j;
  }
  const std::vector<double> vol = shell_volumes(m);
  return std::all_of(vol.begin(), vol.end(), [](double v) { return v > 0.0; });
}

}  // namespace

SectionEngine::SectionEngine(Mesh mesh) : mesh_(compact(std::move(mesh))) {
  if (mesh_.shell.size() != mesh_.triangles.size()) mesh_.shell.assign(mesh_.triangles.size(), 0);
  if (mesh_.shell_names.empty() && !mesh_.triangles.empty()) mesh_.shell_names.push_back("shell");
  if (section_checks_enabled()) {
    closed_positive_ = closed_and_positive(mesh_);
    const Box3 b = bounding_box(mesh_);
    const double d = is_empty(b) ? 0.0 : norm(b.hi - b.lo);
    area_tolerance_ = 1e-9 * d * d;
  }
}

StationRange SectionEngine::range(const MachPlanes& planes) const {
  const PlaneFn pf = plane_fn(planes);
  StationRange r{HUGE_VAL, -HUGE_VAL};
  for (const Vec3& p : mesh_.positions) {
    const double f = f_of(p, pf);
    r.lo = std::min(r.lo, f);
    r.hi = std::max(r.hi, f);
  }
  if (mesh_.positions.empty()) r = {0.0, 0.0};
  return r;
}

std::vector<double> SectionEngine::areas(const MachPlanes& planes,
                                         std::span<const double> stations,
                                         std::vector<std::vector<double>>* per_shell) const {
  const PlaneFn pf = plane_fn(planes);
  const StationIndex index(stations);
  const std::size_t n = stations.size();
  const std::size_t shells = shell_count(mesh_);
  std::vector<double> f(mesh_.positions.size());
  tbb::parallel_for(tbb::blocked_range<std::size_t>(0, f.size(), 1 << 15), [&](const auto& r) {
    for (std::size_t i = r.begin(); i < r.end(); ++i) f[i] = f_of(mesh_.positions[i], pf);
  });
  std::vector<std::uint32_t> kv(f.size());
  tbb::parallel_for(tbb::blocked_range<std::size_t>(0, f.size(), 1 << 15), [&](const auto& r) {
    for (std::size_t i = r.begin(); i < r.end(); ++i)
      kv[i] = static_cast<std::uint32_t>(index.first_greater(f[i]));
  });
  const std::size_t width = n + (per_shell ? shells * n : 0);
  tbb::combinable<std::vector<double>> partial([width] { return std::vector<double>(width, 0.0); });
  tbb::parallel_for(tbb::blocked_range<std::size_t>(0, mesh_.triangles.size(), 1 << 14),
                    [&](const auto& r) {
                      std::vector<double>& acc = partial.local();
                      accumulate(mesh_, f, kv, index, r.begin(), r.end(), acc.data(),
                                 per_shell ? acc.data() + n : nullptr);
                    });
  std::vector<double> total(width, 0.0);
  partial.combine_each([&](const std::vector<double>& acc) {
    for (std::size_t k = 0; k < width; ++k) total[k] += acc[k];
  });
  std::vector<double> out(n);
  for (std::size_t k = 0; k < n; ++k) out[index.original(k)] = total[k];
  if (closed_positive_)
    for (std::size_t k = 0; k < n; ++k)
      if (out[k] < -area_tolerance_)
        throw std::logic_error("section engine: area " + std::to_string(out[k]) + " m² < 0 at station " +
                               std::to_string(stations[k]) + " of a closed, outward mesh");
  if (per_shell) {
    per_shell->assign(shells, std::vector<double>(n, 0.0));
    for (std::size_t s = 0; s < shells; ++s)
      for (std::size_t k = 0; k < n; ++k) (*per_shell)[s][index.original(k)] = total[n + s * n + k];
  }
  return out;
}

AreaCurve SectionEngine::curve(const MachPlanes& planes, std::vector<double> stations,
                               bool with_per_shell) const {
  AreaCurve c;
  c.mach = planes.mach;
  c.roll_deg = planes.roll_deg;
  c.area = areas(planes, stations, with_per_shell ? &c.per_shell : nullptr);
  c.x = std::move(stations);
  return c;
}

std::vector<std::vector<double>> SectionEngine::areas_for_rolls(
    double mach, std::span<const double> rolls_deg,
    const std::function<std::vector<double>(const StationRange&)>& stations_for_range) const {
  std::vector<std::vector<double>> out(rolls_deg.size());
  tbb::parallel_for(std::size_t{0}, rolls_deg.size(), [&](std::size_t r) {
    const MachPlanes planes{mach, rolls_deg[r]};
    const PlaneFn pf = plane_fn(planes);
    // Per-thread buffers reused across roll angles: fresh multi-megabyte allocations would
    // cost a page fault per 4 KiB on every roll.
    thread_local std::vector<double> f;
    thread_local std::vector<std::uint32_t> kv;
    vertex_stations(mesh_.positions, pf, f);
    StationRange range{HUGE_VAL, -HUGE_VAL};
    for (double v : f) {
      range.lo = std::min(range.lo, v);
      range.hi = std::max(range.hi, v);
    }
    const std::vector<double> stations = stations_for_range(range);
    const StationIndex index(stations);
    std::vector<double> acc(stations.size(), 0.0);
    vertex_station_index(f, index, kv);
    accumulate(mesh_, f, kv, index, 0, mesh_.triangles.size(), acc.data(), nullptr);
    out[r].resize(stations.size());
    for (std::size_t k = 0; k < stations.size(); ++k) out[r][index.original(k)] = acc[k];
  });
  if (closed_positive_)
    for (std::size_t r = 0; r < out.size(); ++r)
      for (double a : out[r])
        if (a < -area_tolerance_)
          throw std::logic_error("section engine: area " + std::to_string(a) + " m² < 0 at roll " +
                                 std::to_string(rolls_deg[r]) + "° of a closed, outward mesh");
  return out;
}

Section SectionEngine::section(const MachPlanes& planes, double station) const {
  const PlaneFn pf = plane_fn(planes);
  std::vector<double> f;
  vertex_stations(mesh_.positions, pf, f);
  Section s;
  s.planes = planes;
  s.station = station;
  double twice = 0.0;
  for (std::size_t i = 0; i < mesh_.triangles.size(); ++i) {
    const Tri& t = mesh_.triangles[i];
    const double f0 = f[t[0]], f1 = f[t[1]], f2 = f[t[2]];
    const double lo = std::min(f0, std::min(f1, f2));
    const double hi = std::max(f0, std::max(f1, f2));
    if (!(lo < station && station <= hi)) continue;
    const auto seg = crossing_segment(t, f.data(), mesh_.positions.data(), station);
    twice += shoelace(seg);
    s.segments.push_back(seg);
    s.segment_shell.push_back(mesh_.shell[i]);
    expand(s.bounds, seg[0]);
    expand(s.bounds, seg[1]);
  }
  s.area = 0.5 * twice;
  s.cut_area = s.area * planes.mach;
  return s;
}

}  // namespace machcut
