// Tests of the validity features (slicing/drag/validity.cpp): which faces are steeper than the
// Mach angle, how they are grouped and named, and what the drag says about them.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <numbers>

#include "machcut/drag/ends.h"
#include "machcut/drag/validity.h"
#include "machcut/drag/wave_drag.h"
#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::Contains;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
std::vector<ValidityFeature> features_of(const Mesh& m, double mach) {
  return steep_features(m, mach, triangle_parts(m, Mesh{}), m.shell_names, {});
}

// A closed cone of half-angle `deg` and base radius r along x (apex at x = 0), flat base.
Mesh cone(double deg, double r, int segments) {
  const double l = r / std::tan(deg * std::numbers::pi / 180.0);
  Mesh m = make_body_of_revolution({0.0, l}, {0.0, r}, segments);
  m.shell_names = {"cone"};
  return m;
}
}  // namespace

TEST_CASE("the steepness limit is the Mach angle, 60 degrees at M = 1", "[validity]") {
  // Source: the Mach angle μ = asin(1/M) (common practice); M = 2 gives 30°, M = √2 45°; the
  // cap at 60° is this project's choice for M near 1 (docs/method.md §9.1).
  CHECK_THAT(steep_limit_deg(2.0), WithinAbs(30.0, 1e-12));
  CHECK_THAT(steep_limit_deg(std::sqrt(2.0)), WithinAbs(45.0, 1e-12));
  CHECK_THAT(steep_limit_deg(1.0), WithinAbs(60.0, 1e-12));
  CHECK_THAT(steep_limit_deg(1.1), WithinAbs(60.0, 1e-12));  // μ = 65.4° there
}

TEST_CASE("a cone is a feature exactly when it is steeper than the Mach cone", "[validity]") {
  // Source: a cone's faces are inclined to the flow by its half-angle δ (elementary geometry),
  // so it counts when δ > μ; its frontal area is that of its base polygon, (n/2) r² sin(2π/n).
  const Mesh c = cone(35.0, 0.5, 24);
  const std::vector<ValidityFeature> at2 = features_of(c, 2.0);  // μ = 30°
  // The lateral surface; the flat base (90°, facing aft) is a second feature.
  REQUIRE(at2.size() == 2);
  const double base = 0.5 * 24 * 0.25 * std::sin(2 * std::numbers::pi / 24);
  const auto front = std::find_if(at2.begin(), at2.end(),
                                  [](const ValidityFeature& f) { return f.faces_upstream; });
  REQUIRE(front != at2.end());
  CHECK_THAT(front->frontal_area, WithinRel(base, 1e-12));
  CHECK_THAT(front->x_from, WithinAbs(0.0, 1e-12));
  CHECK_THAT(front->steepest_deg, WithinAbs(35.0, 0.5));  // facets of a 24-gon: within 0.5°
  CHECK(front->triangles.size() == 24);
  // At M = 1.5, μ = 41.8°: only the base is left.
  const std::vector<ValidityFeature> at15 = features_of(c, 1.5);
  REQUIRE(at15.size() == 1);
  CHECK_FALSE(at15.front().faces_upstream);
}

TEST_CASE("faces closed by a wake are not features", "[validity]") {
  // Source: the wake continues a flat aft face at constant area (docs/method.md §7.1), so the
  // face makes no step: only the front face of a box remains.
  const Mesh box = make_box({0, -1, -0.5}, {4, 1, 0.5});
  const Mesh wake = flat_face_tubes(box, +1, far_station(box)).mesh;
  const SectionEngine engine(box);
  const WaveDragModel model(engine, {}, {}, wake);
  const std::vector<ValidityFeature> f = model.features(1.5);
  REQUIRE(f.size() == 1);
  CHECK(f.front().faces_upstream);
  CHECK_THAT(f.front().frontal_area, WithinRel(2.0, 1e-12));  // 2 m × 1 m
  CHECK_THAT(f.front().x_from, WithinAbs(0.0, 1e-12));
  CHECK_THAT(f.front().x_to, WithinAbs(0.0, 1e-12));
}

