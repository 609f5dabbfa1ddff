// Tests of the shared mesh functions (slicing/common/mesh.cpp): bounding box, signed volume,
// surface area, shell extraction and concatenation, against closed forms of elementary
// geometry for generated polyhedra.
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <cmath>
#include <numbers>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

// Area of a regular n-gon of circumradius r: n/2 r² sin(2π/n) (elementary geometry).
double ngon_area(double r, int n) {
  return 0.5 * n * r * r * std::sin(2 * std::numbers::pi / n);
}

// make_body_of_revolution's rings are regular n-gons and each side quad joins two parallel
// chords, so the body is a stack of frusta of regular n-gonal pyramids. Frustum volume
// h/3 (A1 + A2 + √(A1 A2)) (elementary geometry, "prismatoid formula"); with A = k r² it is
// k h/3 (r1² + r1 r2 + r2²). The sum is signed in h, which also covers a profile that turns back
// (the torus).
double ngon_frusta_volume(const std::vector<double>& x, const std::vector<double>& r, int n) {
  const double k = ngon_area(1.0, n);
  double v = 0.0;
  for (std::size_t i = 0; i + 1 < x.size(); ++i)
    v += k * (x[i + 1] - x[i]) / 3.0 * (r[i] * r[i] + r[i] * r[i + 1] + r[i + 1] * r[i + 1]);
  return v;
}

// Lateral area of the same stack: each band is n isosceles trapezoids with parallel sides
// 2 r sin(π/n) and height √(h² + ((r2 − r1) cos(π/n))²) (the chords' midpoints lie at r cos(π/n)
// from the axis); plus the flat n-gon caps where an end radius is not zero.
double ngon_frusta_area(const std::vector<double>& x, const std::vector<double>& r, int n) {
  const double s = std::sin(std::numbers::pi / n), c = std::cos(std::numbers::pi / n);
  double a = ngon_area(r.front(), n) + ngon_area(r.back(), n);
  for (std::size_t i = 0; i + 1 < x.size(); ++i) {
    const double h = x[i + 1] - x[i], dr = (r[i + 1] - r[i]) * c;
    a += n * (r[i] + r[i + 1]) * s * std::sqrt(h * h + dr * dr);
  }
  return a;
}

Mesh named(Mesh m, const std::string& name) {
  m.shell_names = {name};
  return m;
}

// The three corner positions of triangle f.
std::array<Vec3, 3> corners(const Mesh& m, std::size_t f) {
  return {m.positions[m.triangles[f][0]], m.positions[m.triangles[f][1]],
          m.positions[m.triangles[f][2]]};
}

bool same(Vec3 a, Vec3 b) {
  return a.x == b.x && a.y == b.y && a.z == b.z;
}

}  // namespace

// ------------------------------------------------------------------------ bounding box --

TEST_CASE("bounding box of a box is its corners, unreferenced vertices do not count", "[mesh]") {
  // Source: definition of the axis-aligned bounding box (the header: referenced vertices only).
  Mesh m = make_box({-1.5, 2.0, -0.25}, {3.0, 2.5, 4.0});
  m.positions.push_back({100.0, -100.0, 100.0});  // referenced by no triangle
  const Box3 b = bounding_box(m);
  CHECK_FALSE(is_empty(b));
  CHECK(b.lo.x == -1.5);
  CHECK(b.lo.y == 2.0);
  CHECK(b.lo.z == -0.25);
  CHECK(b.hi.x == 3.0);
  CHECK(b.hi.y == 2.5);
  CHECK(b.hi.z == 4.0);
}

TEST_CASE("bounding box of an empty mesh, or one without triangles, is empty",
          "[mesh][degenerate]") {
  CHECK(is_empty(bounding_box(Mesh{})));
  Mesh points;
  points.positions = {{0, 0, 0}, {1, 1, 1}};
  CHECK(is_empty(bounding_box(points)));
}

TEST_CASE("bounding box of a sphere is within its radius", "[mesh]") {
  // Source: the UV sphere's poles lie on the x axis at c.x ∓ r and every vertex on the sphere,
  // so |y − c.y|, |z − c.z| <= r (elementary geometry); 1e-15 relative covers sin/cos rounding.
  const Mesh s = make_sphere({1.0, -2.0, 0.5}, 2.0, 16, 32);
  const Box3 b = bounding_box(s);
  CHECK_THAT(b.lo.x, WithinAbs(-1.0, 1e-14));
  CHECK_THAT(b.hi.x, WithinAbs(3.0, 1e-14));
  CHECK(b.lo.y >= -4.0 - 1e-14);
  CHECK(b.hi.y <= 0.0 + 1e-14);
  CHECK(b.lo.z >= -1.5 - 1e-14);
  CHECK(b.hi.z <= 2.5 + 1e-14);
  // 32 segments include φ = 0, π/2, π, 3π/2: the equator ring reaches ±r in y and z exactly
  // (up to cos/sin rounding).
  CHECK_THAT(b.hi.z, WithinAbs(2.5, 1e-14));
  CHECK_THAT(b.lo.y, WithinAbs(-4.0, 1e-14));
}

