#include "machcut/drag/wave_drag.h"

#include <tbb/parallel_for.h>

#include <algorithm>
#include <array>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <limits>
#include <set>

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
  r.increments = {0.0, 0.0, fits[1].drag_area - fits[2].drag_area, fits[0].drag_area - fits[1].drag_area};
  r.levels = 2;
  r.station_error = std::fabs(r.increments[3]);
  r.coarse_error = std::fabs(r.increments[2]);
  return r;
}

// Coarser grids evaluated with each one (their increments show the convergence).
constexpr int kLevels = 4;

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

// The station error from the roll-averaged signed increments of D/q between levels
// (docs/method.md §6). Geometric convergence is claimed only when the last two ratios of
// successive increments are at most 0.7; the error is then the remainder of that geometric
// sequence (ratio at least ½: never less than the last increment). Otherwise the increments
// show no limit, and the estimate is what four more halvings of the cells would add at the
// largest increment seen: the expected change of 16 times the cells, not a tolerance.
struct StationEstimate {
  double error = 0.0;     // m²
  double ratio = 0.0;     // the larger of the last two ratios of successive increments
  bool geometric = true;  // increments decreasing geometrically
};

StationEstimate station_estimate(const std::array<double, 4>& inc, int levels, double drag) {
  StationEstimate e;
  const double noise = 1e-11 * std::fabs(drag);
  auto mag = [&](int k) { return std::fabs(inc[static_cast<std::size_t>(k)]); };
  auto ratio = [&](int k) { return mag(k) <= noise ? 0.0 : mag(k) / std::max(mag(k - 1), noise); };
  if (mag(3) <= noise) return e;  // no change at the level of rounding
  const int first = 4 - levels;   // the first increment set
  e.ratio = levels >= 3 ? std::max(ratio(2), ratio(3)) : ratio(3);
  e.geometric = e.ratio <= 0.7;
  if (e.geometric) {
    const double rho = std::max(0.5, e.ratio);
    e.error = mag(3) * rho / (1.0 - rho);
  } else {
    double largest = 0.0;
    for (int k = first; k < 4; ++k) largest = std::max(largest, mag(k));
    e.error = 4.0 * largest;
  }
  return e;
}

// Keeps the features that matter — frontal area at least 0.2 % of the largest area, or at
// least 1 % of D/q (with at least 0.01 % of the largest area), or a tenth of the growth of a
// resolution-limited value — and writes the advice.
void finish_features(MachDrag& r, double peak_area) {
  if (!(peak_area > 0.0))
    for (const ValidityFeature& f : r.features) peak_area += f.frontal_area;  // no curve: keep by size
  std::vector<ValidityFeature> kept;
  for (ValidityFeature& f : r.features) {
    const bool big = f.frontal_area >= 0.002 * peak_area;
    // (A sliver left by the union has no frontal area to speak of, whatever the cells of its
    // station range carry.)
    const bool costly = std::isfinite(f.drag_share) && std::fabs(f.drag_share) >= 0.01 &&
                        f.frontal_area >= 1e-4 * peak_area;
    const bool growing = r.resolution_limited && std::fabs(f.growth) >= 0.1 * std::fabs(r.growth_per_halving);
    if (big || costly || growing) kept.push_back(std::move(f));
  }
  r.features = std::move(kept);
  r.advice = validity_advice(r.features, r.mach, r.resolution_limited);
}

