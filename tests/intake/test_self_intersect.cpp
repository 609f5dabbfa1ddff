// Tests of the self-intersection test of closed shells on the triangle arrays
// (slicing/intake/self_intersect_cgal.cpp, self_intersecting_shells in union.h).
#include <catch2/catch.hpp>

#include <CGAL/Exact_predicates_inexact_constructions_kernel.h>
#include <CGAL/Polygon_mesh_processing/self_intersections.h>
#include <CGAL/Surface_mesh.h>

#include <cmath>
#include <optional>
#include <random>

#include "machcut/intake/union.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;

namespace {

// All triangles as one shell.
Mesh one_shell(Mesh m, const std::string& name = "part") {
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {name};
  return m;
}

struct Verdict {
  std::vector<std::uint32_t> intersecting, not_manifold;
};

Verdict verdict(const Mesh& m) {
  Verdict v;
  v.intersecting = self_intersecting_shells(m, std::vector<bool>(shell_count(m), true), &v.not_manifold);
  return v;
}

// Triangular bipyramid over the base A = (1, 0, 0), B = (−1, 1, 0), C = (−1, −1, 0) with apexes
// `top` (faces top-A-B, top-B-C, top-C-A) and `bottom` (bottom-B-A, bottom-C-B, bottom-A-C):
// closed, every vertex one fan. Any two of its faces share a vertex (each has two of the three
// base vertices), so the only rules in play are those for a shared edge and a shared vertex.
Mesh bipyramid(Vec3 top, Vec3 bottom) {
  Mesh m;
  m.positions = {{1, 0, 0}, {-1, 1, 0}, {-1, -1, 0}, top, bottom};
  m.triangles = {{3, 0, 1}, {3, 1, 2}, {3, 2, 0}, {4, 1, 0}, {4, 2, 1}, {4, 0, 2}};
  return one_shell(m);
}

// The reference: CGAL's PMP::does_self_intersect on a CGAL::Surface_mesh of the shell (the
// route machcut took before); nullopt when Surface_mesh::add_face refuses a face.
using K = CGAL::Exact_predicates_inexact_constructions_kernel;
using SM = CGAL::Surface_mesh<K::Point_3>;
std::optional<bool> cgal_does_self_intersect(const Mesh& m) {
  SM sm;
  std::vector<SM::Vertex_index> vid;
  for (const Vec3& p : m.positions) vid.push_back(sm.add_vertex(K::Point_3(p.x, p.y, p.z)));
  for (const Tri& t : m.triangles)
    if (sm.add_face(vid[t[0]], vid[t[1]], vid[t[2]]) == SM::null_face()) return std::nullopt;
  return CGAL::Polygon_mesh_processing::does_self_intersect(sm);
}

// Every vertex moved by a uniform random offset in [−amp, amp]³ (std::mt19937, fixed seed).
Mesh perturbed(Mesh m, double amp, unsigned seed) {
  std::mt19937 gen(seed);
  auto u = [&] { return amp * (2.0 * (gen() / 4294967296.0) - 1.0); };
  for (Vec3& p : m.positions) p = p + Vec3{u(), u(), u()};
  return m;
}

}  // namespace

TEST_CASE("closed sphere, torus and box do not intersect themselves", "[self_intersect]") {
  // Source: closed form — convex polyhedra (the faceted sphere, the box) and a faceted torus of
  // tube radius a < R are embedded surfaces; CGAL as reference library agrees.
  for (const Mesh& m : {one_shell(make_sphere({0, 0, 0}, 1.0, 16, 32)),
                        one_shell(make_torus(0.0, 2.0, 0.5, 48, 24)),
                        one_shell(make_box({0, 0, 0}, {1, 2, 3}))}) {
    const Verdict v = verdict(m);
    CHECK(v.intersecting.empty());
    CHECK(v.not_manifold.empty());
    CHECK(cgal_does_self_intersect(m) == std::optional<bool>(false));
  }
}

