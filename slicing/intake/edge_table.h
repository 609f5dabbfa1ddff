// Private to the core: undirected edges of a triangle mesh with the half-edges that use them.
#pragma once

#include <cstdint>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut::detail {

// Half-edge h = 3·t + c runs from triangles[t][c] to triangles[t][(c + 1) % 3].
inline std::uint32_t he_from(const Mesh& m, std::uint32_t h) { return m.triangles[h / 3][h % 3]; }
inline std::uint32_t he_to(const Mesh& m, std::uint32_t h) {
  return m.triangles[h / 3][(h % 3 + 1) % 3];
}

// Edge e owns the half-edges half[offsets[e] .. offsets[e + 1]); edge_of[h] is h's edge.
struct EdgeTable {
  std::vector<std::uint32_t> offsets;
  std::vector<std::uint32_t> half;
  std::vector<std::uint32_t> edge_of;
  std::size_t edge_count() const { return offsets.empty() ? 0 : offsets.size() - 1; }
  std::uint32_t uses(std::size_t e) const { return offsets[e + 1] - offsets[e]; }
};

// O(F + V): half-edges bucketed by their lower vertex (counting sort), then grouped by the
// upper vertex inside each small bucket. No hashing, deterministic order.
EdgeTable build_edge_table(const Mesh& mesh);

}  // namespace machcut::detail
