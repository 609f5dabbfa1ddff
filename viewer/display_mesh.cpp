#include "display_mesh.h"

#include <meshoptimizer.h>

#include <algorithm>

namespace machcut::view {

namespace {

// Triangle indices of each shell, in shell order.
std::vector<std::vector<std::uint32_t>> split_by_shell(const Mesh& mesh) {
  const std::size_t shells = std::max<std::size_t>(shell_count(mesh), 1);
  std::vector<std::vector<std::uint32_t>> out(shells);
  for (std::size_t t = 0; t < mesh.triangles.size(); ++t) {
    const std::size_t s = t < mesh.shell.size() ? std::min<std::size_t>(mesh.shell[t], shells - 1) : 0;
    out[s].insert(out[s].end(), mesh.triangles[t].begin(), mesh.triangles[t].end());
  }
  return out;
}

void append(std::vector<std::uint32_t>& all, std::vector<IndexRange>& ranges,
            const std::vector<std::uint32_t>& part) {
  ranges.push_back({static_cast<std::uint32_t>(all.size()), static_cast<std::uint32_t>(part.size())});
  all.insert(all.end(), part.begin(), part.end());
}

}  // namespace

DisplayMesh make_display_mesh(const Mesh& mesh, std::size_t lod_triangles) {
  DisplayMesh d;
  d.box = bounding_box(mesh);
  d.positions.reserve(mesh.positions.size() * 3);
  for (const Vec3& p : mesh.positions) {
    d.positions.push_back(static_cast<float>(p.x));
    d.positions.push_back(static_cast<float>(p.y));
    d.positions.push_back(static_cast<float>(p.z));
  }
  const auto parts = split_by_shell(mesh);
  for (const auto& part : parts) append(d.indices, d.shells, part);
  const std::size_t total = mesh.triangles.size();
  if (lod_triangles == 0 || total <= 2 * lod_triangles) return d;
  const double keep = static_cast<double>(lod_triangles) / static_cast<double>(total);
  std::vector<std::uint32_t> out;
  for (const auto& part : parts) {
    // Small shells are kept whole so that thin parts do not vanish while orbiting.
    const std::size_t tris = part.size() / 3;
    const std::size_t target = std::max<std::size_t>(std::size_t(keep * tris), std::min<std::size_t>(tris, 200));
    if (target >= tris) {
      append(d.lod_indices, d.lod_shells, part);
      continue;
    }
    out.resize(part.size());
    const std::size_t n = meshopt_simplifySloppy(out.data(), part.data(), part.size(), d.positions.data(),
                                                 mesh.positions.size(), 3 * sizeof(float), target * 3,
                                                 1.0f, nullptr);  // error bound off: reach the count
    out.resize(n);
    append(d.lod_indices, d.lod_shells, n > 0 ? out : part);
  }
  return d;
}

}  // namespace machcut::view
