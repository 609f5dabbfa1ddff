// Tests of the wave drag of meshed models (slicing/drag/wave_drag.cpp): generated meshes
// against closed forms of linear theory, and invariances.
#include <catch2/catch.hpp>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <numbers>

#include "machcut/sections/section.h"
#include "machcut/sections/slope_grid.h"
#include "machcut/drag/ends.h"
#include "machcut/drag/wave_drag.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
double sin_phi(double u) { return std::sqrt(std::max(0.0, 4 * u * (1 - u))); }

// A biconvex rectangular wing of span b, centred (test_support.h: biconvex_wing_between).
Mesh biconvex_wing(double c, double b, double tau, int n) {
  return biconvex_wing_between(c, -b / 2, b / 2, tau, n);
}

MachDrag drag_of(const Mesh& mesh, double mach, double tol = 0.005) {
  const SectionEngine engine(mesh);
  WaveDragOptions o;
  o.rel_tol = tol;
  return WaveDragModel(engine, {}, o).at_mach(mach);
}
}  // namespace

TEST_CASE("Sears-Haack body mesh at M = 1 within 0.5% of the closed form", "[wave_drag]") {
  // Source: Sears–Haack body, D/q = 9π S_max²/(2 l²) = 128 V²/(π l⁴) (Sears 1947; Haack
  // 1941). l = 10, S_max = 1: 0.1413717 (docs/method.md §8.1).
  const Mesh m = body_with_area([](double u) { return std::pow(sin_phi(u), 3); }, 10.0, 400, 128);
  const MachDrag d = drag_of(m, 1.0);
  REQUIRE(d.ok);
  CHECK(d.converged);
  CHECK_THAT(d.drag_area, WithinRel(0.1413717, 0.005));
  CHECK(d.aft_treatment == "closed tail");
  CHECK(d.error_estimate <= 0.005 * d.drag_area);
  const ModelMeasures mm = measure_model(SectionEngine(m));
  CHECK_THAT(mm.sears_haack_drag_area, WithinRel(0.1413717, 0.002));
}

TEST_CASE("von Karman ogive and Haack-Adams meshes with a base", "[wave_drag]") {
  // Source: von Kármán ogive D/q = 4 S_B²/(π l²) (docs/method.md §8.1; l = 10, S_B = 1:
  // 0.01273240);
  // Haack–Adams D/q = 4 S_B²/(π l²) + 128 (V − l S_B/2)²/(π l⁴) (Adams, NACA TN 2550 (mem)).
  // Both have S′(l) = 0, where the constant-area wake closure equals the forebody drag of a
  // body with a base (Ward 1955).
  const double l = 10.0;
  const Mesh og = body_with_area(
      [](double u) {
        const double phi = std::acos(1 - 2 * u);
        return (phi - std::sin(phi) * std::cos(phi)) / std::numbers::pi;
      },
      l, 400, 128);
  const MachDrag d = drag_of(og, 1.0);
  REQUIRE(d.ok);
  CHECK_THAT(d.drag_area, WithinRel(0.01273240, 0.005));
  CHECK(d.aft_treatment.find("constant-area wake") != std::string::npos);

  const double sb = 0.4, c = 0.8;
  const Mesh ha = body_with_area(
      [&](double u) {
        const double phi = std::acos(1 - 2 * u);
        return sb * (phi - std::sin(phi) * std::cos(phi)) / std::numbers::pi +
               c * std::pow(sin_phi(u), 3);
      },
      l, 400, 128);
  const double v = l * sb / 2 + 3 * std::numbers::pi * c * l / 16;
  const double expected = 4 * sb * sb / (std::numbers::pi * l * l) +
                          128 * std::pow(v - l * sb / 2, 2) / (std::numbers::pi * std::pow(l, 4));
  const MachDrag h = drag_of(ha, 1.0);
  REQUIRE(h.ok);
  CHECK_THAT(h.drag_area, WithinRel(expected, 0.005));
}

