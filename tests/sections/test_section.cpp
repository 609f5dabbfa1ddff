// Tests of the Mach-plane section engine (slicing/sections/section.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinRel;

namespace {
// Area of a regular n-gon of circumradius r: (n/2) r² sin(2π/n) (elementary geometry).
double ngon_area(int n, double r) { return 0.5 * n * r * r * std::sin(2 * std::numbers::pi / n); }

// A prism along x with a regular n-gon section: its side walls are parallel to x, so every
// plane that crosses only the walls cuts a section whose projection on the y-z plane is the
// n-gon itself, whatever the Mach number or roll angle.
Mesh make_prism(double x0, double x1, double r, int n) {
  return make_body_of_revolution({x0, x1}, {r, r}, n);
}
}  // namespace

TEST_CASE("normal cut of a box is its face area", "[section]") {
  // Source: elementary geometry, a 2 × 3 section of a box.
  const SectionEngine engine(make_box({0, -1, -1.5}, {10, 1, 1.5}));
  const std::vector<double> x{-1.0, 0.5, 5.0, 9.99, 10.5};
  const auto a = engine.areas({1.0, 0.0}, x);
  CHECK(a[0] == 0.0);
  CHECK_THAT(a[1], WithinRel(6.0, 1e-12));
  CHECK_THAT(a[2], WithinRel(6.0, 1e-12));
  CHECK_THAT(a[3], WithinRel(6.0, 1e-12));
  CHECK(a[4] == 0.0);
}

TEST_CASE("Mach-plane section of a prism projects to its polygon at any Mach and roll",
          "[section]") {
  // Source: the projection argument above; polygon area from elementary geometry.
  const int n = 24;
  const double r = 0.7;
  const SectionEngine engine(make_prism(0.0, 20.0, r, n));
  const double expected = ngon_area(n, r);
  for (double mach : {1.0, 1.2, 1.6, 2.5})
    for (double roll : {0.0, 17.0, 90.0, 135.0, 233.0}) {
      const double beta = std::sqrt(mach * mach - 1);
      // Stations whose plane stays within the walls: |X − xc| + β r < half length.
      const std::vector<double> x{10.0 - 5.0 * (1 - beta * r / 10), 10.0, 12.5};
      const auto a = engine.areas({mach, roll}, x);
      for (double v : a) CHECK_THAT(v, WithinRel(expected, 1e-9));
    }
}

TEST_CASE("cut area is the projected area times Mach", "[section]") {
  // Source: docs/method.md §3.2 — the Mach plane normal has n_x = 1/M, so S_proj = S_cut / M.
  const SectionEngine engine(make_prism(0.0, 20.0, 1.0, 32));
  const Section s = engine.section({2.0, 30.0}, 10.0);
  CHECK_THAT(s.cut_area, WithinRel(2.0 * s.area, 1e-15));
  CHECK_THAT(s.area, WithinRel(ngon_area(32, 1.0), 1e-9));
}

TEST_CASE("planes through vertices, along edges and coplanar with faces", "[section]") {
  // A box x ∈ [0, 10]; its vertices lie at x = 0 and x = 10. Convention (section.h): the
  // area at a station is the limit from upstream, S(X) = lim S(X − ε).
  const SectionEngine engine(make_box({0, -1, -1.5}, {10, 1, 1.5}));
  const auto a = engine.areas({1.0, 0.0}, std::vector<double>{0.0, 10.0});
  CHECK(a[0] == 0.0);                      // coplanar with the nose face: nothing upstream
  CHECK_THAT(a[1], WithinRel(6.0, 1e-12));  // coplanar with the base face: the full section
  // A prism whose ring vertices lie exactly on the plane X = 5 (a ring at x = 5).
  const Mesh m = make_body_of_revolution({0.0, 5.0, 10.0}, {1.0, 1.0, 1.0}, 16);
  const SectionEngine e2(m);
  const auto b = e2.areas({1.0, 0.0}, std::vector<double>{5.0, std::nextafter(5.0, 6.0)});
  CHECK_THAT(b[0], WithinRel(ngon_area(16, 1.0), 1e-12));
  CHECK_THAT(b[1], WithinRel(ngon_area(16, 1.0), 1e-12));
  // Mach plane through a vertex of the ring and along no edge: still the polygon.
  const double beta = std::sqrt(1.5 * 1.5 - 1);
  const double through_vertex = 5.0 - beta * 1.0;  // vertex (5, 1, 0) at roll 0
  const auto c = e2.areas({1.5, 0.0}, std::vector<double>{through_vertex});
  CHECK_THAT(c[0], WithinRel(ngon_area(16, 1.0), 1e-12));
}

