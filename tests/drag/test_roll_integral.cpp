// Tests of the adaptive roll-angle average (slicing/drag/roll_integral.cpp) on analytic D(θ).
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/drag/roll_integral.h"
#include "test_support.h"

using namespace machcut;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
RollProvider from(double (*f)(double), bool* hit_break = nullptr) {
  return [f, hit_break](std::span<const double> rolls) {
    std::vector<RollSample> out;
    for (double r : rolls) {
      if (hit_break && std::fabs(std::remainder(r - 90.0, 180.0)) < 1e-12) *hit_break = true;
      RollSample s;
      s.roll_deg = r;
      s.drag_area = f(r * std::numbers::pi / 180.0);
      out.push_back(s);
    }
    return out;
  };
}
}  // namespace

TEST_CASE("smooth periodic integrands average exactly", "[roll]") {
  // Source: (1/2π)∮ (a + cos θ + cos 2θ) dθ = a (elementary calculus).
  auto f = [](double t) { return 2.0 + std::cos(t) + 0.5 * std::cos(2 * t); };
  RollIntegralOptions o;
  const RollIntegral r = integrate_rolls(from(+f), o);
  CHECK(r.converged);
  CHECK_THAT(r.drag_area, WithinRel(2.0, 1e-10));
  // With the matching symmetries the reduced ranges give the same average.
  auto lr = [](double t) { return 2.0 + std::sin(t) + std::cos(2 * t); };  // D(θ) = D(π − θ)
  o.symmetry = RollSymmetry::left_right;
  CHECK_THAT(integrate_rolls(from(+lr), o).drag_area, WithinRel(2.0, 1e-10));
  auto ud = [](double t) { return 2.0 + std::cos(t) + std::cos(4 * t); };  // D(θ) = D(−θ)
  o.symmetry = RollSymmetry::up_down;
  CHECK_THAT(integrate_rolls(from(+ud), o).drag_area, WithinRel(2.0, 1e-10));
  auto both = [](double t) { return 2.0 + std::cos(2 * t); };
  o.symmetry = RollSymmetry::both;
  CHECK_THAT(integrate_rolls(from(+both), o).drag_area, WithinRel(2.0, 1e-10));
}

TEST_CASE("log-singular integrand converges with breaks and an honest error", "[roll]") {
  // Source: (1/2π)∮ −ln|cos θ| dθ = ln 2 (Gradshteyn & Ryzhik 4.224 (from memory); the
  // classic ∫₀^{π/2} ln cos θ dθ = −(π/2) ln 2). Singular at θ = ±90°, like D(θ) of an
  // unswept wing (docs/method.md §5.3).
  auto f = [](double t) { return -std::log(std::fabs(std::cos(t))); };
  for (RollSymmetry s : {RollSymmetry::none, RollSymmetry::left_right, RollSymmetry::both}) {
    RollIntegralOptions o;
    o.rel_tol = 1e-4;
    o.symmetry = s;
    o.breaks_deg = {90.0, 270.0};
    bool hit = false;
    const RollIntegral r = integrate_rolls(from(+f, &hit), o);
    CHECK_FALSE(hit);
    CHECK(r.converged);
    CHECK(std::fabs(r.drag_area - std::log(2.0)) <= r.quadrature_error);
    CHECK_THAT(r.drag_area, WithinRel(std::log(2.0), 1e-4));
  }
}

TEST_CASE("evaluation budget is respected and reported", "[roll]") {
  auto f = [](double t) { return -std::log(std::fabs(std::cos(t))); };
  RollIntegralOptions o;
  o.rel_tol = 1e-14;
  o.max_evaluations = 200;
  o.breaks_deg = {90.0, 270.0};
  const RollIntegral r = integrate_rolls(from(+f), o);
  CHECK_FALSE(r.converged);
  CHECK(r.evaluations <= 200);
  CHECK(r.quadrature_error > 0.0);
}

TEST_CASE("a failing sample stops the integral with its message", "[roll]") {
  RollProvider bad = [](std::span<const double> rolls) {
    std::vector<RollSample> out(rolls.size());
    out[3].ok = false;
    out[3].problem = "no curve";
    return out;
  };
  const RollIntegral r = integrate_rolls(bad, {});
  CHECK_FALSE(r.ok);
  CHECK(r.problem == "no curve");
}

TEST_CASE("singular roll angles of a box's edges", "[roll]") {
  // Source: docs/method.md §5.3 — planes contain an edge of direction d when dₓ = β(d_y cos θ +
  // d_z sin θ): edges along y give θ = ±90°, along z θ = 0°, 180°, along x none.
  const Mesh box = test::make_box({0, -3, -0.2}, {2, 3, 0.2});
  const std::vector<double> b = singular_roll_angles(box, 1.5, 15.0, 0.05);
  REQUIRE(b.size() == 4);
  CHECK_THAT(b[0], WithinAbs(0.0, 1e-9));
  CHECK_THAT(b[1], WithinAbs(90.0, 1e-9));
  CHECK_THAT(b[2], WithinAbs(180.0, 1e-9));
  CHECK_THAT(b[3], WithinAbs(270.0, 1e-9));
  CHECK(singular_roll_angles(box, 1.0).empty());  // M = 1: all rolls are alike
}

TEST_CASE("roll symmetry detection", "[roll]") {
  // A curve that depends on θ through cos θ only is up-down symmetric (D(θ) = D(−θ)); through
  // sin θ left-right; through cos 2θ both; through cos θ + sin θ neither.
  auto curve = [](double (*g)(double)) {
    return [g](double deg) {
      const double t = deg * std::numbers::pi / 180.0;
      return std::vector<double>{0.0, 1.0 + 0.3 * g(t), 2.0 - 0.1 * g(t), 0.0};
    };
  };
  CHECK(detect_roll_symmetry(curve([](double t) { return std::cos(t); })) == RollSymmetry::up_down);
  CHECK(detect_roll_symmetry(curve([](double t) { return std::sin(t); })) == RollSymmetry::left_right);
  CHECK(detect_roll_symmetry(curve([](double t) { return std::cos(2 * t); })) == RollSymmetry::both);
  CHECK(detect_roll_symmetry(curve([](double t) { return std::cos(t) + std::sin(t); })) ==
        RollSymmetry::none);
}