TEST_CASE("biconvex rectangular wing matches Ackeret's thin-aerofoil drag", "[wave_drag]") {
  // Source: Ackeret (1925) thin aerofoil, parabolic arc: C_d = 16 τ²/(3β); for a rectangular
  // wing with βA >= 1 the linear-theory tip losses of a closed symmetric section integrate to
  // zero, so C_D equals the 2-D value (docs/method.md §5.5). Here βA = 4 and 6.9. Faceting
  // with 100 chordwise panels lowers ∫z′² by h² = 1e-4 (elementary calculus).
  const double c = 1.0, b = 4.0, tau = 0.04;
  const Mesh wing = biconvex_wing(c, b, tau, 100);
  for (double mach : {std::sqrt(2.0), 2.0}) {
    const double beta = std::sqrt(mach * mach - 1);
    const double expected = 16 * tau * tau / (3 * beta) * b * c;
    const MachDrag d = drag_of(wing, mach);
    REQUIRE(d.ok);
    CHECK(d.symmetry == RollSymmetry::both);
    CHECK_FALSE(d.breaks_deg.empty());  // the unswept edges: θ = ±90°
    CHECK_THAT(d.drag_area, WithinRel(expected, 0.01));
    INFO("M " << mach << " D/q " << d.drag_area << " expected " << expected << " err "
              << d.error_estimate << " rolls " << d.roll_evaluations << " stations " << d.stations);
    CHECK(std::fabs(d.drag_area - expected) <= d.error_estimate + 2e-4 * expected);
  }
}

TEST_CASE("D/q is invariant to rolling the mesh and scales with length squared", "[wave_drag]") {
  // Source: the roll average is over all roll angles, so rotating the model about the flow
  // axis cannot change it; D/q has units of area (dimensional analysis).
  const Mesh wing = biconvex_wing(1.0, 3.0, 0.05, 60);
  const MachDrag a = drag_of(wing, 1.5);
  const MachDrag r = drag_of(rotate_about_x(wing, 31.0), 1.5);
  REQUIRE(a.ok);
  REQUIRE(r.ok);
  CHECK(r.symmetry == RollSymmetry::none);
  CHECK(std::fabs(a.drag_area - r.drag_area) <= a.error_estimate + r.error_estimate);
  Mesh big = wing;
  for (Vec3& p : big.positions) p = 1000.0 * p;
  const MachDrag s = drag_of(big, 1.5);
  CHECK_THAT(s.drag_area, WithinRel(1e6 * a.drag_area, 1e-6));
}

TEST_CASE("refining stations and rolls changes D/q by less than the error estimate", "[wave_drag]") {
  // Source: the definition of an error estimate. The fine run has 4× the cells the coarse one
  // ended with and starts from 4× the roll angles. The body, S ∝ u²(1 − u)², has pointed ends
  // (a Sears–Haack nose is steeper than any Mach line, which needs far more cells at M > 1).
  const Mesh body = body_with_area([](double u) { return 16 * std::pow(u * (1 - u), 2); }, 8.0, 200, 64);
  const Mesh wing = biconvex_wing(1.5, 5.0, 0.04, 60);
  const SectionEngine engine(concatenate({body, wing}));
  for (double mach : {1.3, 1.8}) {
    const MachDrag coarse = WaveDragModel(engine, {}, WaveDragOptions{}).at_mach(mach);
    WaveDragOptions o;
    o.cells = 4 * coarse.stations;
    o.length_floor = 0.999 * coarse.cell_size / 4;
    o.initial_rolls = 4 * o.initial_rolls;
    const MachDrag fine = WaveDragModel(engine, {}, o).at_mach(mach);
    REQUIRE(coarse.ok);
    REQUIRE(fine.ok);
    INFO("M " << mach << " coarse " << coarse.drag_area << " ± " << coarse.error_estimate << " ("
              << coarse.stations << " cells, " << coarse.roll_evaluations << " rolls) fine "
              << fine.drag_area << " ± " << fine.error_estimate << " (" << fine.stations
              << " cells, " << fine.roll_evaluations << " rolls)");
    CHECK(fine.stations > coarse.stations);
    CHECK(fine.roll_evaluations > coarse.roll_evaluations);
    CHECK(std::fabs(coarse.drag_area - fine.drag_area) <= coarse.error_estimate);
  }
}

