// Tests of hole closing and its error bound (slicing/intake/holes.cpp): fans over circular
// and triangular holes against polygon-area closed forms, the station range of a patch under
// Mach planes, the largest normal section and the "too broken to bound" threshold.
#include <catch2/catch.hpp>

#include <cmath>
#include <functional>
#include <map>
#include <numbers>
#include <utility>

#include "machcut/intake/holes.h"
#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::Contains;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

// Area of a regular n-gon of circumradius r: n/2 r² sin(2π/n) (elementary geometry).
double ngon_area(double r, int n) {
  return 0.5 * n * r * r * std::sin(2 * std::numbers::pi / n);
}

// Every edge used by exactly one triangle in each direction (closed and consistently
// oriented), counted independently of holes.cpp with a map of directed edges.
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

// The mesh without the triangles whose three corners all satisfy `drop`.
Mesh without(Mesh m, const std::function<bool(Vec3)>& drop) {
  Mesh out = m;
  out.triangles.clear();
  out.shell.clear();
  for (std::size_t f = 0; f < m.triangles.size(); ++f) {
    const Tri& t = m.triangles[f];
    if (drop(m.positions[t[0]]) && drop(m.positions[t[1]]) && drop(m.positions[t[2]])) continue;
    out.triangles.push_back(t);
    out.shell.push_back(m.shell[f]);
  }
  return out;
}

// Shoelace area of a vertex loop projected on the y–z plane, signed: positive when the loop
// turns counter-clockwise seen from +x (its right-hand normal is +x).
double yz_shoelace(const Mesh& m, const std::vector<std::uint32_t>& loop) {
  double a = 0.0;
  for (std::size_t i = 0; i < loop.size(); ++i) {
    const Vec3 p = m.positions[loop[i]], q = m.positions[loop[(i + 1) % loop.size()]];
    a += p.y * q.z - q.y * p.z;
  }
  return 0.5 * a;
}

// x of ring i of make_sphere({0,0,0}, r, rings, ·).
double ring_x(double r, int i, int rings) {
  return -r * std::cos(std::numbers::pi * i / rings);
}

// A sphere of radius r with its nose cap (rings 0 .. k) cut away: a circular hole at ring k.
Mesh sphere_without_nose(double r, int rings, int segments, int k) {
  const double cut = 0.5 * (ring_x(r, k, rings) + ring_x(r, k + 1, rings));
  return without(make_sphere({0, 0, 0}, r, rings, segments), [cut](Vec3 p) { return p.x < cut; });
}

}  // namespace

// ------------------------------------------------------------------------ close_holes --

TEST_CASE("a cylinder without its base: the fan is the n-gon, the prism volume comes back",
          "[holes]") {
  // Source: the aft cap of an n-gon cylinder is a regular n-gon: area n/2 r² sin(2π/n), centre
  // on the axis (its vertex centroid), normal +x outward; the restored prism has volume A L
  // (elementary geometry). Tolerance: rounding of n terms.
  const double r = 0.6, l = 2.5;
  const int n = 48;
  const Mesh open =
      without(make_body_of_revolution({0.0, l}, {r, r}, n), [l](Vec3 p) { return p.x == l; });
  REQUIRE(open.triangles.size() == 3 * static_cast<std::size_t>(n));  // side 2n + front cap n
  Mesh m = open;
  const HoleClosing hc = close_holes(m);
  REQUIRE(hc.ok);
  CHECK(hc.reason.empty());
  REQUIRE(hc.holes.size() == 1);
  const Hole& h = hc.holes[0];
  CHECK(h.loop.size() == static_cast<std::size_t>(n));
  CHECK(h.shell == 0);
  CHECK(hc.added_triangles == static_cast<std::size_t>(n));
  CHECK(m.triangles.size() == open.triangles.size() + static_cast<std::size_t>(n));
  CHECK(m.shell.size() == m.triangles.size());
  CHECK(m.positions.size() == open.positions.size() + 1);  // the fan's centre
  const Vec3 c = m.positions.back();
  CHECK(c.x == l);
  CHECK_THAT(c.y, WithinAbs(0.0, 1e-15));
  CHECK_THAT(c.z, WithinAbs(0.0, 1e-15));
  CHECK_THAT(h.projected_area, WithinRel(ngon_area(r, n), 1e-13));
  // Patch orientation: the loop turns counter-clockwise seen from +x (outward normal of a base)
  // and encloses the n-gon.
  CHECK_THAT(yz_shoelace(m, h.loop), WithinRel(ngon_area(r, n), 1e-13));
  CHECK(consistently_oriented(m));
  CHECK_THAT(signed_volume(m), WithinRel(ngon_area(r, n) * l, 1e-13));
}