TEST_CASE("features of a united model are named by the part they lie on", "[validity]") {
  // Source: construction — two boxes as one shell named as a union, the parts as given; every
  // triangle lies on exactly one part's surface.
  const Mesh a = make_box({0, -1, -1}, {2, 1, 1});
  const Mesh b = make_box({3, -0.2, -0.2}, {4, 0.2, 0.2});
  Mesh parts = concatenate({a, b});
  parts.shell_names = {"front.obj#1", "rear.obj#1"};
  Mesh united = parts;
  std::fill(united.shell.begin(), united.shell.end(), 0u);
  united.shell_names = {"front.obj#1 + rear.obj#1"};
  const std::vector<std::uint32_t> part = triangle_parts(united, parts);
  for (std::size_t t = 0; t < part.size(); ++t) CHECK(part[t] == parts.shell[t]);
  const std::vector<ValidityFeature> f = steep_features(united, 1.5, part, parts.shell_names, {});
  REQUIRE(f.size() == 4);             // front and aft faces of each box
  CHECK(f[0].part == "front.obj#1");  // largest frontal area first: 4 m²
  CHECK_THAT(f[0].frontal_area, WithinRel(4.0, 1e-12));
  CHECK(std::count_if(f.begin(), f.end(),
                      [](const ValidityFeature& v) { return v.part == "rear.obj#1"; }) == 2);
}

TEST_CASE("models within the theory have no features", "[validity]") {
  // Source: a pointed body whose nose half-angle (16°) is inside the Mach cone at M 2 (30°), and
  // a 4 % biconvex wing (surface slopes below 9.1°, elementary calculus), are within small-
  // disturbance theory; so is the M = 1 normal-cut curve of the slender body.
  const Mesh body =
      body_with_area([](double u) { return 16 * std::pow(u * (1 - u), 2); }, 8.0, 200, 64);
  const SectionEngine engine(body);
  const WaveDragModel model(engine, {}, {});
  for (double mach : {1.0, 1.5, 2.0}) {
    const MachDrag d = model.at_mach(mach);
    INFO("M " << mach);
    CHECK(d.features.empty());
    CHECK(d.advice.empty());
  }
}

TEST_CASE("a box fin's front face is found, shared out and explained", "[validity]") {
  // Source: elementary geometry — the front face of the box fin, 0.06 m × 0.7 m (the shells
  // are not united, so all of it), faces the flow at 90°; its share (docs/method.md §9.1) is
  // positive, since a face raising the area adds drag, and less than the whole, since the body has
  // drag of its own.
  const Mesh body =
      make_body_of_revolution({0.0, 1.5, 3.0, 4.5, 5.5, 6.0}, {0.0, 0.45, 0.5, 0.45, 0.3, 0.0}, 24);
  Mesh fin = make_box({4.5, -0.03, 0.3}, {5.5, 0.03, 1.0});
  Mesh model_mesh = concatenate({body, fin});
  model_mesh.shell_names = {"body", "fin"};
  const Mesh wakes = flat_face_tubes(model_mesh, +1, far_station(model_mesh)).mesh;
  const SectionEngine engine(model_mesh);
  const WaveDragModel model(engine, {}, {}, wakes);
  const MachDrag d = model.at_mach(1.6);
  REQUIRE(d.ok);
  const auto fin_front =
      std::find_if(d.features.begin(), d.features.end(),
                   [](const ValidityFeature& f) { return f.part == "fin" && f.faces_upstream; });
  REQUIRE(fin_front != d.features.end());
  CHECK_THAT(fin_front->frontal_area, WithinRel(0.06 * 0.7, 1e-9));
  CHECK_THAT(fin_front->x_from, WithinAbs(4.5, 1e-12));
  CHECK(fin_front->steepest_deg > 89.9);
  CHECK(fin_front->drag_share > 0.0);
  CHECK(fin_front->drag_share < 1.0);
  CHECK_THAT(d.advice, Contains("fin") && Contains("flow-through") && Contains("of D/q"));
}
