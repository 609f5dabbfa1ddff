// Tests of the least-drag target (slicing/design/optimum.cpp) against published closed forms.
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/common/errors.h"
#include "machcut/design/optimum.h"

using namespace machcut;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// Sears–Haack area, written out here from Sears (1947): S_max [4ξ(1 − ξ)]^{3/2}.
double sh_area(double xi, double s_max) { return s_max * std::pow(4.0 * xi * (1.0 - xi), 1.5); }
}  // namespace

TEST_CASE("length and volume only reproduce the Sears-Haack body", "[optimum]") {
  // Source: Sears (1947), Haack (1941): D/q = 128 V²/(π l⁴), S = S_max[4ξ(1−ξ)]^{3/2} with
  // V = 3π S_max l/16. docs/method.md §8.1 check value: l = 10, S_max = 1 → 0.1413717.
  const double l = 10.0, s_max = 1.0, v = 3.0 * std::numbers::pi * s_max * l / 16.0;
  LeastDragProblem p;
  p.x0 = 2.0;
  p.length = l;
  p.volume = v;
  p.base_area = 0.0;
  const LeastDragBody body = least_drag_body(p);
  CHECK_THAT(body.drag_area, WithinRel(0.1413717, 1e-6));
  CHECK_THAT(body.drag_area,
             WithinRel(9.0 * std::numbers::pi * s_max * s_max / (2.0 * l * l), 1e-12));
  CHECK_THAT(body.volume, WithinRel(v, 1e-12));
  for (double xi : {0.05, 0.2, 0.5, 0.77, 0.99})
    CHECK_THAT(least_drag_area(body, 2.0 + xi * l), WithinAbs(sh_area(xi, s_max), 1e-12));
  CHECK(least_drag_area(body, 2.0) == 0.0);
  CHECK_THAT(least_drag_area(body, 12.0), WithinAbs(0.0, 1e-12));
  CHECK_THAT(sears_haack_drag_area(l, v), WithinRel(0.1413717, 1e-6));
  CHECK_THAT(sears_haack_area(2.0, l, v, 2.0 + 0.3 * l), WithinRel(sh_area(0.3, s_max), 1e-12));
}

TEST_CASE("base area only gives von Karman's ogive", "[optimum]") {
  // Source: docs/method.md §8.1 (von Kármán ogive): S = (S_B/π)(φ − sin φ cos φ),
  // D/q = 4 S_B²/(π l²); l = 10, S_B = 1 → 0.01273240.
  LeastDragProblem p;
  p.length = 10.0;
  p.base_area = 1.0;
  const LeastDragBody body = least_drag_body(p);
  CHECK_THAT(body.drag_area, WithinRel(0.01273240, 1e-6));
  for (double u : {0.1, 0.5, 0.9}) {
    const double phi = std::acos(1.0 - 2.0 * u);
    CHECK_THAT(least_drag_area(body, u * 10.0),
               WithinAbs((phi - std::sin(phi) * std::cos(phi)) / std::numbers::pi, 1e-12));
  }
}

TEST_CASE("base area and volume give the Haack-Adams body", "[optimum]") {
  // Source: Adams, NACA TN 2550 (mem), as written in docs/method.md §8.1:
  // D/q = 4 S_B²/(π l²) + 128 (V − l S_B/2)²/(π l⁴); free base: S_B = 16V/(9l),
  // D/q = 128 V²/(9π l⁴).
  const double l = 8.0, v = 3.0, sb = 0.2;
  LeastDragProblem p;
  p.length = l;
  p.volume = v;
  p.base_area = sb;
  const double expected = 4 * sb * sb / (std::numbers::pi * l * l) +
                          128 * std::pow(v - l * sb / 2, 2) / (std::numbers::pi * std::pow(l, 4));
  CHECK_THAT(least_drag_body(p).drag_area, WithinRel(expected, 1e-12));

  p.base_area.reset();
  const LeastDragBody free_base = least_drag_body(p);
  CHECK_THAT(free_base.base_area, WithinRel(16 * v / (9 * l), 1e-12));
  CHECK_THAT(free_base.drag_area,
             WithinRel(128 * v * v / (9 * std::numbers::pi * std::pow(l, 4)), 1e-12));
}

TEST_CASE("one area fixed at mid-length, closed body: D/q = 4 pi S_max^2 / l^2", "[optimum]") {
  // Source: docs/method.md §8.1, least-drag closed body with S_max fixed at mid-length only (the
  // Eminton–Lord one-point solution; G(½, ½) = ¼ by hand from the closed-form kernel).
  const double l = 12.0, s = 1.5;
  LeastDragProblem p;
  p.x0 = -3.0;
  p.length = l;
  p.base_area = 0.0;
  p.pins = {{-3.0 + l / 2, s}};
  const LeastDragBody body = least_drag_body(p);
  CHECK_THAT(body.drag_area, WithinRel(4 * std::numbers::pi * s * s / (l * l), 1e-12));
  CHECK_THAT(least_drag_area(body, -3.0 + l / 2), WithinRel(s, 1e-12));
  // The one-point solution peaks at the pinned station (symmetry; it is S_max).
  CHECK(least_drag_area(body, -3.0 + 0.45 * l) < s);
  CHECK(least_drag_area(body, -3.0 + 0.55 * l) < s);
}

