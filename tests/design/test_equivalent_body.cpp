// Tests of the equivalent body of revolution (slicing/design/equivalent_body.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/design/equivalent_body.h"
#include "machcut/sections/section.h"
#include "machcut/drag/wave_drag.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

TEST_CASE("equivalent body of a prism is a cylinder of the same area", "[equivalent_body]") {
  // Source: a prism along x cut by any plane crossing only its walls projects to its polygon
  // (see test_section.cpp); regular 24-gon area (n/2) r² sin(2π/n) (elementary geometry).
  const Mesh prism = make_body_of_revolution({0.0, 20.0}, {0.5, 0.5}, 24);
  const SectionEngine engine(prism);
  const WaveDragModel model(engine, {}, {});
  const double area = 12 * 0.25 * std::sin(2 * std::numbers::pi / 24);
  for (double mach : {1.0, 1.5}) {
    const EquivalentBody b = equivalent_body(model, mach, 101, 36);
    REQUIRE(b.x.size() == 101);
    // Mid-length stations are away from the oblique end effects.
    CHECK_THAT(b.area[50], WithinRel(area, 1e-9));
    CHECK_THAT(b.radius[50], WithinRel(std::sqrt(area / std::numbers::pi), 1e-9));
    CHECK(b.rolls == (mach > 1 ? 36 : 1));
  }
}

TEST_CASE("equivalent body mesh is closed and encloses the area curve", "[equivalent_body]") {
  // Source: the volume of the mesh must equal that of its frustums (π h/3)(r₁² + r₁r₂ + r₂²)
  // (elementary geometry), and each cut at M = 1
  // must give back π r² (the rings are scaled to enclose it exactly).
  EquivalentBody b;
  b.x = {0.0, 1.0, 2.0, 3.0};
  b.radius = {0.0, 0.5, 0.6, 0.4};
  for (double r : b.radius) b.area.push_back(std::numbers::pi * r * r);
  const Mesh m = equivalent_body_mesh(b, 96);
  double v = 0.0;
  for (std::size_t i = 0; i + 1 < b.x.size(); ++i) {
    const double r1 = b.radius[i], r2 = b.radius[i + 1];
    v += std::numbers::pi / 3 * (r1 * r1 + r1 * r2 + r2 * r2) * (b.x[i + 1] - b.x[i]);
  }
  // Polygon frustum (h/3)(A₁ + √(A₁A₂) + A₂) with Aᵢ = π rᵢ² equals the circular one.
  CHECK_THAT(signed_volume(m), WithinRel(v, 1e-9));
  const SectionEngine e(m);
  const std::vector<double> at{1.0 + 1e-9, 2.0 + 1e-9};
  const auto a = e.areas({1.0, 0.0}, at);
  CHECK_THAT(a[0], WithinRel(b.area[1], 1e-6));
  CHECK_THAT(a[1], WithinRel(b.area[2], 1e-6));
  // Flat cap at the base: the last cut is π r² too.
  CHECK_THAT(e.areas({1.0, 0.0}, std::vector<double>{3.0})[0], WithinRel(b.area[3], 1e-9));
}

TEST_CASE("equivalent body CSV and mesh text", "[equivalent_body]") {
  EquivalentBody b;
  b.mach = 1.2;
  b.x = {0.0, 1.0};
  b.area = {0.0, std::numbers::pi};
  b.radius = {0.0, 1.0};
  const std::string csv = equivalent_body_csv({b});
  CHECK(csv.rfind("mach,x_m,area_m2,radius_m\n", 0) == 0);
  CHECK(csv.find("1.2,1,3.14159265358979,1") != std::string::npos);
  const Mesh m = equivalent_body_mesh(b, 8);
  const std::string stl = mesh_to_stl(m, "b");
  CHECK(stl.rfind("solid b", 0) == 0);
  const std::string obj = mesh_to_obj(m, "b");
  CHECK(obj.find("\nf ") != std::string::npos);
  CHECK(obj.rfind("# b\n", 0) == 0);
}
