#include "machcut/intake/health.h"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <utility>

#include "edge_table.h"

namespace machcut {

namespace detail {

EdgeTable build_edge_table(const Mesh& mesh) {
  const auto nh = static_cast<std::uint32_t>(3 * mesh.triangles.size());
  const std::size_t nv = mesh.positions.size();
  // Counting sort of the half-edges by lower vertex; each entry packs (upper vertex, h) so the
  // small per-vertex sorts compare plain integers without going back to the triangles.
  std::vector<std::uint32_t> start(nv + 1, 0);
  for (const Tri& t : mesh.triangles)
    for (int c = 0; c < 3; ++c) ++start[std::min(t[c], t[(c + 1) % 3]) + 1];
  for (std::size_t v = 0; v < nv; ++v) start[v + 1] += start[v];
  std::vector<std::uint64_t> keyed(nh);
  {
    std::vector<std::uint32_t> fill(start.begin(), start.end() - 1);
    for (std::uint32_t h = 0; h < nh; ++h) {
      const std::uint32_t a = he_from(mesh, h), b = he_to(mesh, h);
      keyed[fill[std::min(a, b)]++] = (std::uint64_t{std::max(a, b)} << 32) | h;
    }
  }
  EdgeTable t;
  t.half.resize(nh);
  t.edge_of.resize(nh);
  t.offsets.reserve(nh / 2 + 2);
  for (std::size_t v = 0; v < nv; ++v) {
    std::sort(keyed.begin() + start[v], keyed.begin() + start[v + 1]);
    for (std::uint32_t i = start[v]; i < start[v + 1]; ++i) {
      if (i == start[v] || (keyed[i] >> 32) != (keyed[i - 1] >> 32))
        t.offsets.push_back(i);
      const auto h = static_cast<std::uint32_t>(keyed[i]);
      t.half[i] = h;
      t.edge_of[h] = static_cast<std::uint32_t>(t.offsets.size() - 1);
    }
  }
  t.offsets.push_back(nh);
  return t;
}

}  // namespace detail

namespace {

using detail::EdgeTable;
using detail::he_from;

// Breadth-first walk over manifold edges from `seed`: flip[t] says whether t must be turned to
// agree with the seed. Returns false on a conflict (the component is not orientable).
bool walk_component(const Mesh& m, const EdgeTable& et, std::uint32_t seed,
                    std::vector<std::int8_t>& flip, std::vector<std::uint32_t>& comp) {
  bool ok = true;
  comp.assign(1, seed);
  flip[seed] = 0;
  for (std::size_t i = 0; i < comp.size(); ++i) {
    const std::uint32_t t = comp[i];
    for (std::uint32_t c = 0; c < 3; ++c) {
      const std::uint32_t h = 3 * t + c, e = et.edge_of[h];
      if (et.uses(e) != 2) continue;
      const std::uint32_t a = et.half[et.offsets[e]], b = et.half[et.offsets[e] + 1];
      const std::uint32_t g = a == h ? b : a;
      const std::uint32_t u = g / 3;
      if (u == t) continue;
      // Neighbours agree when they run along the shared edge in opposite directions.
      const std::int8_t want = static_cast<std::int8_t>(
          flip[t] ^ (he_from(m, h) == he_from(m, g) ? 1 : 0));
      if (flip[u] < 0) {
        flip[u] = want;
        comp.push_back(u);
      } else if (flip[u] != want) {
        ok = false;
      }
    }
  }
  return ok;
}

void turn(Tri& t) { std::swap(t[1], t[2]); }

OrientationFix empty_fix(std::size_t shells) {
  OrientationFix f;
  f.flipped_faces.assign(shells, 0);
  f.inverted.assign(shells, false);
  f.non_orientable.assign(shells, false);
  return f;
}

// Step 1 of fix_orientation: consistent orientation per manifold-connected component.
// Turning triangles changes no undirected edge, but it does renumber half-edges, so `et` is
// only valid for the mesh as it was before this call (callers use it for closedness only).
void make_consistent(Mesh& mesh, const EdgeTable& et, OrientationFix& fix) {
  const std::size_t nf = mesh.triangles.size();
  std::vector<std::int8_t> flip(nf, -1);
  std::vector<std::uint32_t> comp;
  for (std::uint32_t s = 0; s < nf; ++s) {
    if (flip[s] >= 0) continue;
    const bool ok = walk_component(mesh, et, s, flip, comp);
    const std::uint32_t shell = mesh.shell[s];
    if (!ok) {
      fix.non_orientable[shell] = true;
      continue;
    }
    std::size_t turned = 0;
    for (std::uint32_t t : comp) turned += static_cast<std::size_t>(flip[t]);
    const bool keep_seed = 2 * turned <= comp.size();  // keep the majority orientation
    for (std::uint32_t t : comp)
      if ((flip[t] == 1) == keep_seed) {
        turn(mesh.triangles[t]);
        ++fix.flipped_faces[mesh.shell[t]];
      }
  }
}

// Per shell: closed (every edge exactly two uses) — from the edge table.
std::vector<bool> closed_shells(const Mesh& mesh, const EdgeTable& et) {
  std::vector<bool> closed(shell_count(mesh), true);
  for (std::size_t e = 0; e < et.edge_count(); ++e)
    if (et.uses(e) != 2) closed[mesh.shell[et.half[et.offsets[e]] / 3]] = false;
  return closed;
}

// Step 2: closed, orientable shells with negative volume are turned inside out.
// `et`: the edge table of the mesh before step 1 (closedness does not depend on orientation).
void turn_inverted(Mesh& mesh, const EdgeTable& et, OrientationFix& fix) {
  const std::vector<bool> closed = closed_shells(mesh, et);
  const std::vector<double> vol = shell_volumes(mesh);
  for (std::size_t s = 0; s < vol.size(); ++s)
    fix.inverted[s] = closed[s] && !fix.non_orientable[s] && vol[s] < 0.0;
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i)
    if (fix.inverted[mesh.shell[i]]) turn(mesh.triangles[i]);
}

void describe_fix(const Mesh& mesh, OrientationFix& fix) {
  for (std::size_t s = 0; s < shell_count(mesh); ++s) {
    const std::string& n = mesh.shell_names[s];
    if (fix.non_orientable[s])
      fix.actions.push_back(n + ": orientation conflicts between neighbours (non-orientable); "
                                "left as is");
    if (fix.flipped_faces[s] > 0)
      fix.actions.push_back(n + ": " + std::to_string(fix.flipped_faces[s]) +
                            " triangle(s) turned to agree with their neighbours");
    if (fix.inverted[s]) fix.actions.push_back(n + ": shell was inside out; turned");
  }
}

bool degenerate(const Mesh& m, const Tri& t) {
  const Vec3 a = m.positions[t[0]], b = m.positions[t[1]], c = m.positions[t[2]];
  const double l2 = std::max({dot(b - a, b - a), dot(c - b, c - b), dot(a - c, a - c)});
  return l2 == 0.0 || 0.5 * norm(cross(b - a, c - a)) <= kDegenerateRelArea * l2;
}

// Edge counts per shell and samples for the whole model.
void count_edges(const Mesh& mesh, const EdgeTable& et, HealthReport& r) {
  for (std::size_t e = 0; e < et.edge_count(); ++e) {
    const std::uint32_t n = et.uses(e), h = et.half[et.offsets[e]];
    ShellHealth& sh = r.shells[mesh.shell[h / 3]];
    const Vec3 mid = 0.5 * (mesh.positions[he_from(mesh, h)] + mesh.positions[detail::he_to(mesh, h)]);
    if (n == 1) {
      ++sh.boundary_edges;
      if (r.boundary_samples.size() < kSampleCount) r.boundary_samples.push_back(mid);
    } else if (n > 2) {
      ++sh.nonmanifold_edges;
      if (r.nonmanifold_samples.size() < kSampleCount) r.nonmanifold_samples.push_back(mid);
    } else if (he_from(mesh, h) == he_from(mesh, et.half[et.offsets[e] + 1])) {
      sh.oriented = false;
    }
  }
}

}  // namespace

