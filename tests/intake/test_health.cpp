// Tests of the health report, the orientation fix and hole closing
// (slicing/intake/health.cpp, slicing/intake/holes.cpp, slicing/intake/model.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <utility>

#include "machcut/intake/health.h"
#include "machcut/intake/holes.h"
#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

// Every edge used by exactly one triangle in each direction (closed and consistently oriented),
// counted independently of health.cpp with a map of directed edges.
bool consistently_oriented(const Mesh& m) {
  std::map<std::pair<std::uint32_t, std::uint32_t>, int> directed;
  for (const Tri& t : m.triangles)
    for (int k = 0; k < 3; ++k) ++directed[{t[k], t[(k + 1) % 3]}];
  for (const auto& [e, n] : directed) {
    auto it = directed.find({e.second, e.first});
    if (n != 1 || it == directed.end() || it->second != 1) return false;
  }
  return true;
}

Mesh unit_cube() { return make_box({0, 0, 0}, {1, 1, 1}); }

// Index of the cube triangle whose three vertices satisfy `on_face`.
template <class F>
std::size_t triangle_on(const Mesh& m, F on_face) {
  for (std::size_t i = 0; i < m.triangles.size(); ++i) {
    bool all = true;
    for (std::uint32_t v : m.triangles[i]) all = all && on_face(m.positions[v]);
    if (all) return i;
  }
  FAIL("no triangle on that face");
  return 0;
}

Mesh without_triangle(Mesh m, std::size_t i) {
  m.triangles.erase(m.triangles.begin() + static_cast<std::ptrdiff_t>(i));
  m.shell.erase(m.shell.begin() + static_cast<std::ptrdiff_t>(i));
  return m;
}

}  // namespace

TEST_CASE("closed unit cube is healthy", "[health]") {
  // Source: elementary geometry — volume 1 m³, area 6 m², 12 triangles, 8 vertices.
  const HealthReport h = check_health(unit_cube());
  CHECK(h.closed);
  CHECK(h.triangles == 12);
  CHECK(h.vertices == 8);
  REQUIRE(h.shells.size() == 1);
  CHECK(h.shells[0].closed);
  CHECK(h.shells[0].oriented);
  CHECK(h.boundary_edges == 0);
  CHECK(h.nonmanifold_edges == 0);
  CHECK(h.degenerate_triangles == 0);
  CHECK_THAT(h.volume, WithinRel(1.0, 1e-14));
  CHECK_THAT(h.wetted_area, WithinRel(6.0, 1e-14));
  CHECK_THAT(h.length, WithinRel(1.0, 1e-15));
}

TEST_CASE("cube with one triangle removed: 3 boundary edges and a hole bound", "[health][holes]") {
  // Source: elementary geometry. Removing one triangle of a closed mesh leaves its 3 edges with
  // one triangle each. The removed triangle lies on the face x = 1: its y–z projection is half
  // the unit face, 0.5 m², and the planes x = X meet it only at X = 1.
  Mesh m = without_triangle(unit_cube(), triangle_on(unit_cube(), [](Vec3 p) { return p.x == 1; }));
  const HealthReport h = check_health(m);
  CHECK_FALSE(h.closed);
  CHECK(h.boundary_edges == 3);
  CHECK(h.boundary_samples.size() == 3);
  for (const Vec3& p : h.boundary_samples) CHECK(p.x == 1.0);

  PreparedModel pm;
  pm.mesh = m;
  const HoleClosing hc = close_holes(pm.mesh);
  REQUIRE(hc.ok);
  REQUIRE(hc.holes.size() == 1);
  CHECK(hc.holes[0].loop.size() == 3);
  CHECK_THAT(hc.holes[0].projected_area, WithinRel(0.5, 1e-14));
  CHECK(check_health(pm.mesh).closed);
  CHECK_THAT(signed_volume(pm.mesh), WithinRel(1.0, 1e-14));  // the fan restores a flat face
  pm.holes = hc.holes;
  const std::vector<double> x{0.5, 1.0, 1.5};
  const std::vector<double> bound = hole_error_bounds(pm, {1.0, 0.0}, x);
  CHECK(bound[0] == 0.0);
  CHECK_THAT(bound[1], WithinRel(0.5, 1e-14));
  CHECK(bound[2] == 0.0);
  // 0.5 m² of hole against a 1 m² largest section is more than kMaxHoleAreaFraction: closed
  // all the same (the fan restores the face exactly here), with a warning; the bound stands.
  const PreparedModel large = prepare_mesh(m, {});
  CHECK(large.usable);
  CHECK(large.holes.size() == 1);
  bool warned = false;
  for (const std::string& w : large.warnings) warned = warned || w.find("mostly the fans' guess") != std::string::npos;
  CHECK(warned);
}