// The faces of `mesh` that a tube of `tubes` closes: a wake's or capture's front cap is a copy
// of the face (ends.h), so the same three vertex positions.
std::vector<bool> faces_closed_by(const Mesh& mesh, const Mesh& tubes) {
  std::vector<bool> out(mesh.triangles.size(), false);
  if (tubes.triangles.empty()) return out;
  using Key = std::array<double, 9>;
  auto key_of = [](const Mesh& m, const Tri& t) {
    std::array<Vec3, 3> p{m.positions[t[0]], m.positions[t[1]], m.positions[t[2]]};
    std::sort(p.begin(), p.end(), [](const Vec3& a, const Vec3& b) {
      return a.x != b.x ? a.x < b.x : a.y != b.y ? a.y < b.y : a.z < b.z;
    });
    return Key{p[0].x, p[0].y, p[0].z, p[1].x, p[1].y, p[1].z, p[2].x, p[2].y, p[2].z};
  };
  std::set<Key> caps;
  for (const Tri& t : tubes.triangles) caps.insert(key_of(tubes, t));
  for (std::size_t f = 0; f < mesh.triangles.size(); ++f) out[f] = caps.count(key_of(mesh, mesh.triangles[f])) > 0;
  return out;
}

}  // namespace

double default_length_floor(const Mesh& mesh) {
  const Box3 b = bounding_box(mesh);
  return (b.hi.x - b.lo.x) / 16384.0;
}

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
                             WaveDragOptions options, Mesh tubes, const Mesh* parts)
    : engine_(engine),
      slope_mesh_(&engine.mesh(), tubes),  // the engine's positions, not a copy (engine_ outlives it)
      options_(std::move(options)) {
  const Mesh& mesh = engine.mesh();
  closed_by_tubes_ = faces_closed_by(mesh, tubes);
  if (!tubes.triangles.empty()) tube_engine_.emplace_back(std::move(tubes));
  default_length_floor_ = machcut::default_length_floor(mesh);
  const bool united = std::any_of(mesh.shell_names.begin(), mesh.shell_names.end(),
                                  [](const std::string& n) { return n.find(" + ") != std::string::npos; });
  if (parts && united) {
    part_of_ = triangle_parts(mesh, *parts);
    part_names_ = parts->shell_names;
  } else {
    part_of_ = triangle_parts(mesh, Mesh{});
    part_names_ = mesh.shell_names;
  }
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
  // D on this grid and on the grids of 2, 4, 8 and 16 times the cell width, from the same cell
  // means (they nest exactly; slope_grid.h).
  std::vector<double> avg = slope_averages(g, true, &r.kink_width);
  double d[kLevels + 1];
  for (int level = 0; level <= kLevels; ++level) {
    d[level] = von_karman_drag_area(steps_from_averages(avg));
    if (level < kLevels) avg = coarsen_averages(avg);
  }
  r.drag_area = d[0];
  for (int k = 0; k < kLevels; ++k) r.increments[static_cast<std::size_t>(k)] = d[kLevels - 1 - k] - d[kLevels - k];
  r.levels = kLevels;
  r.station_error = std::fabs(r.increments[3]);
  r.coarse_error = std::fabs(r.increments[2]);
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
    ri.coarse_error = s.coarse_error;
    ri.increments = s.increments;
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
  // The quadrature need not be finer than a fifth of the station error it is added to.
  const int levels = uses_grid() ? kLevels : 2;
  o.abs_tol_of = [levels](const RollIntegral& so_far) {
    return 0.2 * station_estimate(so_far.increments, levels, so_far.drag_area).error;
  };
  return integrate_rolls([&](std::span<const double> rolls) { return samples(mach, n, rolls); }, o);
}

std::vector<ValidityFeature> WaveDragModel::features(double mach) const {
  return steep_features(engine_.mesh(), mach, part_of_, part_names_, closed_by_tubes_);
}

