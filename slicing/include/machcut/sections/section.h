// The Mach-plane section engine: exact projected section areas of a closed, oriented mesh.
//
// Cutting planes (supersonic area rule, Jones, NACA Report 1284, 1956; normal planes at M = 1
// for the transonic area rule, Whitcomb, NACA Report 1273, 1956):
//     f(p) = p.x − β (p.y cos θ + p.z sin θ) = X,   β = √(M² − 1),
// θ the roll angle. X, where the plane crosses the line y = z = 0, is the station.
// The area reported is the section projected on a plane normal to the flow (= cut area / M).
//
// Exactness: the area is the shoelace sum, in the (y, z) projection, of the segments in which
// the plane crosses each triangle, oriented by the triangle's outward normal (no loop
// assembly). A vertex with f(v) == X is treated as lying downstream of the plane (symbolic
// perturbation), so planes through vertices, along edges and coplanar with faces give the
// limit of the area as the plane approaches from upstream: S(X) = lim S(X − ε). Crossing
// points are computed per edge from its lower-indexed vertex, so the two triangles sharing an
// edge produce bitwise-identical points and the loops close exactly.
#pragma once

#include <array>
#include <cstddef>
#include <functional>
#include <span>
#include <vector>

#include "machcut/sections/area_curve.h"
#include "machcut/common/mesh.h"

namespace machcut {

// Parameters of one family of Mach planes. Mach >= 1 (asserted); M = 1 gives normal planes.
struct MachPlanes {
  double mach = 1.0;
  double roll_deg = 0.0;
};

// f(p): the station of the Mach plane through p.
double station_of(const Vec3& p, const MachPlanes& planes);

// The range of stations [lo, hi] over which the planes meet the mesh (m).
struct StationRange {
  double lo = 0.0;
  double hi = 0.0;
};

enum class Spacing {
  uniform,  // n stations evenly from lo to hi, both ends included
  cosine,   // end-clustered: x = lo + (hi − lo)(1 − cos(π i/(n − 1)))/2
};

// n >= 2 stations over `range` (both ends included).
std::vector<double> make_stations(const StationRange& range, int n, Spacing spacing);

// One section: segments of the cut (not assembled into loops) and its areas.
struct Section {
  MachPlanes planes;
  double station = 0.0;      // X, m
  double area = 0.0;         // projected on a plane normal to the flow, m²
  double cut_area = 0.0;     // true area in the cutting plane (= area · M), m²
  std::vector<std::array<Vec3, 2>> segments;  // oriented: outside on the right, seen from +x
  std::vector<std::uint32_t> segment_shell;   // shell of each segment
  Box3 bounds;               // of the segments, m
};

// In-plane coordinates (true shape, m) of a point p on the plane at `station`, origin where the
// plane crosses y = z = 0: u along e_u = (β, cos θ, sin θ)/M, v along e_v = (0, −sin θ, cos θ).
// At M = 1 and θ = 0, (u, v) = (y, z).
std::array<double, 2> plane_coordinates(const Vec3& p, const MachPlanes& planes, double station);

// Precomputes the mesh once, then answers any number of Mach/roll/station queries.
// A class because the precomputation (vertex array, shell table) is reused across queries.
// Thread-safe for concurrent const calls.
class SectionEngine {
 public:
  // The mesh should be closed and consistently oriented outward (see health.h); a copy is kept.
  // With section checks on (section_checks_enabled), a mesh whose every edge is used by one
  // triangle each way and whose every shell encloses a positive volume is marked, and areas()
  // throws std::logic_error when such a mesh gives an area below −1e-9 × (box diagonal)²: the
  // triage (model.h) let through a mesh that is not what its health report says.
  explicit SectionEngine(Mesh mesh);

  const Mesh& mesh() const { return mesh_; }

  StationRange range(const MachPlanes& planes) const;

  // Projected areas (m²) at `stations` (any order, any values; outside the model: 0).
  // When `per_shell` is non-null it is resized to shell_count × stations.size() and filled
  // with each shell's own area.
  std::vector<double> areas(const MachPlanes& planes, std::span<const double> stations,
                            std::vector<std::vector<double>>* per_shell = nullptr) const;

  // Area curve at the given stations (parameters recorded in the result).
  AreaCurve curve(const MachPlanes& planes, std::vector<double> stations,
                  bool with_per_shell = false) const;

  // Areas for several roll angles at once, run in parallel over the roll angles (TBB).
  // stations_for_roll(i) gives the stations for roll i. Result [roll][station].
  std::vector<std::vector<double>> areas_for_rolls(
      double mach, std::span<const double> rolls_deg,
      const std::function<std::vector<double>(const StationRange&)>& stations_for_range) const;

  // The full section at one station, with its segments.
  Section section(const MachPlanes& planes, double station) const;

 private:
  Mesh mesh_;
  bool closed_positive_ = false;  // set only with section checks on
  double area_tolerance_ = 0.0;   // m²
};

// The invariant checks of SectionEngine: on in debug builds (no NDEBUG) and wherever the
// environment has MACHCUT_CHECK_SECTIONS=1 (the test programs set it for themselves and for
// the CLI they run); off otherwise (they cost an edge table per engine).
bool section_checks_enabled();

}  // namespace machcut
