// Tests of the Eminton–Lord wave drag of one equivalent body (slicing/drag/eminton_lord.cpp) against
// closed forms of slender-body theory.
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>
#include <vector>

#include "machcut/drag/eminton_lord.h"

using namespace machcut;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// Samples S(u) at nose, `n` uniform interior stations and tail of a body of length l from x0.
template <class F>
EmintonLordFit fit_uniform(F area_of_u, double x0, double l, int n) {
  std::vector<double> x, s;
  for (int i = 0; i <= n + 1; ++i) {
    const double u = static_cast<double>(i) / (n + 1);
    x.push_back(x0 + u * l);
    s.push_back(area_of_u(u));
  }
  return eminton_lord_fit(x, s);
}

double sin_phi(double u) { return std::sqrt(std::max(0.0, 4 * u * (1 - u))); }  // 4ξ(1−ξ) = sin²φ

// Iₙ(φ) of the sine series (docs/method.md §4.2).
double i_n(int n, double phi) {
  if (n == 1) return 0.5 * (phi - std::sin(phi) * std::cos(phi));
  return 0.5 * (std::sin((n - 1) * phi) / (n - 1) - std::sin((n + 1) * phi) / (n + 1));
}
}  // namespace

TEST_CASE("Eminton-Lord kernel equals its defining series", "[drag]") {
  // Source: G(u, v) = Σₙ≥₂ Iₙ(φ)Iₙ(ψ)/n (Eminton 1955; docs/method.md §4.5), summed directly. The
  // terms fall like 1/n³, so 200 000 terms leave < 1e-10.
  for (auto [u, v] : {std::pair{0.1, 0.7}, {0.5, 0.5}, {0.02, 0.03}, {0.9, 0.35}}) {
    const double phi = std::acos(1 - 2 * u), psi = std::acos(1 - 2 * v);
    double sum = 0.0;
    for (int n = 2; n < 200000; ++n) sum += i_n(n, phi) * i_n(n, psi) / n;
    CHECK_THAT(eminton_lord_kernel(u, v), WithinAbs(sum, 1e-9));
  }
}

TEST_CASE("Sears-Haack samples reproduce the published convergence from below", "[drag]") {
  // Source: docs/method.md §4.5 (computed there independently): l = 10, S_max = 1,
  // N = 3, 9, 19 uniform interior stations give 0.13952, 0.14126, 0.14136; closed form
  // 9π S_max²/(2 l²) = 0.1413717 (Sears 1947; Haack 1941).
  auto sh = [](double u) { return std::pow(sin_phi(u), 3); };
  CHECK_THAT(fit_uniform(sh, 0.0, 10.0, 3).drag_area, WithinAbs(0.13952, 6e-6));
  CHECK_THAT(fit_uniform(sh, 0.0, 10.0, 9).drag_area, WithinAbs(0.14126, 6e-6));
  CHECK_THAT(fit_uniform(sh, 0.0, 10.0, 19).drag_area, WithinAbs(0.14136, 6e-6));
  const double exact = 9 * std::numbers::pi / (2 * 100.0);
  CHECK_THAT(exact, WithinRel(0.1413717, 1e-6));
  CHECK_THAT(fit_uniform(sh, 3.0, 10.0, 99).drag_area, WithinRel(exact, 1e-5));
}

TEST_CASE("von Karman ogive is reproduced exactly with any stations", "[drag]") {
  // Source: von Kármán ogive of given length and base area, D/q = 4 S_B²/(π l²)
  // (docs/method.md §8.1; von Kármán 1935 (mem)); it is the least-drag body through any of its own
  // samples.
  auto ogive = [](double u) {
    const double phi = std::acos(1 - 2 * u);
    return (phi - std::sin(phi) * std::cos(phi)) / std::numbers::pi;
  };
  for (int n : {1, 5, 40}) {
    const EmintonLordFit f = fit_uniform(ogive, -2.0, 10.0, n);
    REQUIRE(f.ok);
    CHECK_THAT(f.drag_area, WithinRel(4.0 / (std::numbers::pi * 100.0), 1e-9));  // 0.01273240
  }
  CHECK_THAT(4.0 / (std::numbers::pi * 100.0), WithinRel(0.01273240, 1e-6));
}