TEST_CASE("two crossing boxes given as one shell intersect themselves", "[self_intersect]") {
  // Source: closed form — the surfaces of [0,2]³ and [1,3]³ cross along the edges of [1,2]³.
  Mesh m = concatenate({make_box({0, 0, 0}, {2, 2, 2}), make_box({1, 1, 1}, {3, 3, 3}),
                        make_box({5, 5, 5}, {6, 6, 6})});
  m.shell.assign(24, 0);   // the two crossing boxes
  m.shell.resize(36, 1);   // a clean third box, its own shell
  m.shell_names = {"twisted", "clean"};
  const Verdict v = verdict(m);
  CHECK(v.intersecting == std::vector<std::uint32_t>{0});
  CHECK(v.not_manifold.empty());
  // A shell not marked closed is not tested.
  CHECK(self_intersecting_shells(m, {false, true}).empty());
}

TEST_CASE("boxes in one shell: touching faces intersect, a gap of 1e-9 does not", "[self_intersect]") {
  // Source: closed form — [0,1]³ and [1,2]×[0,1]² share the square x = 1 (coplanar faces that
  // overlap, on distinct vertices); shifted by 1e-9 m (1e-9 of their size) they are apart.
  // The float boxes of both pairs overlap, so the exact tests decide.
  const Mesh touching = one_shell(concatenate({make_box({0, 0, 0}, {1, 1, 1}), make_box({1, 0, 0}, {2, 1, 1})}));
  const Mesh apart = one_shell(concatenate({make_box({0, 0, 0}, {1, 1, 1}), make_box({1 + 1e-9, 0, 0}, {2, 1, 1})}));
  CHECK(verdict(touching).intersecting == std::vector<std::uint32_t>{0});
  CHECK(verdict(apart).intersecting.empty());
  CHECK(cgal_does_self_intersect(touching) == std::optional<bool>(true));   // CGAL as reference library
  CHECK(cgal_does_self_intersect(apart) == std::optional<bool>(false));
}

TEST_CASE("a flat tetrahedron folds: edge-adjacent coplanar faces overlap", "[self_intersect]") {
  // Source: closed form — with d = (1/3, 1/3, 0) inside the triangle a b c of the plane z = 0,
  // the faces b-a-d, c-b-d, a-c-d lie in that plane and cover a-b-c: each meets a-b-c across a
  // shared edge, on the same side of it.
  Mesh m;
  m.positions = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {1.0 / 3, 1.0 / 3, 0}};
  m.triangles = {{0, 1, 2}, {1, 0, 3}, {2, 1, 3}, {0, 2, 3}};
  m = one_shell(m);
  CHECK(verdict(m).intersecting == std::vector<std::uint32_t>{0});
  CHECK(cgal_does_self_intersect(m) == std::optional<bool>(true));  // CGAL as reference library
  // Lifted off the plane it is a proper tetrahedron (control).
  m.positions[3].z = -0.5;
  CHECK(verdict(m).intersecting.empty());
}

TEST_CASE("faces sharing one vertex: an opposite edge through the other face intersects", "[self_intersect]") {
  // Source: closed form — with bottom S = (0, 0, −1) and top N = (5, 0, −1), the edge A–S of
  // face S-B-A crosses the plane z = −(x + 1)/6 of face N-B-C at (5/7, 0, −2/7), inside it
  // (there |y| ≤ 5/7); the two faces share only B. No two faces of it are coplanar.
  const Mesh crossing = bipyramid({5, 0, -1}, {0, 0, -1});
  CHECK(verdict(crossing).intersecting == std::vector<std::uint32_t>{0});
  CHECK(cgal_does_self_intersect(crossing) == std::optional<bool>(true));  // CGAL as reference library
  // Control, closed form: with N = (−1/3, 0, −2) the bottom apex S lies inside the tetrahedron
  // A B C N (its section at z = −1 is the triangle (1/3, 0), (−2/3, ±1/2)), so the two fans
  // meet only along the base edges they share.
  const Mesh nested = bipyramid({-1.0 / 3, 0, -2}, {0, 0, -1});
  CHECK(verdict(nested).intersecting.empty());
  CHECK(cgal_does_self_intersect(nested) == std::optional<bool>(false));
  // The usual bipyramid (apexes on both sides of the base) is convex.
  CHECK(verdict(bipyramid({0, 0, 1}, {0, 0, -1})).intersecting.empty());
}

