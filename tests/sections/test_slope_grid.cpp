// Tests of the exact slope grid and its drag integral (slicing/sections/slope_grid.cpp): the kernel
// against quadrature, the FFT quadratic form against the direct double sum, the integral
// against closed forms of slender-body theory, the mesh slopes against the section engine.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <numeric>
#include <random>
#include <vector>

#include "machcut/sections/section.h"
#include "machcut/sections/slope_grid.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// Steps of S′ across the cells of a uniform grid over [0, l] from an analytic S′.
template <class F>
std::vector<double> analytic_steps(F slope, double l, int cells) {
  std::vector<double> a(cells);
  for (int j = 0; j < cells; ++j) a[j] = slope(l * (j + 1) / cells) - slope(l * j / cells);
  return a;
}

// Sears–Haack rings: S = S_max (4u(1 − u))^{3/2}.
Mesh sears_haack_rings(double l, double s_max, int rings, int segments) {
  return body_with_area([&](double u) { return s_max * std::pow(4 * u * (1 - u), 1.5); }, l, rings, segments);
}

double grid_drag(const Mesh& m, const MachPlanes& p, int cells, bool spread) {
  const StationRange r = SectionEngine(m).range(p);
  const double margin = (r.hi - r.lo) / 64;
  SlopeGrid g = make_slope_grid(r.lo - margin, r.hi + margin, cells);
  g.tail = r.hi;
  add_mesh_slopes(m, p, g);
  return von_karman_drag_area(slope_steps(g, spread));
}
}  // namespace

TEST_CASE("cell-averaged logarithm matches quadrature", "[slope_grid]") {
  // Source: K₀ = ∫₀¹∫₀¹ ln|u − v| du dv = −3/2 (elementary calculus); for m >= 1,
  // K_m = ∫₋₁¹ (1 − |s|) ln(m + s) ds, by composite Simpson on each half (smooth there for
  // m >= 2; 4000 intervals leave < 1e-14).
  CHECK_THAT(cell_log_kernel(0), WithinAbs(-1.5, 1e-15));
  for (int m : {2, 3, 15, 16, 17, 100, 5000}) {
    const int n = 4000;
    double sum = 0.0;
    for (int side : {-1, 1})
      for (int i = 0; i <= n; ++i) {
        const double s = side * static_cast<double>(i) / n;
        const double weight = (i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0);
        sum += weight * (1 - std::fabs(s)) * std::log(m + s) / (3.0 * n);
      }
    INFO("m = " << m);
    CHECK_THAT(cell_log_kernel(m), WithinAbs(sum, 1e-13 * std::log(m)));
    CHECK(cell_log_kernel(-m) == cell_log_kernel(m));
  }
}

TEST_CASE("FFT quadratic form equals the direct double sum", "[slope_grid]") {
  // Source: the definition D/q = −(1/2π) Σᵢⱼ aᵢ aⱼ K_{i−j}, summed directly.
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  for (int n : {1, 2, 5, 64, 300}) {
    std::vector<double> a(n);
    for (double& v : a) v = u(rng);
    const double mean = std::accumulate(a.begin(), a.end(), 0.0) / n;
    for (double& v : a) v -= mean;  // S′ = 0 at both ends
    double direct = 0.0;
    for (int i = 0; i < n; ++i)
      for (int j = 0; j < n; ++j) direct += a[i] * a[j] * cell_log_kernel(i - j);
    direct /= -2 * std::numbers::pi;
    INFO("n = " << n);
    CHECK_THAT(von_karman_drag_area(a), WithinAbs(direct, 1e-12 * (1 + std::fabs(direct))));
  }
  CHECK(von_karman_drag_area(std::vector<double>{}) == 0.0);
}

TEST_CASE("coarsening adds neighbouring steps", "[slope_grid]") {
  // Source: the integral of S″ over two cells is the sum over each (additivity).
  const std::vector<double> a{1, 2, 3, 4, -5, -5};
  CHECK(coarsen_steps(a) == std::vector<double>{3, 7, -10});
}

TEST_CASE("drag integral on analytic curves matches the closed forms", "[slope_grid]") {
  // Source: Sears–Haack body D/q = 9π S_max²/(2 l²) (Sears 1947; Haack 1941); von Kármán
  // ogive of base area S_B, D/q = 4 S_B²/(π l²), its base closed by a constant-area wake
  // (docs/method.md §8.1). S′ is taken from the formulas, so only the cell averaging is tested.
  const double l = 10.0, s_max = 1.0;
  auto sh_slope = [&](double x) {
    const double u = x / l, q = 4 * u * (1 - u);
    return q <= 0 ? 0.0 : s_max * 1.5 * std::sqrt(q) * 4 * (1 - 2 * u) / l;
  };
  const double sh = 9 * std::numbers::pi * s_max * s_max / (2 * l * l);
  CHECK_THAT(von_karman_drag_area(analytic_steps(sh_slope, l, 4096)), WithinRel(sh, 2e-4));
  const double sb = 0.5;
  auto ogive_slope = [&](double x) {  // S = S_B (φ − sin φ cos φ)/π → S′ = 8 S_B √(u(1−u))/(π l)
    const double u = x / l;
    return 8 * sb * std::sqrt(std::max(0.0, u * (1 - u))) / (std::numbers::pi * l);
  };
  const double og = 4 * sb * sb / (std::numbers::pi * l * l);
  CHECK_THAT(von_karman_drag_area(analytic_steps(ogive_slope, l, 4096)), WithinRel(og, 2e-4));
}

