// Zero-lift wave drag of a meshed model across Mach numbers by the supersonic area rule
// (Jones, NACA Report 1284, 1956): for each roll angle θ the Mach-plane area curve S(X; θ)
// gives an equivalent body whose drag D(θ)/q is von Kármán's slender-body integral; the roll
// average (roll_integral.h) gives D/q.
//
// D(θ)/q, two methods:
//   - exact slope grid (slope_grid.h), the default: the mesh's exact piecewise-linear S′ is
//     laid on a uniform grid of `cells` cells and the integral evaluated on it; the grids of
//     half and a quarter as many cells come from the same pass;
//   - Eminton–Lord least-drag curve through sampled areas (eminton_lord.h), used only when a capture
//     is given as an area (S = model − min(capture area, shell area) is not a sum of meshes):
//     2N − 1 nested cosine stations and their every-second and every-fourth subsets.
// Accuracy control, per Mach number:
//   - stations: the two increments d₁ (coarsest → middle) and d₂ (middle → finest) and their
//     ratio ρ = d₂/d₁ (roll-averaged) give the station error d₂·max(1, ρ/(1 − ρ)) (the
//     remainder of a geometric sequence, never less than the last increment). While it exceeds
//     what the quadrature leaves of the tolerance (at least half), the grid is doubled up to a
//     limit. ρ > 0.7 is not (yet) convergence: ρ is capped at 0.9 in that formula, so the
//     estimate is then 2.3 to 9 times d₂, and the result is flagged `stations_diverge`;
//   - roll angles: adaptive quadrature with breaks at the singular roll angles of the model's
//     straight sharp edges and with its detected mirror symmetry (roll_integral.h); the
//     quadrature gets the other half of the tolerance.
// The error estimate reported is quadrature error + station error.
#pragma once

#include <functional>
#include <span>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"
#include "machcut/drag/roll_integral.h"
#include "machcut/sections/section.h"
#include "machcut/sections/slope_grid.h"

namespace machcut {

// A captured stream tube to subtract: at each station, min(area, the shell's own area) is
// taken off the total (common practice for flow-through nacelles modelled as solids: the
// inlet capture area carried through the nacelle).
struct CaptureTube {
  std::string name;  // for messages, e.g. "nacelle.obj#1"
  Mesh shell;        // the nacelle as a closed solid (its own mesh)
  double area = 0.0; // capture area, m²
};

struct WaveDragOptions {
  double rel_tol = 0.005;      // target of error_estimate / |D/q|
  int cells = 16384;           // initial slope-grid cells per roll (rounded up to a power of 2)
  int max_cells = 65536;       // most cells tried
  int stations = 65;           // Eminton–Lord (area captures only): initial N; 2N − 1 used
  int max_stations = 257;      // Eminton–Lord: largest 2N − 1 tried (the solve is O(N³))
  int initial_rolls = 60;      // roll angles of the first quadrature pass (15 per piece)
  int max_roll_evaluations = 2000;  // per station level
  bool use_symmetry = true;
  bool use_breaks = true;      // breaks at singular roll angles of sharp edges
  std::function<void(double fraction)> progress;  // may be empty; called from this thread
};

// The outcome for one Mach number.
struct MachDrag {
  double mach = 1.0;
  double drag_area = 0.0;         // D/q, m² (meaningful when ok)
  double error_estimate = 0.0;    // quadrature_error + station_error, m²
  double quadrature_error = 0.0;  // m²
  double station_error = 0.0;     // m²
  int stations = 0;               // per roll at the final level: grid cells (or 2N − 1 stations)
  double kink_width = 0.0;        // m: facet scale over which S′ steps of edges lying in the
                                  // Mach planes were spread (slope_grid.h; 0: none)
  int station_levels = 0;         // levels tried
  int roll_evaluations = 0;       // rolls evaluated at the final level
  int roll_pieces = 0;            // quadrature intervals at the final level
  RollSymmetry symmetry = RollSymmetry::none;
  std::vector<double> breaks_deg; // singular roll angles used as breaks (folded)
  double max_base_area = 0.0;     // largest tail area over the rolls, m²
  bool converged = false;         // error_estimate <= rel_tol |D/q|
  bool stations_diverge = false;  // increments not decreasing at the final level (see above)
  bool ok = true;                 // false: no number can be given; `problem` says why
  std::string problem;
  std::string aft_treatment;      // "closed tail" or "base area … closed by a constant-area wake"
  std::vector<RollSample> rolls;  // D(θ)/q at the final level, sorted by roll
};

// The model quantities that do not depend on Mach.
struct ModelMeasures {
  double volume = 0.0;       // m³ (divergence theorem)
  double length = 0.0;       // x extent, m
  double x0 = 0.0;           // nose station, m
  double max_area = 0.0;     // largest normal-plane area (M = 1), m², on a fine grid
  double sears_haack_drag_area = 0.0;  // 128 V²/(π l⁴), m² (Sears 1947; Haack 1941)
};
ModelMeasures measure_model(const SectionEngine& engine);

// Precomputes what every Mach number shares (capture engines, symmetry); then answers Mach
// numbers one at a time. A class because that set-up is reused across a sweep.
class WaveDragModel {
 public:
  // `tubes`: closed shells whose signed areas are added at every station (ends.h: constant-
  // area wakes behind flat aft faces, inward capture tubes behind inlet faces); may be empty.
  // The station range of each roll is that of `engine`'s mesh alone.
  WaveDragModel(const SectionEngine& engine, std::vector<CaptureTube> captures,
                WaveDragOptions options, Mesh tubes = {});

  RollSymmetry symmetry() const { return symmetry_; }

  // True when D(θ) comes from the exact slope grid; false (Eminton–Lord) when a capture is
  // given as an area.
  bool uses_grid() const { return capture_engines_.empty(); }
  MachDrag at_mach(double mach) const;

  // The station range of the Mach planes at (mach, roll_deg), m.
  StationRange range(double mach, double roll_deg) const { return engine_.range({mach, roll_deg}); }

  // The slope grid of the area curve at (mach, roll_deg), tubes included, on `cells` cells over
  // [lo, hi] (which should reach beyond the model's own station range); its tail is the
  // model's own. Only meaningful when uses_grid().
  SlopeGrid slope_grid(double mach, double roll_deg, double lo, double hi, int cells) const;

  // Areas at `stations` for roll `roll_deg` with the capture tubes subtracted, m².
  std::vector<double> areas(double mach, double roll_deg, const std::vector<double>& stations) const;

 private:
  std::vector<RollSample> samples(double mach, int n, std::span<const double> rolls) const;
  RollSample grid_sample(double mach, double roll_deg, int cells) const;
  // slope_grid with the model's tail station already known (no second pass for the range).
  SlopeGrid slope_grid(double mach, double roll_deg, double lo, double hi, int cells, double tail) const;
  RollIntegral one_level(double mach, int n, const std::vector<double>& breaks) const;

  const SectionEngine& engine_;
  std::vector<SectionEngine> capture_engines_;
  std::vector<SectionEngine> tube_engine_;  // empty or one engine of the tubes
  SlopeMesh slope_mesh_;                    // the mesh and the tubes, for the slope grid
  std::vector<double> capture_areas_;
  WaveDragOptions options_;
  RollSymmetry symmetry_ = RollSymmetry::none;
};

}  // namespace machcut
