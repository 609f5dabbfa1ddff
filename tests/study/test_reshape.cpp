// Reshaping a part for less wave drag (slicing/study/reshape.cpp, docs/method.md §8.8).
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <numbers>

#include "machcut/common/errors.h"
#include "machcut/sections/section.h"
#include "machcut/study/reshape.h"
#include "test_support.h"

using namespace machcut;

namespace {

// A parabolic spindle r = R·4u(1 − u), l = 10 m, R = 0.5 m (volume 8πR²l/15 = 4.19 m³).
Mesh spindle() {
  const double l = 10.0, R = 0.5;
  std::vector<double> x, r;
  for (int i = 0; i <= 120; ++i) {
    const double u = 0.5 * (1 - std::cos(std::numbers::pi * i / 120));
    x.push_back(u * l);
    r.push_back(R * 4 * u * (1 - u));
  }
  r.front() = r.back() = 0.0;
  Mesh body = test::make_body_of_revolution(x, r, 48);
  body.shell_names = {"body.obj"};
  return body;
}

// Normal (M = 1) areas of `mesh` at 201 stations along it.
std::vector<double> normal_areas(const Mesh& mesh) {
  const SectionEngine engine(mesh);
  const MachPlanes normal{1.0, 0.0};
  return engine.areas(normal, make_stations(engine.range(normal), 201, Spacing::uniform));
}

}  // namespace

TEST_CASE("reshape of a body of revolution at M 1, volume kept, reaches the Sears-Haack drag",
          "[reshape]") {
  // Of all bodies of the spindle's volume and length the Sears–Haack body has the least drag,
  // D/q = 128V²/(πl⁴) (Sears 1947; Haack 1941).
  const double l = 10.0;
  const Study study(test::prepared_model(spindle()), EndSetup{});
  ReshapeRequest q;
  q.mach = 1.0;
  q.parts = {"body.obj"};
  const ReshapeResult res = reshape(study, q);
  const double v = res.volume_after;
  const double sears_haack = 128.0 * v * v / (std::numbers::pi * std::pow(l, 4));
  INFO("before " << res.drag_before << " m², after " << res.drag_after << " m², Sears–Haack "
                 << sears_haack << " m², volume " << res.volume_before << " → " << v << " m³, "
                 << res.iterations << " steps");
  std::string notes;
  for (const std::string& n : res.notes) notes += n + "\n";
  INFO(notes);
  CHECK(res.drag_before > 1.05 * sears_haack);  // the spindle is not the optimum
  CHECK(std::fabs(v - res.volume_before) < 1e-3 * res.volume_before);
  // The 1 %. Measured: +0.74 % with the default 64 modes (+2.1 % with 24, +1.0 % with
  // 48, +0.44 % with 96): the sine series converges slowly at the pointed ends, where the
  // Sears–Haack radius grows as u^{3/4}.
  CHECK(std::fabs(res.drag_after - sears_haack) < 0.01 * sears_haack);
  CHECK_FALSE(res.self_intersecting);
  CHECK(res.unmet.empty());
}

TEST_CASE("reshape names an unknown part and a kept station outside the part", "[reshape]") {
  Mesh body = test::make_sphere({1, 0, 0}, 1.0, 16, 24);
  body.shell_names = {"ball.obj"};
  const Study study(test::prepared_model(body), EndSetup{});
  ReshapeRequest q;
  q.mach = 1.0;
  q.parts = {"wing.obj"};
  CHECK_THROWS_AS(reshape(study, q), InputError);
  q.parts = {"ball.obj"};
  q.keep = {"5"};
  CHECK_THROWS_AS(reshape(study, q), InputError);
}

TEST_CASE("reshape keeps the area within --max-area and --min-area", "[reshape]") {
  // The Sears–Haack body of the spindle's volume V and length l has the largest area
  // S_max = 16V/(3πl) = 0.711 m² (Sears 1947), below the spindle's πR² = 0.785 m²: the
  // unconstrained reshape lowers the middle of the body. A limit of 0.69 m² is below where it
  // would go; a floor of 0.75 m² (over the stations where the spindle reaches it) above.
  const Mesh body = spindle();
  const Study study(test::prepared_model(body), EndSetup{});
  const std::vector<double> before = normal_areas(body);
  const double before_max = *std::max_element(before.begin(), before.end());
  REQUIRE(before_max == Approx(0.785).epsilon(0.01));
  ReshapeRequest q;
  q.mach = 1.0;
  q.parts = {"body.obj"};
  SECTION("a largest area") {
    q.max_area = 0.69;
    const ReshapeResult res = reshape(study, q);
    const std::vector<double> after = normal_areas(res.mesh);
    const double largest = *std::max_element(after.begin(), after.end());
    INFO("largest area " << before_max << " -> " << largest << " m², D/q " << res.drag_before << " -> "
                         << res.drag_after << " m²");
    CHECK(res.unmet.empty());
    CHECK(largest <= 1.01 * q.max_area);  // the tolerance reshape itself allows before "unmet"
    CHECK(largest >= 0.95 * q.max_area);  // and the limit is active: the optimum lies above it
    CHECK(res.volume_after == Approx(res.volume_before).epsilon(1e-3));
    CHECK(res.drag_after < res.drag_before);
  }
  SECTION("a smallest area where the body reaches it") {
    q.min_area = 0.75;
    const ReshapeResult res = reshape(study, q);
    const std::vector<double> after = normal_areas(res.mesh);
    REQUIRE(after.size() == before.size());
    double lowest = 1e9;
    for (std::size_t j = 0; j < after.size(); ++j)
      if (before[j] >= q.min_area) lowest = std::min(lowest, after[j]);
    INFO("lowest area where the spindle reaches 0.75 m²: " << lowest << " m², D/q " << res.drag_before
                                                           << " -> " << res.drag_after << " m²");
    CHECK(res.unmet.empty());
    CHECK(lowest >= 0.99 * q.min_area);
    CHECK(lowest <= 1.03 * q.min_area);  // active: unconstrained, the middle would go to 0.711 m²
    CHECK(res.drag_after < res.drag_before);
  }
}