TEST_CASE("an open tube: two holes facing opposite ways, each the n-gon", "[holes]") {
  // Source: as above — both caps are regular n-gons; the front patch faces −x (counter-clockwise
  // seen from −x), the aft one +x.
  const double r = 1.0, l = 4.0;
  const int n = 32;
  Mesh m = without(
      without(make_body_of_revolution({0.0, l}, {r, r}, n), [](Vec3 p) { return p.x == 0.0; }),
      [l](Vec3 p) { return p.x == l; });
  REQUIRE(m.triangles.size() == 2 * static_cast<std::size_t>(n));
  const HoleClosing hc = close_holes(m);
  REQUIRE(hc.ok);
  REQUIRE(hc.holes.size() == 2);
  CHECK(hc.added_triangles == 2 * static_cast<std::size_t>(n));
  double front = 0.0, aft = 0.0;
  for (const Hole& h : hc.holes) {
    CHECK_THAT(h.projected_area, WithinRel(ngon_area(r, n), 1e-13));
    const double x = m.positions[h.loop[0]].x;
    (x == 0.0 ? front : aft) = yz_shoelace(m, h.loop);
  }
  CHECK_THAT(front, WithinRel(-ngon_area(r, n), 1e-13));
  CHECK_THAT(aft, WithinRel(ngon_area(r, n), 1e-13));
  CHECK(consistently_oriented(m));
  CHECK_THAT(signed_volume(m), WithinRel(ngon_area(r, n) * l, 1e-13));
}

TEST_CASE("holes in two shells are closed in their own shells", "[holes][shells]") {
  // Source: elementary geometry — each box loses one triangle of a face normal to x (area
  // half the face, projected in full) or along x (projected area 0); the fans are flat in the
  // face's plane and restore the box volumes a b c.
  const Mesh a = make_box({0, 0, 0}, {1, 2, 3});  // face x = 1: 2 × 3 → triangle 3 m²
  const Mesh b = make_box({5, 0, 0}, {6, 1, 1});  // face z = 1: along the flow
  Mesh both = concatenate({a, b});
  both.shell_names = {"a.obj#1", "a.obj#2"};
  // Drop one triangle of a's face x = 1 and one of b's face z = 1.
  bool dropped_a = false, dropped_b = false;
  Mesh m = both;
  m.triangles.clear();
  m.shell.clear();
  for (std::size_t f = 0; f < both.triangles.size(); ++f) {
    const Tri& t = both.triangles[f];
    auto all = [&](const std::function<bool(Vec3)>& p) {
      return p(both.positions[t[0]]) && p(both.positions[t[1]]) && p(both.positions[t[2]]);
    };
    if (!dropped_a && all([](Vec3 p) { return p.x == 1.0; })) {
      dropped_a = true;
      continue;
    }
    if (!dropped_b && all([](Vec3 p) { return p.z == 1.0 && p.x >= 5.0; })) {
      dropped_b = true;
      continue;
    }
    m.triangles.push_back(t);
    m.shell.push_back(both.shell[f]);
  }
  REQUIRE(dropped_a);
  REQUIRE(dropped_b);
  const HoleClosing hc = close_holes(m);
  REQUIRE(hc.ok);
  REQUIRE(hc.holes.size() == 2);
  CHECK(hc.added_triangles == 6);  // a fan of 3 over each 3-vertex loop
  for (const Hole& h : hc.holes) {
    CHECK(h.loop.size() == 3);
    if (h.shell == 0)
      CHECK_THAT(h.projected_area, WithinRel(3.0, 1e-14));
    else
      CHECK_THAT(h.projected_area, WithinAbs(0.0, 1e-15));
  }
  CHECK(hc.holes[0].shell != hc.holes[1].shell);
  // Every fan triangle is in the shell of its loop.
  for (std::size_t f = m.triangles.size() - 6; f < m.triangles.size(); ++f) {
    const Vec3 p = m.positions[m.triangles[f][0]];
    CHECK(m.shell[f] == (p.x < 2.0 ? 0u : 1u));
  }
  CHECK(consistently_oriented(m));
  CHECK_THAT(signed_volume(m, 0), WithinRel(6.0, 1e-14));
  CHECK_THAT(signed_volume(m, 1), WithinRel(1.0, 1e-14));
}

