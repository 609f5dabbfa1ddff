// Overlap tests and the union of overlapping shells with CGAL Polygon_mesh_processing
// (The CGAL Project, CGAL User and Reference Manual, "Polygon Mesh Processing":
// do_intersect, Side_of_triangle_mesh, does_self_intersect, corefine_and_compute_union).
// The only CGAL translation unit of the union; CGAL types never leave this file.
#include <CGAL/Exact_predicates_inexact_constructions_kernel.h>
#include <CGAL/alpha_wrap_3.h>
#include <CGAL/Polygon_mesh_processing/orientation.h>
#include <CGAL/Polygon_mesh_processing/corefinement.h>
#include <CGAL/Polygon_mesh_processing/intersection.h>
#include <CGAL/Polygon_mesh_processing/self_intersections.h>
#include <CGAL/Polygon_mesh_processing/shape_predicates.h>
#include <CGAL/Side_of_triangle_mesh.h>
#include <CGAL/Surface_mesh.h>

#include <chrono>
#include <map>
#include <memory>
#include <numeric>
#include <optional>

#include "machcut/intake/union.h"

namespace machcut {

namespace {

namespace PMP = CGAL::Polygon_mesh_processing;
using K = CGAL::Exact_predicates_inexact_constructions_kernel;
using SM = CGAL::Surface_mesh<K::Point_3>;

// Triangle indices per shell, one pass (counting sort by shell id).
std::vector<std::vector<std::uint32_t>> triangles_by_shell(const Mesh& mesh) {
  std::vector<std::vector<std::uint32_t>> by(shell_count(mesh));
  for (std::uint32_t i = 0; i < mesh.triangles.size(); ++i) by[mesh.shell[i]].push_back(i);
  return by;
}

std::vector<Box3> shell_boxes(const Mesh& mesh) {
  std::vector<Box3> b(shell_count(mesh));
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i)
    for (std::uint32_t v : mesh.triangles[i]) expand(b[mesh.shell[i]], mesh.positions[v]);
  return b;
}

bool boxes_overlap(const Box3& a, const Box3& b) {
  return !is_empty(a) && !is_empty(b) && a.lo.x <= b.hi.x && b.lo.x <= a.hi.x &&
         a.lo.y <= b.hi.y && b.lo.y <= a.hi.y && a.lo.z <= b.hi.z && b.lo.z <= a.hi.z;
}

// A CGAL surface mesh of the given triangles; nullopt when they do not form a manifold
// surface CGAL can hold (add_face refuses non-manifold edges and vertices).
// The surface mesh of triangles `tris` of `mesh`. Sized before it is filled and indexed by a
// flat table (4 bytes a vertex of `mesh`), not a map: on a 5M-triangle shell the map took
// 120 MB and the growing property arrays up to 90 MB of slack (heaptrack, issue 13).
std::optional<SM> to_surface_mesh(const Mesh& mesh, const std::vector<std::uint32_t>& tris) {
  SM sm;
  std::vector<SM::Vertex_index> vmap(mesh.positions.size(), SM::null_vertex());
  std::size_t vertices = 0;
  for (std::uint32_t t : tris)
    for (std::uint32_t v : mesh.triangles[t])
      if (vmap[v] == SM::null_vertex()) {
        vmap[v] = SM::Vertex_index(0);  // counted; numbered below
        ++vertices;
      }
  std::fill(vmap.begin(), vmap.end(), SM::null_vertex());
  sm.reserve(static_cast<SM::size_type>(vertices), static_cast<SM::size_type>(3 * tris.size() / 2 + 1),
             static_cast<SM::size_type>(tris.size()));
  auto vertex = [&](std::uint32_t v) {
    if (vmap[v] == SM::null_vertex()) {
      const Vec3 p = mesh.positions[v];
      vmap[v] = sm.add_vertex(K::Point_3(p.x, p.y, p.z));
    }
    return vmap[v];
  };
  for (std::uint32_t t : tris) {
    const Tri& tri = mesh.triangles[t];
    if (sm.add_face(vertex(tri[0]), vertex(tri[1]), vertex(tri[2])) == SM::null_face())
      return std::nullopt;
  }
  return sm;
}

// Surface meshes built on first use and kept (a shell may be in several pairs).
class ShellMeshes {
 public:
  explicit ShellMeshes(const Mesh& mesh) : mesh_(mesh), tris_(triangles_by_shell(mesh)) {
    cache_.resize(tris_.size());
    tried_.assign(tris_.size(), false);
  }
  const SM* get(std::uint32_t s) {
    if (!tried_[s]) {
      tried_[s] = true;
      if (auto sm = to_surface_mesh(mesh_, tris_[s])) cache_[s] = std::make_unique<SM>(std::move(*sm));
    }
    return cache_[s].get();
  }
  const std::vector<std::uint32_t>& triangles(std::uint32_t s) const { return tris_[s]; }

