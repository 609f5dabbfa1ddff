// Tests of the small reference helpers (slicing/sections/plane_and_slope.cpp).
#include <catch2/catch.hpp>

#include <cmath>

#include "machcut/sections/plane_and_slope.h"
#include "machcut/sections/section.h"

using namespace machcut;
using Catch::Matchers::WithinAbs;

TEST_CASE("plane_point lies on the Mach plane and inverts plane_coordinates", "[reference]") {
  // Source: the plane definition x − β(y cos θ + z sin θ) = X (Jones, NACA Report 1284) and the
  // in-plane frame documented in section.h, evaluated by their own code paths.
  for (double mach : {1.0, 1.3, 2.5})
    for (double roll : {0.0, 37.0, 90.0, 211.0}) {
      const MachPlanes planes{mach, roll};
      for (double u : {-2.0, 0.0, 1.5})
        for (double v : {-0.7, 0.0, 3.0}) {
          const Vec3 p = plane_point(planes, 4.25, u, v);
          CHECK_THAT(station_of(p, planes), WithinAbs(4.25, 1e-12));
          const auto uv = plane_coordinates(p, planes, 4.25);
          CHECK_THAT(uv[0], WithinAbs(u, 1e-12));
          CHECK_THAT(uv[1], WithinAbs(v, 1e-12));
        }
    }
}

TEST_CASE("plane_point at M = 1 and θ = 0 is (X, u, v)", "[reference]") {
  // Source: section.h — at M = 1, θ = 0 the in-plane coordinates are (y, z).
  const Vec3 p = plane_point({1.0, 0.0}, 2.0, 0.5, -0.25);
  CHECK(p.x == 2.0);
  CHECK(p.y == 0.5);
  CHECK(p.z == -0.25);
}

TEST_CASE("area_slope is exact for a quadratic on uneven stations", "[reference]") {
  // Source: the three-point Lagrange derivative is exact for polynomials of degree <= 2
  // (common practice; any numerical-analysis text). S = 3x² − 2x + 1, S′ = 6x − 2.
  const std::vector<double> x{0.0, 0.3, 1.0, 1.2, 2.5, 4.0};
  std::vector<double> s;
  for (double xi : x) s.push_back(3 * xi * xi - 2 * xi + 1);
  const auto d = area_slope(x, s);
  REQUIRE(d.size() == x.size());
  for (std::size_t i = 0; i < x.size(); ++i) CHECK_THAT(d[i], WithinAbs(6 * x[i] - 2, 1e-10));
}

TEST_CASE("area_slope degenerate sizes", "[reference]") {
  CHECK(area_slope(std::vector<double>{}, std::vector<double>{}).empty());
  const auto one = area_slope(std::vector<double>{1.0}, std::vector<double>{2.0});
  REQUIRE(one.size() == 1);
  CHECK(one[0] == 0.0);
  const auto two = area_slope(std::vector<double>{0.0, 2.0}, std::vector<double>{1.0, 5.0});
  CHECK(two[0] == 2.0);  // the chord slope (common practice)
  CHECK(two[1] == 2.0);
}
