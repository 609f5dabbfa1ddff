// The Study (slicing/study/study.cpp): the one assembly of the stages behind every front end.
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/design/optimum.h"
#include "machcut/study/comparison.h"
#include "machcut/study/study.h"
#include "test_support.h"

using namespace machcut;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

constexpr double kPi = std::numbers::pi;


// A cylinder of radius r from x = 0 to x = l with a pointed cone nose of length n, flat base.
Mesh based_body(double r, double n, double l, int seg) {
  std::vector<double> x{0.0}, rad{0.0};
  for (int i = 1; i <= 20; ++i) {
    x.push_back(n * i / 20.0);
    rad.push_back(r * i / 20.0);
  }
  x.push_back(l);
  rad.push_back(r);
  return test::make_body_of_revolution(x, rad, seg);
}

// Linear interpolation of a curve's area at x (0 outside).
double area_at_x(const AreaCurve& c, double x) {
  for (std::size_t i = 1; i < c.x.size(); ++i)
    if (x >= c.x[i - 1] && x <= c.x[i])
      return c.area[i - 1] + (x - c.x[i - 1]) / (c.x[i] - c.x[i - 1]) * (c.area[i] - c.area[i - 1]);
  return 0.0;
}

}  // namespace

TEST_CASE("study: area of a box is its cross-section; parts and error bounds come along", "[study]") {
  // Closed form: a normal cut through a 1 × 0.4 × 0.3 box has area 0.12 m².
  const Study s(test::prepared_model(test::make_box({0, 0, 0}, {1, 0.4, 0.3})), EndSetup{});
  AreaRequest q;
  q.stations = 11;
  const AreaResult r = s.area(q);
  REQUIRE(r.curve.x.size() == 11);
  for (std::size_t i = 1; i + 1 < r.curve.x.size(); ++i) CHECK_THAT(r.curve.area[i], WithinRel(0.12, 1e-12));
  REQUIRE(r.curve.per_shell.size() == 1);
  CHECK(r.part_names == s.model().mesh.shell_names);
  CHECK(r.curve.error_bound.empty());  // closed mesh
  q.at = {-1.0, 0.5};
  const AreaResult outside = s.area(q);
  CHECK(outside.outside == std::vector<double>{-1.0});
  CHECK(outside.curve.area[0] == 0.0);
}

TEST_CASE("study: every front end's limits come from one place", "[study]") {
  const Study s(test::prepared_model(test::make_box({0, 0, 0}, {1, 1, 1})), EndSetup{});
  AreaRequest q;
  q.mach = kMaxMach * 1.01;
  CHECK_THROWS_AS(s.area(q), InputError);
  q.mach = 0.99;
  CHECK_THROWS_WITH(s.area(q), Catch::Contains("--mach: Mach 0.99 is below 1"));
  q.mach = 1.2;
  q.roll_deg = 1e308;
  CHECK_THROWS_WITH(s.area(q), Catch::Contains("--roll"));
  CHECK_THROWS_AS(s.drag_at(25.0), InputError);
  CHECK_THROWS_WITH(parse_number("", "--x"), "--x: empty where a number is expected");
  CHECK_THROWS_WITH(parse_number("1e400", "--x"), Catch::Contains("not a finite number"));
  CHECK(readable_number(-1.0) == "-1");
  CHECK(readable_number(1e308) == "1e+308");  // never 310 digits
}

TEST_CASE("study: the drag is computed once per Mach and option set", "[study]") {
  // Sears–Haack body at M = 1: D/q = 128 V²/(π l⁴) (Sears 1947), the mesh's own V and l.
  const Mesh m = test::body_with_area([](double u) { return 0.5 * std::pow(4 * u * (1 - u), 1.5); }, 10.0, 161, 96);
  const Study s(test::prepared_model(m), EndSetup{});
  const MachDrag a = s.drag_at(1.0);
  REQUIRE(a.ok);
  CHECK_THAT(a.drag_area, WithinRel(s.measures().sears_haack_drag_area, 0.01));
  CHECK_THAT(s.measures().sears_haack_drag_area,
             WithinRel(128 * std::pow(signed_volume(m), 2) / (kPi * std::pow(10.0, 4)), 1e-9));
  const MachDrag b = s.drag_at(1.0);
  CHECK(b.drag_area == a.drag_area);
  CHECK(&s.drag_model({}) == &s.drag_model({}));
  WaveDragOptions other;
  other.rel_tol = 0.01;
  CHECK(&s.drag_model(other) != &s.drag_model({}));
}

