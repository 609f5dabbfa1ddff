#include "machcut/drag/wave_drag.h"

#include <tbb/parallel_for.h>

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "machcut/drag/eminton_lord.h"
#include "machcut/design/optimum.h"
#include "machcut/sections/slope_grid.h"

namespace machcut {

namespace {

// The drag of one roll's curve at 2n − 1 nested cosine stations, and of its every-second and
// every-fourth subsets: the two increments give the station error and its convergence ratio.
RollSample roll_sample(double roll_deg, const std::vector<double>& x, const std::vector<double>& s) {
  RollSample r;
  r.roll_deg = roll_deg;
  r.length = x.back() - x.front();
  r.base_area = s.back();
  for (double a : s) r.peak_area = std::max(r.peak_area, a);
  EmintonLordFit fits[3];
  for (int level = 0; level < 3; ++level) {
    std::vector<double> xs, ss;
    const std::size_t step = std::size_t{1} << level;
    for (std::size_t i = 0; i < x.size(); i += step) {
      xs.push_back(x[i]);
      ss.push_back(s[i]);
    }
    fits[level] = eminton_lord_fit(xs, ss);
    if (!fits[level].ok) {
      r.ok = false;
      char buf[160];
      std::snprintf(buf, sizeof buf, "roll %.3f°: %s", roll_deg, fits[level].problem.c_str());
      r.problem = buf;
      return r;
    }
  }
  r.drag_area = fits[0].drag_area;
  r.station_error = std::fabs(fits[0].drag_area - fits[1].drag_area);
  r.coarse_error = std::fabs(fits[1].drag_area - fits[2].drag_area);
  return r;
}

int power_of_two_at_least(int n) {
  int p = 4;
  while (p < n && p < (1 << 24)) p <<= 1;
  return p;
}

std::string aft_text(double base_area, double peak_area) {
  if (base_area <= 1e-6 * peak_area) return "closed tail";
  char buf[240];
  std::snprintf(buf, sizeof buf,
                "base area up to %.6g m² closed by a constant-area wake (S' = 0 at the base: "
                "forebody pressure drag of a body with a base, Ward 1955; no base drag)",
                base_area);
  return buf;
}

}  // namespace

ModelMeasures measure_model(const SectionEngine& engine) {
  ModelMeasures m;
  m.volume = signed_volume(engine.mesh());
  const StationRange r = engine.range({1.0, 0.0});
  m.x0 = r.lo;
  m.length = r.hi - r.lo;
  if (m.length > 0.0) {
    const std::vector<double> x = make_stations(r, 801, Spacing::uniform);
    for (double a : engine.areas({1.0, 0.0}, x)) m.max_area = std::max(m.max_area, a);
  }
  m.sears_haack_drag_area = sears_haack_drag_area(m.length, m.volume);
  return m;
}

WaveDragModel::WaveDragModel(const SectionEngine& engine, std::vector<CaptureTube> captures,
                             WaveDragOptions options, Mesh tubes)
    : engine_(engine),
      slope_mesh_(tubes.triangles.empty() ? engine.mesh() : concatenate({engine.mesh(), tubes})),
      options_(std::move(options)) {
  if (!tubes.triangles.empty()) tube_engine_.emplace_back(std::move(tubes));
  for (CaptureTube& c : captures) {
    capture_engines_.emplace_back(std::move(c.shell));
    capture_areas_.push_back(c.area);
  }
  if (!options_.use_symmetry) return;
  // Mirror symmetry of the area curves at β = 1 (M = √2), stations at fixed fractions.
  const double mach = std::sqrt(2.0);
  symmetry_ = detect_roll_symmetry([&](double roll) {
    const StationRange r = engine_.range({mach, roll});
    if (!(r.hi > r.lo)) return std::vector<double>{};
    return areas(mach, roll, make_stations(r, 65, Spacing::cosine));
  });
}

std::vector<double> WaveDragModel::areas(double mach, double roll_deg,
                                         const std::vector<double>& stations) const {
  std::vector<double> s = engine_.areas({mach, roll_deg}, stations);
  for (const SectionEngine& t : tube_engine_) {
    const std::vector<double> extra = t.areas({mach, roll_deg}, stations);
    for (std::size_t i = 0; i < s.size(); ++i) s[i] += extra[i];
  }
  for (std::size_t c = 0; c < capture_engines_.size(); ++c) {
    const std::vector<double> own = capture_engines_[c].areas({mach, roll_deg}, stations);
    for (std::size_t i = 0; i < s.size(); ++i) s[i] -= std::min(capture_areas_[c], own[i]);
  }
  return s;
}

SlopeGrid WaveDragModel::slope_grid(double mach, double roll_deg, double lo, double hi,
                                    int cells) const {
  return slope_grid(mach, roll_deg, lo, hi, cells, engine_.range({mach, roll_deg}).hi);
}

SlopeGrid WaveDragModel::slope_grid(double mach, double roll_deg, double lo, double hi, int cells,
                                    double tail) const {
  SlopeGrid g = make_slope_grid(lo, hi, cells);
  g.tail = tail;
  slope_mesh_.add_slopes({mach, roll_deg}, g);
  return g;
}

RollSample WaveDragModel::grid_sample(double mach, double roll_deg, int cells) const {
  RollSample r;
  r.roll_deg = roll_deg;
  const MachPlanes planes{mach, roll_deg};
  const StationRange range = engine_.range(planes);
  if (!(range.hi > range.lo)) {
    r.ok = false;
    r.problem = "the model has no extent along the flow";
    return r;
  }
  r.length = range.hi - range.lo;
  // The grid reaches 1/64 of the length beyond both ends, so that slope steps at the nose and
  // at the tail (where S′ falls to 0 in the constant-area wake of a base) lie inside it with
  // room to be spread.
  const double margin = r.length / 64.0;
  SlopeGrid g = slope_grid(mach, roll_deg, range.lo - margin, range.hi + margin, cells, range.hi);
  const double h = (g.hi - g.lo) / cells;
  r.peak_area = largest_area(g);
  r.base_area = g.tail_area;
  std::size_t j = 0;
  if (has_area_step(g, std::max(r.peak_area, r.base_area), &j)) {
    char buf[320];
    std::snprintf(buf, sizeof buf,
                  "roll %.3f°: the area curve steps by %.4g m² at X = %.4g m — a face lies in "
                  "the Mach plane with no wake or capture tube to close it (a flat nose or "
                  "inlet face), for which linear theory gives no finite drag",
                  roll_deg, g.area_step[j], g.lo + (static_cast<double>(j) + 0.5) * h);
    r.ok = false;
    r.problem = buf;
    return r;
  }
  std::vector<double> a = slope_steps(g, true, &r.kink_width);
  double d[3];
  for (int level = 0; level < 3; ++level) {
    d[level] = von_karman_drag_area(a);
    if (level < 2) a = coarsen_steps(a);
  }
  r.drag_area = d[0];
  r.station_error = std::fabs(d[0] - d[1]);
  r.coarse_error = std::fabs(d[1] - d[2]);
  return r;
}

std::vector<RollSample> WaveDragModel::samples(double mach, int n,
                                               std::span<const double> rolls) const {
  if (uses_grid()) {
    std::vector<RollSample> out(rolls.size());
    tbb::parallel_for(std::size_t{0}, rolls.size(),
                      [&](std::size_t i) { out[i] = grid_sample(mach, rolls[i], n); });
    return out;
  }
  const int count = 2 * n - 1;
  auto stations = [&](const StationRange& r) { return make_stations(r, count, Spacing::cosine); };
  std::vector<std::vector<double>> s;
  if (capture_engines_.empty() && tube_engine_.empty())
    s = engine_.areas_for_rolls(mach, rolls, stations);
  std::vector<RollSample> out(rolls.size());
  tbb::parallel_for(std::size_t{0}, rolls.size(), [&](std::size_t i) {
    const StationRange r = engine_.range({mach, rolls[i]});
    if (!(r.hi > r.lo)) {
      out[i].roll_deg = rolls[i];
      out[i].ok = false;
      out[i].problem = "the model has no extent along the flow";
      return;
    }
    const std::vector<double> x = stations(r);
    out[i] = roll_sample(rolls[i], x, s.empty() ? areas(mach, rolls[i], x) : s[i]);
  });
  return out;
}

RollIntegral WaveDragModel::one_level(double mach, int n, const std::vector<double>& breaks) const {
  if (mach <= 1.0) {  // normal planes: every roll angle gives the same curve
    RollIntegral ri;
    const double zero = 0.0;
    ri.samples = samples(mach, n, std::span<const double>(&zero, 1));
    const RollSample& s = ri.samples.front();
    ri.ok = s.ok;
    ri.problem = s.problem;
    ri.drag_area = s.drag_area;
    ri.station_error = s.station_error;
    ri.evaluations = 1;
    ri.pieces = 1;
    ri.converged = true;
    return ri;
  }
  RollIntegralOptions o;
  o.rel_tol = 0.5 * options_.rel_tol;
  o.symmetry = symmetry_;
  o.breaks_deg = breaks;
  o.max_evaluations = std::max(options_.max_roll_evaluations, options_.initial_rolls);
  o.min_pieces = std::max(1, (options_.initial_rolls + 14) / 15);
  return integrate_rolls([&](std::span<const double> rolls) { return samples(mach, n, rolls); }, o);
}

MachDrag WaveDragModel::at_mach(double mach) const {
  MachDrag r;
  r.mach = mach;
  r.symmetry = mach > 1.0 ? symmetry_ : RollSymmetry::both;
  if (mach > 1.0 && options_.use_breaks) r.breaks_deg = singular_roll_angles(engine_.mesh(), mach);
  // The level size: grid cells (doubled) or Eminton–Lord N (2N − 1 stations, N → 2N − 1).
  const bool grid = uses_grid();
  int n = grid ? power_of_two_at_least(options_.cells) : std::max(5, options_.stations);
  const int n_max = grid ? std::max(n, options_.max_cells) : options_.max_stations;
  auto count = [&](int level) { return grid ? level : 2 * level - 1; };
  auto next = [&](int level) { return grid ? 2 * level : 2 * level - 1; };
  for (;;) {
    const RollIntegral ri = one_level(mach, n, r.breaks_deg);
    ++r.station_levels;
    if (!ri.ok) {
      r.ok = false;
      r.problem = ri.problem;
      return r;
    }
    r.drag_area = ri.drag_area;
    r.quadrature_error = ri.quadrature_error;
    // The increments d₁ (coarse → middle) and d₂ (middle → fine) of the nested station sets:
    // for geometric convergence with ratio ρ = d₂/d₁ the error left after the fine set is
    // d₂ ρ/(1 − ρ); it is never taken smaller than d₂ itself. ρ > 0.7 is not (yet)
    // convergence; ρ is capped at 0.9, so increments that do not decrease count nine times.
    const double rho = ri.coarse_error > 0.0 ? ri.station_error / ri.coarse_error : 0.0;
    const double rho_capped = std::min(rho, 0.9);
    r.stations_diverge = rho > 0.7;
    r.station_error = ri.station_error * std::max(1.0, rho_capped / (1.0 - rho_capped));
    r.stations = count(n);
    r.roll_evaluations = ri.evaluations;
    r.roll_pieces = ri.pieces;
    r.rolls = ri.samples;
    // The stations get what the quadrature leaves of the tolerance (at least half of it).
    const double target = std::max(0.5 * options_.rel_tol * std::fabs(ri.drag_area),
                                   options_.rel_tol * std::fabs(ri.drag_area) - ri.quadrature_error);
    if (r.station_error <= target) break;
    if (count(next(n)) > n_max) break;
    n = next(n);
  }
  double peak = 0.0;
  for (const RollSample& s : r.rolls) {
    r.max_base_area = std::max(r.max_base_area, s.base_area);
    r.kink_width = std::max(r.kink_width, s.kink_width);
    peak = std::max(peak, s.peak_area);
  }
  r.aft_treatment = aft_text(r.max_base_area, peak);
  r.error_estimate = r.quadrature_error + r.station_error;
  r.converged = r.error_estimate <= options_.rel_tol * std::fabs(r.drag_area);
  if (!r.converged && r.stations_diverge && grid)
    r.problem = "the grid refinement is not yet converging (the drag still grows as the cells "
                "are halved): narrow features of the area curves — faces or edges nearly lying "
                "in the Mach planes, such as a blunt nose steeper than the Mach lines — are not "
                "resolved within the cell limit";
  else if (!r.converged && r.stations_diverge)
    r.problem = "station refinement does not converge: the area curves have slope jumps (a "
                "capture area cut off where the shell's own area reaches it, an edge lying in "
                "the cutting planes or a flat face across the flow), for which linear theory "
                "gives a logarithmically infinite drag";
  else if (!r.converged)
    r.problem = "the error estimate did not reach the tolerance within the station and roll "
                "limits";
  if (!(r.error_estimate <= 0.2 * std::fabs(r.drag_area))) {
    r.ok = false;  // the number would be dominated by what is unresolved
    if (r.problem.empty()) r.problem = "the error estimate exceeds 20% of the drag";
  }
  return r;
}

}  // namespace machcut
