// An invented low-poly aircraft for benchmarks: the kind of mesh a designer gets from a visual
// model — flat intake faces across the flow, box-section fins with square leading edges,
// crudely faceted fuselage, canopy and stores — generated in code, no real aircraft.
//
// `rough_aircraft(level)`: the same design at two tessellations. The curved parts (fuselage,
// canopy, stores) are lofted through design curves with `level` times the rings and segments,
// so level 1 is crude (20-sided fuselage, 8-sided stores) and level 2.8 is about eight times
// the triangles; the flat-faced parts (wing with a hexagonal section, box fins, intake ducts,
// pylons) keep their geometry and only get more triangles. Level 1 has about 13 000
// triangles, level 2.8 about 110 000. Every part is its own closed, outward-oriented shell;
// the parts overlap (wing, fins and ducts pass into the fuselage) as in a visual model, so
// they are united before analysis. Mirror symmetric in y. Length 16 m, span 9.6 m.
#pragma once

#include <algorithm>
#include <cmath>
#include <numbers>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut::bench {

namespace rough_detail {

// A closed loft through rings of equal size (a ring of one point is an apex); an end ring of
// more than one point is closed by a fan from its centroid (flat when the ring is planar).
inline void add_loft(Mesh& m, const std::vector<std::vector<Vec3>>& rings,
                     const std::string& name) {
  const auto shell = static_cast<std::uint32_t>(m.shell_names.size());
  m.shell_names.push_back(name);
  const std::size_t first_tri = m.triangles.size();
  std::vector<std::vector<std::uint32_t>> id;
  std::size_t n = 0;
  for (const auto& r : rings) n = std::max(n, r.size());
  for (const auto& r : rings) {
    std::vector<std::uint32_t> ids;
    const auto base = static_cast<std::uint32_t>(m.positions.size());
    for (const Vec3& p : r) m.positions.push_back(p);
    for (std::size_t j = 0; j < n; ++j)
      ids.push_back(base + static_cast<std::uint32_t>(r.size() == 1 ? 0 : j));
    id.push_back(ids);
  }
  for (std::size_t i = 0; i + 1 < id.size(); ++i)
    for (std::size_t j = 0; j < n; ++j) {
      const std::size_t k = (j + 1) % n;
      const std::uint32_t a = id[i][j], b = id[i][k], c = id[i + 1][k], d = id[i + 1][j];
      if (a != b) m.triangles.push_back({a, b, c});
      if (c != d) m.triangles.push_back({a, c, d});
    }
  auto cap = [&](std::size_t i, bool front) {
    if (rings[i].size() == 1) return;
    Vec3 c{};
    for (const Vec3& p : rings[i]) c = c + p;
    c = (1.0 / static_cast<double>(rings[i].size())) * c;
    const auto ci = static_cast<std::uint32_t>(m.positions.size());
    m.positions.push_back(c);
    for (std::size_t j = 0; j < n; ++j) {
      const std::uint32_t a = id[i][j], b = id[i][(j + 1) % n];
      m.triangles.push_back(front ? Tri{ci, b, a} : Tri{ci, a, b});
    }
  };
  cap(0, true);
  cap(rings.size() - 1, false);
  m.shell.resize(m.triangles.size(), shell);
  // Outward orientation: flip the part when it encloses negative volume.
  double v = 0.0;
  for (std::size_t t = first_tri; t < m.triangles.size(); ++t) {
    const Tri& f = m.triangles[t];
    v += dot(m.positions[f[0]], cross(m.positions[f[1]], m.positions[f[2]]));
  }
  if (v < 0.0)
    for (std::size_t t = first_tri; t < m.triangles.size(); ++t)
      std::swap(m.triangles[t][1], m.triangles[t][2]);
}

// `n` points along the closed polygon `corners`, spread over its sides by length (every corner
// kept), counter-clockwise as given.
inline std::vector<Vec3> polygon_points(const std::vector<Vec3>& corners, int per_side) {
  std::vector<Vec3> out;
  for (std::size_t i = 0; i < corners.size(); ++i) {
    const Vec3 a = corners[i], b = corners[(i + 1) % corners.size()];
    for (int k = 0; k < per_side; ++k)
      out.push_back(a + (static_cast<double>(k) / per_side) * (b - a));
  }
  return out;
}

inline int scaled(double level, int n) {
  return std::max(2, static_cast<int>(std::lround(level * n)));
}

// A box-section fin or pylon lofted along its span: at each spanwise fraction s the section is
// the rectangle [le(s), le(s) + chord(s)] × [−t/2, t/2] across the span direction. `at(s, x, w)`
// maps (span fraction, x, thickness offset) to a point.
template <class At>
void add_box_fin(Mesh& m, const std::string& name, int along, int per_side, At at) {
  std::vector<std::vector<Vec3>> rings;
  for (int i = 0; i <= along; ++i) {
    const double s = static_cast<double>(i) / along;
    rings.push_back(polygon_points(
        {at(s, 0.0, -1.0), at(s, 1.0, -1.0), at(s, 1.0, 1.0), at(s, 0.0, 1.0)}, per_side));
  }
  add_loft(m, rings, name);
}

}  // namespace rough_detail

