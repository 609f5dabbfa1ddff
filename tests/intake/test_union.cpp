// Tests of the overlap checks and the union of overlapping shells
// (slicing/intake/union_cgal.cpp, through slicing/intake/model.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/intake/holes.h"
#include "machcut/sections/section.h"
#include "machcut/intake/union.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinRel;

namespace {

// Area of the union of two circles of radius r whose centres are d apart: 2πr² minus the lens
// 2r² acos(d/2r) − (d/2)√(4r² − d²) (Weisstein, MathWorld "Circle-Circle Intersection").
double circle_union_area(double r, double d) {
  const double lens = 2 * r * r * std::acos(d / (2 * r)) - 0.5 * d * std::sqrt(4 * r * r - d * d);
  return 2 * std::numbers::pi * r * r - lens;
}

// Volume of the union of two spheres of radius r whose centres are d apart: 2·(4/3)πr³ minus
// the lens π(4r + d)(2r − d)²/12 (Weisstein, MathWorld "Sphere-Sphere Intersection").
double sphere_union_volume(double r, double d) {
  return 2 * 4.0 / 3.0 * std::numbers::pi * r * r * r -
         std::numbers::pi * (4 * r + d) * (2 * r - d) * (2 * r - d) / 12;
}

// Radius of the largest sphere about `c` inside a convex closed mesh: the least distance from
// c to the planes of its faces.
double inner_radius(const Mesh& m, Vec3 c) {
  double r = HUGE_VAL;
  for (const Tri& t : m.triangles) {
    const Vec3 a = m.positions[t[0]];
    const Vec3 n = cross(m.positions[t[1]] - a, m.positions[t[2]] - a);
    r = std::fmin(r, std::fabs(dot(c - a, n)) / norm(n));
  }
  return r;
}

Mesh named(Mesh m, const std::string& name) {
  m.shell_names = {name};
  return m;
}

}  // namespace

TEST_CASE("union of two overlapping spheres: section and volume against closed forms", "[union]") {
  // The spheres are faceted (inscribed polyhedra), so the closed forms are evaluated for the
  // circumscribed radius R and for the inscribed radius (the faces' least distance to the
  // centre): the union of two polyhedra, each between its two spheres, lies between the unions
  // of the spheres — a bracket free of any tuning.
  const double R = 1.0, d = 1.0;
  const int rings = 48, segments = 96;
  const Mesh a = named(make_sphere({0, 0, 0}, R, rings, segments), "left");
  const Mesh b = named(make_sphere({0, d, 0}, R, rings, segments), "right");
  const PreparedModel pm = prepare_mesh(concatenate({a, b}), {});
  REQUIRE(pm.usable);
  REQUIRE(pm.united);
  REQUIRE(pm.health.intersecting.size() == 1);
  CHECK(pm.health.volume_is_union);
  CHECK(shell_count(pm.analysis) == 1);

  // Section by the normal plane x = 0, through both centres: the union of two n-gons inscribed
  // in circles of radius R about centres d apart; each n-gon contains the circle of radius
  // R cos(π/n) (elementary geometry).
  const std::vector<double> x0{0.0};
  const double area = SectionEngine(pm.analysis).areas({1.0, 0.0}, x0)[0];
  const double r_in2d = R * std::cos(std::numbers::pi / segments);
  CHECK(area <= circle_union_area(R, d) * (1 + 1e-12));
  CHECK(area >= circle_union_area(r_in2d, d) * (1 - 1e-12));
  CHECK_THAT(area, WithinRel(circle_union_area(R, d), 2e-3));  // (π/n)² = 1.1e-3 for n = 96

  const double r_in = inner_radius(a, {0, 0, 0});
  const double v = pm.health.volume;
  CHECK(v <= sphere_union_volume(R, d) * (1 + 1e-12));
  CHECK(v >= sphere_union_volume(r_in, d) * (1 - 1e-12));
  CHECK_THAT(v, WithinRel(sphere_union_volume(R, d), 5e-3));
}

TEST_CASE("a box inside another counts once", "[union]") {
  // Source: elementary geometry — the big box 4 × 2 × 2 = 16 m³ with section 4 m² holds the
  // small one (1 m³, section 1 m²) entirely.
  const Mesh big = named(make_box({0, -1, -1}, {4, 1, 1}), "big");
  const Mesh small = named(make_box({1, -0.5, -0.5}, {2, 0.5, 0.5}), "small");
  const PreparedModel pm = prepare_mesh(concatenate({big, small}), {});
  REQUIRE(pm.usable);
  REQUIRE(pm.health.contained.size() == 1);
  CHECK(pm.health.contained[0].a == 1);  // small inside big
  CHECK(pm.health.contained[0].b == 0);
  CHECK(pm.health.intersecting.empty());
  CHECK(pm.united);
  CHECK_THAT(pm.health.volume, WithinRel(16.0, 1e-12));
  const std::vector<double> x{1.5};
  CHECK_THAT(SectionEngine(pm.analysis).areas({1.0, 0.0}, x)[0], WithinRel(4.0, 1e-12));
}

