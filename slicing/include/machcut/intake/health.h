// Mesh health: what is wrong with a model before it is analysed (open edges, non-manifold
// edges, degenerate and flipped triangles, inverted shells, overlaps), and the one repair that
// is unambiguous — making the orientation consistent and outward. No CGAL here (see union.h).
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "machcut/common/geometry.h"
#include "machcut/common/mesh.h"

namespace machcut {

// Counts for one shell (an edge-connected component as imported).
struct ShellHealth {
  std::string name;
  std::size_t triangles = 0;
  double volume = 0.0;                  // signed, m³, after the orientation fix
  bool closed = false;                  // every edge has exactly two triangles
  bool oriented = true;                 // every two-triangle edge is used in opposite directions
  std::size_t boundary_edges = 0;       // edges with one triangle
  std::size_t nonmanifold_edges = 0;    // edges with three or more triangles
  std::size_t degenerate_triangles = 0; // zero area (to rounding, see kDegenerateRelArea)
  std::size_t flipped_faces = 0;        // triangles turned to agree with their neighbours
  bool inverted = false;                // the whole shell was inside out and has been turned
};

// Two shells by index into HealthReport::shells. For `contained`, `a` lies inside `b`.
struct ShellPair {
  std::uint32_t a = 0;
  std::uint32_t b = 0;
};

struct HealthReport {
  std::vector<ShellHealth> shells;
  std::size_t triangles = 0;
  std::size_t vertices = 0;             // referenced by triangles
  bool closed = false;                  // every shell closed
  std::size_t boundary_edges = 0;
  std::vector<Vec3> boundary_samples;   // midpoints of up to kSampleCount boundary edges, m
  std::size_t nonmanifold_edges = 0;
  std::vector<Vec3> nonmanifold_samples;// midpoints of up to kSampleCount such edges, m
  std::size_t degenerate_triangles = 0;
  Box3 bounds;                          // m
  double length = 0.0;                  // x extent (along the flow), m
  double wetted_area = 0.0;             // m² (of the union once united)
  double volume = 0.0;                  // m³: of the union when `volume_is_union`, else the sum
  bool volume_is_union = false;         // true: overlaps checked and none, or shells united
  // Filled by the overlap check (union.h); empty until then.
  bool overlaps_checked = false;
  std::vector<ShellPair> intersecting;  // surfaces cross or touch
  std::vector<ShellPair> contained;     // a inside b, surfaces apart
  std::vector<std::uint32_t> self_intersecting;  // shells whose surface crosses itself
};

inline constexpr std::size_t kSampleCount = 5;
// A triangle is degenerate when its area is below this fraction of its longest edge squared
// (a needle or a cap thinner than ~1e-12 of its size: its normal is rounding noise).
inline constexpr double kDegenerateRelArea = 1e-12;

// What fix_orientation did, per shell (same indexing as Mesh::shell_names).
struct OrientationFix {
  std::vector<std::size_t> flipped_faces;
  std::vector<bool> inverted;
  std::vector<bool> non_orientable;  // neighbour orientations conflict (Möbius-like): left as is
  std::vector<std::string> actions;  // one readable line per shell changed or left alone
};

// Makes the orientation consistent and outward, in place, where that is unambiguous:
//  1. per component connected through manifold (two-triangle) edges, a breadth-first walk
//     turns triangles to agree with their neighbours, keeping the majority orientation;
//  2. a closed shell with negative volume is turned inside out. Open shells are not turned
//     (their volume sign depends on the missing surface): close holes first, then call again.
// Shells whose neighbour constraints conflict are left unchanged and marked non_orientable.
// Cost O(F). An empty mesh gives empty vectors.
OrientationFix fix_orientation(Mesh& mesh);

// Adds the results of earlier fixes into `into` (per shell sums / ors; actions appended).
void merge_fix(OrientationFix& into, const OrientationFix& more);

// The health report of `mesh` (the overlap fields stay empty; see union.h). When `fix` is given,
// its flipped/inverted counts go into the shells. Cost O(F + V), no CGAL.
HealthReport check_health(const Mesh& mesh, const OrientationFix* fix = nullptr);

}  // namespace machcut
