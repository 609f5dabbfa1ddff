// Closing the holes of open meshes, with a bound of the area error they cause.
#include <algorithm>
#include <cmath>
#include <limits>

#include "edge_table.h"
#include "machcut/intake/holes.h"

namespace machcut {

namespace {

using detail::he_from;
using detail::he_to;

constexpr std::uint32_t kNone = std::numeric_limits<std::uint32_t>::max();

// Boundary half-edges (their edge has one triangle), and per vertex the one that starts there.
struct Boundary {
  std::vector<std::uint32_t> half;
  std::vector<std::uint32_t> out;  // per vertex: boundary half-edge starting there, or kNone
  std::string problem;
  std::vector<std::pair<std::uint32_t, std::string>> bad;  // per shell (per_shell mode)
};

Boundary find_boundary(const Mesh& mesh, bool per_shell) {
  const detail::EdgeTable et = detail::build_edge_table(mesh);
  Boundary b;
  b.out.assign(mesh.positions.size(), kNone);
  std::vector<std::uint8_t> ends(mesh.positions.size(), 0);
  std::vector<char> bad(mesh.shell_names.size(), 0);
  for (std::size_t e = 0; e < et.edge_count(); ++e) {
    if (et.uses(e) != 1) continue;
    const std::uint32_t h = et.half[et.offsets[e]];
    const std::uint32_t a = he_from(mesh, h), z = he_to(mesh, h);
    if (b.out[a] != kNone || ends[z] != 0) {
      const Vec3 p = mesh.positions[b.out[a] != kNone ? a : z];
      const std::uint32_t s = mesh.shell[h / 3];
      const std::string why = "the open boundary is not a set of simple loops (boundary edges meet at "
                              "the vertex (" + std::to_string(p.x) + ", " + std::to_string(p.y) + ", " +
                              std::to_string(p.z) + ") m)";
      if (!per_shell) {
        b.problem = mesh.shell_names[s] + ": " + why;
        return b;
      }
      if (!bad[s]) b.bad.push_back({s, why});
      bad[s] = 1;
      continue;
    }
    b.out[a] = h;
    ends[z] = 1;
    b.half.push_back(h);
  }
  if (per_shell)  // the boundary edges of a bad shell are not traced
    std::erase_if(b.half, [&](std::uint32_t h) { return bad[mesh.shell[h / 3]] != 0; });
  return b;
}

// Follows boundary half-edges from h0 until it returns; the vertices in boundary order, or an
// empty vector when the chain breaks (orientation inconsistent along the boundary).
std::vector<std::uint32_t> trace_loop(const Mesh& mesh, const Boundary& b, std::uint32_t h0,
                                      std::vector<char>& seen) {
  std::vector<std::uint32_t> loop;
  std::uint32_t h = h0;
  do {
    if (h == kNone || seen[h]) return {};
    seen[h] = 1;
    loop.push_back(he_from(mesh, h));
    h = b.out[he_to(mesh, h)];
  } while (h != h0);
  return loop;
}

// Fan from the centroid. Why a fan: it is O(n), deterministic and needs no search (ear
// clipping is O(n²), the minimum-area triangulation of Liepa, 2003, "Filling holes in meshes",
// O(n³)); a fan of a non-planar or non-convex loop may fold, but the section engine's signed
// sum stays exact for the patched surface, and whatever the true missing surface is, its
// difference from the fan is what Hole::projected_area bounds.
Hole fan_fill(Mesh& mesh, const std::vector<std::uint32_t>& boundary_order, std::uint32_t shell) {
  Hole hole;
  hole.shell = shell;
  hole.loop.assign(boundary_order.rbegin(), boundary_order.rend());  // patch orientation
  Vec3 c;
  for (std::uint32_t v : hole.loop) c = c + mesh.positions[v];
  c = (1.0 / static_cast<double>(hole.loop.size())) * c;
  const auto ci = static_cast<std::uint32_t>(mesh.positions.size());
  mesh.positions.push_back(c);
  const std::size_t n = hole.loop.size();
  for (std::size_t i = 0; i < n; ++i) {
    const std::uint32_t u = hole.loop[i], v = hole.loop[(i + 1) % n];
    mesh.triangles.push_back({u, v, ci});
    mesh.shell.push_back(shell);
    const Vec3 w = cross(mesh.positions[v] - mesh.positions[u], c - mesh.positions[u]);
    hole.projected_area += 0.5 * std::fabs(w.x);  // area on the y–z plane
  }
  return hole;
}

}  // namespace

HoleClosing close_holes(Mesh& mesh, bool per_shell) {
  HoleClosing r;
  const Boundary b = find_boundary(mesh, per_shell);
  if (!b.problem.empty()) return {{}, false, b.problem, 0, {}};
  r.unclosable = b.bad;
  std::vector<std::vector<std::uint32_t>> loops;
  std::vector<std::uint32_t> shells;
  std::vector<char> seen(3 * mesh.triangles.size(), 0);
  std::vector<char> refused(mesh.shell_names.size(), 0);
  for (const auto& u : r.unclosable) refused[u.first] = 1;
  for (std::uint32_t h : b.half) {
    if (seen[h] || refused[mesh.shell[h / 3]]) continue;
    std::vector<std::uint32_t> loop = trace_loop(mesh, b, h, seen);
    const std::uint32_t s = mesh.shell[h / 3];
    if (loop.size() < 3) {
      const std::string why = "an open boundary does not form a closed loop (inconsistent orientation)";
      if (!per_shell) return {{}, false, mesh.shell_names[s] + ": " + why, 0, {}};
      r.unclosable.push_back({s, why});
      refused[s] = 1;
      continue;
    }
    loops.push_back(std::move(loop));
    shells.push_back(s);
  }
  const std::size_t before = mesh.triangles.size();
  for (std::size_t i = 0; i < loops.size(); ++i)
    if (!refused[shells[i]]) r.holes.push_back(fan_fill(mesh, loops[i], shells[i]));
  r.added_triangles = mesh.triangles.size() - before;
  return r;
}

StationRange hole_station_range(const Mesh& mesh, const Hole& hole, const MachPlanes& planes) {
  StationRange r{HUGE_VAL, -HUGE_VAL};
  for (std::uint32_t v : hole.loop) {
    const double s = station_of(mesh.positions[v], planes);
    r.lo = std::min(r.lo, s);
    r.hi = std::max(r.hi, s);
  }
  return r;
}

double largest_normal_section(const Mesh& mesh, int stations) {
  if (mesh.triangles.empty()) return 0.0;
  const SectionEngine engine(mesh);
  const MachPlanes normal{1.0, 0.0};
  const std::vector<double> x = make_stations(engine.range(normal), stations, Spacing::uniform);
  const std::vector<double> a = engine.areas(normal, x);
  return *std::max_element(a.begin(), a.end());
}

std::string holes_too_large(const Mesh& closed_mesh, const std::vector<Hole>& holes) {
  double total = 0.0;
  for (const Hole& h : holes) total += h.projected_area;
  if (total == 0.0) return "";
  const double largest = largest_normal_section(closed_mesh);
  if (total <= kMaxHoleAreaFraction * largest) return "";
  return "too broken to bound: the holes' projected area (" + std::to_string(total) +
         " m²) is more than " + std::to_string(static_cast<int>(kMaxHoleAreaFraction * 100)) +
         "% of the largest section (" + std::to_string(largest) + " m²)";
}

}  // namespace machcut
