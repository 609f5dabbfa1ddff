#include "machcut/common/mesh.h"

#include <unordered_map>

namespace machcut {

Box3 bounding_box(const Mesh& mesh) {
  Box3 box;
  for (const Tri& t : mesh.triangles)
    for (std::uint32_t v : t) expand(box, mesh.positions[v]);
  return box;
}

double signed_volume(const Mesh& mesh, long shell_id) {
  // Divergence theorem: V = Σ (a · (b × c)) / 6 over outward-oriented triangles.
  double v = 0.0;
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    if (shell_id >= 0 && mesh.shell[i] != static_cast<std::uint32_t>(shell_id)) continue;
    const Tri& t = mesh.triangles[i];
    v += dot(mesh.positions[t[0]], cross(mesh.positions[t[1]], mesh.positions[t[2]]));
  }
  return v / 6.0;
}

std::vector<double> shell_volumes(const Mesh& mesh) {
  std::vector<double> v(shell_count(mesh), 0.0);
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    const Tri& t = mesh.triangles[i];
    v[mesh.shell[i]] +=
        dot(mesh.positions[t[0]], cross(mesh.positions[t[1]], mesh.positions[t[2]])) / 6.0;
  }
  return v;
}

double surface_area(const Mesh& mesh, long shell_id) {
  double a = 0.0;
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    if (shell_id >= 0 && mesh.shell[i] != static_cast<std::uint32_t>(shell_id)) continue;
    const Tri& t = mesh.triangles[i];
    const Vec3 p = mesh.positions[t[0]];
    a += 0.5 * norm(cross(mesh.positions[t[1]] - p, mesh.positions[t[2]] - p));
  }
  return a;
}

Mesh extract_shell(const Mesh& mesh, std::uint32_t shell_id) {
  Mesh out;
  out.shell_names.push_back(shell_id < mesh.shell_names.size() ? mesh.shell_names[shell_id] : "");
  std::unordered_map<std::uint32_t, std::uint32_t> remap;
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    if (mesh.shell[i] != shell_id) continue;
    Tri t{};
    for (int k = 0; k < 3; ++k) {
      auto [it, fresh] = remap.try_emplace(mesh.triangles[i][k],
                                           static_cast<std::uint32_t>(out.positions.size()));
      if (fresh) out.positions.push_back(mesh.positions[mesh.triangles[i][k]]);
      t[k] = it->second;
    }
    out.triangles.push_back(t);
    out.shell.push_back(0);
  }
  return out;
}

Mesh concatenate(const std::vector<Mesh>& parts) {
  Mesh out;
  for (const Mesh& m : parts) {
    const auto vbase = static_cast<std::uint32_t>(out.positions.size());
    const auto sbase = static_cast<std::uint32_t>(out.shell_names.size());
    out.positions.insert(out.positions.end(), m.positions.begin(), m.positions.end());
    for (const Tri& t : m.triangles) out.triangles.push_back({t[0] + vbase, t[1] + vbase, t[2] + vbase});
    for (std::uint32_t s : m.shell) out.shell.push_back(s + sbase);
    out.shell_names.insert(out.shell_names.end(), m.shell_names.begin(), m.shell_names.end());
  }
  return out;
}

}  // namespace machcut
