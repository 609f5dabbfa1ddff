// Where a mesh is open or non-manifold, edge by edge: the boundary edges (one triangle) and the
// non-manifold edges (three or more triangles) as vertex pairs, for front ends that draw them
// on the model. health.h counts the same edges (and samples a few midpoints); this lists all.
#pragma once

#include <array>
#include <cstdint>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut {

struct EdgeFlaws {
  std::vector<std::array<std::uint32_t, 2>> boundary;     // edges used by one triangle
  std::vector<std::array<std::uint32_t, 2>> nonmanifold;  // edges used by three or more
};

// The flawed edges of `mesh` (vertex indices into mesh.positions, lower index first), in a
// deterministic order. Counts equal check_health's boundary_edges and nonmanifold_edges for
// the same mesh. A closed manifold mesh or an empty one gives empty lists. O(F + V).
EdgeFlaws find_edge_flaws(const Mesh& mesh);

// The edges of the closed holes' loops (model.h: Hole::loop), as vertex pairs into the mesh the
// holes were closed in: the boundary the file had before the analysis closed it.
std::vector<std::array<std::uint32_t, 2>> hole_edges(
    const std::vector<std::vector<std::uint32_t>>& loops);

}  // namespace machcut
