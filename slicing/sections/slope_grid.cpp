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

// Adds α + β c to the cell means of the cells k1 <= c < k2 (clipped to the grid): a straight
// piece of a tent at the cell centres, directly for few cells, as a run for many.
inline void add_run(double alpha, double beta, long k1, long k2, SlopeGrid& g, LinearRuns& runs) {
  const long end = static_cast<long>(g.average.size());
  k1 = std::clamp(k1, 0L, end);
  k2 = std::clamp(k2, 0L, end);
  if (k2 <= k1) return;
  if (k2 - k1 <= 8) {
    for (long k = k1; k < k2; ++k) g.average[static_cast<std::size_t>(k)] += alpha + beta * static_cast<double>(k);
    return;
  }
  runs.d[static_cast<std::size_t>(k1)][0] += alpha;
  runs.d[static_cast<std::size_t>(k2)][0] -= alpha;
  runs.d[static_cast<std::size_t>(k1)][1] += beta;
  runs.d[static_cast<std::size_t>(k2)][1] -= beta;
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
  g.average.assign(static_cast<std::size_t>(cells), 0.0);
  return g;
}

// Two passes, counting first: the arrays are allocated once at their size (growing them by
// doubling left up to half again unused and briefly held both copies: part of the 1.05 GB peak
// of `drag` on 5M triangles, issue 13).
SlopeMesh::Part SlopeMesh::make_part(std::shared_ptr<const std::vector<Vec3>> positions,
                                     const std::vector<Tri>& triangles) {
  Part part;
  part.positions = std::move(positions);
  const std::vector<Vec3>& p = *part.positions;
  // The x component of (b − a) × (c − a); 0: parallel to the flow, no part in S.
  const auto twice = [&](const Tri& t) {
    const Vec3 &a = p[t[0]], &b = p[t[1]], &c = p[t[2]];
    return (b.y - a.y) * (c.z - a.z) - (b.z - a.z) * (c.y - a.y);
  };
  std::size_t kept = 0;
  for (const Tri& t : triangles) kept += twice(t) != 0.0;
  part.triangles.reserve(kept);
  part.twice_area.reserve(kept);
  for (const Tri& t : triangles) {
    const double w = twice(t);
    if (w == 0.0) continue;
    part.triangles.push_back(t);
    part.twice_area.push_back(w);
  }
  return part;
}

SlopeMesh::SlopeMesh(const Mesh& mesh) {
  parts_.push_back(make_part(std::make_shared<const std::vector<Vec3>>(mesh.positions), mesh.triangles));
}

SlopeMesh::SlopeMesh(const Mesh* mesh, const Mesh& extra) {
  // An aliasing shared_ptr with no owner: reads mesh->positions, never frees them.
  parts_.push_back(make_part(std::shared_ptr<const std::vector<Vec3>>(std::shared_ptr<void>(), &mesh->positions),
                             mesh->triangles));
  if (!extra.triangles.empty())
    parts_.push_back(make_part(std::make_shared<const std::vector<Vec3>>(extra.positions), extra.triangles));
}