TEST_CASE("a closed mesh and an empty mesh have no holes", "[holes][degenerate]") {
  Mesh closed = make_sphere({0, 0, 0}, 1.0, 8, 16);
  const Mesh before = closed;
  const HoleClosing hc = close_holes(closed);
  CHECK(hc.ok);
  CHECK(hc.holes.empty());
  CHECK(hc.added_triangles == 0);
  CHECK(closed.triangles == before.triangles);
  CHECK(closed.positions.size() == before.positions.size());
  Mesh empty;
  const HoleClosing he = close_holes(empty);
  CHECK(he.ok);
  CHECK(he.holes.empty());
  CHECK(empty.positions.empty());
}

TEST_CASE("a Möbius strip's boundary is refused and the mesh left unchanged",
          "[holes][degenerate]") {
  // Source: the Möbius strip is the classic non-orientable surface (common knowledge): its one
  // boundary curve cannot be oriented consistently with the triangles, so no fan agrees with
  // them. The refusal names the shell.
  Mesh m;
  const int n = 24;
  for (int i = 0; i < n; ++i) {
    const double t = 2 * std::numbers::pi * i / n;
    const Vec3 c{std::cos(t), std::sin(t), 0};
    const Vec3 d{0.2 * std::cos(t / 2) * std::cos(t), 0.2 * std::cos(t / 2) * std::sin(t),
                 0.2 * std::sin(t / 2)};
    m.positions.push_back(c + d);
    m.positions.push_back(c - d);
  }
  for (std::uint32_t i = 0; i < n; ++i) {
    const std::uint32_t a = 2 * i, b = 2 * i + 1;
    const std::uint32_t c = i + 1 < n ? 2 * i + 2 : 1, d = i + 1 < n ? 2 * i + 3 : 0;  // twist
    m.triangles.push_back({a, b, d});
    m.triangles.push_back({a, d, c});
  }
  m.shell.assign(m.triangles.size(), 0);
  m.shell_names = {"strip.obj"};
  const Mesh before = m;
  const HoleClosing hc = close_holes(m);
  CHECK_FALSE(hc.ok);
  CHECK_THAT(hc.reason, Contains("strip.obj"));
  CHECK(hc.holes.empty());
  CHECK(hc.added_triangles == 0);
  CHECK(m.triangles == before.triangles);
  CHECK(m.positions.size() == before.positions.size());
}

TEST_CASE("two loops touching at a vertex are refused with the vertex", "[holes][degenerate]") {
  // Source: definition of a simple loop — two triangles sharing only vertex 0 give a boundary
  // that passes that vertex twice. The reason gives the shell and the vertex's coordinates.
  Mesh m;
  m.positions = {{0.5, 0.25, 0}, {1, 1, 0}, {1, -1, 0.5}, {-1, 1, 0.2}, {-1, -1, 0}};
  m.triangles = {{0, 1, 2}, {0, 3, 4}};
  m.shell = {0, 0};
  m.shell_names = {"bowtie.stl"};
  const HoleClosing hc = close_holes(m);
  CHECK_FALSE(hc.ok);
  CHECK_THAT(hc.reason, Contains("bowtie.stl") && Contains("simple loops") && Contains("0.5"));
  CHECK(m.triangles.size() == 2);
}

// ----------------------------------------------------------------- hole_station_range --

TEST_CASE("station range of a base patch under normal and Mach planes", "[holes][stations]") {
  // Source: the station of a point is x − β (y cos θ + z sin θ), β = √(M² − 1) (Mach-plane
  // definition, section.h; Jones, NACA Report 1284, 1956). The aft loop of an n-gon cylinder
  // (n a multiple of 8) has vertices at every multiple of 45° in roll, so over the loop
  // y cos θ + z sin θ spans exactly [−r, r] at θ = 0°, 45°, 90°: range [L − βr, L + βr].
  const double r = 0.5, l = 3.0;
  const int n = 32;
  Mesh m = without(make_body_of_revolution({0.0, l}, {r, r}, n), [l](Vec3 p) { return p.x == l; });
  const HoleClosing hc = close_holes(m);
  REQUIRE(hc.holes.size() == 1);
  const StationRange normal = hole_station_range(m, hc.holes[0], {1.0, 0.0});
  CHECK(normal.lo == l);
  CHECK(normal.hi == l);
  const double beta = std::sqrt(2.0 * 2.0 - 1.0);
  for (double roll : {0.0, 45.0, 90.0}) {
    INFO("roll " << roll);
    const StationRange s = hole_station_range(m, hc.holes[0], {2.0, roll});
    CHECK_THAT(s.lo, WithinAbs(l - beta * r, 1e-12));
    CHECK_THAT(s.hi, WithinAbs(l + beta * r, 1e-12));
  }
}