namespace {
// A rough model of the kind a visual mesh gives: an 8-sided body with a blunt faceted nose
// (51° to the flow) and a flat base, and a box fin with a flat front face across the flow,
// the two shells overlapping (their areas add); the wakes behind the flat aft faces.
struct Rough {
  Mesh mesh;
  Mesh wakes;
};
Rough rough_body_with_box_fin() {
  const Mesh body = make_body_of_revolution({0.0, 0.2, 1.5, 3.0, 4.5, 5.5, 6.0},
                                            {0.0, 0.25, 0.45, 0.5, 0.45, 0.3, 0.2}, 8);
  Mesh fin = make_box({4.5, -0.03, 0.3}, {5.5, 0.03, 1.0});
  fin.shell_names = {"fin"};
  Rough r;
  r.mesh = concatenate({body, fin});
  r.mesh.shell_names = {"body", "fin"};
  r.wakes = flat_face_tubes(r.mesh, +1, far_station(r.mesh)).mesh;
  return r;
}

struct Case {
  const char* name;
  Mesh mesh;
  Mesh tubes;
  double mach;
  double floor_fraction;  // length floor / model length (0: the default)
};
}  // namespace

TEST_CASE("refining 4x and 16x beyond the reported cells stays within the estimate", "[wave_drag]") {
  // Source: the definition of an error estimate (docs/method.md §6): for a converged value the
  // rest of the refinement, for a resolution-limited one what four more halvings add. Each case
  // is computed again with its length floor and first grid 4 and 16 times finer. Cases: a
  // Sears–Haack body at M 2 (its nose is steeper than the Mach cone: the drag grows like
  // ln(1/h), Lighthill 1948 (from memory) — slow growth that must be detected, not called
  // converged), a pointed body (S ∝ u²(1 − u)², nose half-angle 16° inside the 30° Mach cone),
  // a biconvex rectangular wing, and the rough body with a box fin.
  const Rough rough = rough_body_with_box_fin();
  std::vector<Case> cases;
  cases.push_back({"Sears-Haack body, M 2", body_with_area([](double u) { return std::pow(sin_phi(u), 3); }, 10.0, 400, 128), {}, 2.0, 1.0 / 4096});
  cases.push_back({"pointed body, M 2", body_with_area([](double u) { return 16 * std::pow(u * (1 - u), 2); }, 8.0, 200, 64), {}, 2.0, 0.0});
  cases.push_back({"biconvex wing, M 1.5", biconvex_wing(1.0, 3.0, 0.05, 60), {}, 1.5, 0.0});
  cases.push_back({"rough body with box fin, M 1.6", rough.mesh, rough.wakes, 1.6, 1.0 / 4096});
  for (const Case& c : cases) {
    const SectionEngine engine(c.mesh);
    const double length = measure_model(engine).length;
    WaveDragOptions o;
    if (c.floor_fraction > 0.0) {
      o.length_floor = c.floor_fraction * length;
      o.cells = 1 << 12;
    }
    const MachDrag d = WaveDragModel(engine, {}, o, c.tubes).at_mach(c.mach);
    REQUIRE(d.ok);
    for (int factor : {4, 16}) {
      WaveDragOptions f = o;
      f.cells = factor * d.stations;
      f.length_floor = 0.999 * d.cell_size / factor;
      const MachDrag fine = WaveDragModel(engine, {}, f, c.tubes).at_mach(c.mach);
      REQUIRE(fine.ok);
      INFO(c.name << ": " << d.drag_area << " ± " << d.error_estimate << " at " << d.stations << " cells ("
                  << (d.converged ? "converged" : d.resolution_limited ? "resolution-limited" : "not converged")
                  << ", growth " << d.growth_per_halving << " ratio " << d.growth_ratio << "); " << factor
                  << "x: " << fine.drag_area << " at " << fine.stations << " cells");
      CHECK(fine.stations >= factor * d.stations);
      CHECK(std::fabs(fine.drag_area - d.drag_area) <= d.error_estimate);
    }
    if (c.name[0] == 'S') {  // the blunt nose: never called converged
      CHECK(d.resolution_limited);
      CHECK_FALSE(d.converged);
      CHECK(d.growth_per_halving > 0.0);
    }
    if (c.name[0] == 'p' || c.name[0] == 'b') CHECK(d.converged);
  }
}

