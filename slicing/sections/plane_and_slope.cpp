#include "machcut/sections/plane_and_slope.h"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <numbers>

namespace machcut {

Vec3 plane_point(const MachPlanes& planes, double station, double u, double v) {
  assert(planes.mach >= 1.0);
  const double beta = std::sqrt(std::max(0.0, planes.mach * planes.mach - 1.0));
  const double t = planes.roll_deg * std::numbers::pi / 180.0;
  const double c = std::cos(t), s = std::sin(t);
  // e_u and e_v are orthonormal and both satisfy f(e) = 0 for the linear part of f, so the
  // point stays on the plane f = station.
  const Vec3 eu = (1.0 / planes.mach) * Vec3{beta, c, s};
  const Vec3 ev{0.0, -s, c};
  return Vec3{station, 0.0, 0.0} + u * eu + v * ev;
}

std::vector<double> area_slope(std::span<const double> x, std::span<const double> s) {
  assert(x.size() == s.size());
  const std::size_t n = x.size();
  std::vector<double> d(n, 0.0);
  if (n < 2) return d;
  if (n == 2) {
    d[0] = d[1] = (s[1] - s[0]) / (x[1] - x[0]);
    return d;
  }
  // Three-point Lagrange derivative on uneven spacing (common practice).
  auto three = [&](std::size_t a, std::size_t at) {
    const double x0 = x[a], x1 = x[a + 1], x2 = x[a + 2], t = x[at];
    const double l0 = (2 * t - x1 - x2) / ((x0 - x1) * (x0 - x2));
    const double l1 = (2 * t - x0 - x2) / ((x1 - x0) * (x1 - x2));
    const double l2 = (2 * t - x0 - x1) / ((x2 - x0) * (x2 - x1));
    return l0 * s[a] + l1 * s[a + 1] + l2 * s[a + 2];
  };
  d[0] = three(0, 0);
  for (std::size_t i = 1; i + 1 < n; ++i) d[i] = three(i - 1, i);
  d[n - 1] = three(n - 3, n - 1);
  return d;
}

}  // namespace machcut
