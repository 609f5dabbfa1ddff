// Self-intersection test of closed shells on machcut's own triangle arrays (a triangle soup
// with shared vertex indices), with CGAL's box intersection and exact predicates.
//
// The rules are those of CGAL's PMP::does_self_intersect (The CGAL Project, CGAL 5.5 User and
// Reference Manual, "Polygon Mesh Processing", self_intersections.h:
// internal::do_faces_intersect), applied to vertex indices instead of half-edges:
//   - a degenerate (collinear) triangle counts as a self-intersection;
//   - two triangles sharing an edge intersect only when they fold onto each other (coplanar,
//     their third vertices on the same side of the edge);
//   - two triangles sharing one vertex intersect when an edge opposite the shared vertex meets
//     the other triangle;
//   - otherwise the triangle–triangle test.
// Candidate pairs come from CGAL's box_self_intersection_d (Kettner, Meyer, Zomorodian,
// "Intersecting Sequences of dD Iso-oriented Boxes", CGAL 5.5 User and Reference Manual).
//
// Why not PMP::does_self_intersect on a Surface_mesh, as before: on a 5M-triangle shell the
// Surface_mesh took about 270 MB and CGAL's boxes (Box_with_info_d of doubles with a face
// handle, plus two vectors of pointers) about 360 MB on top of the 140 MB welded mesh; `drag`
// then peaked at 863 MB (maximum resident set, GNU time), 3.45× the 250 MB binary STL
// (issue 13). Here a box is 28 bytes (float bounds rounded outward, a triangle index), CGAL
// sorts 8-byte pointers to them, and no mesh copy is made: on the same body the test takes
// about 9 s instead of 16 s, and reading the file and testing it peak at 398 MB resident
// instead of 850 MB. CGAL 5.5 has no self-intersection test for triangle soups, so the glue is
// ours.
//
// Surface_mesh::add_face also refused shells that are not manifold; that check is made here on
// the arrays (see nonmanifold_shells). It does not depend on the order of the triangles, which
// add_face did: two closed sheets meeting at one vertex were refused in most orders but
// accepted in a few (2 of 200 random orders of two boxes sharing a corner).
#include <CGAL/Exact_predicates_inexact_constructions_kernel.h>
#include <CGAL/box_intersection_d.h>
#include <CGAL/intersections.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

#include "machcut/intake/union.h"

