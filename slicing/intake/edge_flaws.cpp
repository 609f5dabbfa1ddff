#include "machcut/intake/edge_flaws.h"

#include <algorithm>

#include "edge_table.h"

namespace machcut {

EdgeFlaws find_edge_flaws(const Mesh& mesh) {
  EdgeFlaws out;
  if (mesh.triangles.empty()) return out;
  const detail::EdgeTable t = detail::build_edge_table(mesh);
  for (std::size_t e = 0; e < t.edge_count(); ++e) {
    const std::uint32_t uses = t.uses(e);
    if (uses == 2) continue;
    const std::uint32_t h = t.half[t.offsets[e]];
    const std::uint32_t a = detail::he_from(mesh, h), b = detail::he_to(mesh, h);
    const std::array<std::uint32_t, 2> edge{std::min(a, b), std::max(a, b)};
    (uses == 1 ? out.boundary : out.nonmanifold).push_back(edge);
  }
  return out;
}

std::vector<std::array<std::uint32_t, 2>> hole_edges(
    const std::vector<std::vector<std::uint32_t>>& loops) {
  std::vector<std::array<std::uint32_t, 2>> out;
  for (const auto& loop : loops)
    for (std::size_t i = 0; i < loop.size() && loop.size() >= 2; ++i) {
      const std::uint32_t a = loop[i], b = loop[(i + 1) % loop.size()];
      out.push_back({std::min(a, b), std::max(a, b)});
    }
  return out;
}

}  // namespace machcut