TEST_CASE("a hole along the flow closes exactly and is usable", "[health][holes]") {
  // Source: elementary geometry — the missing triangle lies on the face z = 1, whose y–z
  // projection is a segment: no projected area; the fan restores the volume 1 m³ exactly.
  Mesh m = without_triangle(unit_cube(), triangle_on(unit_cube(), [](Vec3 p) { return p.z == 1; }));
  const PreparedModel pm = prepare_mesh(m, {});
  REQUIRE(pm.usable);
  REQUIRE(pm.holes.size() == 1);
  CHECK(pm.holes[0].projected_area == 0.0);
  CHECK(pm.health.boundary_edges == 3);  // as found, before closing
  CHECK_THAT(pm.health.volume, WithinRel(1.0, 1e-14));
  CHECK_FALSE(pm.warnings.empty());
}

TEST_CASE("small hole in a sphere: bound is the missing triangle's projection", "[health][holes]") {
  // Source: the y–z projected area of the removed triangle, computed here from its vertices
  // (elementary geometry); the fan of a 3-vertex loop lies in that triangle's plane.
  Mesh sphere = make_sphere({0, 0, 0}, 1.0, 16, 32);
  const std::size_t removed = 40;  // a triangle of the second ring band from the nose
  const Tri t = sphere.triangles[removed];
  const Vec3 a = sphere.positions[t[0]], b = sphere.positions[t[1]], c = sphere.positions[t[2]];
  const double expected = 0.5 * std::fabs(cross(b - a, c - a).x);
  const PreparedModel pm = prepare_mesh(without_triangle(sphere, removed), {});
  REQUIRE(pm.usable);
  REQUIRE(pm.holes.size() == 1);
  CHECK_THAT(pm.holes[0].projected_area, WithinRel(expected, 1e-12));
  const double xlo = std::fmin(a.x, std::fmin(b.x, c.x)), xhi = std::fmax(a.x, std::fmax(b.x, c.x));
  const std::vector<double> x{xlo - 0.01, 0.5 * (xlo + xhi), xhi + 0.01};
  const auto bound = hole_error_bounds(pm, {1.0, 0.0}, x);
  CHECK(bound[0] == 0.0);
  CHECK_THAT(bound[1], WithinRel(expected, 1e-12));
  CHECK(bound[2] == 0.0);
  // The patched sphere's volume equals the intact one's (the patch is the removed triangle).
  CHECK_THAT(pm.health.volume, WithinRel(signed_volume(sphere), 1e-12));
}

TEST_CASE("a flipped face is turned back", "[health][orientation]") {
  // Source: the definition of a consistently oriented closed mesh (each edge used once in each
  // direction, checked independently above); cube volume 1 m³.
  Mesh m = unit_cube();
  std::swap(m.triangles[5][1], m.triangles[5][2]);
  CHECK_FALSE(check_health(m).shells[0].oriented);
  const OrientationFix fix = fix_orientation(m);
  CHECK(fix.flipped_faces[0] == 1);
  CHECK_FALSE(fix.inverted[0]);
  CHECK(consistently_oriented(m));
  const HealthReport h = check_health(m, &fix);
  CHECK(h.shells[0].flipped_faces == 1);
  CHECK_THAT(h.volume, WithinRel(1.0, 1e-14));
}

TEST_CASE("an inside-out shell is turned; a healthy one beside it is left alone",
          "[health][orientation]") {
  // Source: elementary geometry — volumes 1 m³ and 8 m³, positive when outward.
  Mesh inside_out = unit_cube();
  for (Tri& t : inside_out.triangles) std::swap(t[1], t[2]);
  Mesh m = concatenate({inside_out, make_box({3, 0, 0}, {5, 2, 2})});
  const OrientationFix fix = fix_orientation(m);
  CHECK(fix.inverted[0]);
  CHECK_FALSE(fix.inverted[1]);
  CHECK(fix.flipped_faces[0] == 0);
  CHECK(consistently_oriented(m));
  const HealthReport h = check_health(m, &fix);
  CHECK(h.shells[0].inverted);
  CHECK_THAT(h.shells[0].volume, WithinRel(1.0, 1e-14));
  CHECK_THAT(h.shells[1].volume, WithinRel(8.0, 1e-14));
  CHECK_FALSE(fix.actions.empty());
}

TEST_CASE("non-manifold edge is counted", "[health]") {
  // Source: definition — an edge with three triangles is non-manifold; the fin's two free
  // edges are boundary edges.
  Mesh m = unit_cube();
  const auto fin = static_cast<std::uint32_t>(m.positions.size());
  m.positions.push_back({0.5, -1.0, 0.0});
  m.triangles.push_back({0, 1, fin});  // vertices 0 (0,0,0) and 1 (1,0,0) share a cube edge
  m.shell.push_back(0);
  const HealthReport h = check_health(m);
  CHECK(h.nonmanifold_edges == 1);
  CHECK(h.boundary_edges == 2);
  CHECK_FALSE(h.closed);
  REQUIRE(h.nonmanifold_samples.size() == 1);
  CHECK_THAT(h.nonmanifold_samples[0].x, WithinAbs(0.5, 1e-15));
}

