// Reshaping a part for less wave drag (slicing/study/reshape.cpp, docs/method.md §8.8).
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include "machcut/common/errors.h"
#include "machcut/study/reshape.h"
#include "test_support.h"

using namespace machcut;

TEST_CASE("reshape of a body of revolution at M 1, volume kept, reaches the Sears-Haack drag",
          "[reshape]") {
  // A parabolic spindle r = R·4u(1 − u), l = 10 m, R = 0.5 m. Of all bodies of its volume and
  // length the Sears–Haack body has the least drag, D/q = 128V²/(πl⁴) (Sears 1947; Haack 1941).
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
  const Study study(test::prepared_model(body), EndSetup{});
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
