#include "machcut/sections/slope_grid.h"

#include <unsupported/Eigen/FFT>

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <complex>
#include <map>
#include <numbers>

namespace machcut {

namespace {

// F(u) with F″ = ln|u|, F(0) = F′(0) = 0: F(u) = u² ln|u| / 2 − 3u²/4.
double second_antiderivative_log(double u) {
  if (u == 0.0) return 0.0;
  return 0.5 * u * u * std::log(std::fabs(u)) - 0.75 * u * u;
}

// The running linear pieces of S′ on many nodes: value at node k is α + β k over [k1, k2).
struct LinearRuns {
  std::vector<std::array<double, 2>> d;  // difference arrays of (α, β), cells + 2 long
};

inline long floor_long(double v) {
  const long k = static_cast<long>(v);
  return v < static_cast<double>(k) ? k - 1 : k;
}

// Adds value(k) = H (k − u_from)/(u_to − u_from) at the nodes k with u_lo < k <= u_hi (a
// straight piece of one tent; stations in grid units u = (X − lo)/cell), directly for few
// nodes, as a run for many.
inline void add_piece(double h_tent, double u_from, double u_to, double u_lo, double u_hi,
                      SlopeGrid& g, LinearRuns& runs) {
  const long end = static_cast<long>(g.slope.size());
  const long k1 = std::clamp(floor_long(u_lo) + 1, 0L, end);
  const long k2 = std::clamp(floor_long(u_hi) + 1, 0L, end);  // exclusive
  if (k2 <= k1) return;
  const double inv = h_tent / (u_to - u_from);
  if (k2 - k1 <= 8) {
    for (long k = k1; k < k2; ++k) g.slope[k] += inv * (static_cast<double>(k) - u_from);
    return;
  }
  const double alpha = -inv * u_from;
  runs.d[k1][0] += alpha;
  runs.d[k2][0] -= alpha;
  runs.d[k1][1] += inv;
  runs.d[k2][1] -= inv;
}

// The fraction of a triangle's area with station below x, its stations s[0] <= s[1] <= s[2]:
// the distribution function of a linear function over a triangle (piecewise quadratic).
inline double upstream_fraction(const double* s, double x) {
  if (x >= s[2]) return 1.0;
  if (x <= s[0]) return 0.0;
  const double span = s[2] - s[0];
  if (x <= s[1] && s[1] > s[0]) return (x - s[0]) * (x - s[0]) / ((s[1] - s[0]) * span);
  return 1.0 - (s[2] - x) * (s[2] - x) / ((s[2] - s[1]) * span);
}

// Adds the constant H at the nodes k with u_lo < k <= u_hi.
inline void add_constant(double h_tent, double u_lo, double u_hi, SlopeGrid& g, LinearRuns& runs) {
  const long end = static_cast<long>(g.slope.size());
  const long k1 = std::clamp(floor_long(u_lo) + 1, 0L, end);
  const long k2 = std::clamp(floor_long(u_hi) + 1, 0L, end);
  if (k2 <= k1) return;
  runs.d[k1][0] += h_tent;
  runs.d[k2][0] -= h_tent;
}

// One FFT object per thread (Eigen's keeps plans and is not shared), returning half spectra
// of real input.
Eigen::FFT<double>& thread_fft() {
  thread_local Eigen::FFT<double> fft(Eigen::default_fft_impl<double>(), Eigen::FFT<double>::HalfSpectrum);
  return fft;
}

// The transform of the kernel K for `cells` cells (circular, length n >= 2·cells, a power of
// two) as its real half spectrum (K is symmetric), cached per thread.
const std::vector<double>& kernel_transform(int cells, std::size_t n) {
  thread_local std::map<int, std::vector<double>> cache;
  auto it = cache.find(cells);
  if (it != cache.end()) return it->second;
  std::vector<double> k(n, 0.0);
  for (int m = 0; m < cells; ++m) {
    k[m] = cell_log_kernel(m);
    if (m > 0) k[n - m] = k[m];
  }
  std::vector<std::complex<double>> spectrum;
  thread_fft().fwd(spectrum, k);
  std::vector<double> real(spectrum.size());
  for (std::size_t i = 0; i < real.size(); ++i) real[i] = spectrum[i].real();
  return cache.emplace(cells, std::move(real)).first->second;
}

// `v` zero-padded to n >= 2·size (a power of two), so that circular convolution with K is the
// linear one, and its half spectrum (bins 0 … n/2).
struct PaddedSpectrum {
  std::size_t n = 1;
  std::vector<std::complex<double>> bins;
};
PaddedSpectrum padded_spectrum(std::span<const double> v) {
  PaddedSpectrum out;
  while (out.n < 2 * v.size()) out.n <<= 1;
  std::vector<double> padded(out.n, 0.0);
  std::copy(v.begin(), v.end(), padded.begin());
  thread_fft().fwd(out.bins, padded);
  return out;
}

}  // namespace

double cell_log_kernel(int m) {
  m = std::abs(m);
  if (m < 8) {
    return second_antiderivative_log(m + 1.0) - 2.0 * second_antiderivative_log(m) +
           second_antiderivative_log(m - 1.0);
  }
  // ln m + ∫₋₁¹ (1 − |s|) ln(1 + s/m) ds = ln m − Σₖ m^(−2k) / (k (2k + 1)(2k + 2)), summed to
  // k = 8 (the next term is below 1e-19 for m >= 8), where the closed form above cancels.
  const double x = 1.0 / (static_cast<double>(m) * m);
  double sum = 0.0;
  for (int k = 8; k >= 1; --k) sum = x * (1.0 / (k * (2.0 * k + 1) * (2.0 * k + 2)) + sum);
  return std::log(static_cast<double>(m)) - sum;
}

SlopeGrid make_slope_grid(double lo, double hi, int cells) {
  assert(cells >= 1 && hi > lo);
  SlopeGrid g;
  g.lo = lo;
  g.hi = hi;
  g.slope.assign(static_cast<std::size_t>(cells) + 1, 0.0);
  return g;
}

SlopeMesh::SlopeMesh(const Mesh& mesh) : positions_(mesh.positions) {
  for (const Tri& t : mesh.triangles) {
    const Vec3 &a = positions_[t[0]], &b = positions_[t[1]], &c = positions_[t[2]];
    // The x component of (b − a) × (c − a).
    const double twice = (b.y - a.y) * (c.z - a.z) - (b.z - a.z) * (c.y - a.y);
    if (twice == 0.0) continue;  // parallel to the flow: no part in S
    triangles_.push_back(t);
    twice_area_.push_back(twice);
  }
}

void SlopeMesh::add_slopes(const MachPlanes& planes, SlopeGrid& g) const {
  const long cells = static_cast<long>(g.slope.size()) - 1;
  const double step = (g.hi - g.lo) / static_cast<double>(cells);
  const double flat = 1e-12 * static_cast<double>(cells);  // 1e-12 of the length, grid units
  // Stations in grid units: u = (x − (by y + bz z) − lo)/cell; by, bz read off station_of.
  const double by = -station_of({0.0, 1.0, 0.0}, planes), bz = -station_of({0.0, 0.0, 1.0}, planes);
  const double inv_step = 1.0 / step;
  std::vector<double> u(positions_.size());
  for (std::size_t i = 0; i < u.size(); ++i) {
    const Vec3& p = positions_[i];
    u[i] = (p.x - (by * p.y + bz * p.z) - g.lo) * inv_step;
  }
  thread_local LinearRuns runs;
  runs.d.assign(static_cast<std::size_t>(cells) + 2, {0.0, 0.0});
  const auto dense = [&](auto& v) {  // the step arrays are allocated when first needed
    if (v.empty()) v.assign(static_cast<std::size_t>(cells), 0);
  };
  auto cell_of = [&](double v) { return std::clamp(floor_long(v), 0L, cells - 1); };
  const double end = static_cast<double>(cells);
  const double tail = (g.tail - g.lo) * inv_step;  // +∞ when no tail is set
  g.tail_area = 0.0;
  for (std::size_t i = 0; i < triangles_.size(); ++i) {
    const Tri& t = triangles_[i];
    double s[3] = {u[t[0]], u[t[1]], u[t[2]]};  // in station order
    if (s[0] > s[1]) std::swap(s[0], s[1]);
    if (s[1] > s[2]) std::swap(s[1], s[2]);
    if (s[0] > s[1]) std::swap(s[0], s[1]);
    // S at the tail, −Σ A_T φ_T: φ_T the triangle's fraction upstream of it (vertices on the
    // plane count as downstream, as in section.h, so S is the upstream limit there).
    if (s[0] < tail && std::isfinite(tail))
      g.tail_area -= 0.5 * twice_area_[i] * upstream_fraction(s, tail);
    if (s[0] >= end) continue;  // downstream of the grid (a face at the tail is the base)
    if (s[2] - s[0] <= flat) {  // lies in the plane: S steps by −A_T here
      if (s[0] >= 0.0 && s[0] < tail - flat) {
        dense(g.area_step);
        g.area_step[cell_of(s[0])] -= 0.5 * twice_area_[i];
      }
      continue;
    }
    if (s[2] <= 0.0) continue;
    // H = −2 A_T/(f₃ − f₁) in m: the extent in grid units times the cell width.
    const double h_tent = -twice_area_[i] * inv_step / (s[2] - s[0]);
    auto kink = [&](double at, double jump) {  // S′ steps by `jump` at station `at`
      const long c = cell_of(at);
      dense(g.kink);
      dense(g.kink_extent);
      dense(g.kink_count);
      g.kink[c] += jump;
      g.kink_extent[c] += (s[2] - s[0]) * step;
      ++g.kink_count[c];
    };
    // Rising side (first → middle corner), then falling side (middle → last). A side along an
    // edge in the plane rises or falls at once (at the edge's middle station, which keeps the
    // triangle's integral of S′ exact however the 1e-12 tolerance is met).
    if (s[1] - s[0] > flat) {
      add_piece(h_tent, s[0], s[1], s[0], s[1], g, runs);
    } else {
      const double mid = 0.5 * (s[0] + s[1]);
      kink(mid, h_tent);
      add_constant(h_tent, mid, s[1], g, runs);
    }
    if (s[2] - s[1] > flat) {
      add_piece(h_tent, s[2], s[1], s[1], s[2], g, runs);
    } else {
      const double mid = 0.5 * (s[1] + s[2]);
      kink(mid, -h_tent);
      add_constant(h_tent, s[1], mid, g, runs);
    }
  }
  double alpha = 0.0, beta = 0.0;
  for (long k = 0; k <= cells; ++k) {
    alpha += runs.d[k][0];
    beta += runs.d[k][1];
    g.slope[k] += alpha + beta * static_cast<double>(k);
  }
}

void add_mesh_slopes(const Mesh& mesh, const MachPlanes& planes, SlopeGrid& grid) {
  SlopeMesh(mesh).add_slopes(planes, grid);
}

std::vector<double> slope_steps(const SlopeGrid& g, bool spread_kinks, double* widest) {
  const std::size_t n = g.slope.size() - 1;
  std::vector<double> a(n);
  for (std::size_t j = 0; j < n; ++j) a[j] = g.slope[j + 1] - g.slope[j];
  if (widest) *widest = 0.0;
  if (!spread_kinks || g.kink.empty()) return a;
  const double cell = (g.hi - g.lo) / static_cast<double>(n);
  std::vector<double> spread(n + 1, 0.0);  // difference array of the spread kinks
  for (std::size_t j = 0; j < n; ++j) {
    if (g.kink_count[j] == 0) continue;
    const double width = g.kink_extent[j] / g.kink_count[j];
    const long w = std::min(static_cast<long>(n), std::lround(width / cell));
    if (w <= 1) continue;
    if (widest) *widest = std::max(*widest, width);
    a[j] -= g.kink[j];
    const long from = std::max(0L, static_cast<long>(j) - w / 2);
    const long to = std::min(static_cast<long>(n), from + w);
    const double per = g.kink[j] / static_cast<double>(to - from);
    spread[from] += per;
    spread[to] -= per;
  }
  double run = 0.0;
  for (std::size_t j = 0; j < n; ++j) a[j] += (run += spread[j]);
  return a;
}

double largest_area(const SlopeGrid& g) {
  const std::size_t cells = g.slope.size() - 1;
  const double h = (g.hi - g.lo) / static_cast<double>(cells);
  double area = 0.0, peak = 0.0;
  for (std::size_t k = 0; k < cells; ++k) {
    area += 0.5 * h * (g.slope[k] + g.slope[k + 1]);
    peak = std::max(peak, area);
  }
  return peak;
}

bool has_area_step(const SlopeGrid& g, double scale, std::size_t* cell) {
  for (std::size_t j = 0; j < g.area_step.size(); ++j)
    if (std::fabs(g.area_step[j]) > 1e-9 * scale) {
      if (cell) *cell = j;
      return true;
    }
  return false;
}

std::vector<double> coarsen_steps(std::span<const double> steps) {
  std::vector<double> out(steps.size() / 2);
  for (std::size_t j = 0; j < out.size(); ++j) out[j] = steps[2 * j] + steps[2 * j + 1];
  return out;
}

double von_karman_drag_area(std::span<const double> steps) {
  if (steps.empty()) return 0.0;
  // By Parseval's theorem Σᵢⱼ aᵢ aⱼ K_{i−j} = (1/n) Σₖ |âₖ|² K̂ₖ over the full spectrum.
  const PaddedSpectrum a = padded_spectrum(steps);
  const std::vector<double>& kt = kernel_transform(static_cast<int>(steps.size()), a.n);
  double q = 0.0;
  for (std::size_t k = 0; k < a.bins.size(); ++k) {
    const double weight = (k == 0 || k == a.n / 2) ? 1.0 : 2.0;
    q += weight * std::norm(a.bins[k]) * kt[k];
  }
  q /= static_cast<double>(a.n);
  return -q / (2.0 * std::numbers::pi);
}

std::vector<double> drag_change_by_cell(std::span<const double> steps_a,
                                        std::span<const double> steps_b) {
  assert(steps_a.size() == steps_b.size());
  const std::size_t cells = steps_a.size();
  if (cells == 0) return {};
  std::vector<double> sum(cells);
  for (std::size_t i = 0; i < cells; ++i) sum[i] = steps_a[i] + steps_b[i];
  PaddedSpectrum s = padded_spectrum(sum);
  const std::vector<double>& kt = kernel_transform(static_cast<int>(cells), s.n);
  for (std::size_t k = 0; k < s.bins.size(); ++k) s.bins[k] *= kt[k];
  std::vector<double> conv;  // K (a + b)
  thread_fft().inv(conv, s.bins, static_cast<Eigen::Index>(s.n));
  std::vector<double> share(cells);
  for (std::size_t i = 0; i < cells; ++i)
    share[i] = -(steps_b[i] - steps_a[i]) * conv[i] / (2.0 * std::numbers::pi);
  return share;
}

}  // namespace machcut
