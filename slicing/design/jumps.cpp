// Area jumps of an area curve — see jumps.h.
#include "machcut/design/jumps.h"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <numeric>

#include "machcut/drag/eminton_lord.h"

namespace machcut {
namespace {

// y ≈ c0 + c1 t + c2 t², t = x − x_ref.
struct Quad {
  double x_ref = 0.0, c0 = 0.0, c1 = 0.0, c2 = 0.0;
  double value(double x) const { const double t = x - x_ref; return c0 + t * (c1 + t * c2); }
  double slope(double x) const { return c1 + 2.0 * c2 * (x - x_ref); }
};

// Least-squares quadratic (linear for two points) through stations [lo, hi], scaled so that
// the 3×3 normal equations stay well conditioned.
Quad fit(std::span<const double> x, std::span<const double> y, std::size_t lo, std::size_t hi, double x_ref) {
  Quad q;
  q.x_ref = x_ref;
  const std::size_t n = hi - lo + 1;
  double scale = 0.0;
  for (std::size_t j = lo; j <= hi; ++j) scale = std::max(scale, std::abs(x[j] - x_ref));
  if (scale <= 0.0) { q.c0 = y[lo]; return q; }
  double m[3][4] = {};
  const int order = n >= 3 ? 3 : 2;
  for (std::size_t j = lo; j <= hi; ++j) {
    const double t = (x[j] - x_ref) / scale;
    const double p[3] = {1.0, t, t * t};
    for (int r = 0; r < order; ++r) {
      for (int c = 0; c < order; ++c) m[r][c] += p[r] * p[c];
      m[r][3] += p[r] * y[j];
    }
  }
  // Gaussian elimination with partial pivoting on the tiny system.
  for (int k = 0; k < order; ++k) {
    int piv = k;
    for (int r = k + 1; r < order; ++r) if (std::abs(m[r][k]) > std::abs(m[piv][k])) piv = r;
    std::swap(m[k], m[piv]);
    if (std::abs(m[k][k]) < 1e-300) return q;
    for (int r = k + 1; r < order; ++r) {
      const double f = m[r][k] / m[k][k];
      for (int c = k; c < 4; ++c) m[r][c] -= f * m[k][c];
    }
  }
  double c[3] = {0.0, 0.0, 0.0};
  for (int k = order - 1; k >= 0; --k) {
    double s = m[k][3];
    for (int j = k + 1; j < order; ++j) s -= m[k][j] * c[j];
    c[k] = s / m[k][k];
  }
  q.c0 = c[0];
  q.c1 = c[1] / scale;
  q.c2 = c[2] / (scale * scale);
  return q;
}

// Stations of the upstream window ending at i and the downstream one starting at i + 1.
struct Windows { std::size_t left_lo, left_hi, right_lo, right_hi; };
Windows windows_at(std::span<const double> x, std::size_t i, double w) {
  Windows win{i, i, i + 1, i + 1};
  while (win.left_lo > 0 && (x[i] - x[win.left_lo - 1] <= w || i - win.left_lo < 2)) --win.left_lo;
  while (win.right_hi + 1 < x.size() && (x[win.right_hi + 1] - x[i + 1] <= w || win.right_hi - i - 1 < 2)) ++win.right_hi;
  return win;
}

struct GapMeasure { double step = 0.0, kink = 0.0, x = 0.0; };

GapMeasure measure_gap(std::span<const double> x, std::span<const double> y, std::size_t i, double w) {
  const Windows win = windows_at(x, i, w);
  const double m = 0.5 * (x[i] + x[i + 1]);
  const Quad l = fit(x, y, win.left_lo, win.left_hi, m);
  const Quad r = fit(x, y, win.right_lo, win.right_hi, m);
  GapMeasure g{r.value(m) - l.value(m), r.slope(m) - l.slope(m), m};
  return g;
}

// Station of a kink: where the two one-sided fits cross, kept inside the gap.
double kink_station(const GapMeasure& g, double half_gap) {
  if (g.kink == 0.0) return g.x;
  return g.x + std::clamp(-g.step / g.kink, -half_gap, half_gap);
}

// Steps first (local maxima of |step| within ±W), then kinks (local maxima of W|kink|) that
// are not within W of a step: a step inside a fitting window also bends the fits, so its
// neighbours show a spurious kink that must not be reported on its own.
std::vector<AreaJump> candidates(const AreaCurve& c, double w, const JumpOptions& o) {
  const std::size_t n = c.x.size();
  double s_max = 0.0;
  for (double a : c.area) s_max = std::max(s_max, std::abs(a));
  const double threshold = o.min_size_frac * s_max;
  if (!(s_max > 0.0)) return {};
  std::vector<GapMeasure> gaps(n);
  for (std::size_t i = 2; i + 3 < n; ++i) gaps[i] = measure_gap(c.x, c.area, i, w);
  auto local_max = [&](std::size_t i, auto measure) {
    for (std::size_t k = 2; k + 3 < n; ++k)
      if (k != i && std::abs(c.x[k] - c.x[i]) < w && measure(gaps[k]) > measure(gaps[i])) return false;
    return true;
  };
  auto step_of = [](const GapMeasure& g) { return std::abs(g.step); };
  auto kink_of = [w](const GapMeasure& g) { return w * std::abs(g.kink); };
  std::vector<AreaJump> kept;
  for (int pass = 0; pass < 2; ++pass) {
    for (std::size_t i = 2; i + 3 < n; ++i) {
      const GapMeasure& g = gaps[i];
      const bool is_step = pass == 0;
      // A step must dominate its own gap's kink; otherwise it is a kink inside a window.
      const bool found = is_step ? step_of(g) >= threshold && step_of(g) >= kink_of(g) && local_max(i, step_of)
                                 : kink_of(g) >= threshold && local_max(i, kink_of);
      if (!found) continue;
      const double x = is_step ? g.x : kink_station(g, 0.5 * (c.x[i + 1] - c.x[i]));
      if (!is_step && std::any_of(kept.begin(), kept.end(), [&](const AreaJump& k) { return std::abs(k.x - x) < w; })) continue;
      AreaJump j;
      j.mach = c.mach;
      j.x = x;
      j.step = g.step;
      j.slope_change = g.kink;
      j.size = step_of(g) + kink_of(g);
      j.kind = is_step ? "step" : "kink";
      kept.push_back(j);
    }
  }
  return kept;
}

// Shells whose own curve steps or kinks at the jump.
std::vector<std::uint32_t> shells_at(const AreaCurve& c, double x, double w, double frac) {
  if (c.per_shell.empty()) return {};
  const auto it = std::upper_bound(c.x.begin(), c.x.end(), x);
  std::size_t i = static_cast<std::size_t>(std::max<std::ptrdiff_t>(it - c.x.begin() - 1, 2));
  i = std::min(i, c.x.size() - 4);
  std::vector<std::pair<double, std::uint32_t>> sizes;
  for (std::size_t s = 0; s < c.per_shell.size(); ++s) {
    if (c.per_shell[s].size() != c.x.size()) continue;
    const GapMeasure g = measure_gap(c.x, c.per_shell[s], i, w);
    sizes.push_back({std::abs(g.step) + w * std::abs(g.kink), static_cast<std::uint32_t>(s)});
  }
  std::sort(sizes.rbegin(), sizes.rend());
  std::vector<std::uint32_t> out;
  for (const auto& [size, s] : sizes)
    if (size > 0.0 && size >= frac * sizes.front().first) out.push_back(s);
  return out;
}

}  // namespace

double eminton_lord_drag(std::span<const double> x, std::span<const double> area) {
  const EmintonLordFit f = eminton_lord_fit(x, area);
  return f.ok ? f.drag_area : 0.0;
}

std::vector<double> smooth_region(const AreaCurve& c, double x_from, double x_to, double w) {
  std::vector<double> out = c.area;
  const std::size_t n = c.x.size();
  if (n < 4 || !(x_to > x_from)) return out;
  const std::size_t a = static_cast<std::size_t>(std::lower_bound(c.x.begin(), c.x.end(), x_from) - c.x.begin());
  const std::size_t b = static_cast<std::size_t>(std::upper_bound(c.x.begin(), c.x.end(), x_to) - c.x.begin());
  if (a == 0 || b >= n || a >= b) return out;  // a region that reaches an end is left alone
  // Upstream fit on the stations before the region, downstream fit on those after it.
  const Windows up = windows_at(c.x, a - 1, w);
  const Windows down = windows_at(c.x, b - 1, w);
  const Quad l = fit(c.x, c.area, up.left_lo, up.left_hi, c.x[a - 1]);
  const Quad r = fit(c.x, c.area, down.right_lo, down.right_hi, c.x[b]);
  // Cubic Hermite from (x[a−1], l) to (x[b], r) in value and slope.
  const double x0 = c.x[a - 1], x1 = c.x[b], h = x1 - x0;
  const double y0 = l.value(x0), y1 = r.value(x1), d0 = l.slope(x0) * h, d1 = r.slope(x1) * h;
  for (std::size_t k = a; k < b; ++k) {
    const double t = (c.x[k] - x0) / h, t2 = t * t, t3 = t2 * t;
    out[k] = (2 * t3 - 3 * t2 + 1) * y0 + (t3 - 2 * t2 + t) * d0 + (-2 * t3 + 3 * t2) * y1 + (t3 - t2) * d1;
  }
  return out;
}

std::vector<AreaJump> find_jumps(const AreaCurve& c, const CurveDrag& drag, const JumpOptions& o) {
  assert(c.x.size() == c.area.size());
  if (c.x.size() < 8) return {};
  const double length = c.x.back() - c.x.front();
  if (!(length > 0.0)) return {};
  const double w = o.window_frac * length;
  // The finest window: min_window_gaps of the widest station gap.
  double gap = 0.0;
  for (std::size_t i = 1; i < c.x.size(); ++i) gap = std::max(gap, c.x[i] - c.x[i - 1]);
  std::vector<AreaJump> all;
  for (double wk = w; ; wk *= 0.5) {
    for (AreaJump& j : candidates(c, wk, o)) {
      j.window = wk;
      all.push_back(j);
    }
    if (0.5 * wk < o.min_window_gaps * gap) break;
  }
  // One jump per feature, the finest window that resolves it first (a coarse window blurs a
  // short feature into a kink of exaggerated size), the largest first within a window; another
  // within the smaller of the two windows is the same feature seen at another scale.
  std::stable_sort(all.begin(), all.end(), [](const AreaJump& a, const AreaJump& b) {
    return a.window != b.window ? a.window < b.window : a.size > b.size;
  });
  std::vector<AreaJump> jumps;
  for (const AreaJump& j : all)
    if (std::none_of(jumps.begin(), jumps.end(), [&](const AreaJump& k) {
          return std::abs(k.x - j.x) < std::min(k.window, j.window);
        }))
      jumps.push_back(j);
  const double d0 = drag ? drag(c.x, c.area) : 0.0;
  for (AreaJump& j : jumps) {
    const double half = o.smooth_frac * length * (j.window / w);
    j.x_from = std::max(c.x.front(), j.x - half);
    j.x_to = std::min(c.x.back(), j.x + half);
    j.shells = shells_at(c, j.x, j.window, o.shell_frac);
    if (!drag) continue;
    const std::vector<double> smooth = smooth_region(c, j.x_from, j.x_to, j.window);
    j.drag_change = d0 - drag(c.x, smooth);
    j.share = d0 != 0.0 ? j.drag_change / d0 : 0.0;
  }
  std::stable_sort(jumps.begin(), jumps.end(), [&](const AreaJump& a, const AreaJump& b) {
    return drag ? a.drag_change > b.drag_change : a.size > b.size;
  });
  if (jumps.size() > static_cast<std::size_t>(std::max(o.max_jumps, 0))) jumps.resize(static_cast<std::size_t>(std::max(o.max_jumps, 0)));
  return jumps;
}

}  // namespace machcut