void SlopeMesh::add_slopes(const MachPlanes& planes, SlopeGrid& g) const {
  const long cells = static_cast<long>(g.slope.size()) - 1;
  const double step = (g.hi - g.lo) / static_cast<double>(cells);
  const double flat = 1e-12 * static_cast<double>(cells);  // 1e-12 of the length, grid units
  // Stations in grid units: u = (x − (by y + bz z) − lo)/cell; by, bz read off station_of.
  const double by = -station_of({0.0, 1.0, 0.0}, planes), bz = -station_of({0.0, 0.0, 1.0}, planes);
  const double inv_step = 1.0 / step;
  thread_local std::vector<double> u;
  if (g.average.size() != static_cast<std::size_t>(cells)) g.average.assign(static_cast<std::size_t>(cells), 0.0);
  thread_local LinearRuns runs;
  runs.d.assign(static_cast<std::size_t>(cells) + 2, {0.0, 0.0});
  const auto dense = [&](auto& v) {  // the step arrays are allocated when first needed
    if (v.empty()) v.assign(static_cast<std::size_t>(cells), 0);
  };
  auto cell_of = [&](double v) { return std::clamp(floor_long(v), 0L, cells - 1); };
  const double end = static_cast<double>(cells);
  const double tail = (g.tail - g.lo) * inv_step;  // +∞ when no tail is set
  g.tail_area = 0.0;
  for (const Part& part : parts_) {
    const std::vector<Vec3>& positions = *part.positions;
    u.resize(positions.size());
    for (std::size_t i = 0; i < u.size(); ++i) {
      const Vec3& p = positions[i];
      u[i] = (p.x - (by * p.y + bz * p.z) - g.lo) * inv_step;
    }
    for (std::size_t i = 0; i < part.triangles.size(); ++i) {
      const Tri& t = part.triangles[i];
      double s[3] = {u[t[0]], u[t[1]], u[t[2]]};  // in station order
      if (s[0] > s[1]) std::swap(s[0], s[1]);
      if (s[1] > s[2]) std::swap(s[1], s[2]);
      if (s[0] > s[1]) std::swap(s[0], s[1]);
      // S at the tail, −Σ A_T φ_T: φ_T the triangle's fraction upstream of it (vertices on the
      // plane count as downstream, as in section.h, so S is the upstream limit there).
      if (s[0] < tail && std::isfinite(tail))
        g.tail_area -= 0.5 * part.twice_area[i] * upstream_fraction(s, tail);
      if (s[0] >= end) continue;  // downstream of the grid (a face at the tail is the base)
      if (s[2] - s[0] <= flat) {  // lies in the plane: S steps by −A_T here
        if (s[0] >= 0.0 && s[0] < tail - flat) {
          dense(g.area_step);
          g.area_step[cell_of(s[0])] -= 0.5 * part.twice_area[i];
        }
        continue;
      }
      if (s[2] <= 0.0) continue;
      // The mean of S′ over a cell is the cell's share of S: −A_T (φ_T(c + 1) − φ_T(c)) / cell.
      // Inside a straight piece of the tent that is the tent at the cell centre (a run); the at
      // most three cells holding a corner station get it exactly.
      const double span = s[2] - s[0], d01 = s[1] - s[0], d12 = s[2] - s[1];
      const double share = -0.5 * part.twice_area[i] * inv_step;  // the whole triangle's S change / cell
      const double h_tent = 2.0 * share / span;                // tent height, m
      const long c0 = floor_long(s[0]), c1 = floor_long(s[1]), c2 = floor_long(s[2]);
      if (c2 == c0) {
        if (c0 >= 0 && c0 < cells) g.average[static_cast<std::size_t>(c0)] += share;  // within one cell
      } else {
        const double ia = d01 > 0.0 ? 1.0 / (d01 * span) : 0.0, ib = d12 > 0.0 ? 1.0 / (d12 * span) : 0.0;
        // φ_T at x in [s0, s2] (upstream_fraction with the divisions done once).
        auto phi = [&](double x) { return x <= s[1] && d01 > 0.0 ? (x - s[0]) * (x - s[0]) * ia : 1.0 - (s[2] - x) * (s[2] - x) * ib; };
        // Rising cells c0 < k < c1: H (k + ½ − s0)/d01; falling cells c1 < k < c2: H (s2 − k − ½)/d12.
        if (c1 > c0 + 1) add_run(h_tent / d01 * (0.5 - s[0]), h_tent / d01, c0 + 1, c1, g, runs);
        if (c2 > c1 + 1) add_run(h_tent / d12 * (s[2] - 0.5), -h_tent / d12, c1 + 1, c2, g, runs);
        auto add = [&](long c, double v) {
          if (c >= 0 && c < cells) g.average[static_cast<std::size_t>(c)] += v;
        };
        // φ is 0 at the start of the first corner's cell and 1 at the end of the last one's.
        add(c0, share * phi(static_cast<double>(c0 + 1)));
        add(c2, share * (1.0 - phi(static_cast<double>(c2))));
        if (c1 > c0 && c1 < c2) add(c1, share * (phi(static_cast<double>(c1 + 1)) - phi(static_cast<double>(c1))));
      }
      // A side along an edge in the plane makes S′ step at once (a kink of S; at the edge's
      // middle station): recorded for slope_steps' spreading.
      auto kink = [&](double at, double jump) {
        const long c = cell_of(at);
        dense(g.kink);
        dense(g.kink_moment);
        dense(g.kink_extent);
        dense(g.kink_count);
        g.kink[c] += jump;
        g.kink_moment[c] += jump * std::clamp(at - static_cast<double>(c), 0.0, 1.0);
        g.kink_extent[c] += (s[2] - s[0]) * step;
        ++g.kink_count[c];
      };
      if (s[1] - s[0] <= flat) kink(0.5 * (s[0] + s[1]), h_tent);
      if (s[2] - s[1] <= flat) kink(0.5 * (s[1] + s[2]), -h_tent);
    }
  }
  double alpha = 0.0, beta = 0.0;
  for (long k = 0; k < cells; ++k) {
    alpha += runs.d[k][0];
    beta += runs.d[k][1];
    g.average[k] += alpha + beta * static_cast<double>(k);
  }
  // S′ at the nodes: the mean over the two cells that meet there.
  for (long k = 0; k <= cells; ++k)
    g.slope[k] = 0.5 * ((k > 0 ? g.average[k - 1] : 0.0) + (k < cells ? g.average[k] : 0.0));
}

void add_mesh_slopes(const Mesh& mesh, const MachPlanes& planes, SlopeGrid& grid) {
  SlopeMesh(mesh).add_slopes(planes, grid);
}