TEST_CASE("study: one base area for the drag's wake and the least-drag target", "[study]") {
  // A cylinder with a flat base of radius 0.5: the wake carries πr² (polygon: (n/2) r² sin(2π/n))
  // downstream, and the target's base area "model" is that same area.
  const int seg = 64;
  const Study s(test::prepared_model(based_body(0.5, 2.0, 8.0, seg)), EndSetup{});
  const double polygon = 0.5 * seg * 0.25 * std::sin(2 * kPi / seg);
  CHECK_THAT(s.measures().base_area, WithinRel(polygon, 1e-9));
  CHECK(s.measures().base_area <= s.measures().max_area * (1 + 1e-12));
  TargetRequest t;
  const TargetResult r = s.target(t);
  REQUIRE(r.problem.base_area.has_value());
  CHECK(*r.problem.base_area == s.measures().base_area);
  CHECK_THAT(r.body.base_area, WithinRel(polygon, 1e-6));
  const MachDrag d = s.drag_at(1.2);
  REQUIRE(d.ok);
  CHECK_THAT(d.max_base_area, WithinRel(polygon, 1e-6));
  // No wake: nothing closes the base; the base area measure is 0.
  EndSetup no_wake;
  no_wake.wakes = false;
  const Study bare(test::prepared_model(based_body(0.5, 2.0, 8.0, seg)), no_wake);
  CHECK(bare.measures().base_area == 0.0);
}

TEST_CASE("study: the target checks its options and names them", "[study]") {
  const Study s(test::prepared_model(based_body(0.5, 2.0, 8.0, 48)), EndSetup{});
  TargetRequest t;
  t.fix = {"nan"};
  CHECK_THROWS_WITH(s.target(t), Catch::Contains("--fix"));
  t.fix = {"20"};  // outside the body
  CHECK_THROWS_WITH(s.target(t), Catch::Contains("not inside the body"));
  t.fix = {};
  t.base = "-5";
  CHECK_THROWS_WITH(s.target(t), Catch::Contains("--base-area"));
  t.base = "model";
  t.max_area = -1;
  CHECK_THROWS_WITH(s.target(t), Catch::Contains("--max-area"));
}

TEST_CASE("study: an unknown capture names --capture; a capture subtracts its inlet", "[study]") {
  EndSetup bad;
  bad.captures = {"nothing.obj"};
  CHECK_THROWS_WITH(Study(test::prepared_model(based_body(0.5, 2.0, 8.0, 32)), bad), Catch::Contains("--capture"));
  bad.captures = {"part=abc"};
  CHECK_THROWS_WITH(Study(test::prepared_model(based_body(0.5, 2.0, 8.0, 32)), bad), Catch::Contains("--capture"));
}

TEST_CASE("study: the zone split adds up to the table's change at M = 1", "[study]") {
  // Two Sears–Haack-like bodies of different volume: the zones' sum equals B − A of their
  // M = 1 drags (both on the cells the drags ended on).
  const Mesh ma = test::body_with_area([](double u) { return 0.5 * std::pow(4 * u * (1 - u), 1.5); }, 10.0, 121, 64);
  const Mesh mb = test::body_with_area([](double u) { return 0.6 * std::pow(4 * u * (1 - u), 1.5); }, 10.0, 121, 64);
  const Study a(test::prepared_model(ma), EndSetup{}), b(test::prepared_model(mb), EndSetup{});
  CompareRequest q;
  q.machs = {1.0, 1.5};
  const Comparison c = compare_studies(a, b, q);
  REQUIRE(c.rows.size() == 2);
  REQUIRE(c.splits.size() == 2);
  REQUIRE(c.splits[0].zones.ok);
  REQUIRE(c.splits[0].table_delta.has_value());
  CHECK_THAT(c.splits[0].zones.delta_drag_area, WithinRel(*c.splits[0].table_delta, 1e-3));
  // At M 1.5 the split is roll-averaged on evenly spaced rolls; a body of revolution has the
  // same curve at every roll, so its sum equals the table's change as well.
  REQUIRE(c.splits[1].zones.ok);
  REQUIRE(c.splits[1].table_delta.has_value());
  CHECK_THAT(c.splits[1].zones.delta_drag_area, WithinRel(*c.splits[1].table_delta, 1e-3));
  // Sears–Haack: D/q ∝ V², so B/A = (0.6/0.5)² (Sears 1947).
  CHECK_THAT(c.rows[0].b.drag_area / c.rows[0].a.drag_area, WithinRel(1.44, 0.01));
}