OrientationFix fix_orientation(Mesh& mesh) {
  OrientationFix fix = empty_fix(shell_count(mesh));
  if (mesh.triangles.empty()) return fix;
  const EdgeTable et = detail::build_edge_table(mesh);
  make_consistent(mesh, et, fix);
  turn_inverted(mesh, et, fix);
  describe_fix(mesh, fix);
  return fix;
}

void merge_fix(OrientationFix& into, const OrientationFix& more) {
  if (into.flipped_faces.size() < more.flipped_faces.size()) {
    into.flipped_faces.resize(more.flipped_faces.size(), 0);
    into.inverted.resize(more.inverted.size(), false);
    into.non_orientable.resize(more.non_orientable.size(), false);
  }
  for (std::size_t s = 0; s < more.flipped_faces.size(); ++s) {
    into.flipped_faces[s] += more.flipped_faces[s];
    into.inverted[s] = into.inverted[s] != more.inverted[s];  // turned twice = not turned
    into.non_orientable[s] = into.non_orientable[s] || more.non_orientable[s];
  }
  into.actions.insert(into.actions.end(), more.actions.begin(), more.actions.end());
}

HealthReport check_health(const Mesh& mesh, const OrientationFix* fix) {
  HealthReport r;
  r.shells.resize(shell_count(mesh));
  const std::vector<double> vol = shell_volumes(mesh);
  for (std::size_t s = 0; s < r.shells.size(); ++s) {
    r.shells[s].name = mesh.shell_names[s];
    r.shells[s].volume = vol[s];
    if (fix && s < fix->flipped_faces.size()) {
      r.shells[s].flipped_faces = fix->flipped_faces[s];
      r.shells[s].inverted = fix->inverted[s];
    }
  }
  std::vector<char> used(mesh.positions.size(), 0);
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    ShellHealth& sh = r.shells[mesh.shell[i]];
    ++sh.triangles;
    if (degenerate(mesh, mesh.triangles[i])) ++sh.degenerate_triangles;
    for (std::uint32_t v : mesh.triangles[i]) used[v] = 1;
  }
  count_edges(mesh, detail::build_edge_table(mesh), r);
  r.closed = !r.shells.empty();
  for (ShellHealth& sh : r.shells) {
    sh.closed = sh.boundary_edges == 0 && sh.nonmanifold_edges == 0 && sh.triangles > 0;
    r.closed = r.closed && sh.closed;
    r.boundary_edges += sh.boundary_edges;
    r.nonmanifold_edges += sh.nonmanifold_edges;
    r.degenerate_triangles += sh.degenerate_triangles;
    r.volume += sh.volume;
  }
  r.triangles = mesh.triangles.size();
  r.vertices = static_cast<std::size_t>(std::count(used.begin(), used.end(), 1));
  r.bounds = bounding_box(mesh);
  r.length = is_empty(r.bounds) ? 0.0 : r.bounds.hi.x - r.bounds.lo.x;
  r.wetted_area = surface_area(mesh);
  return r;
}

}  // namespace machcut