TEST_CASE("the length floor and the time budget stop the refinement and say so", "[wave_drag]") {
  // Source: the options' contract (wave_drag.h). The Sears–Haack body at M 2 never converges
  // (its nose is steeper than the Mach cone), so the refinement runs to what stops it.
  const Mesh sh = body_with_area([](double u) { return std::pow(sin_phi(u), 3); }, 10.0, 200, 64);
  const SectionEngine engine(sh);
  WaveDragOptions o;
  o.cells = 1024;
  o.length_floor = 10.0 / 8192;
  const MachDrag floor = WaveDragModel(engine, {}, o).at_mach(2.0);
  REQUIRE(floor.ok);
  CHECK(floor.resolution_limited);
  CHECK_FALSE(floor.time_limited);
  CHECK(floor.cell_size >= o.length_floor);
  CHECK(floor.cell_size < 2 * o.length_floor);
  CHECK(floor.station_levels == 4);  // 1024, 2048, 4096, 8192 cells
  CHECK_FALSE(floor.problem.empty());
  o.time_budget = 0.0;  // no second level can end within it
  const MachDrag budget = WaveDragModel(engine, {}, o).at_mach(2.0);
  CHECK(budget.time_limited);
  CHECK(budget.station_levels == 1);
  CHECK(budget.stations == 1024);
}

TEST_CASE("each Mach number stands alone: a step in S at M = 1, a value above", "[wave_drag]") {
  // Source: a flat face across the flow is a step in S in the normal planes (no finite linear
  // drag, docs/method.md §4.1) but is crossed gradually by oblique Mach planes (§3.1).
  const Rough rough = rough_body_with_box_fin();
  const SectionEngine engine(rough.mesh);
  const WaveDragModel model(engine, {}, {}, rough.wakes);
  const MachDrag m1 = model.at_mach(1.0);
  CHECK_FALSE(m1.ok);
  CHECK(m1.problem.find("steps") != std::string::npos);
  REQUIRE_FALSE(m1.features.empty());  // the faces that make the step, named
  CHECK(std::isnan(m1.features.front().drag_share));
  const MachDrag m15 = model.at_mach(1.5);
  CHECK(m15.ok);
  CHECK(std::isfinite(m15.drag_area));
  CHECK(m15.drag_area > 0.0);
}