void WaveDragModel::add_feature_shares(double mach, int n, MachDrag& r) const {
  // Roll angles: one at M = 1, else 32 midpoints over the whole turn (the split needs no
  // adaptive quadrature: its integrand is bounded on the cell means). The set is mapped onto
  // itself by both mirror symmetries, so mirror-image features get equal shares.
  std::vector<double> rolls{0.0};
  if (mach > 1.0) {
    const int k = 32;
    rolls.clear();
    for (int i = 0; i < k; ++i) rolls.push_back(-90.0 + 360.0 * (i + 0.5) / k);
  }
  const std::size_t nf = r.features.size(), nr = rolls.size();
  // Per roll: D on the grid and on the grid of twice the cells' width, and each feature's cells.
  std::vector<double> drag(2 * nr, 0.0), part(2 * nr * nf, 0.0);
  std::vector<char> failed(nr, 0);
  const Mesh& mesh = engine_.mesh();
  tbb::parallel_for(std::size_t{0}, nr, [&](std::size_t i) {
    const MachPlanes planes{mach, rolls[i]};
    const StationRange range = engine_.range(planes);
    const double margin = (range.hi - range.lo) / 64.0;
    const SlopeGrid g = slope_grid(mach, rolls[i], range.lo - margin, range.hi + margin, n, range.hi);
    if (has_area_step(g, std::max(largest_area(g), g.tail_area))) {
      failed[i] = 1;
      return;
    }
    std::vector<double> avg = slope_averages(g, true);
    for (int level = 0; level < 2; ++level) {
      const std::vector<double> a = steps_from_averages(avg);
      const std::vector<double> c = drag_change_by_cell(std::vector<double>(a.size(), 0.0), a);
      const double h = (g.hi - g.lo) / static_cast<double>(a.size());
      for (double v : c) drag[2 * i + level] += v;
      // Step j sits at node g_j (the cell-wide interval centred there).
      for (std::size_t f = 0; f < nf; ++f) {
        double x0 = HUGE_VAL, x1 = -HUGE_VAL;
        for (std::uint32_t t : r.features[f].triangles)
          for (std::uint32_t v : mesh.triangles[t]) {
            const double x = station_of(mesh.positions[v], planes);
            x0 = std::min(x0, x);
            x1 = std::max(x1, x);
          }
        const long last = static_cast<long>(a.size()) - 1;
        const long j0 = std::clamp(std::lround((x0 - g.lo) / h), 0L, last);
        const long j1 = std::clamp(std::lround((x1 - g.lo) / h), 0L, last);
        double sum = 0.0;
        for (long j = j0; j <= j1; ++j) sum += c[static_cast<std::size_t>(j)];
        part[(2 * i + level) * nf + f] = sum;
      }
      avg = coarsen_averages(avg);
    }
  });
  if (std::any_of(failed.begin(), failed.end(), [](char c) { return c != 0; })) return;
  double d_fine = 0.0;
  for (std::size_t i = 0; i < nr; ++i) d_fine += drag[2 * i] / static_cast<double>(nr);
  for (std::size_t f = 0; f < nf; ++f) {
    double fine = 0.0, coarse = 0.0;
    for (std::size_t i = 0; i < nr; ++i) {
      fine += part[(2 * i) * nf + f] / static_cast<double>(nr);
      coarse += part[(2 * i + 1) * nf + f] / static_cast<double>(nr);
    }
    r.features[f].drag_share = d_fine != 0.0 ? fine / d_fine : 0.0;
    r.features[f].growth = fine - coarse;
  }
}