TEST_CASE("Eminton-Lord through Sears-Haack samples converges from below", "[optimum]") {
  // Source: docs/method.md §4.5 (computed there independently): l = 10, S_max = 1, N equally
  // spaced interior stations uᵢ = i/(N+1) on the Sears–Haack curve, closed base: N = 3, 9, 19 give
  // 0.13952, 0.14126, 0.14136 against 0.141372.
  const double expected[] = {0.13952, 0.14126, 0.14136};
  const int counts[] = {3, 9, 19};
  for (int k = 0; k < 3; ++k) {
    LeastDragProblem p;
    p.length = 10.0;
    p.base_area = 0.0;
    for (int i = 1; i <= counts[k]; ++i) {
      const double u = static_cast<double>(i) / (counts[k] + 1);
      p.pins.push_back({10.0 * u, sh_area(u, 1.0)});
    }
    const LeastDragBody body = least_drag_body(p);
    CHECK_THAT(body.drag_area, WithinAbs(expected[k], 6e-6));
    CHECK(body.drag_area < 0.141372);
  }
}

TEST_CASE("closed-form kernel matches the sine series it sums", "[optimum]") {
  // Source: the definition G = Σₙ≥₂ Iₙ(φ)Iₙ(ψ)/n with the Iₙ of docs/method.md §4.2. A single
  // pin at u₁ with a closed base gives S(u) = S₁ G(u, u₁)/G(u₁, u₁), so ratios of areas are ratios
  // of G; here they are checked against the series summed to 20000 terms.
  auto in = [](int n, double phi) {
    return 0.5 * (std::sin((n - 1) * phi) / (n - 1) - std::sin((n + 1) * phi) / (n + 1));
  };
  auto series = [&](double u, double v) {
    const double a = std::acos(1 - 2 * u), b = std::acos(1 - 2 * v);
    double g = 0;
    for (int n = 2; n <= 20000; ++n) g += in(n, a) * in(n, b) / n;
    return g;
  };
  LeastDragProblem p;
  p.length = 1.0;
  p.base_area = 0.0;
  p.pins = {{0.3, 1.0}};
  const LeastDragBody body = least_drag_body(p);
  for (double u : {0.1, 0.5, 0.8}) {
    const double ratio = least_drag_area(body, u) / least_drag_area(body, 0.3);
    CHECK_THAT(ratio, WithinAbs(series(u, 0.3) / series(0.3, 0.3), 1e-5));
  }
}

TEST_CASE("a maximum area is honoured at a higher drag", "[optimum]") {
  // Property of constrained minimisation (common practice): adding a constraint cannot lower
  // the minimum; the result must stay below the limit.
  const double l = 10.0, v = 3.0 * std::numbers::pi * l / 16.0;  // Sears–Haack with S_max = 1
  LeastDragProblem p;
  p.length = l;
  p.volume = v;
  p.base_area = 0.0;
  p.max_area = 0.9;
  const LeastDragBody body = least_drag_body(p);
  CHECK(body.max_area_met);
  CHECK(body.active_max_pins >= 1);
  CHECK(body.drag_area > sears_haack_drag_area(l, v));
  CHECK_THAT(body.volume, WithinRel(v, 1e-9));
  for (int i = 0; i <= 200; ++i) CHECK(least_drag_area(body, l * i / 200.0) <= 0.9 * 1.001);
}

TEST_CASE("least-drag problems without a solution are input errors", "[optimum][errors]") {
  LeastDragProblem p;
  p.length = 10.0;
  CHECK_THROWS_AS(least_drag_body(p), InputError);  // nothing fixed
  p.base_area = 0.0;
  p.pins = {{11.0, 1.0}};
  CHECK_THROWS_AS(least_drag_body(p), InputError);  // outside
  p.pins = {{5.0, 1.0}, {5.0, 2.0}};
  CHECK_THROWS_AS(least_drag_body(p), InputError);  // coincident
  p.pins = {{5.0, -1.0}};
  CHECK_THROWS_AS(least_drag_body(p), InputError);  // negative
  p.length = 0.0;
  CHECK_THROWS_AS(least_drag_body(p), InputError);
}

TEST_CASE("correction of a Sears-Haack curve towards itself is zero", "[optimum]") {
  // Source: Sears (1947) closed form sampled; the target for the same length and volume is the
  // same body, so the correction is zero up to the trapezoid error of the sampled volume.
  AreaCurve c;
  const int n = 2001;
  for (int i = 0; i < n; ++i) {
    const double xi = static_cast<double>(i) / (n - 1);
    c.x.push_back(10.0 * xi);
    c.area.push_back(sh_area(xi, 1.0));
  }
  const CurveMeasures m = measure_curve(c);
  CHECK_THAT(m.volume, WithinRel(3 * std::numbers::pi * 10.0 / 16.0, 1e-5));
  CHECK_THAT(m.max_area, WithinRel(1.0, 1e-12));
  LeastDragProblem p;
  p.x0 = m.x0;
  p.length = m.length;
  p.volume = m.volume;
  p.base_area = 0.0;
  const Correction corr = correction_to(c, least_drag_body(p));
  for (std::size_t i = 0; i < corr.x.size(); i += 100) CHECK_THAT(corr.delta_area[i], WithinAbs(0.0, 2e-5));
  CHECK(correction_csv(corr).rfind("x_m,area_m2,target_area_m2", 0) == 0);
}