TEST_CASE("roll-angle peaks of edges in the Mach planes are integrated, not missed or overweighted", "[wave_drag]") {
  // Source: the roll average is (1/2π)∮ D(θ) dθ (Jones 1956); its logarithmic peaks at the
  // singular roll angles are integrable, so the midpoint rule on 3 600 uniform roll angles
  // converges to it (more slowly) and is an independent check of the adaptive quadrature. A small
  // rocket of a faceted body and four box fins at M 2.2, as in the example.
  std::vector<Mesh> parts{make_body_of_revolution({0.0, 0.25, 0.5, 1.5}, {0.0, 0.04, 0.06, 0.06}, 16)};
  for (int k = 0; k < 4; ++k)
    parts.push_back(rotate_about_x(make_box({1.2, -0.004, 0.07}, {1.45, 0.004, 0.16}), 45.0 + 90.0 * k));
  const Mesh rocket = concatenate(parts);
  const Mesh wakes = flat_face_tubes(rocket, +1, far_station(rocket)).mesh;
  const SectionEngine engine(rocket);
  WaveDragOptions o;
  o.cells = 4096;
  o.length_floor = 1.5 * 1.04 / 4096;  // one grid: the same cells as the dense average
  const WaveDragModel model(engine, {}, o, wakes);
  const MachDrag d = model.at_mach(2.2);
  REQUIRE(d.ok);
  CHECK_FALSE(d.breaks_deg.empty());
  const int n = 3600;
  double dense = 0.0, peak = 0.0;
  for (int k = 0; k < n; ++k) {
    const double roll = 360.0 * (k + 0.5) / n;
    const StationRange r = model.range(2.2, roll);
    const double margin = (r.hi - r.lo) / 64;
    const SlopeGrid g = model.slope_grid(2.2, roll, r.lo - margin, r.hi + margin, d.stations);
    const double dk = von_karman_drag_area(slope_steps(g));
    dense += dk / n;
    peak = std::max(peak, dk);
  }
  INFO("adaptive " << d.drag_area << " ± " << d.quadrature_error << " (" << d.roll_evaluations
                   << " rolls), dense " << dense << ", largest D(θ) " << peak);
  CHECK(std::fabs(d.drag_area - dense) <= d.quadrature_error + 2e-3 * dense);
}

TEST_CASE("a flat-faced body is reported, not given a number", "[wave_drag]") {
  // Source: von Kármán's integral diverges for a jump in S (a flat face across the flow at
  // M = 1): S′ has a delta, and the station refinement cannot converge (docs/method.md §4.1).
  const Mesh box = make_box({0, -1, -1}, {4, 1, 1});
  const MachDrag d = drag_of(box, 1.0);
  CHECK_FALSE(d.converged);
  CHECK_FALSE(d.problem.empty());
  CHECK(std::isfinite(d.drag_area));
}

TEST_CASE("wake and capture tubes behind flat faces", "[wave_drag]") {
  // Source: a prism's volume is its face area times its length (elementary geometry); the
  // wake of a box's aft face (+x) is outward, the capture tube of its front face (−x) inward.
  const Mesh box = make_box({0, -1, -0.5}, {4, 1, 0.5});
  const Tubes w = flat_face_tubes(box, +1, 10.0);
  CHECK(w.faces == 2);
  CHECK_THAT(w.face_area, WithinRel(2.0, 1e-12));
  CHECK_THAT(signed_volume(w.mesh), WithinRel(2.0 * 6.0, 1e-12));
  const Tubes c = flat_face_tubes(box, -1, 10.0);
  CHECK_THAT(signed_volume(c.mesh), WithinRel(-2.0 * 10.0, 1e-12));
  // Box + wake − capture: every normal cut inside the box gives 2 + 0 − 2 = 0 and behind it
  // 2 − 2 = 0: a flow-through duct of constant area displaces nothing (common practice).
  const SectionEngine sum(concatenate({box, w.mesh, c.mesh}));
  for (double a : sum.areas({1.0, 0.0}, std::vector<double>{1.0, 3.9, 6.0}))
    CHECK_THAT(a, WithinAbs(0.0, 1e-12));
  CHECK(far_station(box) > 4.0 + 40.0 * std::hypot(1.0, 0.5));
}