namespace {

// ∫₀ᵘ clamp((v − a)/w, 0, 1) dv: the integral of a unit ramp from a to a + w.
double ramp_integral(double u, double a, double w) {
  if (u <= a) return 0.0;
  if (u >= a + w) return u - a - 0.5 * w;
  return 0.5 * (u - a) * (u - a) / w;
}

}  // namespace

std::vector<double> slope_averages(const SlopeGrid& g, bool spread_kinks, double* widest) {
  const std::size_t n = g.slope.size() - 1;
  std::vector<double> avg = g.average.size() == n ? g.average : std::vector<double>(n, 0.0);
  if (widest) *widest = 0.0;
  if (!spread_kinks || g.kink.empty()) return avg;
  const double cell = (g.hi - g.lo) / static_cast<double>(n);
  std::vector<double> removed(n + 1, 0.0);  // difference array of the steps taken out
  for (std::size_t j = 0; j < n; ++j) {
    if (g.kink_count[j] == 0 || g.kink[j] == 0.0) continue;
    const double width = g.kink_extent[j] / g.kink_count[j];
    const long w = std::min(static_cast<long>(n), std::lround(width / cell));
    if (w <= 1) continue;
    if (widest) *widest = std::max(*widest, width);
    const double jump = g.kink[j];
    // Take the step out: its exact share of cell j (from the recorded positions) and all of
    // every later cell ...
    avg[j] -= jump - g.kink_moment[j];
    removed[j + 1] += jump;
    // ... and put in a ramp of w cells centred on the cell (clipped at the grid's ends).
    const double wd = static_cast<double>(w);
    const double a = std::clamp(static_cast<double>(j) + 0.5 - 0.5 * wd, 0.0, static_cast<double>(n) - wd);
    const long first = static_cast<long>(std::floor(a)), past = static_cast<long>(std::ceil(a + wd));
    for (long m = first; m < past; ++m)
      avg[static_cast<std::size_t>(m)] += jump * (ramp_integral(m + 1.0, a, wd) - ramp_integral(static_cast<double>(m), a, wd));
    removed[static_cast<std::size_t>(past)] -= jump;  // from here on the ramp is at its top
  }
  double run = 0.0;
  for (std::size_t j = 0; j < n; ++j) avg[j] -= (run += removed[j]);
  return avg;
}

std::vector<double> steps_from_averages(std::span<const double> avg) {
  const std::size_t n = avg.size();
  std::vector<double> a(n);
  // S′ is taken piecewise linear through the cell means at the cell centres; its step from the
  // centre of cell j − 1 to that of cell j (across node g_j) is a_j (S′ = 0 beyond the ends).
  for (std::size_t j = 0; j < n; ++j) a[j] = avg[j] - (j > 0 ? avg[j - 1] : 0.0);
  // The fall to 0 after the last cell (0 whenever the grid reaches beyond the curve's ends)
  // is put into the last step, so that the steps sum to 0 as the integral needs.
  if (n > 0) a[n - 1] -= avg[n - 1];
  return a;
}

std::vector<double> coarsen_averages(std::span<const double> avg) {
  std::vector<double> out(avg.size() / 2);
  for (std::size_t j = 0; j < out.size(); ++j) out[j] = 0.5 * (avg[2 * j] + avg[2 * j + 1]);
  return out;
}

std::vector<double> slope_steps(const SlopeGrid& g, bool spread_kinks, double* widest) {
  return steps_from_averages(slope_averages(g, spread_kinks, widest));
}

double largest_area(const SlopeGrid& g) {
  const std::size_t cells = g.slope.size() - 1;
  const double h = (g.hi - g.lo) / static_cast<double>(cells);
  double area = 0.0, peak = 0.0;
  for (std::size_t k = 0; k < g.average.size(); ++k) {
    area += h * g.average[k];
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

std::vector<double> log_kernel_apply(std::span<const double> steps) {
  const std::size_t n = steps.size();
  if (n == 0) return {};
  PaddedSpectrum s = padded_spectrum(steps);
  const std::vector<double>& kt = kernel_transform(static_cast<int>(n), s.n);
  for (std::size_t k = 0; k < s.bins.size(); ++k) s.bins[k] *= kt[k];
  std::vector<double> c;
  thread_fft().inv(c, s.bins, static_cast<Eigen::Index>(s.n));
  c.resize(n);
  return c;
}

std::vector<double> drag_gradient(std::span<const double> steps, double cell) {
  const std::size_t n = steps.size();
  if (n == 0) return {};
  const std::vector<double> c = log_kernel_apply(steps);
  std::vector<double> g(n, 0.0);
  if (n < 3) return g;
  const double f = -1.0 / (std::numbers::pi * cell * cell);
  for (std::size_t j = 1; j + 1 < n; ++j) g[j] = f * (c[j - 1] - 2.0 * c[j] + c[j + 1]);
  g[0] = g[1];
  g[n - 1] = g[n - 2];
  return g;
}

}  // namespace machcut