 private:
  const Mesh& mesh_;
  std::vector<std::vector<std::uint32_t>> tris_;
  std::vector<std::unique_ptr<SM>> cache_;
  std::vector<bool> tried_;
};

// Whether any vertex of `inner` lies strictly inside the closed mesh `outer`.
bool inside(const SM& inner, const SM& outer) {
  if (inner.number_of_vertices() == 0) return false;
  CGAL::Side_of_triangle_mesh<SM, K> side(outer);
  return side(inner.point(*inner.vertices().begin())) == CGAL::ON_BOUNDED_SIDE;
}

void test_pair(ShellMeshes& meshes, const std::vector<bool>& closed, std::uint32_t a,
               std::uint32_t b, OverlapReport& r) {
  const SM* ma = meshes.get(a);
  const SM* mb = meshes.get(b);
  if (!ma || !mb) return;
  ++r.pairs_tested;
  if (PMP::do_intersect(*ma, *mb)) {
    r.intersecting.push_back({a, b});
    return;
  }
  if (!closed[a] || !closed[b]) return;
  if (inside(*ma, *mb)) r.contained.push_back({a, b});
  else if (inside(*mb, *ma)) r.contained.push_back({b, a});
}

// Union–find over shells joined by overlap pairs; groups of two or more, in shell order.
std::vector<std::vector<std::uint32_t>> overlap_groups(std::size_t n, const OverlapReport& o) {
  std::vector<std::uint32_t> parent(n);
  std::iota(parent.begin(), parent.end(), 0u);
  auto find = [&](std::uint32_t x) {
    while (parent[x] != x) x = parent[x] = parent[parent[x]];
    return x;
  };
  auto join = [&](const ShellPair& p) { parent[find(p.a)] = find(p.b); };
  for (const ShellPair& p : o.intersecting) join(p);
  for (const ShellPair& p : o.contained) join(p);
  std::map<std::uint32_t, std::vector<std::uint32_t>> by_root;
  for (std::uint32_t s = 0; s < n; ++s) by_root[find(s)].push_back(s);
  std::vector<std::vector<std::uint32_t>> groups;
  for (auto& [root, members] : by_root)
    if (members.size() > 1) groups.push_back(std::move(members));
  std::sort(groups.begin(), groups.end());
  return groups;
}

std::string group_name(const Mesh& mesh, const std::vector<std::uint32_t>& g) {
  std::string name;
  for (std::uint32_t s : g) name += (name.empty() ? "" : " + ") + mesh.shell_names[s];
  return name;
}

// Why a group cannot be united ("" when it can); records self-intersecting shells.
std::string group_problem(const Mesh& mesh, ShellMeshes& meshes, const std::vector<bool>& closed,
                          const std::vector<std::uint32_t>& g, UnionResult& r) {
  for (std::uint32_t s : g) {
    if (!closed[s]) return mesh.shell_names[s] + " is open (a union needs closed shells)";
    const SM* sm = meshes.get(s);
    if (!sm) return mesh.shell_names[s] + " is not a manifold surface";
    for (SM::Face_index f : sm->faces())
      if (PMP::is_degenerate_triangle_face(f, *sm))
        return mesh.shell_names[s] + " has degenerate (zero-area) triangles";
    if (PMP::does_self_intersect(*sm)) {
      r.self_intersecting.push_back(s);
      return mesh.shell_names[s] + " intersects itself (a union needs a clean surface)";
    }
  }
  return "";
}

// The union of the group's shells, or an error message.
std::optional<SM> unite_group(ShellMeshes& meshes, const std::vector<std::uint32_t>& g,
                              std::string& why) {
  SM acc = *meshes.get(g[0]);
  for (std::size_t i = 1; i < g.size(); ++i) {
    SM next = *meshes.get(g[i]);
    SM out;
    bool ok = false;
    try {
      ok = PMP::corefine_and_compute_union(acc, next, out);
    } catch (const std::exception& e) {
      why = std::string("CGAL failed: ") + e.what();
      return std::nullopt;
    }
    if (!ok || !CGAL::is_closed(out)) {
      why = "CGAL could not build a closed manifold union";
      return std::nullopt;
    }
    acc = std::move(out);
  }
  return acc;
}

void append_surface_mesh(const SM& sm, std::uint32_t shell, Mesh& out) {
  std::map<SM::Vertex_index, std::uint32_t> index;
  for (SM::Vertex_index v : sm.vertices()) {
    index[v] = static_cast<std::uint32_t>(out.positions.size());
    const K::Point_3& p = sm.point(v);
    out.positions.push_back({p.x(), p.y(), p.z()});
  }
  for (SM::Face_index f : sm.faces()) {
    Tri t{};
    int k = 0;
    for (SM::Vertex_index v : CGAL::vertices_around_face(sm.halfedge(f), sm))
      if (k < 3) t[k++] = index[v];
    out.triangles.push_back(t);
    out.shell.push_back(shell);
  }
}

// Copies the triangles of shell s into `out` as shell `shell` (vertices shared by index).
void append_shell(const Mesh& mesh, const std::vector<std::uint32_t>& tris, std::uint32_t shell,
                  std::vector<std::int64_t>& remap, Mesh& out) {
  for (std::uint32_t t : tris) {
    Tri nt{};
    for (int k = 0; k < 3; ++k) {
      const std::uint32_t v = mesh.triangles[t][k];
      if (remap[v] < 0) {
        remap[v] = static_cast<std::int64_t>(out.positions.size());
        out.positions.push_back(mesh.positions[v]);
      }
      nt[k] = static_cast<std::uint32_t>(remap[v]);
    }
    out.triangles.push_back(nt);
    out.shell.push_back(shell);
  }
}

}  // namespace

