// Tests of area-jump detection (slicing/design/jumps.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/design/jumps.h"
#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// Sears–Haack area (Sears 1947), S_max = 1, on [0, l].
double sh(double x, double l) {
  const double xi = x / l;
  return xi <= 0 || xi >= 1 ? 0.0 : std::pow(4 * xi * (1 - xi), 1.5);
}

AreaCurve sampled(int n, double l, const std::function<double(double)>& s) {
  AreaCurve c;
  for (int i = 0; i < n; ++i) {
    c.x.push_back(l * i / (n - 1));
    c.area.push_back(s(c.x.back()));
  }
  return c;
}
}  // namespace

TEST_CASE("a clean Sears-Haack curve has no jumps", "[jumps]") {
  // Source: Sears (1947) — the curve is smooth inside (0, l); the 1 % threshold must not fire.
  const AreaCurve c = sampled(401, 10.0, [](double x) { return sh(x, 10.0); });
  CHECK(find_jumps(c, eminton_lord_drag).empty());
}

TEST_CASE("a step in area is found at its station with its size", "[jumps]") {
  // Constructed: Sears–Haack plus 0.2 m² from x = 6.01 on (a canopy-like step).
  const AreaCurve c = sampled(401, 10.0, [](double x) { return sh(x, 10.0) + (x > 6.01 && x < 9.0 ? 0.2 : 0.0); });
  const auto jumps = find_jumps(c, {});
  REQUIRE(jumps.size() >= 2);
  const auto& j = jumps[0].x < 7 ? jumps[0] : jumps[1];
  CHECK(j.kind == "step");
  CHECK_THAT(j.x, WithinAbs(6.01, 0.025));  // within one station spacing
  CHECK_THAT(j.step, WithinAbs(0.2, 0.01));
}

TEST_CASE("a slope kink is found with its slope change", "[jumps]") {
  // Constructed: a ramp whose slope changes from 0.3 to 0.1 m²/m at x = 4 (a tail junction).
  const AreaCurve c = sampled(201, 10.0, [](double x) { return x < 4 ? 0.3 * x : 1.2 + 0.1 * (x - 4); });
  const auto jumps = find_jumps(c, {});
  REQUIRE(!jumps.empty());
  CHECK(jumps[0].kind == "kink");
  CHECK_THAT(jumps[0].x, WithinAbs(4.0, 1e-9));
  CHECK_THAT(jumps[0].slope_change, WithinAbs(-0.2, 1e-9));
}

TEST_CASE("a Sears-Haack body with a blister: the jump is at the blister", "[jumps]") {
  // Constructed mesh: a Sears–Haack body of revolution (l = 10, S_max = 1) and a sphere of
  // radius 0.25 centred on its surface at x = 6, summed as separate shells. A sphere's section
  // area π(ρ² − (x − 6)²) starts and ends with slope ±2πρ (elementary geometry), so the curve
  // kinks at x = 5.75 and 6.25 by about 2πρ = 1.571 m²/m; the blister's shell must be named.
  const double l = 10.0;
  std::vector<double> xs, rs;
  for (int i = 0; i <= 200; ++i) {
    xs.push_back(l * i / 200.0);
    rs.push_back(std::sqrt(sh(xs.back(), l) / std::numbers::pi));
  }
  const double rb = std::sqrt(sh(6.0, l) / std::numbers::pi);
  const Mesh m = concatenate({make_body_of_revolution(xs, rs, 96), make_sphere({6.0, 0.0, rb}, 0.25, 48, 96)});
  const SectionEngine engine(m);
  const AreaCurve c = engine.curve({1.0, 0.0}, make_stations({0.0, l}, 401, Spacing::uniform), true);
  const auto jumps = find_jumps(c, eminton_lord_drag);
  REQUIRE(jumps.size() >= 2);
  for (const auto& j : jumps) UNSCOPED_INFO(j.kind << " x=" << j.x << " step=" << j.step << " kink=" << j.slope_change << " share=" << j.share);
  for (int k = 0; k < 2; ++k) {
    CHECK(std::abs(std::abs(jumps[k].x - 6.0) - 0.25) < 0.03);
    CHECK(std::abs(std::abs(jumps[k].slope_change) - 2 * std::numbers::pi * 0.25) <
          0.15 * 2 * std::numbers::pi * 0.25);
    REQUIRE(!jumps[k].shells.empty());
    CHECK(jumps[k].shells[0] == 1);
    CHECK(jumps[k].drag_change > 0.0);  // smoothing a kink lowers the Eminton–Lord drag
    CHECK(jumps[k].share > 0.0);
    CHECK(jumps[k].share < 1.0);
  }
}

TEST_CASE("smoothing a region joins the curve in value", "[jumps]") {
  // A quadratic is its own one-sided fit, so the cubic that replaces a region of it is the
  // quadratic itself (Hermite interpolation reproduces cubics; common practice).
  const AreaCurve c = sampled(101, 10.0, [](double x) { return 0.1 * x * x - 0.3 * x + 1; });
  const auto s = smooth_region(c, 3.0, 6.0, 0.5);
  for (std::size_t i = 0; i < s.size(); ++i) CHECK_THAT(s[i], WithinAbs(c.area[i], 1e-9));
}

TEST_CASE("too short or empty curves give no jumps", "[jumps][errors]") {
  AreaCurve c;
  CHECK(find_jumps(c, eminton_lord_drag).empty());
  c = sampled(5, 1.0, [](double x) { return x; });
  CHECK(find_jumps(c, eminton_lord_drag).empty());
  c = sampled(50, 1.0, [](double) { return 0.0; });
  CHECK(find_jumps(c, eminton_lord_drag).empty());
}

TEST_CASE("a band narrower than the fit window is found as its two steps", "[jumps]") {
  // Constructed curve (closed form): S = 4u(1 − u) m² plus a band of 0.1 m² from u = 0.50 to
  // 0.52 — shorter than the first window (2.5% of the length), eight station gaps wide. The
  // finer windows see an up-step of +0.1 m² and a down-step of −0.1 m².
  AreaCurve c;
  for (int i = 0; i <= 400; ++i) {
    const double u = i / 400.0;
    c.x.push_back(u);
    c.area.push_back(4 * u * (1 - u) + (u > 0.5 + 1e-9 && u < 0.52 + 1e-9 ? 0.1 : 0.0));
  }
  const auto jumps = find_jumps(c, {});
  const AreaJump* up = nullptr;
  const AreaJump* down = nullptr;
  for (const AreaJump& j : jumps) {
    if (j.kind == "step" && std::fabs(j.x - 0.50125) < 0.003) up = &j;
    if (j.kind == "step" && std::fabs(j.x - 0.52125) < 0.003) down = &j;
  }
  REQUIRE(up);
  REQUIRE(down);
  CHECK_THAT(up->step, WithinRel(0.1, 0.05));
  CHECK_THAT(down->step, WithinRel(-0.1, 0.05));
  CHECK(up->window < 0.02);  // found at a finer window than the first (0.025)
}