TEST_CASE("mesh slopes equal the section engine's area differences", "[slope_grid]") {
  // Source: differences of the section engine's exact areas (section.h; the engine is checked
  // against CGAL's Polygon_mesh_slicer in test_section_cgal): the cell mean of S′ is
  // (S(g_{j+1}) − S(g_j))/h and S′ at a node the mean over its two cells (slope_grid.h).
  const Mesh sphere = make_sphere({1, 0.2, -0.1}, 1.5, 24, 40);
  const Mesh torus = make_torus(2.0, 1.2, 0.4, 36, 18);
  for (const Mesh* m : {&sphere, &torus})
    for (MachPlanes p : {MachPlanes{1.0, 0.0}, MachPlanes{1.5, 20.0}, MachPlanes{2.3, 250.0}}) {
      const SectionEngine engine(*m);
      const StationRange r = engine.range(p);
      const double margin = 0.05 * (r.hi - r.lo);  // nodes beyond both ends: S′ = 0 there
      const int cells = 97;
      SlopeGrid g = make_slope_grid(r.lo - margin, r.hi + margin, cells);
      add_mesh_slopes(*m, p, g);
      double scale = 0.0;
      for (double v : g.slope) scale = std::max(scale, std::fabs(v));
      const double h = (g.hi - g.lo) / cells;
      std::vector<double> nodes(cells + 1);
      for (int k = 0; k <= cells; ++k) nodes[k] = g.lo + h * k;
      const std::vector<double> s = engine.areas(p, nodes);
      // Faces lying in the plane (the torus's front and back annuli at M = 1) are steps of S,
      // kept apart in area_step.
      auto step = [&](int j) { return g.area_step.empty() ? 0.0 : g.area_step[j] / h; };
      for (int k = 1; k < cells; ++k) {
        INFO("M " << p.mach << " roll " << p.roll_deg << " node " << k);
        CHECK_THAT(g.average[k] + step(k), WithinAbs((s[k + 1] - s[k]) / h, 1e-9 * scale));
        CHECK_THAT(g.slope[k] + 0.5 * (step(k - 1) + step(k)), WithinAbs((s[k + 1] - s[k - 1]) / (2 * h), 1e-9 * scale));
      }
      CHECK_THAT(g.slope.front(), WithinAbs(0.0, 1e-12 * scale));
      CHECK_THAT(g.slope.back(), WithinAbs(0.0, 1e-9 * scale));
    }
}

TEST_CASE("faces in the plane are steps of S unless they are the base", "[slope_grid]") {
  // Source: elementary geometry — a 2 m × 2 m front face cut by a normal plane adds its whole
  // area at once; the aft face at the tail is the base, continued by a constant-area wake.
  const Mesh box = make_box({0, -1, -1}, {4, 1, 1});
  SlopeGrid g = make_slope_grid(-0.5, 4.5, 50);
  g.tail = 4.0;
  add_mesh_slopes(box, {1.0, 0.0}, g);
  CHECK_THAT(g.area_step[5], WithinAbs(4.0, 1e-12));  // the cell [0, 0.1) holds the nose face
  CHECK_THAT(std::accumulate(g.area_step.begin(), g.area_step.end(), 0.0), WithinAbs(4.0, 1e-12));
  CHECK_THAT(g.tail_area, WithinAbs(4.0, 1e-12));  // the base: S just upstream of the tail
  // Oblique planes cross both faces gradually: no step.
  SlopeGrid o = make_slope_grid(-3, 7, 50);
  const MachPlanes oblique{1.5, 30.0};
  o.tail = 2.0;  // a plane through the middle: S there from the section engine
  add_mesh_slopes(box, oblique, o);
  CHECK(std::all_of(o.area_step.begin(), o.area_step.end(), [](double s) { return s == 0.0; }));
  CHECK_THAT(o.tail_area, WithinAbs(SectionEngine(box).areas(oblique, std::vector<double>{2.0}).front(), 1e-12));
}

TEST_CASE("slope steps of edges in the normal planes are spread over the facets", "[slope_grid]") {
  // Source: a kink of S (a step of S′) makes von Kármán's integral grow like ln(1/h) as the
  // cells shrink (docs/method.md §4.1: a jump in S′ gives a logarithmically infinite drag). A
  // lofted mesh at M = 1 has one at every ring; spread over the facets, the drag converges to the
  // Sears–Haack closed form 9π S_max²/(2 l²) (Sears 1947; Haack 1941).
  const Mesh body = sears_haack_rings(10.0, 1.0, 200, 64);
  const MachPlanes normal{1.0, 0.0};
  const double raw_coarse = grid_drag(body, normal, 4096, false);
  const double raw_fine = grid_drag(body, normal, 65536, false);
  const double spread_coarse = grid_drag(body, normal, 4096, true);
  const double spread_fine = grid_drag(body, normal, 65536, true);
  INFO("raw " << raw_coarse << " → " << raw_fine << ", spread " << spread_coarse << " → " << spread_fine);
  CHECK(raw_fine - raw_coarse > 1e-2 * raw_fine);  // grows: 4 halvings of the cells
  CHECK(std::fabs(spread_fine - spread_coarse) < 0.03 * (raw_fine - raw_coarse));
  CHECK_THAT(spread_fine, WithinRel(9 * std::numbers::pi / 200, 2e-3));
  SlopeGrid g = make_slope_grid(-0.2, 10.2, 1024);
  add_mesh_slopes(body, normal, g);
  const std::vector<double> a = slope_steps(g, false), b = slope_steps(g, true);
  CHECK_THAT(std::accumulate(b.begin(), b.end(), 0.0), WithinAbs(std::accumulate(a.begin(), a.end(), 0.0), 1e-12));
}
