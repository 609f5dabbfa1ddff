// The triangle mesh every stage shares: plain data, SI units (m), model axes after mapping
// (x along the flow from nose to tail, y to starboard, z up).
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <vector>

#include "machcut/common/geometry.h"

namespace machcut {

using Tri = std::array<std::uint32_t, 3>;

struct Mesh {
  std::vector<Vec3> positions;          // #V welded vertex positions, m
  std::vector<Tri> triangles;           // #F vertex indices, counter-clockwise seen from outside
  std::vector<std::uint32_t> shell;     // #F shell id per triangle, 0 .. shell_names.size()-1
  std::vector<std::string> shell_names; // one per shell, e.g. "wing.obj#1"
};

inline std::size_t shell_count(const Mesh& m) { return m.shell_names.size(); }

// Bounding box of the referenced vertices.
Box3 bounding_box(const Mesh& mesh);

// Signed volume (m³) of all triangles (divergence theorem); positive for closed meshes with
// outward normals. When `shell_id` >= 0 only that shell's triangles count.
double signed_volume(const Mesh& mesh, long shell_id = -1);

// Signed volume (m³) of every shell, indexed by shell id (divergence theorem, as above).
std::vector<double> shell_volumes(const Mesh& mesh);

// Total triangle area (m²), the wetted area of a closed model.
double surface_area(const Mesh& mesh, long shell_id = -1);

// The triangles of one shell as a mesh of their own (vertices compacted, one shell).
Mesh extract_shell(const Mesh& mesh, std::uint32_t shell_id);

// Concatenate meshes; shells keep their names and are renumbered.
Mesh concatenate(const std::vector<Mesh>& parts);

}  // namespace machcut