TEST_CASE("unite = false gives the plain sum", "[union]") {
  // Source: elementary geometry — 16 + 1 m³, sections 4 + 1 m².
  const Mesh big = named(make_box({0, -1, -1}, {4, 1, 1}), "big");
  const Mesh small = named(make_box({1, -0.5, -0.5}, {2, 0.5, 0.5}), "small");
  ModelSetup setup;
  setup.unite = false;
  const PreparedModel pm = prepare_mesh(concatenate({big, small}), setup);
  REQUIRE(pm.usable);
  CHECK_FALSE(pm.united);
  CHECK_FALSE(pm.health.volume_is_union);
  CHECK_FALSE(pm.warnings.empty());
  CHECK_THAT(pm.health.volume, WithinRel(17.0, 1e-12));
  const std::vector<double> x{1.5};
  CHECK_THAT(SectionEngine(pm.analysis).areas({1.0, 0.0}, x)[0], WithinRel(5.0, 1e-12));
}

TEST_CASE("shells with disjoint bounding boxes are not tested", "[union]") {
  // Source: boxes apart cannot meet (definition); nothing to unite.
  const Mesh m = concatenate({named(make_box({0, 0, 0}, {1, 1, 1}), "a"),
                              named(make_box({2, 0, 0}, {3, 1, 1}), "b")});
  const OverlapReport o = find_overlaps(m, {true, true});
  CHECK(o.pairs_total == 1);
  CHECK(o.pairs_tested == 0);
  const PreparedModel pm = prepare_mesh(m, {});
  CHECK(pm.health.volume_is_union);
  CHECK_FALSE(pm.united);
  CHECK_THAT(pm.health.volume, WithinRel(2.0, 1e-14));
}

TEST_CASE("shells whose bounds overlap but which are apart are neither crossing nor nested",
          "[union]") {
  // Source: elementary geometry — the box [0.8, 1]³ lies in the bounding box of the unit
  // sphere but outside the sphere (its nearest corner is √3·0.8 = 1.39 from the centre).
  const Mesh m = concatenate({named(make_sphere({0, 0, 0}, 1.0, 16, 32), "sphere"),
                              named(make_box({0.8, 0.8, 0.8}, {1, 1, 1}), "box")});
  const OverlapReport o = find_overlaps(m, {true, true});
  CHECK(o.pairs_tested == 1);
  CHECK(o.intersecting.empty());
  CHECK(o.contained.empty());
}

TEST_CASE("a self-intersecting shell is wrapped, then united; --strict refuses it", "[union]") {
  // Two crossing boxes given as one shell intersect themselves; a third box crosses them.
  Mesh twisted = concatenate({make_box({0, 0, 0}, {2, 2, 2}), make_box({1, 1, 1}, {3, 3, 3})});
  twisted.shell.assign(twisted.triangles.size(), 0);
  twisted.shell_names = {"twisted"};
  const Mesh other = named(make_box({2.5, 1.5, 1.5}, {4, 2.5, 2.5}), "other");
  const PreparedModel pm = prepare_mesh(concatenate({twisted, other}), {});
  REQUIRE(pm.health.self_intersecting.size() == 1);
  CHECK(pm.health.self_intersecting[0] == 0);
  REQUIRE(pm.wraps.size() == 1);
  CHECK(pm.wraps[0].shell == 0);
  CHECK(pm.united);
  // Closed form: [0,2]³ ∪ [1,3]³ = 8 + 8 − 1 = 15 m³, with `other` (1.5 m³, 0.5 m³ inside
  // [1,3]³) 16 m³; the wrap's offset (alpha/10, alpha = diag/100) adds well under 3%.
  CHECK(signed_volume(pm.analysis) == Approx(16.0).epsilon(0.03));
  CHECK(signed_volume(pm.analysis) > 16.0);  // a wrap encloses its input
  bool named_it = false;
  for (const std::string& w : pm.warnings)
    named_it = named_it || (w.find("twisted: its surface intersects itself; replaced by its alpha wrap") != std::string::npos);
  CHECK(named_it);
  ModelSetup strict;
  strict.strict = true;
  const PreparedModel refused = prepare_mesh(concatenate({twisted, other}), strict);
  CHECK_FALSE(refused.usable);
  CHECK_THAT(refused.reason, Catch::Contains("twisted: its surface intersects itself"));
}

TEST_CASE("a shell with a degenerate triangle is wrapped before the union; --strict refuses it", "[union]") {
  // A closed box with a zero-area triangle on one edge (every edge still has two triangles).
  Mesh box = make_box_with_sliver({0, 0, 0}, {2, 2, 2});
  box.shell_names = {"sliver"};
  const HealthReport h = check_health(box);
  REQUIRE(h.closed);
  REQUIRE(h.degenerate_triangles == 1);
  const Mesh other = named(make_box({1, 1, 1}, {3, 3, 3}), "other");
  const PreparedModel pm = prepare_mesh(concatenate({box, other}), {});
  CHECK(pm.united);
  bool named_it = false;
  for (const std::string& w : pm.warnings)
    named_it = named_it || (w.find("sliver: ") != std::string::npos && w.find("alpha wrap") != std::string::npos);
  CHECK(named_it);
  // Closed form: [0,2]³ ∪ [1,3]³ = 15 m³ (the wrap's offset adds under 3%).
  CHECK(signed_volume(pm.analysis) == Approx(15.0).epsilon(0.03));
  ModelSetup strict;
  strict.strict = true;
  CHECK_FALSE(prepare_mesh(concatenate({box, other}), strict).usable);
}