TEST_CASE("a degenerate triangle counts as a self-intersection, as in CGAL", "[self_intersect]") {
  // Source: CGAL as reference library — PMP::does_self_intersect reports collinear faces.
  // A closed box whose edge a–b carries a zero-area triangle (a, m, b), m the midpoint of a–b:
  // the neighbour across a–b is split at m, so the shell stays closed and manifold. (The faces
  // at m also touch the edge a–b of the other neighbour there, which counts too: in a closed
  // manifold a collinear face always comes with such a contact, so this case cannot single out
  // the collinear rule.)
  Mesh box = one_shell(make_box({0, 0, 0}, {2, 2, 2}));
  CHECK(verdict(box).intersecting.empty());
  box = one_shell(make_box_with_sliver({0, 0, 0}, {2, 2, 2}));
  const Verdict v = verdict(box);
  CHECK(v.not_manifold.empty());
  CHECK(v.intersecting == std::vector<std::uint32_t>{0});
  CHECK(cgal_does_self_intersect(box) == std::optional<bool>(true));
}

TEST_CASE("shells that are not manifold are named, not tested", "[self_intersect]") {
  // Source: definition (a 2-manifold has one fan of triangles at each vertex and each edge
  // once in each direction); CGAL as reference library: Surface_mesh refuses such faces.
  // Two boxes sharing one corner vertex (index), as one shell: two fans at that vertex.
  // make_box numbers corner i at (i & 1 ? hi.x : lo.x, …): the first box's (1, 1, 1) is
  // vertex 7, the second box's is vertex 8 + 0.
  Mesh corner = concatenate({make_box({0, 0, 0}, {1, 1, 1}), make_box({1, 1, 1}, {2, 2, 2})});
  REQUIRE(corner.positions[7].x == 1.0);
  REQUIRE(corner.positions[8].x == 1.0);
  for (Tri& t : corner.triangles)
    for (std::uint32_t& v : t)
      if (v == 8) v = 7;
  corner = one_shell(corner);
  Verdict v = verdict(corner);
  CHECK(v.not_manifold == std::vector<std::uint32_t>{0});
  CHECK(v.intersecting.empty());
  CHECK_FALSE(cgal_does_self_intersect(corner).has_value());
  // A box with one triangle turned: its edges are used twice in one direction.
  Mesh turned = one_shell(make_box({0, 0, 0}, {1, 1, 1}));
  std::swap(turned.triangles[0][1], turned.triangles[0][2]);
  v = verdict(turned);
  CHECK(v.not_manifold == std::vector<std::uint32_t>{0});
  CHECK_FALSE(cgal_does_self_intersect(turned).has_value());
  // A triangle using one vertex twice.
  Mesh twice = one_shell(make_box({0, 0, 0}, {1, 1, 1}));
  twice.triangles[0][1] = twice.triangles[0][0];
  CHECK(verdict(twice).not_manifold == std::vector<std::uint32_t>{0});
}

TEST_CASE("randomly perturbed spheres and tori: same verdict as CGAL's does_self_intersect", "[self_intersect]") {
  // Source: CGAL as reference library — PMP::does_self_intersect on a Surface_mesh. Small
  // perturbations keep the surfaces embedded, large ones fold them; both kinds must occur.
  int yes = 0, no = 0;
  for (double amp : {0.0, 0.01, 0.05, 0.1, 0.2, 0.4})
    for (unsigned seed = 1; seed <= 4; ++seed)
      for (const Mesh& base : {one_shell(make_sphere({0, 0, 0}, 1.0, 12, 24)),
                               one_shell(make_torus(0.0, 1.0, 0.4, 24, 12))}) {
        const Mesh m = perturbed(base, amp, seed);
        const std::optional<bool> ref = cgal_does_self_intersect(m);
        REQUIRE(ref.has_value());
        const Verdict v = verdict(m);
        INFO("amplitude " << amp << ", seed " << seed);
        CHECK(v.not_manifold.empty());
        CHECK(!v.intersecting.empty() == *ref);
        (*ref ? yes : no) += 1;
      }
  CHECK(yes >= 5);
  CHECK(no >= 5);
}