TEST_CASE("degenerate triangle is counted", "[health]") {
  // Source: definition — three collinear points span no area.
  Mesh m = unit_cube();
  const auto v = static_cast<std::uint32_t>(m.positions.size());
  m.positions.insert(m.positions.end(), {{5, 0, 0}, {6, 1, 1}, {7, 2, 2}});
  m.triangles.push_back({v, v + 1, v + 2});
  m.shell.push_back(1);
  m.shell_names.push_back("needle");
  const HealthReport h = check_health(m);
  CHECK(h.degenerate_triangles == 1);
  CHECK(h.shells[1].degenerate_triangles == 1);
  CHECK(h.shells[0].degenerate_triangles == 0);
}

TEST_CASE("a Möbius strip is reported non-orientable and left alone", "[health][orientation]") {
  // Source: the Möbius strip is the classic non-orientable surface (common knowledge).
  Mesh m;
  const int n = 24;
  for (int i = 0; i < n; ++i) {
    const double t = 2 * 3.14159265358979323846 * i / n;
    const Vec3 c{std::cos(t), std::sin(t), 0};
    const Vec3 d{0.2 * std::cos(t / 2) * std::cos(t), 0.2 * std::cos(t / 2) * std::sin(t),
                 0.2 * std::sin(t / 2)};
    m.positions.push_back(c + d);
    m.positions.push_back(c - d);
  }
  for (std::uint32_t i = 0; i < n; ++i) {
    const std::uint32_t a = 2 * i, b = 2 * i + 1;
    // The last band joins the first with the rails swapped: the half twist.
    const std::uint32_t c = i + 1 < n ? 2 * i + 2 : 1, d = i + 1 < n ? 2 * i + 3 : 0;
    m.triangles.push_back({a, b, d});
    m.triangles.push_back({a, d, c});
  }
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"strip"};
  const Mesh before = m;
  const OrientationFix fix = fix_orientation(m);
  CHECK(fix.non_orientable[0]);
  CHECK(m.triangles == before.triangles);
  // The triage wraps it (it has no inside to cut); --strict refuses it.
  const PreparedModel pm = prepare_mesh(m, {});
  CHECK(pm.usable);
  CHECK(pm.wraps.size() == 1);
  ModelSetup strict;
  strict.strict = true;
  CHECK_FALSE(prepare_mesh(m, strict).usable);
}

TEST_CASE("boundary that is not a set of simple loops is wrapped, or refused with --strict", "[holes]") {
  // Source: definition — two triangles meeting at one vertex (a bow tie): that vertex starts
  // two boundary edges, so the boundary is not a set of simple loops.
  Mesh m;
  m.positions = {{0, 0, 0}, {1, 1, 0}, {1, -1, 0.5}, {-1, 1, 0.2}, {-1, -1, 0}};
  m.triangles = {{0, 1, 2}, {0, 3, 4}};
  m.shell = {0, 0};
  m.shell_names = {"bowtie"};
  Mesh copy = m;
  const HoleClosing hc = close_holes(copy);
  CHECK_FALSE(hc.ok);
  CHECK_THAT(hc.reason, Catch::Contains("simple loops"));
  CHECK(copy.triangles == m.triangles);
  const PreparedModel pm = prepare_mesh(m, {});
  CHECK(pm.usable);
  REQUIRE(pm.wraps.size() == 1);
  CHECK_THAT(pm.wraps[0].why, Catch::Contains("simple loops"));
  ModelSetup strict;
  strict.strict = true;
  const PreparedModel refused = prepare_mesh(m, strict);
  CHECK_FALSE(refused.usable);
  CHECK_THAT(refused.reason, Catch::Contains("too broken to bound") && Catch::Contains("bowtie"));
}

TEST_CASE("open flat sheets are left out as flat parts", "[holes]") {
  // A sheet across the flow: all its vertices in one plane — a flat part, left out; nothing
  // else remains.
  Mesh across;
  across.positions = {{0, 0, 0}, {0, 1, 0}, {0, 1, 1}, {0, 0, 1}};
  across.triangles = {{0, 1, 2}, {0, 2, 3}};
  across.shell = {0, 0};
  across.shell_names = {"sheet"};
  const PreparedModel a = prepare_mesh(across, {});
  CHECK_FALSE(a.usable);
  CHECK_THAT(a.reason, Catch::Contains("flat part"));
  // A sheet along the flow: no projected hole area, but no volume either — flat.
  Mesh along = across;
  along.positions = {{0, 0, 0}, {1, 0, 0}, {1, 1, 0}, {0, 1, 0}};
  const PreparedModel b = prepare_mesh(along, {});
  CHECK_FALSE(b.usable);
  CHECK_THAT(b.reason, Catch::Contains("flat"));
}

TEST_CASE("closed zero-volume model is flat", "[health]") {
  // Source: divergence theorem — a triangle and its reverse enclose no volume.
  Mesh m;
  m.positions = {{0, 0, 0}, {1, 0, 0}, {0, 1, 0}};
  m.triangles = {{0, 1, 2}, {0, 2, 1}};
  m.shell = {0, 0};
  m.shell_names = {"pillow"};
  CHECK(check_health(m).closed);
  const PreparedModel pm = prepare_mesh(m, {});
  CHECK_FALSE(pm.usable);
  CHECK_THAT(pm.reason, Catch::Contains("flat"));
}
