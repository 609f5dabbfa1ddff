// Exactness of the section engine (slicing/sections/section.cpp) against an independent
// implementation: CGAL::Polygon_mesh_slicer (The CGAL Project, CGAL User and Reference Manual,
// "Polygon Mesh Processing — Slicer") cuts the mesh, the polylines are projected on the y–z
// plane and their areas summed with nesting (even–odd) signs. The only CGAL test unit.
#include <CGAL/Exact_predicates_inexact_constructions_kernel.h>
#include <CGAL/Polygon_mesh_slicer.h>
#include <CGAL/Surface_mesh.h>
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>
#include <vector>

#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinRel;

namespace {

using K = CGAL::Exact_predicates_inexact_constructions_kernel;
using SM = CGAL::Surface_mesh<K::Point_3>;
using Polyline = std::vector<K::Point_3>;

SM to_cgal(const Mesh& m) {
  SM sm;
  std::vector<SM::Vertex_index> v;
  for (const Vec3& p : m.positions) v.push_back(sm.add_vertex(K::Point_3(p.x, p.y, p.z)));
  for (const Tri& t : m.triangles) REQUIRE(sm.add_face(v[t[0]], v[t[1]], v[t[2]]) != SM::null_face());
  return sm;
}

// Shoelace area of a closed polyline projected on the y–z plane, unsigned (m²).
double yz_area(const Polyline& p) {
  double a = 0.0;
  for (std::size_t i = 0; i + 1 < p.size(); ++i)
    a += p[i].y() * p[i + 1].z() - p[i + 1].y() * p[i].z();
  return 0.5 * std::fabs(a);
}

// Whether (y, z) lies inside the projection of the closed polyline (crossing number).
bool inside_yz(const Polyline& p, double y, double z) {
  bool in = false;
  for (std::size_t i = 0; i + 1 < p.size(); ++i) {
    const double y1 = p[i].y(), z1 = p[i].z(), y2 = p[i + 1].y(), z2 = p[i + 1].z();
    if ((z1 > z) != (z2 > z) && y < y1 + (z - z1) * (y2 - y1) / (z2 - z1)) in = !in;
  }
  return in;
}

// Projected section area from CGAL's polylines: a loop nested inside an odd number of other
// loops is a hole (even–odd rule).
double cgal_projected_area(const SM& sm, const MachPlanes& planes, double station) {
  const double beta = std::sqrt(planes.mach * planes.mach - 1.0);
  const double t = planes.roll_deg * std::numbers::pi / 180.0;
  // x − β(y cos θ + z sin θ) − X = 0
  const K::Plane_3 plane(1.0, -beta * std::cos(t), -beta * std::sin(t), -station);
  CGAL::Polygon_mesh_slicer<SM, K> slicer(sm);
  std::vector<Polyline> lines;
  slicer(plane, std::back_inserter(lines));
  double area = 0.0;
  for (std::size_t i = 0; i < lines.size(); ++i) {
    REQUIRE(lines[i].size() >= 4);
    REQUIRE(lines[i].front() == lines[i].back());  // closed loops only on a closed mesh
    int depth = 0;
    for (std::size_t j = 0; j < lines.size(); ++j)
      if (j != i && inside_yz(lines[j], lines[i][0].y(), lines[i][0].z())) ++depth;
    area += (depth % 2 == 0 ? 1.0 : -1.0) * yz_area(lines[i]);
  }
  return area;
}

void compare(const Mesh& mesh, const MachPlanes& planes, const std::vector<double>& stations) {
  const SectionEngine engine(mesh);
  const SM sm = to_cgal(mesh);
  const std::vector<double> ours = engine.areas(planes, stations);
  for (std::size_t i = 0; i < stations.size(); ++i) {
    INFO("Mach " << planes.mach << " roll " << planes.roll_deg << " station " << stations[i]);
    const double theirs = cgal_projected_area(sm, planes, stations[i]);
    REQUIRE(theirs > 0.0);
    CHECK_THAT(ours[i], WithinRel(theirs, 1e-9));
  }
}

// Stations strictly inside the range, avoiding the ends.
std::vector<double> inner_stations(const SectionEngine& e, const MachPlanes& p, int n) {
  const StationRange r = e.range(p);
  std::vector<double> x;
  for (int i = 1; i <= n; ++i) x.push_back(r.lo + (r.hi - r.lo) * (i - 0.37) / n);
  return x;
}

}  // namespace

TEST_CASE("sections match CGAL's slicer at Mach planes", "[section][cgal]") {
  const std::vector<Mesh> meshes{
      make_sphere({0.3, -0.2, 0.1}, 1.3, 12, 20),
      rotate_about_x(make_body_of_revolution({0, 1, 3, 6, 7}, {0, 0.6, 0.8, 0.5, 0.3}, 17), 11),
      make_torus(2.0, 1.5, 0.4, 24, 12),  // annular sections at normal cuts: nested loops
      rotate_about_x(make_box({0, -1, -0.5}, {5, 1, 0.5}), 23)};
  for (const Mesh& mesh : meshes)
    for (const MachPlanes planes : {MachPlanes{1.0, 0.0}, MachPlanes{1.4, 0.0},
                                    MachPlanes{2.0, 37.0}, MachPlanes{1.2, 210.0}}) {
      const SectionEngine engine(mesh);
      compare(mesh, planes, inner_stations(engine, planes, 7));
    }
}

TEST_CASE("sections through a vertex match CGAL's slicer", "[section][cgal]") {
  // A plane through a vertex (not along an edge or face): the section is continuous there, so
  // the engine's upstream limit equals the section itself.
  const Mesh mesh = rotate_about_x(make_body_of_revolution({0, 1, 3, 6}, {0, 0.6, 0.8, 0.4}, 13), 7);
  for (const MachPlanes planes : {MachPlanes{1.5, 30.0}, MachPlanes{1.8, 101.0}}) {
    std::vector<double> x;
    for (std::size_t v : {5u, 17u, 20u}) x.push_back(station_of(mesh.positions[v], planes));
    compare(mesh, planes, x);
  }
}
