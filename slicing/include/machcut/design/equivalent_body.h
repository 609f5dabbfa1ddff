// The equivalent body of revolution of the area rule: r(x) = √(S(x)/π), with S the normal-cut
// area curve at M = 1 (Whitcomb, NACA Report 1273, 1956) or the roll-averaged Mach-plane area
// curve at M > 1 (Jones, NACA Report 1284, 1956), for export to other analysis.
#pragma once

#include <string>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut {

class WaveDragModel;

struct EquivalentBody {
  double mach = 1.0;
  int rolls = 1;              // roll angles averaged (1 at M = 1)
  std::vector<double> x;      // stations, m (where the planes cross y = z = 0)
  std::vector<double> area;   // roll-averaged projected area, m² (may be < 0 after capture)
  std::vector<double> radius; // √(max(area, 0)/π), m
};

// The body at `mach` with `stations` uniform stations (>= 2) over the union of the station
// ranges of all rolls; S̄(X) = (1/2π)∮ S(X; θ) dθ by the midpoint rule over `rolls` uniform
// angles (areas, unlike drag, are bounded in θ, so the plain rule converges). Captured stream
// tubes of the model are subtracted as in its drag.
EquivalentBody equivalent_body(const WaveDragModel& model, double mach, int stations, int rolls);

// CSV of several bodies: header "mach,x_m,area_m2,radius_m", one row per station.
std::string equivalent_body_csv(const std::vector<EquivalentBody>& bodies);

// A closed, outward-oriented triangle mesh of the body: rings of `segments` vertices at each
// station (radius 0 collapses a ring to a point on the axis), flat caps where an end radius is
// not zero. The polygonal rings are scaled so each ring encloses the area π r² exactly.
Mesh equivalent_body_mesh(const EquivalentBody& body, int segments = 64);

// The mesh as ASCII STL or as OBJ text (positions as given); `comment` is the OBJ's first line.
std::string mesh_to_stl(const Mesh& mesh, const std::string& solid_name);
std::string mesh_to_obj(const Mesh& mesh, const std::string& comment);

}  // namespace machcut