TEST_CASE("Haack-Adams body with a base matches its closed form", "[drag]") {
  // Source: Haack–Adams body of given l, V, S_B (Adams, NACA TN 2550 (mem); docs/method.md §8.1):
  // D/q = 4 S_B²/(π l²) + 128 (V − l S_B/2)²/(π l⁴). Its shape is S_B s₀(u) + c sin³φ with
  // V = l S_B/2 + 3π c l/16 (integration of the sine series, docs/method.md §4.2).
  const double l = 8.0, sb = 0.3, c = 0.6;
  const double v = l * sb / 2 + 3 * std::numbers::pi * c * l / 16;
  auto body = [&](double u) { return sb * karman_ogive_shape(u) + c * std::pow(sin_phi(u), 3); };
  const double expected = 4 * sb * sb / (std::numbers::pi * l * l) +
                          128 * std::pow(v - l * sb / 2, 2) / (std::numbers::pi * std::pow(l, 4));
  const EmintonLordFit f = fit_uniform(body, 0.0, l, 60);
  REQUIRE(f.ok);
  CHECK_THAT(f.drag_area, WithinRel(expected, 1e-4));
  CHECK(f.base_area == sb);
}

TEST_CASE("parabolic spindle converges to its closed form from below", "[drag]") {
  // Source: parabolic spindle S = S_max [4ξ(1 − ξ)]², D/q = 128 S_max²/(3π l²)
  // (docs/method.md §8.1).
  auto spindle = [](double u) { return std::pow(sin_phi(u), 4); };
  const double exact = 128.0 / (3 * std::numbers::pi * 25.0);
  double last = 0.0;
  for (int n : {5, 20, 80}) {
    const double d = fit_uniform(spindle, 0.0, 5.0, n).drag_area;
    CHECK(d <= exact * (1 + 1e-12));  // a lower bound (Eminton 1955)
    CHECK(d >= last);                 // monotone with nested-enough refinement
    last = d;
  }
  CHECK_THAT(last, WithinRel(exact, 1e-3));
}

TEST_CASE("fitted curve passes through the samples", "[drag]") {
  // Source: the Eminton–Lord curve interpolates every given area (its defining constraint).
  const std::vector<double> x{0.0, 1.0, 2.5, 4.0, 6.0, 7.0};
  const std::vector<double> s{0.0, 0.4, 1.1, 1.0, 0.6, 0.2};
  const EmintonLordFit f = eminton_lord_fit(x, s);
  REQUIRE(f.ok);
  for (std::size_t i = 0; i < x.size(); ++i) CHECK_THAT(eminton_lord_area(f, x[i]), WithinAbs(s[i], 1e-9));
  CHECK(eminton_lord_area(f, -1.0) == 0.0);
  CHECK(eminton_lord_area(f, 9.0) == 0.2);
}

TEST_CASE("degenerate inputs are reported, not computed", "[drag]") {
  const std::vector<double> one{1.0};
  CHECK_FALSE(eminton_lord_fit(one, one).ok);
  const std::vector<double> x{2.0, 2.0}, s{0.0, 0.0};
  CHECK_FALSE(eminton_lord_fit(x, s).ok);
  const std::vector<double> xn{0.0, 1.0, 2.0}, sn{0.0, NAN, 0.0};
  CHECK_FALSE(eminton_lord_fit(xn, sn).ok);
  // Coincident stations are dropped rather than making the system singular.
  const std::vector<double> xc{0.0, 1.0, 1.0, 2.0}, sc{0.0, 1.0, 1.0, 0.0};
  CHECK(eminton_lord_fit(xc, sc).ok);
}
