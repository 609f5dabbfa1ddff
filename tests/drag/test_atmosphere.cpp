// Tests of the U.S. Standard Atmosphere 1976 (slicing/drag/atmosphere.cpp) against its table.
#include <catch2/catch.hpp>

#include "machcut/drag/atmosphere.h"

using namespace machcut;
using Catch::Matchers::WithinRel;

TEST_CASE("standard atmosphere matches the 1976 table", "[atmosphere]") {
  // Source: U.S. Standard Atmosphere, 1976 (NOAA-S/T 76-1562), table values as quoted in
  // docs/method.md §10 (geopotential altitude).
  struct Row { double h, t, p, rho, a; };
  for (const Row& r : {Row{0, 288.15, 101325, 1.2250, 340.29}, Row{5000, 255.65, 54019.9, 0.73612, 320.53},
                       Row{11000, 216.65, 22632.1, 0.36392, 295.07},
                       Row{20000, 216.65, 5474.9, 0.088035, 295.07}}) {
    const AtmosphereState s = standard_atmosphere(r.h);
    CHECK_THAT(s.temperature, WithinRel(r.t, 1e-6));
    CHECK_THAT(s.pressure, WithinRel(r.p, 2e-5));
    CHECK_THAT(s.density, WithinRel(r.rho, 5e-5));
    CHECK_THAT(s.speed_of_sound, WithinRel(r.a, 2e-5));
  }
}

TEST_CASE("upper layers of the standard atmosphere", "[atmosphere]") {
  // Source: U.S. Standard Atmosphere, 1976, Table 4 (from memory): 32 km geopotential
  // T = 228.65 K, p = 868.02 Pa; 47 km T = 270.65 K, p = 110.91 Pa; 71 km T = 214.65 K,
  // p = 3.9564 Pa.
  CHECK_THAT(standard_atmosphere(32000).temperature, WithinRel(228.65, 1e-6));
  CHECK_THAT(standard_atmosphere(32000).pressure, WithinRel(868.02, 2e-4));
  CHECK_THAT(standard_atmosphere(47000).temperature, WithinRel(270.65, 1e-6));
  CHECK_THAT(standard_atmosphere(47000).pressure, WithinRel(110.91, 5e-4));
  CHECK_THAT(standard_atmosphere(71000).pressure, WithinRel(3.9564, 1e-3));
  CHECK(atmosphere_in_range(0.0));
  CHECK_FALSE(atmosphere_in_range(-1.0));
  CHECK_FALSE(atmosphere_in_range(90000.0));
}

TEST_CASE("dynamic pressure is half gamma p M squared", "[atmosphere]") {
  // Source: q = ½ρU² = ½γpM² with γ = 1.4 (docs/method.md §10; common practice). Sea level, M = 2:
  // ½ · 1.4 · 101325 · 4 = 283 710 Pa; also ½ρ(Ma)² with the table's ρ and a.
  CHECK_THAT(dynamic_pressure(101325, 2.0), WithinRel(283710.0, 1e-12));
  const double rho = 1.2250, a = 340.29;
  CHECK_THAT(dynamic_pressure(101325, 2.0), WithinRel(0.5 * rho * (2 * a) * (2 * a), 1e-4));
}
