// The steps of prepare_model (model.h) that are useful on their own: closing holes with an
// error bound, and preparing a mesh already in memory (tests, the viewer's generated bodies).
#pragma once

#include <string>
#include <vector>
#include <utility>

#include "machcut/intake/model.h"

namespace machcut {

struct HoleClosing {
  std::vector<Hole> holes;            // one per boundary loop, in the order found
  bool ok = true;                     // false: the boundary is not a set of simple loops
  std::string reason;                 // why not ok (names the shell); mesh left unchanged
  std::size_t added_triangles = 0;
  // per_shell only: the shells whose boundary cannot be closed by fans, with why; their
  // holes are left open (the other shells' are closed).
  std::vector<std::pair<std::uint32_t, std::string>> unclosable;
};

// Closes every boundary loop of `mesh` (edges with one triangle) with a fan of triangles from a
// new vertex at the loop's vertex centroid, oriented to agree with the loop's triangles, in the
// loop's shell. Each Hole gets its loop (in the patch's orientation) and projected_area = the
// sum of |area projected on the y–z plane| of its fan triangles, m². Refuses (ok = false, mesh
// unchanged) when a boundary vertex starts or ends more than one boundary edge (loops touching
// or a non-manifold boundary) or a loop does not close (inconsistent orientation).
// per_shell: such shells are listed in `unclosable` instead and the other shells' holes
// closed (ok stays true). Call after fix_orientation. O(F + V).
HoleClosing close_holes(Mesh& mesh, bool per_shell = false);

// The stations [lo, hi] at which the Mach planes meet the hole's patch (its loop vertices
// bound it: station_of is affine and the centroid is inside their hull).
StationRange hole_station_range(const Mesh& mesh, const Hole& hole, const MachPlanes& planes);

// Holes are "too large to bound" when their projected areas add up to more than this fraction
// of the model's largest normal (M = 1) section. 0.25 admits a missing base or nozzle cap
// (typically well under a quarter of the largest section of an aircraft, from memory) and small
// export gaps, and refuses sheets, half shells and open-ended tubes whose result would be
// dominated by the guess.
inline constexpr double kMaxHoleAreaFraction = 0.25;

// Largest projected section area at M = 1 of a closed mesh, m², sampled at `stations` uniform
// stations (enough for a threshold: near a smooth maximum the sampling error is second order).
// 0 for an empty mesh.
double largest_normal_section(const Mesh& mesh, int stations = 257);

// "" when the holes are small against the largest section of `closed_mesh` (the mesh with the
// holes closed); otherwise the reason, with both areas.
std::string holes_too_large(const Mesh& closed_mesh, const std::vector<Hole>& holes);

// prepare_model without the import: health, orientation fix, holes, overlaps and union of a
// mesh in memory. `files` are recorded in the result; `import_warnings` are passed through.
PreparedModel prepare_mesh(Mesh mesh, const ModelSetup& setup,
                           std::vector<std::string> files = {},
                           std::vector<std::string> import_warnings = {});

}  // namespace machcut
