// Zone split of a drag change — see compare.h.
#include "machcut/design/compare.h"

#include <algorithm>
#include <cmath>

#include "machcut/drag/eminton_lord.h"
#include "machcut/sections/slope_grid.h"

namespace machcut {
namespace {

bool drag_of(std::span<const double> x, const std::vector<double>& s, double& d) {
  const EmintonLordFit f = eminton_lord_fit(x, s);
  d = f.drag_area;
  return f.ok;
}

// Hat function of zone z (centres at the zone midpoints; the first and last are flat to the ends).
double hat(double x, const std::vector<double>& centres, std::size_t z) {
  const double c = centres[z];
  if (x <= c) {
    if (z == 0) return 1.0;
    const double l = centres[z - 1];
    return x <= l ? 0.0 : (x - l) / (c - l);
  }
  if (z + 1 == centres.size()) return 1.0;
  const double r = centres[z + 1];
  return x >= r ? 0.0 : (r - x) / (r - c);
}

}  // namespace

DragDifference drag_difference_by_zone(std::span<const double> x, std::span<const double> a,
                                       std::span<const double> b, int zones) {
  DragDifference out;
  const std::size_t n = x.size();
  if (n < 2 || a.size() != n || b.size() != n || zones < 1) return out;
  std::vector<double> sa(a.begin(), a.end()), sb(b.begin(), b.end()), sum(n), delta(n);
  if (!drag_of(x, sa, out.drag_area_a) || !drag_of(x, sb, out.drag_area_b)) return out;
  out.delta_drag_area = out.drag_area_b - out.drag_area_a;
  for (std::size_t i = 0; i < n; ++i) { sum[i] = a[i] + b[i]; delta[i] = b[i] - a[i]; }
  const double x0 = x.front(), len = x.back() - x.front();
  std::vector<double> centres;
  for (int z = 0; z < zones; ++z) centres.push_back(x0 + len * (z + 0.5) / zones);
  std::vector<double> plus(n), minus(n);
  for (std::size_t z = 0; z < centres.size(); ++z) {
    for (std::size_t i = 0; i < n; ++i) {
      const double dz = hat(x[i], centres, z) * delta[i];
      plus[i] = sum[i] + dz;
      minus[i] = sum[i] - dz;
    }
    double dp = 0.0, dm = 0.0;
    if (!drag_of(x, plus, dp) || !drag_of(x, minus, dm)) return out;
    ZoneContribution zc;
    zc.x_center = centres[z];
    zc.x_from = z == 0 ? x0 : centres[z - 1];
    zc.x_to = z + 1 == centres.size() ? x.back() : centres[z + 1];
    zc.delta_drag_area = 0.25 * (dp - dm);
    out.zones.push_back(zc);
  }
  out.ok = true;
  return out;
}

DragDifference drag_difference_by_zone(const WaveDragModel& a, const WaveDragModel& b, int zones,
                                       int cells, double mach, int rolls) {
  DragDifference out;
  if (!a.uses_grid() || !b.uses_grid()) {
    out.problem = "a capture given as an area: no slope grid";
    return out;
  }
  // Roll angles: one at M = 1 (normal planes), else `rolls` evenly over the turn (midpoints;
  // the roll integrand is smooth between its singular angles, so the plain rule converges —
  // the adaptive quadrature of the drag itself is not needed for a split).
  std::vector<double> roll{0.0};
  if (mach > 1.0) {
    roll.clear();
    const int n = std::max(1, rolls);
    for (int k = 0; k < n; ++k) roll.push_back(360.0 * (k + 0.5) / n);
  }
  // One station range for every roll and both models, so that zones mean the same X.
  double x0 = HUGE_VAL, x1 = -HUGE_VAL;
  for (double t : roll) {
    const StationRange ra = a.range(mach, t), rb = b.range(mach, t);
    x0 = std::min({x0, ra.lo, rb.lo});
    x1 = std::max({x1, ra.hi, rb.hi});
  }
  if (!(x1 > x0) || zones < 1) {
    out.problem = "no extent along the flow";
    return out;
  }
  const double margin = (x1 - x0) / 64.0;
  const double width = (x1 - x0) / zones;
  for (int z = 0; z < zones; ++z)
    out.zones.push_back({x0 + (z + 0.5) * width, x0 + z * width, x0 + (z + 1) * width, 0.0});
  const double w = 1.0 / static_cast<double>(roll.size());
  for (double t : roll) {
    const SlopeGrid ga = a.slope_grid(mach, t, x0 - margin, x1 + margin, cells);
    const SlopeGrid gb = b.slope_grid(mach, t, x0 - margin, x1 + margin, cells);
    for (const SlopeGrid* g : {&ga, &gb})
      if (has_area_step(*g, largest_area(*g))) {
        out.problem = mach > 1.0 ? "a face lies in the Mach planes with no wake or capture to close it"
                                 : "a face lies in the normal planes with no wake or capture to close it";
        out.zones.clear();
        return out;
      }
    const std::vector<double> sa = slope_steps(ga), sb = slope_steps(gb);
    out.drag_area_a += w * von_karman_drag_area(sa);
    out.drag_area_b += w * von_karman_drag_area(sb);
    const std::vector<double> share = drag_change_by_cell(sa, sb);
    const double cell = (ga.hi - ga.lo) / cells;
    for (int i = 0; i < cells; ++i) {
      const double x = ga.lo + (i + 0.5) * cell;
      const int z = std::clamp(static_cast<int>(std::floor((x - x0) / width)), 0, zones - 1);
      out.zones[z].delta_drag_area += w * share[i];
      out.delta_drag_area += w * share[i];
    }
  }
  out.ok = true;
  return out;
}

}  // namespace machcut