TEST_CASE("a base closed by its wake converges like the closed form", "[wave_drag]") {
  // Source: von Kármán ogive D/q = 4 S_B²/(π l²) (docs/method.md §8.1) as the forebody of a
  // longer model: a thin slender spike (Sears–Haack, 1% of the area) extends 40% further aft, so
  // the ogive's flat base lies inside the model. Without the wake the base is a step in S (no
  // converged number); with the wake the drag is the ogive's plus the spike's plus their
  // interference, which for the spike's small area is within 3% of the ogive's alone.
  const double l = 10.0;
  Mesh og = body_with_area(
      [](double u) {
        const double phi = std::acos(1 - 2 * u);
        return (phi - std::sin(phi) * std::cos(phi)) / std::numbers::pi;
      },
      l, 300, 96);
  Mesh spike = body_with_area([](double u) { return 0.01 * std::pow(sin_phi(u), 3); }, 14.0, 200, 32);
  const Mesh model = concatenate({og, spike});
  const SectionEngine engine(model);
  WaveDragOptions o;
  const MachDrag bare = WaveDragModel(engine, {}, o).at_mach(1.0);
  CHECK_FALSE(bare.converged);
  const MachDrag waked =
      WaveDragModel(engine, {}, o, flat_face_tubes(og, +1, far_station(model)).mesh).at_mach(1.0);
  REQUIRE(waked.ok);
  CHECK_THAT(waked.drag_area, WithinRel(0.01273240, 0.03));
}

namespace {
nlohmann::json drag_json(const std::string& args) {
  const RunResult r = run_cli("drag " + args + " -q --json -");
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  return nlohmann::json::parse(r.out);
}
}  // namespace

TEST_CASE("machcut drag: units and overlapping shells do not change D/q", "[wave_drag][cli]") {
  // Source: D/q is a property of the shape (dimensional analysis: in m² whatever the file
  // unit); a shell contained in another adds no volume, so the united model is the outer one.
  const Mesh wing = biconvex_wing(1.0, 3.0, 0.05, 40);
  Mesh mm = wing;
  for (Vec3& p : mm.positions) p = 1000.0 * p;
  const std::string f_m = write_obj(wing, "drag_wing_m.obj");
  const std::string f_mm = write_obj(mm, "drag_wing_mm.obj");
  const auto a = drag_json(f_m + " --mach 1.5");
  const auto b = drag_json(f_mm + " --mach 1.5 --units mm");
  const double da = a["results"][0]["drag_area"], db = b["results"][0]["drag_area"];
  CHECK_THAT(db, WithinRel(da, 1e-6));
  CHECK_THAT(double(b["volume"]), WithinRel(double(a["volume"]), 1e-7));  // OBJ text round-off

  const Mesh body = body_with_area([](double u) { return std::pow(sin_phi(u), 3); }, 10.0, 120, 48);
  Mesh inner = body_with_area([](double u) { return 0.3 * std::pow(sin_phi(u), 3); }, 6.0, 60, 24);
  for (Vec3& p : inner.positions) p.x += 2.0;
  const std::string f_body = write_obj(body, "drag_body.obj");
  const std::string f_inner = write_obj(inner, "drag_inner.obj");
  const auto one = drag_json(f_body + " --mach 1.0:1.4:0.4");
  const auto two = drag_json(f_body + " " + f_inner + " --mach 1.0:1.4:0.4");
  for (int k = 0; k < 2; ++k) {
    const double d1 = one["results"][k]["drag_area"], d2 = two["results"][k]["drag_area"];
    const double e1 = one["results"][k]["error_estimate"], e2 = two["results"][k]["error_estimate"];
    CHECK(std::fabs(d1 - d2) <= e1 + e2);
  }
}

