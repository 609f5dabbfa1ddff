// Tests of `machcut compare` and the zone split of a drag change (slicing/design/compare.cpp).
#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <numeric>

#include "machcut/design/compare.h"
#include "machcut/drag/eminton_lord.h"
#include "machcut/sections/section.h"
#include "machcut/sections/slope_grid.h"
#include "machcut/drag/wave_drag.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// Sears–Haack radius (Sears 1947), S_max = π r_max².
std::string sears_haack_stl(const std::string& name, double bump) {
  std::vector<double> xs, rs;
  for (int i = 0; i <= 80; ++i) {
    const double xi = i / 80.0;
    xs.push_back(10 * xi);
    const double b = std::abs(xi - 0.7) < 0.06 ? bump * std::pow(std::cos((xi - 0.7) / 0.06 * 1.5707963), 2) : 0.0;
    rs.push_back(0.5 * std::pow(4 * xi * (1 - xi), 0.75) + b);
  }
  return write_stl_ascii(make_body_of_revolution(xs, rs, 48), name);
}
}  // namespace

TEST_CASE("zone contributions add up to the drag change", "[compare]") {
  // Exact by bilinearity of the Eminton–Lord quadratic form (polarization identity; see
  // compare.h): the zones must sum to D(B) − D(A) computed directly by eminton_lord_fit.
  std::vector<double> x, a, b;
  for (int i = 0; i <= 100; ++i) {
    const double xi = i / 100.0;
    x.push_back(10 * xi);
    a.push_back(std::pow(4 * xi * (1 - xi), 1.5));
    b.push_back(a.back() + 0.05 * std::exp(-std::pow((xi - 0.3) / 0.05, 2)));
  }
  const DragDifference d = drag_difference_by_zone(x, a, b, 10);
  REQUIRE(d.ok);
  CHECK_THAT(d.delta_drag_area, WithinRel(eminton_lord_fit(x, b).drag_area - eminton_lord_fit(x, a).drag_area, 1e-12));
  double sum = 0, largest = 0, where = 0;
  for (const auto& z : d.zones) {
    sum += z.delta_drag_area;
    if (std::abs(z.delta_drag_area) > largest) { largest = std::abs(z.delta_drag_area); where = z.x_center; }
  }
  CHECK_THAT(sum, WithinRel(d.delta_drag_area, 1e-6));
  CHECK_THAT(where, WithinAbs(3.0, 1.0));  // the bump's zone carries the most
}

TEST_CASE("compare of identical inputs gives exactly zero", "[compare][cli]") {
  const std::string a = sears_haack_stl("cmp_a.stl", 0.0);
  const RunResult r = run_cli("compare " + a + " -- " + a + " --mach 1,1.4 --json - -q");
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const auto j = nlohmann::json::parse(r.out);
  REQUIRE(j["results"].size() == 2);
  for (const auto& row : j["results"]) {
    CHECK(row["delta_drag_area"].get<double>() == 0.0);
    CHECK(row["drag_area_a"].get<double>() > 0.0);
  }
  for (double d : j["area_difference"]["delta_area"].get<std::vector<double>>()) CHECK(d == 0.0);
  for (const auto& z : j["zones"]["split"]) CHECK(z["delta_drag_area"].get<double>() == 0.0);
}

TEST_CASE("compare finds a bump where it is", "[compare][cli]") {
  // A Sears–Haack body and the same with a smooth bump at x = 7 m: B − A > 0 at M = 1, and
  // the zone of largest change contains x = 7 (constructed).
  const std::string a = sears_haack_stl("cmp_sh.stl", 0.0);
  const std::string b = sears_haack_stl("cmp_bump.stl", 0.05);
  const RunResult r = run_cli("compare " + a + " -- " + b + " --mach 1 --json - -q");
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["results"][0]["delta_drag_area"].get<double>() > 0.0);
  double largest = 0, where = 0;
  for (const auto& z : j["zones"]["split"])
    if (std::abs(z["delta_drag_area"].get<double>()) > largest) {
      largest = std::abs(z["delta_drag_area"].get<double>());
      where = z["x_center"].get<double>();
    }
  CHECK_THAT(where, WithinAbs(7.0, 1.0));
}

TEST_CASE("compare without the -- separator is an input error", "[compare][cli][errors]") {
  const std::string a = sears_haack_stl("cmp_only.stl", 0.0);
  const RunResult r = run_cli("compare " + a + " " + a + " -q");
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--") != std::string::npos);
}

TEST_CASE("per-cell shares of a slope-grid drag change add up to it", "[compare][slope_grid]") {
  // Source: D = −(1/2π) aᵀKa with K symmetric, so D(b) − D(a) = −(1/2π)(b − a)ᵀK(a + b)
  // (elementary algebra); checked against von_karman_drag_area of each.
  std::vector<double> a(200), b(200);
  for (int i = 0; i < 200; ++i) {
    a[i] = std::sin(0.05 * i) - std::sin(0.05 * (i + 1));
    b[i] = a[i] * (1.0 + 0.3 * std::cos(0.02 * i));
  }
  b.back() -= std::accumulate(b.begin(), b.end(), 0.0);  // S′ = 0 at both ends
  const std::vector<double> share = drag_change_by_cell(a, b);
  const double sum = std::accumulate(share.begin(), share.end(), 0.0);
  CHECK_THAT(sum, WithinAbs(von_karman_drag_area(b) - von_karman_drag_area(a), 1e-12));
  const std::vector<double> none = drag_change_by_cell(a, a);
  CHECK(std::all_of(none.begin(), none.end(), [](double v) { return v == 0.0; }));
}

TEST_CASE("slope-grid zone split adds up to the change of D/q and finds a blister", "[compare]") {
  // Source: the split is exact by construction (above); the change must equal the difference
  // of the two models' D/q at M = 1 within their error estimates, and the zone holding the
  // blister (x = 3 m, constructed) must carry the largest share.
  auto sh = [](double u) { return std::pow(4 * u * (1 - u), 1.5); };
  const Mesh a = body_with_area(sh, 10.0, 300, 64);
  const Mesh b = body_with_area([&](double u) { return sh(u) + 0.05 * std::exp(-std::pow((u - 0.3) / 0.04, 2)); },
                                10.0, 300, 64);
  const SectionEngine ea(a), eb(b);
  const WaveDragModel wa(ea, {}, {}), wb(eb, {}, {});
  const DragDifference d = drag_difference_by_zone(wa, wb, 10);
  INFO(d.problem);
  REQUIRE(d.ok);
  const MachDrag da = wa.at_mach(1.0), db = wb.at_mach(1.0);
  CHECK(std::fabs(d.delta_drag_area - (db.drag_area - da.drag_area)) <= da.error_estimate + db.error_estimate);
  double sum = 0, largest = 0, where = 0;
  for (const auto& z : d.zones) {
    sum += z.delta_drag_area;
    if (std::abs(z.delta_drag_area) > largest) { largest = std::abs(z.delta_drag_area); where = z.x_center; }
  }
  CHECK_THAT(sum, WithinRel(d.delta_drag_area, 1e-12));
  CHECK_THAT(where, WithinAbs(3.0, 0.5));
}