// ---------------------------------------------------- largest section, too large holes --

TEST_CASE("largest normal section: a box's cross-section, a sphere's equator polygon",
          "[holes][sections]") {
  // Source: elementary geometry — every normal section of a box is b × c; the UV sphere's
  // largest section is its equator ring, a regular n-gon of radius r; 257 uniform stations
  // over [−r, r] put the middle one on the equator (rounding of the ring's x: ~1e-16 m).
  CHECK_THAT(largest_normal_section(make_box({0, -1, 0}, {5, 1.5, 0.8})),
             WithinRel(2.5 * 0.8, 1e-14));
  const double r = 1.2;
  const int segments = 40;
  const Mesh s = make_sphere({0, 0, 0}, r, 16, segments);
  CHECK_THAT(largest_normal_section(s), WithinRel(ngon_area(r, segments), 1e-12));
  // Three stations [−r, 0, r] also hit the equator; sampling only the two ends sees no area.
  CHECK_THAT(largest_normal_section(s, 3), WithinRel(ngon_area(r, segments), 1e-12));
  CHECK(largest_normal_section(s, 2) < 1e-12);
  CHECK(largest_normal_section(Mesh{}) == 0.0);
}

TEST_CASE("holes beyond a quarter of the largest section are too large to bound", "[holes]") {
  // Source: closed forms — a hole at ring k of a UV sphere is a regular n-gon of radius
  // r sin(kπ/rings) against the n-gon equator of radius r: the fraction is sin²(kπ/rings).
  // rings = 16: k = 2 → 0.146 (admitted), k = 3 → 0.309 (> kMaxHoleAreaFraction = 0.25).
  const double r = 1.0;
  const int rings = 16, n = 32;
  for (int k : {1, 2, 3}) {
    INFO("k = " << k);
    Mesh m = sphere_without_nose(r, rings, n, k);
    const HoleClosing hc = close_holes(m);
    REQUIRE(hc.ok);
    REQUIRE(hc.holes.size() == 1);
    const double rho = r * std::sin(std::numbers::pi * k / rings);
    CHECK_THAT(hc.holes[0].projected_area, WithinRel(ngon_area(rho, n), 1e-12));
    const StationRange sr = hole_station_range(m, hc.holes[0], {1.0, 0.0});
    CHECK_THAT(sr.lo, WithinAbs(ring_x(r, k, rings), 1e-15));
    CHECK_THAT(sr.hi, WithinAbs(ring_x(r, k, rings), 1e-15));
    const double fraction = std::pow(std::sin(std::numbers::pi * k / rings), 2);
    const std::string why = holes_too_large(m, hc.holes);
    if (fraction <= kMaxHoleAreaFraction) {
      CHECK(why.empty());
    } else {
      CHECK_THAT(why, Contains("too broken to bound") && Contains("25%"));
      // Both areas in the reason: the hole's ngon_area(rho), as printed by std::to_string (6
      // decimals), and the sampled largest section. Without its nose the sphere spans
      // [x_k, r], so no station falls on the equator: the nearest is within half a spacing,
      // (r − x_k)/512 < 3.6e-3 m, and the faceted band beside the equator narrows at
      // dr/dx = (1 − sin(7π/16))/cos(7π/16) = 0.099, so the sample is within
      // 2 · 0.099 · 3.6e-3 = 7.1e-4 of the equator's n-gon (relative).
      CHECK_THAT(why, Contains(std::to_string(ngon_area(rho, n))));
      const std::size_t at = why.find("largest section (");
      REQUIRE(at != std::string::npos);
      const double largest = std::stod(why.substr(at + 17));
      CHECK(largest <= ngon_area(r, n));
      CHECK_THAT(largest, WithinRel(ngon_area(r, n), 7.2e-4));
    }
  }
}

TEST_CASE("holes of no projected area are never too large", "[holes][degenerate]") {
  // A hole along the flow projects to nothing: "" whatever the mesh, even an empty one.
  Hole along;
  along.projected_area = 0.0;
  CHECK(holes_too_large(Mesh{}, {along}).empty());
  CHECK(holes_too_large(make_box({0, 0, 0}, {1, 1, 1}), {}).empty());
  // Several small holes add up: four of 0.07 m² against a 1 m² section is 0.28 > 0.25.
  Hole small;
  small.projected_area = 0.07;
  const Mesh cube = make_box({0, 0, 0}, {1, 1, 1});
  CHECK(holes_too_large(cube, {small, small, small}).empty());
  CHECK_FALSE(holes_too_large(cube, {small, small, small, small}).empty());
}
