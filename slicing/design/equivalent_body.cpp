#include "machcut/design/equivalent_body.h"

#include <tbb/parallel_for.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <sstream>

#include "machcut/output/writers.h"
#include "machcut/drag/wave_drag.h"

namespace machcut {

namespace {
// Adds a ring (or an axis point for radius 0) at station x; returns its vertex indices.
std::vector<std::uint32_t> add_ring(Mesh& m, double x, double r, int segments) {
  // A regular n-gon of circumradius R has area (n/2) R² sin(2π/n): scale R so it is π r².
  const double scale =
      std::sqrt(2.0 * std::numbers::pi / (segments * std::sin(2.0 * std::numbers::pi / segments)));
  std::vector<std::uint32_t> ring;
  if (r <= 0.0) {
    ring.assign(static_cast<std::size_t>(segments), static_cast<std::uint32_t>(m.positions.size()));
    m.positions.push_back({x, 0.0, 0.0});
    return ring;
  }
  for (int j = 0; j < segments; ++j) {
    const double phi = 2.0 * std::numbers::pi * j / segments;
    ring.push_back(static_cast<std::uint32_t>(m.positions.size()));
    m.positions.push_back({x, scale * r * std::cos(phi), scale * r * std::sin(phi)});
  }
  return ring;
}

// A flat cap over `ring`, facing -x (front) or +x (back).
void add_cap(Mesh& m, const std::vector<std::uint32_t>& ring, double x, bool front) {
  const auto c = static_cast<std::uint32_t>(m.positions.size());
  m.positions.push_back({x, 0.0, 0.0});
  const std::size_t n = ring.size();
  for (std::size_t j = 0; j < n; ++j) {
    const std::uint32_t a = ring[j], b = ring[(j + 1) % n];
    m.triangles.push_back(front ? Tri{c, b, a} : Tri{c, a, b});
  }
}
}  // namespace

EquivalentBody equivalent_body(const WaveDragModel& model, double mach, int stations, int rolls) {
  EquivalentBody body;
  body.mach = mach;
  body.rolls = mach > 1.0 ? std::max(1, rolls) : 1;
  std::vector<double> roll(static_cast<std::size_t>(body.rolls));
  for (int k = 0; k < body.rolls; ++k) roll[static_cast<std::size_t>(k)] = 360.0 * (k + 0.5) / body.rolls;
  StationRange all{HUGE_VAL, -HUGE_VAL};
  for (double t : roll) {
    const StationRange r = model.range(mach, t);
    all.lo = std::min(all.lo, r.lo);
    all.hi = std::max(all.hi, r.hi);
  }
  body.x = make_stations(all, std::max(2, stations), Spacing::uniform);
  std::vector<std::vector<double>> per_roll(roll.size());
  tbb::parallel_for(std::size_t{0}, roll.size(),
                    [&](std::size_t k) { per_roll[k] = model.areas(mach, roll[k], body.x); });
  body.area.assign(body.x.size(), 0.0);
  for (const auto& a : per_roll)
    for (std::size_t i = 0; i < a.size(); ++i) body.area[i] += a[i] / body.rolls;
  for (double a : body.area) body.radius.push_back(std::sqrt(std::max(a, 0.0) / std::numbers::pi));
  return body;
}

std::string equivalent_body_csv(const std::vector<EquivalentBody>& bodies) {
  std::ostringstream s;
  s << "mach,x_m,area_m2,radius_m\n";
  for (const EquivalentBody& b : bodies)
    for (std::size_t i = 0; i < b.x.size(); ++i)
      s << format_number(b.mach) << "," << format_number(b.x[i]) << "," << format_number(b.area[i])
        << "," << format_number(b.radius[i]) << "\n";
  return s.str();
}

Mesh equivalent_body_mesh(const EquivalentBody& body, int segments) {
  Mesh m;
  segments = std::max(3, segments);
  std::vector<std::vector<std::uint32_t>> rings;
  for (std::size_t i = 0; i < body.x.size(); ++i)
    rings.push_back(add_ring(m, body.x[i], body.radius[i], segments));
  for (std::size_t i = 0; i + 1 < rings.size(); ++i)
    for (int j = 0; j < segments; ++j) {
      const auto j0 = static_cast<std::size_t>(j), j1 = static_cast<std::size_t>((j + 1) % segments);
      const std::uint32_t a = rings[i][j0], b = rings[i][j1], c = rings[i + 1][j1], d = rings[i + 1][j0];
      if (a != b) m.triangles.push_back({a, b, c});
      if (c != d) m.triangles.push_back({a, c, d});
    }
  if (!rings.empty() && body.radius.front() > 0.0) add_cap(m, rings.front(), body.x.front(), true);
  if (!rings.empty() && body.radius.back() > 0.0) add_cap(m, rings.back(), body.x.back(), false);
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"equivalent body"};
  return m;
}

std::string mesh_to_stl(const Mesh& mesh, const std::string& solid_name) {
  std::ostringstream s;
  s << "solid " << solid_name << "\n";
  for (const Tri& t : mesh.triangles) {
    const Vec3 a = mesh.positions[t[0]], b = mesh.positions[t[1]], c = mesh.positions[t[2]];
    Vec3 n = cross(b - a, c - a);
    const double len = norm(n);
    if (len > 0) n = (1.0 / len) * n;
    s << " facet normal " << format_number(n.x) << " " << format_number(n.y) << " "
      << format_number(n.z) << "\n  outer loop\n";
    for (const Vec3& p : {a, b, c})
      s << "   vertex " << format_number(p.x) << " " << format_number(p.y) << " " << format_number(p.z)
        << "\n";
    s << "  endloop\n endfacet\n";
  }
  s << "endsolid " << solid_name << "\n";
  return s.str();
}

std::string mesh_to_obj(const Mesh& mesh, const std::string& comment) {
  std::ostringstream s;
  s << "# " << comment << "\n";
  for (const Vec3& p : mesh.positions)
    s << "v " << format_number(p.x) << " " << format_number(p.y) << " " << format_number(p.z) << "\n";
  for (const Tri& t : mesh.triangles) s << "f " << t[0] + 1 << " " << t[1] + 1 << " " << t[2] + 1 << "\n";
  return s.str();
}

}  // namespace machcut