namespace machcut {

namespace {

using K = CGAL::Exact_predicates_inexact_constructions_kernel;

// The triangles of each shell in one array (counting sort by shell id): shell s owns
// order[offsets[s] .. offsets[s + 1]). 4 bytes a triangle, unlike a vector per shell.
struct ByShell {
  std::vector<std::uint32_t> offsets;
  std::vector<std::uint32_t> order;
};

ByShell triangles_by_shell(const Mesh& mesh, const std::vector<char>& wanted) {
  ByShell b;
  b.offsets.assign(wanted.size() + 1, 0);
  for (std::uint32_t s : mesh.shell)
    if (wanted[s]) ++b.offsets[s + 1];
  std::partial_sum(b.offsets.begin(), b.offsets.end(), b.offsets.begin());
  b.order.resize(b.offsets.back());
  std::vector<std::uint32_t> next(b.offsets.begin(), b.offsets.end() - 1);
  for (std::uint32_t t = 0; t < mesh.triangles.size(); ++t)
    if (wanted[mesh.shell[t]]) b.order[next[mesh.shell[t]]++] = t;
  return b;
}

// Shells CGAL's Surface_mesh could not hold, found from the arrays: a triangle that uses a
// vertex twice, a directed edge used by two triangles (two triangles of the same orientation
// on one edge, or more than two on it), or a vertex whose triangles in the shell form more than
// one fan (sheets meeting at a point). Per vertex, the fan is the graph joining, for every
// triangle (v, a, b), its link vertices a and b: one fan is one connected component.
// Memory: a vertex → corner table, 4 bytes a vertex and 12 a triangle, freed on return.
std::vector<char> nonmanifold_shells(const Mesh& mesh, const std::vector<char>& wanted) {
  std::vector<char> bad(wanted.size(), 0);
  std::vector<std::uint32_t> first(mesh.positions.size() + 1, 0);
  for (std::uint32_t t = 0; t < mesh.triangles.size(); ++t) {
    if (!wanted[mesh.shell[t]]) continue;
    const Tri& tri = mesh.triangles[t];
    if (tri[0] == tri[1] || tri[1] == tri[2] || tri[2] == tri[0]) bad[mesh.shell[t]] = 1;
    for (std::uint32_t v : tri) ++first[v + 1];
  }
  std::partial_sum(first.begin(), first.end(), first.begin());
  std::vector<std::uint32_t> corner(first.back());  // 3·t + c, grouped by vertex
  {
    std::vector<std::uint32_t> next(first.begin(), first.end() - 1);
    for (std::uint32_t t = 0; t < mesh.triangles.size(); ++t)
      if (wanted[mesh.shell[t]])
        for (std::uint32_t c = 0; c < 3; ++c) corner[next[mesh.triangles[t][c]]++] = 3 * t + c;
  }
  struct Link {
    std::uint32_t shell, out, in;  // triangle (v, out, in) of `shell`
  };
  std::vector<Link> links;
  std::vector<std::uint32_t> ends, parent;
  for (std::size_t v = 0; v + 1 < first.size(); ++v) {
    links.clear();
    for (std::uint32_t k = first[v]; k < first[v + 1]; ++k) {
      const std::uint32_t t = corner[k] / 3, c = corner[k] % 3;
      const Tri& tri = mesh.triangles[t];
      links.push_back({mesh.shell[t], tri[(c + 1) % 3], tri[(c + 2) % 3]});
    }
    std::sort(links.begin(), links.end(),
              [](const Link& a, const Link& b) { return a.shell < b.shell; });
    for (std::size_t i = 0; i < links.size();) {  // one group per shell at this vertex
      std::size_t j = i;
      while (j < links.size() && links[j].shell == links[i].shell) ++j;
      const std::uint32_t s = links[i].shell;
      // Directed edges v → out, and in → v: each at most once.
      ends.clear();
      for (std::size_t k = i; k < j; ++k) ends.push_back(links[k].out);
      std::sort(ends.begin(), ends.end());
      bool twice = std::adjacent_find(ends.begin(), ends.end()) != ends.end();
      ends.clear();
      for (std::size_t k = i; k < j; ++k) ends.push_back(links[k].in);
      std::sort(ends.begin(), ends.end());
      twice = twice || std::adjacent_find(ends.begin(), ends.end()) != ends.end();
      // Fans: union–find over the link vertices (numbered by their rank among `ends`, which
      // holds every link vertex once all out-ends are added).
      for (std::size_t k = i; k < j; ++k) ends.push_back(links[k].out);
      std::sort(ends.begin(), ends.end());
      ends.erase(std::unique(ends.begin(), ends.end()), ends.end());
      parent.resize(ends.size());
      std::iota(parent.begin(), parent.end(), 0u);
      auto find = [&](std::uint32_t x) {
        while (parent[x] != x) x = parent[x] = parent[parent[x]];
        return x;
      };
      auto rank = [&](std::uint32_t w) {
        return static_cast<std::uint32_t>(std::lower_bound(ends.begin(), ends.end(), w) - ends.begin());
      };
      std::size_t fans = ends.size();
      for (std::size_t k = i; k < j; ++k) {
        const std::uint32_t a = find(rank(links[k].out)), b = find(rank(links[k].in));
        if (a != b) {
          parent[a] = b;
          --fans;
        }
      }
      if (twice || fans > 1) bad[s] = 1;
      i = j;
    }
  }
  return bad;
}

// A triangle's bounding box in floats rounded outward, so that it contains the triangle's
// box in doubles: every pair of triangles whose double boxes meet is reported by CGAL, plus
// perhaps a few more, which the exact tests then reject. Bounds are kept inside CGAL's
// sentinels (±FLT_MAX); clamping keeps boxes that meet meeting. 28 bytes.
struct TriBox {
  using NT = float;
  using ID = std::size_t;
  float lo[3], hi[3];
  std::uint32_t tri;
  static int dimension() { return 3; }
  float min_coord(int d) const { return lo[d]; }
  float max_coord(int d) const { return hi[d]; }
  std::size_t id() const { return tri; }
};

constexpr float kBig = 3.0e38f;  // below FLT_MAX, CGAL's sentinel

float below(double x) {
  float f = static_cast<float>(std::clamp(x, -double(kBig), double(kBig)));
  if (double(f) > x) f = std::nextafter(f, -kBig);
  return f;
}
float above(double x) {
  float f = static_cast<float>(std::clamp(x, -double(kBig), double(kBig)));
  if (double(f) < x) f = std::nextafter(f, kBig);
  return f;
}

K::Point_3 point(const Mesh& m, std::uint32_t v) {
  const Vec3& p = m.positions[v];
  return {p.x, p.y, p.z};
}

// CGAL's internal::do_faces_intersect (self_intersections.h, CGAL 5.5) on vertex indices.
bool faces_intersect(const Mesh& m, const Tri& a, const Tri& b) {
  int shared = 0, ia = -1, ib = -1;
  for (int i = 0; i < 3; ++i)
    for (int j = 0; j < 3; ++j)
      if (a[i] == b[j]) {
        ++shared;
        if (ia < 0) {
          ia = i;
          ib = j;
        }
      }
  if (shared >= 2) {
    // Shared edge p–q (the first two vertices of a that b has too); r and s the other vertices
    // of a and of b. With three shared vertices (the two faces of a closed two-triangle shell)
    // r = s: the faces fold onto each other, as CGAL finds too.
    auto in_b = [&](std::uint32_t v) { return v == b[0] || v == b[1] || v == b[2]; };
    std::uint32_t e[2] = {0, 0}, r = 0, s = 0;
    int n = 0;
    for (int i = 0; i < 3; ++i) {
      if (in_b(a[i]) && n < 2) e[n++] = a[i];
      else r = a[i];
    }
    for (int j = 0; j < 3; ++j)
      if (b[j] != e[0] && b[j] != e[1]) s = b[j];
    const K::Point_3 P = point(m, e[0]), Q = point(m, e[1]), R = point(m, r), S = point(m, s);
    return CGAL::coplanar(P, Q, R, S) && CGAL::coplanar_orientation(P, Q, R, S) == CGAL::POSITIVE;
  }
  const K::Triangle_3 ta(point(m, a[0]), point(m, a[1]), point(m, a[2]));
  const K::Triangle_3 tb(point(m, b[0]), point(m, b[1]), point(m, b[2]));
  if (shared == 1) {
    const K::Segment_3 sa(point(m, a[(ia + 1) % 3]), point(m, a[(ia + 2) % 3]));
    const K::Segment_3 sb(point(m, b[(ib + 1) % 3]), point(m, b[(ib + 2) % 3]));
    return CGAL::do_intersect(ta, sb) || CGAL::do_intersect(tb, sa);
  }
  return CGAL::do_intersect(ta, tb);
}

struct Found {};  // thrown by the callback at the first intersecting pair

// Whether the triangles `tris` of `mesh` (a manifold shell) intersect themselves.
bool shell_self_intersects(const Mesh& mesh, const std::uint32_t* tris, std::size_t n) {
  for (std::size_t k = 0; k < n; ++k) {
    const Tri& t = mesh.triangles[tris[k]];
    if (CGAL::collinear(point(mesh, t[0]), point(mesh, t[1]), point(mesh, t[2]))) return true;
  }
  std::vector<TriBox> boxes(n);
  for (std::size_t k = 0; k < n; ++k) {
    const Tri& t = mesh.triangles[tris[k]];
    TriBox& b = boxes[k];
    b.tri = tris[k];
    for (int d = 0; d < 3; ++d) {
      double lo = HUGE_VAL, hi = -HUGE_VAL;
      for (std::uint32_t v : t) {
        const Vec3& p = mesh.positions[v];
        const double x = d == 0 ? p.x : d == 1 ? p.y : p.z;
        lo = std::fmin(lo, x);
        hi = std::fmax(hi, x);
      }
      b.lo[d] = below(lo);
      b.hi[d] = above(hi);
    }
  }
  // Pointers, so that CGAL's working copy of the range is 8 bytes a box.
  std::vector<const TriBox*> ptr(n);
  for (std::size_t k = 0; k < n; ++k) ptr[k] = &boxes[k];
  auto callback = [&](const TriBox* a, const TriBox* b) {
    if (faces_intersect(mesh, mesh.triangles[a->tri], mesh.triangles[b->tri])) throw Found{};
  };
  try {
    // cutoff 2000 as in CGAL's self_intersections_impl; closed boxes (touching counts).
    CGAL::box_self_intersection_d<CGAL::Sequential_tag>(ptr.begin(), ptr.end(), callback,
                                                        std::ptrdiff_t(2000));
  } catch (const Found&) {
    return true;
  }
  return false;
}

}  // namespace

std::vector<std::uint32_t> self_intersecting_shells(const Mesh& mesh, const std::vector<bool>& closed,
                                                    std::vector<std::uint32_t>* not_manifold) {
  const std::size_t n = shell_count(mesh);
  std::vector<char> wanted(n, 0);
  for (std::size_t s = 0; s < n && s < closed.size(); ++s) wanted[s] = closed[s];
  const std::vector<char> bad = nonmanifold_shells(mesh, wanted);
  for (std::size_t s = 0; s < n; ++s) wanted[s] = wanted[s] && !bad[s];
  const ByShell by = triangles_by_shell(mesh, wanted);
  std::vector<std::uint32_t> out;
  for (std::uint32_t s = 0; s < n; ++s) {
    const std::uint32_t count = by.offsets[s + 1] - by.offsets[s];
    if (bad[s]) {
      if (not_manifold) not_manifold->push_back(s);
    } else if (count > 0 && shell_self_intersects(mesh, by.order.data() + by.offsets[s], count)) {
      out.push_back(s);
    }
  }
  return out;
}

}  // namespace machcut