inline Mesh rough_aircraft(double level) {
  using namespace rough_detail;
  using std::numbers::pi;
  Mesh m;
  // Fuselage: superelliptic sections (exponent 2.5), a blunt elliptic-power nose (r ∝ ξ^0.6 at
  // the tip: steeper than any Mach cone there), a boat-tail to a flat nozzle exit at x = 16.
  {
    const int along = scaled(level, 130), around = scaled(level, 24);
    auto radius = [](double x) {
      if (x < 3.6) return std::pow(1.0 - std::pow(1.0 - x / 3.6, 2.0), 0.6);
      if (x < 12.0) return 1.0;
      const double t = (x - 12.0) / 4.0;
      return 1.0 - 0.45 * t * t * (3 - 2 * t);
    };
    std::vector<std::vector<Vec3>> rings;
    rings.push_back({{0.0, 0.0, 0.0}});
    for (int i = 1; i <= along; ++i) {
      const double u = static_cast<double>(i) / along;
      const double x = 16.0 * (u < 0.25 ? 0.25 * (1 - std::cos(pi * u / 0.5)) / 1.0 : u);
      const double r = radius(x);
      std::vector<Vec3> ring;
      for (int j = 0; j < around; ++j) {
        const double phi = 2 * pi * (j + 0.5) / around;
        const double c = std::cos(phi), s = std::sin(phi);
        const double e = 2.0 / 2.5;  // superellipse: |y/a|^2.5 + |z/b|^2.5 = 1
        ring.push_back({x, 0.8 * r * std::copysign(std::pow(std::fabs(c), e), c),
                        0.9 * r * std::copysign(std::pow(std::fabs(s), e), s)});
      }
      rings.push_back(ring);
    }
    add_loft(m, rings, "fuselage");
  }
  // Canopy: a faceted half-ellipsoid bump, its flat bottom inside the fuselage; a steep
  // windscreen.
  {
    const int along = scaled(level, 18), around = scaled(level, 18);
    std::vector<std::vector<Vec3>> rings;
    rings.push_back({{2.6, 0.0, 0.55}});
    for (int i = 1; i < along; ++i) {
      const double t = static_cast<double>(i) / along;  // 0 … 1 over x 2.6 … 6.2
      const double x = 2.6 + 3.6 * t;
      const double h = std::sqrt(std::max(0.0, 1 - std::pow(2 * t - 1, 2))) *
                       (t < 0.5 ? 1.0 : 1.0 - 0.5 * (t - 0.5));
      std::vector<Vec3> ring;
      for (int j = 0; j <= around; ++j) {  // upper arc from starboard to port, then the flat bottom
        const double phi = pi * j / around;
        ring.push_back(
            {x, 0.42 * h * std::cos(phi), 0.55 + 0.7 * h * std::sin(phi) + 0.2 * (1 - h)});
      }
      rings.push_back(ring);
    }
    rings.push_back({{6.2, 0.0, 0.72}});
    add_loft(m, rings, "canopy");
  }
  // Intake ducts: rectangular, flat front faces across the flow at x = 5 (solid, not modelled
  // as flow-through), fading into the fuselage sides aft.
  for (int side : {1, -1}) {
    const int along = scaled(level, 14), per = scaled(level, 5);
    std::vector<std::vector<Vec3>> rings;
    for (int i = 0; i <= along; ++i) {
      const double t = static_cast<double>(i) / along;
      const double x = 5.0 + 5.0 * t;
      const double yc = side * (0.95 - 0.45 * t * t), w = 0.3 * (1 - 0.5 * t * t),
                   h = 0.38 * (1 - 0.4 * t * t);
      rings.push_back(polygon_points({{x, yc - w, -0.1 - h},
                                      {x, yc + w, -0.1 - h},
                                      {x, yc + w, -0.1 + h},
                                      {x, yc - w, -0.1 + h}},
                                     per));
    }
    add_loft(m, rings, side > 0 ? "intake_right" : "intake_left");
  }
  // Wing: trapezoid, 42° leading-edge sweep, hexagonal section 5 % thick, one shell through
  // the fuselage, flat tips.
  {
    const int span = scaled(level, 40), per = scaled(level, 4);
    std::vector<std::vector<Vec3>> rings;
    for (int i = 0; i <= span; ++i) {
      const double y = -4.8 + 9.6 * i / span, s = std::fabs(y) / 4.8;
      const double le = 6.0 + std::fabs(y) * std::tan(42.0 * pi / 180.0), c = 5.5 - 3.9 * s;
      const double t = 0.05 * c, z0 = -0.2;
      rings.push_back(polygon_points({{le, y, z0},
                                      {le + 0.15 * c, y, z0 - t / 2},
                                      {le + 0.85 * c, y, z0 - t / 2},
                                      {le + c, y, z0},
                                      {le + 0.85 * c, y, z0 + t / 2},
                                      {le + 0.15 * c, y, z0 + t / 2}},
                                     per));
    }
    add_loft(m, rings, "wing");
  }
  // Horizontal tails: box sections (square leading edges), 45° sweep, through the fuselage.
  add_box_fin(m, "htail", scaled(level, 24), scaled(level, 4), [](double s, double x, double w) {
    const double y = -2.8 + 5.6 * s, a = std::fabs(y) / 2.8;
    const double le = 12.6 + std::fabs(y), c = 2.6 - 1.4 * a;
    return Vec3{le + x * c, y, 0.05 + 0.06 * w};
  });
  // Vertical fin: box section, 35° leading-edge sweep, root inside the fuselage.
  add_box_fin(m, "vfin", scaled(level, 20), scaled(level, 4), [](double s, double x, double w) {
    const double z = 0.3 + 2.2 * s;
    const double le = 12.2 + (z - 0.3) * std::tan(35.0 * pi / 180.0), c = 3.0 - 1.5 * s;
    return Vec3{le + x * c, 0.08 * w, z};
  });
  // Ventral fins: unswept boxes (flat front faces across the flow).
  for (int side : {1, -1})
    add_box_fin(m, side > 0 ? "ventral_right" : "ventral_left", scaled(level, 8), scaled(level, 3),
                [side](double s, double x, double w) {
                  const double z = -0.5 - 0.6 * s;
                  return Vec3{13.4 + 1.2 * x, side * (0.45 + 0.2 * s) + 0.04 * w, z};
                });
  // Under-wing stores: 8-sided bodies (level 1) with a pointed nose and a flat base, four box
  // fins each, on box pylons.
  for (int side : {1, -1}) {
    const double yc = side * 2.8, zc = -0.75, x0 = 7.2;
    const int along = scaled(level, 20), around = scaled(level, 8);
    std::vector<std::vector<Vec3>> rings;
    rings.push_back({{x0, yc, zc}});
    for (int i = 1; i <= along; ++i) {
      const double t = static_cast<double>(i) / along, x = x0 + 3.2 * t;
      const double r = 0.2 * (t < 0.3 ? std::sqrt(1 - std::pow(1 - t / 0.3, 2)) : 1.0);
      std::vector<Vec3> ring;
      for (int j = 0; j < around; ++j) {
        const double phi = 2 * pi * (j + 0.5) / around;
        ring.push_back({x, yc + r * std::cos(phi), zc + r * std::sin(phi)});
      }
      rings.push_back(ring);
    }
    const std::string s = side > 0 ? "right" : "left";
    add_loft(m, rings, "store_" + s);
    for (int k = 0; k < 4; ++k) {
      const double phi = pi / 4 + k * pi / 2, cy = std::cos(phi), cz = std::sin(phi);
      add_box_fin(m, "store_fin_" + s + std::to_string(k), scaled(level, 4), scaled(level, 2),
                  [=](double sp, double x, double w) {
                    const double r = 0.1 + 0.22 * sp;
                    return Vec3{x0 + 2.6 + 0.5 * x, yc + r * cy - 0.015 * w * cz,
                                zc + r * cz + 0.015 * w * cy};
                  });
    }
    add_box_fin(m, "pylon_" + s, scaled(level, 5), scaled(level, 3),
                [=](double sp, double x, double w) {
                  const double z = zc + 0.1 + 0.45 * sp;
                  return Vec3{x0 + 1.0 + 1.4 * x, yc + 0.04 * w, z};
                });
  }
  return m;
}

}  // namespace machcut::bench