MachDrag WaveDragModel::at_mach(double mach) const {
  using clock = std::chrono::steady_clock;
  const auto t0 = clock::now();
  auto seconds = [&] { return std::chrono::duration<double>(clock::now() - t0).count(); };
  MachDrag r;
  r.mach = mach;
  r.symmetry = mach > 1.0 ? symmetry_ : RollSymmetry::both;
  r.steep_limit_deg = steep_limit_deg(mach);
  r.features = features(mach);
  for (ValidityFeature& f : r.features) f.drag_share = std::numeric_limits<double>::quiet_NaN();
  if (mach > 1.0 && options_.use_breaks) r.breaks_deg = singular_roll_angles(engine_.mesh(), mach);
  const bool grid = uses_grid();
  // The level size: grid cells (doubled) or Eminton–Lord N (2N − 1 stations, N → 2N − 1).
  // On the grid the finest level is the last power of two whose cell is not below the floor.
  const StationRange r0 = engine_.range({mach, 0.0});
  const double grid_length = (r0.hi - r0.lo) * (1.0 + 2.0 / 64.0);
  r.length_floor = options_.length_floor > 0.0 ? options_.length_floor : default_length_floor_;
  int n_floor = 64;
  while (n_floor < options_.max_cells && grid_length / (2.0 * n_floor) >= r.length_floor) n_floor *= 2;
  int n = grid ? std::min(power_of_two_at_least(options_.cells), n_floor) : std::max(5, options_.stations);
  n = grid ? std::max(n, 64) : n;
  const int n_max = grid ? std::max(n, n_floor) : options_.max_stations;
  auto count = [&](int level) { return grid ? level : 2 * level - 1; };
  auto next = [&](int level) { return grid ? 2 * level : 2 * level - 1; };
  StationEstimate est;
  double level_seconds = 0.0;
  for (;;) {
    const double started = seconds();
    const RollIntegral ri = one_level(mach, n, r.breaks_deg);
    level_seconds = seconds() - started;
    ++r.station_levels;
    if (!ri.ok) {
      r.ok = false;
      r.problem = ri.problem;
      finish_features(r, 0.0);
      return r;
    }
    r.drag_area = ri.drag_area;
    r.quadrature_error = ri.quadrature_error;
    est = station_estimate(ri.increments, grid ? kLevels : 2, ri.drag_area);
    r.station_error = est.error;
    r.growth_per_halving = ri.increments[3];
    r.growth_ratio = est.ratio;
    r.stations = count(n);
    r.cell_size = grid ? grid_length / n : 0.0;
    r.roll_evaluations = ri.evaluations;
    r.roll_pieces = ri.pieces;
    r.rolls = ri.samples;
    // The stations get what the quadrature leaves of the tolerance (at least half of it).
    const double target = std::max(0.5 * options_.rel_tol * std::fabs(ri.drag_area),
                                   options_.rel_tol * std::fabs(ri.drag_area) - ri.quadrature_error);
    if (est.geometric && r.station_error <= target) break;
    if (count(next(n)) > n_max) break;
    // A level costs about twice the one before: start it only if it ends within the budget.
    if (seconds() + 2.2 * level_seconds > options_.time_budget) {
      r.time_limited = true;
      break;
    }
    n = next(n);
  }
  r.resolution_limited = !est.geometric;
  double peak = 0.0;
  for (const RollSample& s : r.rolls) {
    r.max_base_area = std::max(r.max_base_area, s.base_area);
    r.kink_width = std::max(r.kink_width, s.kink_width);
    peak = std::max(peak, s.peak_area);
  }
  r.aft_treatment = aft_text(r.max_base_area, peak);
  if (!r.features.empty() && grid) add_feature_shares(mach, n, r);
  finish_features(r, peak);
  r.error_estimate = r.quadrature_error + r.station_error;
  r.converged = !r.resolution_limited && r.error_estimate <= options_.rel_tol * std::fabs(r.drag_area);
  char buf[400];
  if (r.resolution_limited && grid) {
    std::snprintf(buf, sizeof buf,
                  "%s: at %.3g m cells D/q still changes by %+.3g m² per halving of the cells "
                  "(ratio %.2f of successive changes), so the value is the one at that resolution, "
                  "not a limit",
                  r.time_limited ? "not converged within the time budget" : "not converged above the length floor",
                  r.cell_size, r.growth_per_halving, r.growth_ratio);
    r.problem = buf;
  } else if (r.resolution_limited) {
    r.problem = "station refinement does not converge: the area curves have slope jumps (a "
                "capture area cut off where the shell's own area reaches it, an edge lying in "
                "the cutting planes or a flat face across the flow), for which linear theory "
                "gives a logarithmically infinite drag";
  } else if (!r.converged) {
    r.problem = r.time_limited ? "the error estimate did not reach the tolerance within the time budget"
                               : "the error estimate did not reach the tolerance within the station and roll limits";
  }
  return r;
}

}  // namespace machcut
