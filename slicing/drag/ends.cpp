#include "machcut/drag/ends.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <set>

#include "machcut/common/errors.h"
#include "machcut/common/shell_names.h"

namespace machcut {

namespace {

// Indices of the triangles whose unit normal is ±x (sign) within 1e-9; their total area.
std::vector<std::size_t> flat_faces(const Mesh& m, int sign, double* area) {
  std::vector<std::size_t> out;
  *area = 0.0;
  for (std::size_t f = 0; f < m.triangles.size(); ++f) {
    const Tri& t = m.triangles[f];
    const Vec3 n = cross(m.positions[t[1]] - m.positions[t[0]], m.positions[t[2]] - m.positions[t[0]]);
    const double len = norm(n);
    if (len > 0.0 && sign * n.x / len > 1.0 - 1e-9) {
      out.push_back(f);
      *area += 0.5 * len;
    }
  }
  return out;
}

}  // namespace

double far_station(const Mesh& mesh) {
  const Box3 b = bounding_box(mesh);
  double r = 0.0;
  for (const Vec3& p : mesh.positions) r = std::max(r, std::hypot(p.y, p.z));
  return b.hi.x + 40.0 * r + (b.hi.x - b.lo.x);
}

Tubes flat_face_tubes(const Mesh& mesh, int sign, double x_far) {
  Tubes out;
  const std::vector<std::size_t> faces = flat_faces(mesh, sign, &out.face_area);
  out.faces = static_cast<int>(faces.size());
  if (faces.empty()) return out;
  Mesh& m = out.mesh;
  std::map<std::uint32_t, std::uint32_t> front;  // source vertex → (front, back = front + 1)
  auto vid = [&](std::uint32_t v) {
    auto [it, fresh] = front.try_emplace(v, static_cast<std::uint32_t>(m.positions.size()));
    if (fresh) {
      m.positions.push_back(mesh.positions[v]);
      m.positions.push_back({x_far, mesh.positions[v].y, mesh.positions[v].z});
    }
    return it->second;
  };
  std::set<std::pair<std::uint32_t, std::uint32_t>> edges;  // directed edges of the faces
  for (std::size_t f : faces) {
    const Tri& t = mesh.triangles[f];
    for (int k = 0; k < 3; ++k) edges.insert({t[k], t[(k + 1) % 3]});
    const std::uint32_t a = vid(t[0]), b = vid(t[1]), c = vid(t[2]);
    m.triangles.push_back({a, c, b});              // front cap, reversed
    m.triangles.push_back({a + 1, b + 1, c + 1});  // back cap at x_far
  }
  // Walls along the boundary (edges not shared with an opposite edge of another face).
  for (const auto& [p, q] : edges) {
    if (edges.count({q, p})) continue;
    const std::uint32_t a = vid(p), b = vid(q);
    m.triangles.push_back({a, b, b + 1});
    m.triangles.push_back({a, b + 1, a + 1});
  }
  // Orientation: outward for wakes (+x faces), inward for captures (−x faces): the
  // construction gives exactly that (derivation in the header's terms: a +x face's prism is
  // outward, a −x face's the mirror image); checked by the sign of the volume.
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {sign > 0 ? "wake" : "capture"};
  const double v = signed_volume(m);
  if ((sign > 0) != (v > 0))
    for (Tri& t : m.triangles) std::swap(t[1], t[2]);
  return out;
}

std::vector<std::uint32_t> capture_shells(const Mesh& mesh, const std::string& name,
                                          std::set<std::uint32_t>& taken) {
  std::vector<std::uint32_t> out;
  for (std::uint32_t s = 0; s < mesh.shell_names.size(); ++s) {
    const std::string& sn = mesh.shell_names[s];
    if (!shell_selected(sn, name)) continue;
    if (!taken.insert(s).second)
      throw InputError("--capture", sn + " is named by more than one --capture");
    out.push_back(s);
  }
  if (out.empty()) throw InputError("--capture", "no shell, part or file named '" + name + "' in the model");
  return out;
}

}  // namespace machcut