// ---------------------------------------------------------------------- signed volume --

TEST_CASE("box: volume and area are the closed forms", "[mesh][volume]") {
  // Source: elementary geometry — V = a b c, A = 2(ab + bc + ca). Tolerance: a few ulps of
  // summing 12 triangle terms.
  const double a = 4.0, b = 1.5, c = 0.75;
  const Mesh m = make_box({-1.0, 0.5, 2.0}, {-1.0 + a, 0.5 + b, 2.0 + c});
  CHECK_THAT(signed_volume(m), WithinRel(a * b * c, 1e-14));
  CHECK_THAT(surface_area(m), WithinRel(2 * (a * b + b * c + c * a), 1e-14));
}

TEST_CASE("volume does not depend on where the closed mesh sits", "[mesh][volume]") {
  // Source: divergence theorem — for a closed surface Σ a·(b × c)/6 is independent of the
  // origin. Far from the origin the terms cancel with rounding ~ (offset/size)³ ε: 1e3 m off a
  // 1 m box keeps ~1e-7 relative (1e9 × 2.2e-16 × a few terms).
  const Mesh near = make_box({0, 0, 0}, {1, 2, 0.5});
  const Mesh far = make_box({1000, -1000, 1000}, {1001, -998, 1000.5});
  CHECK_THAT(signed_volume(near), WithinRel(1.0, 1e-15));
  CHECK_THAT(signed_volume(far), WithinRel(1.0, 1e-6));
  CHECK_THAT(surface_area(far), WithinRel(surface_area(near), 1e-9));
}

TEST_CASE("an inside-out mesh has negative volume and the same area", "[mesh][volume]") {
  // Source: divergence theorem — reversing every normal changes the sign of the flux.
  Mesh m = make_box({0, 0, 0}, {2, 3, 4});
  for (Tri& t : m.triangles) std::swap(t[1], t[2]);
  CHECK_THAT(signed_volume(m), WithinRel(-24.0, 1e-14));
  CHECK_THAT(surface_area(m), WithinRel(2 * (6.0 + 12.0 + 8.0), 1e-14));
}

TEST_CASE("capped n-gon cylinder: prism volume and area", "[mesh][volume]") {
  // Source: a right prism on a regular n-gon: V = A L, A = n/2 r² sin(2π/n); area 2A plus n
  // rectangles 2 r sin(π/n) × L (elementary geometry). Tolerance: rounding of ~4n terms.
  const double r = 0.5, l = 3.0;
  const int n = 64;
  const Mesh m = make_body_of_revolution({1.0, 1.0 + l}, {r, r}, n);
  const double base = ngon_area(r, n);
  CHECK_THAT(signed_volume(m), WithinRel(base * l, 1e-13));
  CHECK_THAT(surface_area(m),
             WithinRel(2 * base + n * 2 * r * std::sin(std::numbers::pi / n) * l, 1e-13));
  // And the polygon area tends to πr² (1 − O(1/n²)): here within (2π/n)²/6 = 1.6e-3.
  CHECK_THAT(base, WithinRel(std::numbers::pi * r * r, 1.7e-3));
}

TEST_CASE("pointed cone: a third of the base times the height", "[mesh][volume]") {
  // Source: pyramid volume A h / 3 on a regular n-gon base (elementary geometry).
  const double r = 1.25, h = 2.0;
  const int n = 48;
  const Mesh m = make_body_of_revolution({0.0, h}, {0.0, r}, n);
  CHECK_THAT(signed_volume(m), WithinRel(ngon_area(r, n) * h / 3.0, 1e-13));
  CHECK_THAT(surface_area(m), WithinRel(ngon_frusta_area({0.0, h}, {0.0, r}, n), 1e-13));
}

TEST_CASE("UV sphere: stack of n-gon frusta, below 4/3 π r³", "[mesh][volume]") {
  // Source: frustum volume (elementary geometry) summed over the sphere's rings, as
  // make_sphere places them (x = c.x − r cos(πi/rings), radius r sin(πi/rings)); an inscribed
  // polyhedron encloses less than the sphere 4/3 π r³, by O(1/n²): 0.5% at 32 × 64.
  const double r = 1.5;
  const int rings = 32, segments = 64;
  std::vector<double> x, rad;
  for (int i = 0; i <= rings; ++i) {
    const double t = std::numbers::pi * i / rings;
    x.push_back(0.25 - r * std::cos(t));
    rad.push_back(i == 0 || i == rings ? 0.0 : r * std::sin(t));
  }
  const Mesh s = make_sphere({0.25, 0.0, 0.0}, r, rings, segments);
  const double v = signed_volume(s);
  CHECK_THAT(v, WithinRel(ngon_frusta_volume(x, rad, segments), 1e-12));
  CHECK_THAT(surface_area(s), WithinRel(ngon_frusta_area(x, rad, segments), 1e-12));
  const double exact = 4.0 / 3.0 * std::numbers::pi * r * r * r;
  CHECK(v < exact);
  CHECK_THAT(v, WithinRel(exact, 5e-3));
  CHECK_THAT(surface_area(s), WithinRel(4 * std::numbers::pi * r * r, 5e-3));  // sphere area 4πr²
}