TEST_CASE("oblique section of a sphere is a circle of radius sqrt(R^2 - d^2)", "[section]") {
  // Source: elementary geometry. A plane at distance d from the centre of a sphere of radius
  // R cuts a circle of radius √(R² − d²); its projection on the y-z plane has area
  // π(R² − d²)/M. The faceted sphere converges as O(h²): tolerance 1e-3 at 400 × 800 facets.
  const double R = 2.0;
  const SectionEngine engine(make_sphere({5, 0.3, -0.2}, R, 400, 800));
  for (double mach : {1.0, 1.4, 2.0})
    for (double roll : {0.0, 45.0, 200.0}) {
      const MachPlanes p{mach, roll};
      const double c = station_of({5, 0.3, -0.2}, p);  // station of the plane through the centre
      for (double off : {0.0, 0.8, -1.5}) {
        const double d = std::abs(off) / mach;  // plane-to-centre distance: |ΔX| · |n_x|
        const double expected = std::numbers::pi * (R * R - d * d) / mach;
        const auto a = engine.areas(p, std::vector<double>{c + off});
        CHECK_THAT(a[0], WithinRel(expected, 1e-3));
      }
    }
}

TEST_CASE("normal section of a torus is an annulus", "[section]") {
  // Source: elementary geometry. Torus about x, major radius R, tube radius a: the plane
  // x = cx + t cuts an annulus between R ± w, w = √(a² − t²): area 4πRw.
  const double R = 3.0, a = 0.5;
  const SectionEngine engine(make_torus(0.0, R, a, 600, 300));
  for (double t : {0.0, 0.2, -0.35}) {
    const double w = std::sqrt(a * a - t * t);
    const auto s = engine.areas({1.0, 0.0}, std::vector<double>{t});
    CHECK_THAT(s[0], WithinRel(4 * std::numbers::pi * R * w, 2e-3));
  }
}

TEST_CASE("cone section areas grow quadratically", "[section]") {
  // Source: elementary geometry: a cone of base radius Rb and length L has S(x) = π(Rb x/L)².
  const double L = 4.0, Rb = 1.0;
  const SectionEngine engine(make_body_of_revolution({0.0, L}, {0.0, Rb}, 2000));
  for (double x : {1.0, 2.0, 3.5}) {
    const auto s = engine.areas({1.0, 0.0}, std::vector<double>{x});
    CHECK_THAT(s[0], WithinRel(std::numbers::pi * std::pow(Rb * x / L, 2), 1e-5));
  }
}

TEST_CASE("areas are invariant to rotating the mesh about the flow axis with the roll angle",
          "[section]") {
  // Rotating the mesh by φ about x and the roll angle by φ gives the same planes relative to
  // the body (docs/method.md §3.1: planes depend on y cos θ + z sin θ).
  const Mesh m = make_box({0, -1, -0.4}, {6, 2, 1.1});
  const SectionEngine a(m), b(rotate_about_x(m, 40.0));
  const std::vector<double> x{0.5, 1.7, 3.3, 5.2};
  const auto sa = a.areas({1.7, 10.0}, x);
  const auto sb = b.areas({1.7, 50.0}, x);
  for (std::size_t i = 0; i < x.size(); ++i) CHECK_THAT(sb[i], WithinRel(sa[i], 1e-9));
}

TEST_CASE("per-shell areas add up to the total and rolls agree with single queries",
          "[section]") {
  Mesh m = make_body_of_revolution({0, 2, 8, 10}, {0, 1, 1, 0}, 64);
  Mesh box = make_box({3, 2, -0.5}, {5, 3, 0.5});
  const Mesh both = concatenate({m, box});
  const SectionEngine engine(both);
  std::vector<std::vector<double>> per;
  const std::vector<double> x{1.0, 4.0, 9.0};
  const auto total = engine.areas({1.3, 20.0}, x, &per);
  REQUIRE(per.size() == 2);
  for (std::size_t i = 0; i < x.size(); ++i)
    CHECK_THAT(per[0][i] + per[1][i], WithinRel(total[i], 1e-12));
  const std::vector<double> rolls{20.0, 75.0};
  const auto by_roll = engine.areas_for_rolls(1.3, rolls, [&](const StationRange&) { return x; });
  for (std::size_t i = 0; i < x.size(); ++i) {
    CHECK_THAT(by_roll[0][i], WithinRel(total[i], 1e-12));
    CHECK_THAT(by_roll[1][i],
               WithinRel(engine.areas({1.3, 75.0}, std::vector<double>{x[i]})[0], 1e-12));
  }
}

TEST_CASE("section segments reproduce the area and the station range spans the model",
          "[section]") {
  const SectionEngine engine(make_sphere({0, 0, 0}, 1.0, 40, 80));
  const MachPlanes p{1.5, 30.0};
  const StationRange r = engine.range(p);
  // The sphere's extreme stations are ±M·R (support function of the plane normal).
  CHECK_THAT(r.hi, WithinRel(1.5, 2e-3));
  CHECK_THAT(-r.lo, WithinRel(1.5, 2e-3));
  const Section s = engine.section(p, 0.3);
  CHECK(!s.segments.empty());
  CHECK_THAT(s.area, WithinRel(engine.areas(p, std::vector<double>{0.3})[0], 1e-12));
  const auto st = make_stations(r, 5, Spacing::cosine);
  CHECK(st.front() == r.lo);
  CHECK(st.back() == r.hi);
  CHECK_THAT(st[2], Catch::Matchers::WithinAbs(0.5 * (r.lo + r.hi), 1e-12));
}