TEST_CASE("machcut drag: one shell split into two overlapping ones gives the same D/q", "[wave_drag][cli]") {
  // Source: the union of the two halves is the whole wing (elementary geometry), and D/q is a
  // property of the shape. The halves overlap over 0.8 m of the 3 m span.
  const std::string whole = write_obj(biconvex_wing_between(1.0, -1.5, 1.5, 0.05, 40), "split_whole.obj");
  const std::string left = write_obj(biconvex_wing_between(1.0, -1.5, 0.4, 0.05, 40), "split_left.obj");
  const std::string right = write_obj(biconvex_wing_between(1.0, -0.4, 1.5, 0.05, 40), "split_right.obj");
  const auto one = drag_json(whole + " --mach 1.2,1.6");
  const auto two = drag_json(left + " " + right + " --mach 1.2,1.6");
  CHECK_THAT(double(two["volume"]), WithinRel(double(one["volume"]), 1e-6));
  for (int k = 0; k < 2; ++k) {
    const double d1 = one["results"][k]["drag_area"], d2 = two["results"][k]["drag_area"];
    const double e1 = one["results"][k]["error_estimate"], e2 = two["results"][k]["error_estimate"];
    INFO("M " << double(one["results"][k]["mach"]) << ": " << d1 << " ± " << e1 << " vs " << d2 << " ± " << e2);
    CHECK(std::fabs(d1 - d2) <= e1 + e2);
  }
}

TEST_CASE("machcut drag: contract fields, CSV and bad options", "[wave_drag][cli]") {
  // Source: README.md's JSON contract; U.S. Standard Atmosphere 1976 at 11 000 m:
  // p = 22 632 Pa, so q = ½ · 1.4 · 22632.1 · 1.5² (docs/method.md §10).
  const std::string f = write_obj(biconvex_wing(1.0, 3.0, 0.05, 40), "drag_wing_c.obj");
  const auto j = drag_json(f + " --mach 1.5 --ref-area 3 --altitude 11000");
  for (const char* k : {"volume", "length", "max_area", "sears_haack_drag_area", "results"})
    CHECK(j.contains(k));
  const auto& r = j["results"][0];
  for (const char* k : {"mach", "drag_area", "error_estimate", "cd", "drag_n", "rolls"}) CHECK(r.contains(k));
  CHECK_THAT(double(r["cd"]), WithinRel(double(r["drag_area"]) / 3.0, 1e-12));
  CHECK_THAT(double(r["drag_n"]), WithinRel(0.7 * 22632.1 * 2.25 * double(r["drag_area"]), 2e-5));
  CHECK(r["rolls"][0].contains("roll_deg"));
  const RunResult csv = run_cli("drag " + f + " --mach 1.2:1.6:0.2 -q --csv -");
  CHECK(csv.exit_code == 0);
  CHECK(csv.out.rfind("mach,drag_area_m2,error_estimate_m2", 0) == 0);
  CHECK(std::count(csv.out.begin(), csv.out.end(), '\n') == 4);
  const RunResult bad = run_cli("drag " + f + " --mach 0.8");
  CHECK(bad.exit_code == 2);
  CHECK(bad.err.find("--mach") != std::string::npos);
  CHECK(run_cli("drag " + f + " --mach 1.5 --altitude 90000").exit_code == 2);
  CHECK(run_cli("drag " + f + " --mach 1:2").exit_code == 2);
  // A comma list of Mach numbers and sweeps, as the other commands take.
  const auto list = drag_json(f + " --mach 1.2,1.5:1.6:0.1");
  CHECK(list["results"].size() == 3);
  // --capture may come before the files; one shell named twice would be subtracted twice.
  const std::string pod = write_obj(make_box({0.2, -0.2, -0.6}, {0.8, 0.2, -0.3}), "drag_pod.obj");
  const RunResult before = run_cli("drag --mach 1.5 --capture drag_pod.obj " + f + " " + pod + " -q");
  INFO(before.err);
  CHECK(before.exit_code == 0);
  const RunResult twice =
      run_cli("drag " + f + " " + pod + " --mach 1.5 --capture drag_pod.obj --capture drag_pod.obj");
  CHECK(twice.exit_code == 2);
  CHECK(twice.err.find("more than one --capture") != std::string::npos);
}