TEST_CASE("torus: signed frusta sum, and Pappus in the limit", "[mesh][volume]") {
  // Source: make_torus's rings about the x axis are regular nu-gons of radius w = R + a cos v
  // at x = cx + a sin v; the body is a signed stack of frusta (elementary geometry). Pappus's
  // centroid theorem gives the smooth torus 2π² R a²; the inscribed polyhedron is within
  // O(1/n²): 0.3% at 128 × 64.
  const double cx = 2.0, big_r = 3.0, a = 0.8;
  const int nu = 128, nv = 64;
  std::vector<double> x, w;
  for (int j = 0; j <= nv; ++j) {
    const double v = 2 * std::numbers::pi * j / nv;
    x.push_back(cx + a * std::sin(v));
    w.push_back(big_r + a * std::cos(v));
  }
  const Mesh t = make_torus(cx, big_r, a, nu, nv);
  CHECK_THAT(signed_volume(t), WithinRel(ngon_frusta_volume(x, w, nu), 1e-12));
  CHECK_THAT(signed_volume(t),
             WithinRel(2 * std::numbers::pi * std::numbers::pi * big_r * a * a, 3e-3));
  // Pappus for the area: 4π² R a (smooth torus).
  CHECK_THAT(surface_area(t), WithinRel(4 * std::numbers::pi * std::numbers::pi * big_r * a, 3e-3));
}

TEST_CASE("empty meshes have no volume and no area", "[mesh][degenerate]") {
  const Mesh e;
  CHECK(signed_volume(e) == 0.0);
  CHECK(surface_area(e) == 0.0);
  CHECK(shell_volumes(e).empty());
  // A mesh of one flat triangle and its reverse: no volume (divergence theorem), twice the
  // triangle's area (½ · 1 · 1 each).
  Mesh flat;
  flat.positions = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}};
  flat.triangles = {{0, 1, 2}, {0, 2, 1}};
  flat.shell = {0, 0};
  flat.shell_names = {"flat"};
  CHECK(signed_volume(flat) == 0.0);
  CHECK_THAT(surface_area(flat), WithinRel(1.0, 1e-15));
  // A degenerate (zero-area) triangle contributes nothing.
  Mesh sliver;
  sliver.positions = {{0, 0, 0}, {1, 0, 0}, {2, 0, 0}};
  sliver.triangles = {{0, 1, 2}};
  sliver.shell = {0};
  sliver.shell_names = {"sliver"};
  CHECK(surface_area(sliver) == 0.0);
  CHECK(signed_volume(sliver) == 0.0);
}

// --------------------------------------------------------------------- shells by id --

TEST_CASE("per-shell volume and area pick one shell's triangles", "[mesh][shells]") {
  // Source: closed forms of each part (box a b c; n-gon prism A L) and additivity of the
  // divergence-theorem sum over disjoint shells.
  const int n = 32;
  const Mesh box = named(make_box({0, 0, 0}, {1, 2, 3}), "box");
  const Mesh cyl = named(make_body_of_revolution({5.0, 7.0}, {0.5, 0.5}, n), "cyl");
  const Mesh m = concatenate({box, cyl});
  const double vcyl = ngon_area(0.5, n) * 2.0;
  CHECK_THAT(signed_volume(m, 0), WithinRel(6.0, 1e-14));
  CHECK_THAT(signed_volume(m, 1), WithinRel(vcyl, 1e-13));
  CHECK_THAT(signed_volume(m), WithinRel(6.0 + vcyl, 1e-13));
  CHECK(signed_volume(m, 2) == 0.0);  // no triangle in shell 2
  const std::vector<double> v = shell_volumes(m);
  REQUIRE(v.size() == 2);
  CHECK_THAT(v[0], WithinRel(6.0, 1e-14));
  CHECK_THAT(v[1], WithinRel(vcyl, 1e-13));
  CHECK_THAT(surface_area(m, 0), WithinRel(22.0, 1e-14));
  CHECK_THAT(surface_area(m, 0) + surface_area(m, 1), WithinRel(surface_area(m), 1e-14));
}

