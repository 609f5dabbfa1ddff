// What the GL module uploads: float positions, triangles grouped by shell, and a simplified
// level of detail for fast orbiting. Built on the worker thread (GL-free).
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

#include "machcut/common/geometry.h"
#include "machcut/common/mesh.h"

namespace machcut::view {

struct IndexRange {
  std::uint32_t first = 0;  // first index (3 per triangle)
  std::uint32_t count = 0;  // number of indices
};

struct DisplayMesh {
  std::vector<float> positions;          // 3 per vertex, m
  std::vector<std::uint32_t> indices;    // 3 per triangle, grouped by shell
  std::vector<IndexRange> shells;        // per shell, into `indices`
  std::vector<std::uint32_t> lod_indices;  // simplified; empty when the mesh is small
  std::vector<IndexRange> lod_shells;
  Box3 box;
};

// Groups the triangles by shell and, when the mesh has more than 2 × lod_triangles triangles,
// builds a simplified copy of about lod_triangles triangles (meshoptimizer's sloppy simplifier,
// per shell in proportion to its size).
DisplayMesh make_display_mesh(const Mesh& mesh, std::size_t lod_triangles);

}  // namespace machcut::view