OverlapReport find_overlaps(const Mesh& mesh, const std::vector<bool>& closed) {
  OverlapReport r;
  const std::size_t n = shell_count(mesh);
  r.pairs_total = n * (n - (n > 0 ? 1 : 0)) / 2;
  const std::vector<Box3> boxes = shell_boxes(mesh);
  ShellMeshes meshes(mesh);
  for (std::uint32_t a = 0; a < n; ++a)
    for (std::uint32_t b = a + 1; b < n; ++b)
      if (boxes_overlap(boxes[a], boxes[b])) test_pair(meshes, closed, a, b, r);
  for (std::uint32_t s = 0; s < n; ++s) {
    bool used = false;
    for (std::uint32_t b = 0; b < n && !used; ++b)
      used = b != s && boxes_overlap(boxes[s], boxes[b]);
    if (used && !meshes.get(s)) r.untested.push_back(s);
  }
  return r;
}

UnionResult unite_overlapping(const Mesh& mesh, const std::vector<bool>& closed,
                              const OverlapReport& overlaps) {
  const auto t0 = std::chrono::steady_clock::now();
  UnionResult r;
  const std::size_t n = shell_count(mesh);
  ShellMeshes meshes(mesh);
  std::vector<std::int64_t> united_into(n, -1);  // group index per shell
  std::vector<std::optional<SM>> results;
  for (const auto& g : overlap_groups(n, overlaps)) {
    std::string why = group_problem(mesh, meshes, closed, g, r);
    std::optional<SM> u;
    if (why.empty()) u = unite_group(meshes, g, why);
    if (!u) {
      r.refused.push_back(group_name(mesh, g) + " not united: " + why);
      continue;
    }
    for (std::uint32_t s : g) {
      united_into[s] = static_cast<std::int64_t>(results.size());
      r.triangles_in += meshes.triangles(s).size();
    }
    r.groups.push_back(g);
    results.push_back(std::move(u));
  }
  std::vector<std::int64_t> remap(mesh.positions.size(), -1);
  std::vector<bool> emitted(results.size(), false);
  for (std::uint32_t s = 0; s < n; ++s) {
    const auto shell = static_cast<std::uint32_t>(r.mesh.shell_names.size());
    if (united_into[s] < 0) {
      r.mesh.shell_names.push_back(mesh.shell_names[s]);
      append_shell(mesh, meshes.triangles(s), shell, remap, r.mesh);
    } else if (!emitted[united_into[s]]) {
      const auto gi = static_cast<std::size_t>(united_into[s]);
      emitted[gi] = true;
      r.mesh.shell_names.push_back(group_name(mesh, r.groups[gi]));
      append_surface_mesh(*results[gi], shell, r.mesh);
    }
  }
  r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return r;
}

Mesh alpha_wrap_shell(const Mesh& mesh, std::uint32_t shell, double alpha, double offset) {
  std::vector<K::Point_3> points;
  std::vector<std::array<std::size_t, 3>> faces;
  std::map<std::uint32_t, std::size_t> index;
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    if (mesh.shell[i] != shell) continue;
    std::array<std::size_t, 3> f{};
    for (int c = 0; c < 3; ++c) {
      const std::uint32_t v = mesh.triangles[i][c];
      auto [it, fresh] = index.try_emplace(v, points.size());
      if (fresh) points.emplace_back(mesh.positions[v].x, mesh.positions[v].y, mesh.positions[v].z);
      f[c] = it->second;
    }
    faces.push_back(f);
  }
  Mesh out;
  if (faces.empty() || !(alpha > 0.0) || !(offset > 0.0)) return out;
  SM wrap;
  try {
    CGAL::alpha_wrap_3(points, faces, alpha, offset, wrap);
  } catch (const std::exception&) {
    return out;
  }
  if (wrap.is_empty() || !CGAL::is_closed(wrap)) return out;
  if (!PMP::is_outward_oriented(wrap)) PMP::reverse_face_orientations(wrap);
  std::map<SM::Vertex_index, std::uint32_t> vid;
  for (SM::Vertex_index v : wrap.vertices()) {
    vid[v] = static_cast<std::uint32_t>(out.positions.size());
    const K::Point_3& p = wrap.point(v);
    out.positions.push_back({p.x(), p.y(), p.z()});
  }
  for (SM::Face_index f : wrap.faces()) {
    Tri t{};
    int c = 0;
    for (SM::Vertex_index v : CGAL::vertices_around_face(wrap.halfedge(f), wrap)) {
      if (c < 3) t[c] = vid[v];
      ++c;
    }
    if (c != 3) continue;
    out.triangles.push_back(t);
    out.shell.push_back(0);
  }
  out.shell_names = {mesh.shell_names[shell]};
  return out;
}

}  // namespace machcut