TEST_CASE("shell_volumes has an entry for a shell without triangles", "[mesh][shells]") {
  // Header: indexed by shell id over shell_names; a named shell with no triangles has volume 0.
  Mesh m = make_box({0, 0, 0}, {1, 1, 1});
  m.shell_names = {"box", "nothing"};
  const std::vector<double> v = shell_volumes(m);
  REQUIRE(v.size() == 2);
  CHECK_THAT(v[0], WithinRel(1.0, 1e-15));
  CHECK(v[1] == 0.0);
}

// -------------------------------------------------------------------- extract_shell --

TEST_CASE("extract_shell keeps one shell's triangles with compacted vertices", "[mesh][shells]") {
  const Mesh sphere = named(make_sphere({4, 0, 0}, 1.0, 12, 24), "sphere.obj#2");
  const Mesh m = concatenate({named(make_box({0, 0, 0}, {1, 1, 1}), "box.obj#1"), sphere,
                              named(make_torus(10, 2, 0.5, 24, 12), "torus.obj")});
  const Mesh e = extract_shell(m, 1);
  REQUIRE(e.shell_names.size() == 1);
  CHECK(e.shell_names[0] == "sphere.obj#2");
  CHECK(e.triangles.size() == sphere.triangles.size());
  CHECK(e.shell == std::vector<std::uint32_t>(sphere.triangles.size(), 0));
  // Compacted: exactly the sphere's vertices (every one is used by its triangles), each
  // referenced.
  CHECK(e.positions.size() == sphere.positions.size());
  std::vector<char> used(e.positions.size(), 0);
  for (const Tri& t : e.triangles)
    for (std::uint32_t v : t) {
      REQUIRE(v < e.positions.size());
      used[v] = 1;
    }
  CHECK(std::all_of(used.begin(), used.end(), [](char u) { return u == 1; }));
  // Same triangles in the same order, same corners in the same orientation.
  for (std::size_t f = 0; f < e.triangles.size(); ++f) {
    const auto a = corners(e, f), b = corners(sphere, f);
    for (int k = 0; k < 3; ++k) CHECK(same(a[k], b[k]));
  }
  CHECK(signed_volume(e) == signed_volume(m, 1));  // the same terms in the same order
}

TEST_CASE("extract_shell of a shell id that is not there gives an empty mesh",
          "[mesh][degenerate]") {
  const Mesh m = make_box({0, 0, 0}, {1, 1, 1});
  const Mesh e = extract_shell(m, 7);
  CHECK(e.triangles.empty());
  CHECK(e.positions.empty());
  REQUIRE(e.shell_names.size() == 1);
  CHECK(e.shell_names[0].empty());
}

// --------------------------------------------------------------------- concatenate --

TEST_CASE("concatenate renumbers shells and vertices, keeps names and geometry", "[mesh][shells]") {
  // Two parts: a two-shell mesh (box + box) and a torus; the result has 3 shells in order.
  const Mesh two = concatenate({named(make_box({0, 0, 0}, {1, 1, 1}), "a.obj#1"),
                                named(make_box({2, 0, 0}, {3, 1, 2}), "a.obj#2")});
  REQUIRE(shell_count(two) == 2);
  const Mesh torus = named(make_torus(8, 2, 0.5, 16, 8), "t.obj");
  const Mesh m = concatenate({two, Mesh{}, torus});
  REQUIRE(shell_count(m) == 3);
  CHECK(m.shell_names == std::vector<std::string>{"a.obj#1", "a.obj#2", "t.obj"});
  CHECK(m.positions.size() == two.positions.size() + torus.positions.size());
  REQUIRE(m.triangles.size() == two.triangles.size() + torus.triangles.size());
  REQUIRE(m.shell.size() == m.triangles.size());
  for (std::size_t f = 0; f < two.triangles.size(); ++f) CHECK(m.shell[f] == two.shell[f]);
  for (std::size_t f = 0; f < torus.triangles.size(); ++f) {
    const std::size_t g = two.triangles.size() + f;
    CHECK(m.shell[g] == 2);
    const auto a = corners(m, g), b = corners(torus, f);
    for (int k = 0; k < 3; ++k) CHECK(same(a[k], b[k]));
  }
  // Volumes add (divergence theorem is a sum over triangles): 1 + 2 + torus.
  CHECK_THAT(signed_volume(m), WithinRel(3.0 + signed_volume(torus), 1e-13));
  CHECK_THAT(signed_volume(m, 1), WithinRel(2.0, 1e-14));
}

TEST_CASE("concatenating nothing gives an empty mesh", "[mesh][degenerate]") {
  const Mesh m = concatenate({});
  CHECK(m.positions.empty());
  CHECK(m.triangles.empty());
  CHECK(shell_count(m) == 0);
  CHECK(shell_count(concatenate({Mesh{}, Mesh{}})) == 0);
}