TEST_CASE("study: with a captured nacelle the design curve and the correction have no inlet step", "[study]") {
  // A straight flow-through nacelle modelled as a solid cylinder with flat faces: its captured
  // stream tube (inlet face carried downstream, subtracted) and its exit wake cancel its own
  // area exactly (common practice for flow-through nacelles), so the curve the drag integrates
  // is the fuselage's own, and the correction asks for no step at the inlet.
  const Mesh fuselage = test::body_with_area([](double u) { return 0.8 * std::pow(4 * u * (1 - u), 1.5); }, 20.0, 121, 64);
  Mesh nacelle = test::make_body_of_revolution({8.0, 12.0}, {0.4, 0.4}, 48);
  for (Vec3& p : nacelle.positions) p.y += 2.0;
  Mesh both = concatenate({fuselage, nacelle});
  both.shell_names = {"fuselage", "nacelle"};
  PreparedModel p = test::prepared_model(both);
  EndSetup ends;
  ends.captures = {"nacelle"};
  const Study s(std::move(p), ends);
  const AreaCurve closed = s.design_curve(1.0, 201);
  const Study alone(test::prepared_model(fuselage), EndSetup{});
  const AreaCurve bare = alone.design_curve(1.0, 201);
  REQUIRE(closed.x.size() == bare.x.size());
  const double inlet = 0.5 * 48 * 0.16 * std::sin(2 * kPi / 48);  // the nacelle's polygon area
  double worst = 0.0;
  for (std::size_t i = 0; i < closed.x.size(); ++i)
    worst = std::max(worst, std::fabs(closed.area[i] - area_at_x(bare, closed.x[i])));
  CHECK(worst < 1e-6 * inlet);
  const TargetResult t = s.target(TargetRequest{});
  double jump = 0.0;
  for (std::size_t i = 1; i < t.correction.x.size(); ++i)
    if (t.correction.x[i] > 7.5 && t.correction.x[i - 1] < 8.5)
      jump = std::max(jump, std::fabs(t.correction.delta_area[i] - t.correction.delta_area[i - 1]));
  CHECK(jump < 0.05 * inlet);
}

TEST_CASE("study: the target at a design Mach works on the roll-averaged Mach-plane curve", "[study]") {
  // The least-drag body keeps the model's volume at every Mach (∫S̄ dX = V for Mach-plane
  // cuts, docs/method.md §3.2), spans the equivalent body's station range, and honours a pin.
  const Mesh m = test::body_with_area([](double u) { return 0.5 * std::pow(4 * u * (1 - u), 1.5); }, 10.0, 121, 64);
  const Study s(test::prepared_model(m), EndSetup{});
  TargetRequest q;
  q.mach = 1.5;
  q.fix = {"5:0.45"};
  const TargetResult t = s.target(q);
  REQUIRE(t.curve.x.size() == 201);
  CHECK(t.curve.x.front() < 0.0);  // Mach planes reach the nose earlier off the axis
  double v = 0.0, vc = 0.0;
  for (std::size_t i = 1; i < t.correction.x.size(); ++i) {
    const double dx = t.correction.x[i] - t.correction.x[i - 1];
    v += 0.5 * dx * (t.correction.target[i] + t.correction.target[i - 1]);
    vc += 0.5 * dx * (t.correction.area[i] + t.correction.area[i - 1]);
  }
  CHECK_THAT(vc, WithinRel(signed_volume(m), 2e-3));  // trapezoid of the averaged curve
  CHECK_THAT(v, WithinRel(signed_volume(m), 2e-3));
  CHECK_THAT(least_drag_area(t.body, 5.0), WithinRel(0.45, 1e-9));
}
