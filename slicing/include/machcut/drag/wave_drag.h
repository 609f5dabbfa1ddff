// Zero-lift wave drag of a meshed model across Mach numbers by the supersonic area rule
// (Jones, NACA Report 1284, 1956): for each roll angle θ the Mach-plane area curve S(X; θ)
// gives an equivalent body whose drag D(θ)/q is von Kármán's slender-body integral; the roll
// average (roll_integral.h) gives D/q.
//
// D(θ)/q, two methods:
//   - exact slope grid (slope_grid.h), the default: the exact means of the mesh's S′ over the
//     cells of a uniform grid, and the integral evaluated on them; the grids of half, a quarter
//     … a sixteenth as many cells come from the same pass;
//   - Eminton–Lord least-drag curve through sampled areas (eminton_lord.h), used only when a capture
//     is given as an area (S = model − min(capture area, shell area) is not a sum of meshes):
//     2N − 1 nested cosine stations and their every-second and every-fourth subsets.
// Accuracy control, per Mach number (docs/method.md §6):
//   - stations: each roll's grid gives D at the cell width h and at 2h, 4h, 8h, 16h (the cell
//     means nest exactly); the four roll-averaged changes from one width to the next show
//     whether D converges. Only when the last two ratios of successive changes are at most 0.7
//     is the remainder of that geometric sequence taken as the station error (at least the last
//     change). Otherwise D still grows (logarithmically, for a kink of S: a blunt nose, a face
//     nearly lying in the Mach planes): the result is resolution_limited, with its growth per
//     halving, and its estimate is the change of four more halvings at the largest change seen.
//     The grid is doubled while the error exceeds what the quadrature leaves of the tolerance,
//     down to the length floor (default: the model's length / 16 384) and within the time
//     budget;
//   - roll angles: adaptive quadrature with breaks at the singular roll angles of the model's
//     straight sharp edges and with its detected mirror symmetry (roll_integral.h); the
//     quadrature gets half of the tolerance, and need not go below a fifth of the station error.
// The error estimate reported is quadrature error + station error. Each result also lists the
// validity features of that Mach number (validity.h) with their shares of D/q.
#pragma once

#include <functional>
#include <span>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"
#include "machcut/drag/roll_integral.h"
#include "machcut/drag/validity.h"
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
  int cells = 16384;           // initial slope-grid cells per roll (rounded up to a power of 2;
                               // fewer when the length floor is reached first)
  int max_cells = 1 << 20;     // most cells tried (a memory bound; the floor usually stops first)
  double length_floor = 0.0;   // m: the smallest cell the grid is refined to; 0: the model's
                               // default (default_length_floor)
  double time_budget = 20.0;   // s per Mach number: no finer grid is started that would end
                               // after it (the value so far is given, marked time_limited)
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
  double error_estimate = 0.0;    // quadrature_error + station_error, m²; for a
                                  // resolution-limited value the change 16 times the cells
                                  // would bring at the growth seen, not a tolerance
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
  bool converged = false;         // error_estimate <= rel_tol |D/q|, shown by increments that
                                  // decrease geometrically above the length floor
  // Resolution (docs/method.md §6): when the increments do not decrease geometrically down to
  // the length floor, the value is the one at the floor, not a converged one.
  bool resolution_limited = false;  // stopped at the floor (or the time budget) still changing
  bool time_limited = false;        // the time budget stopped the refinement above the floor
  double length_floor = 0.0;        // m: the floor used
  double cell_size = 0.0;           // m: the cell width at the final level (roll 0)
  double growth_per_halving = 0.0;  // m²: D(h) − D(2h) at the final level (roll-averaged)
  double growth_ratio = 0.0;        // the last increment over the one before (max of the last
                                    // two such ratios): < 0.7 geometric, ~1 logarithmic growth
  bool ok = true;                 // false: no number can be given; `problem` says why
  std::string problem;
  std::string aft_treatment;      // "closed tail" or "base area … closed by a constant-area wake"
  std::vector<RollSample> rolls;  // D(θ)/q at the final level, sorted by roll
  // Validity (validity.h, docs/method.md §9.1): the surface steeper than the Mach angle, grouped;
  // empty when the model is within the theory. Shares on the final grid.
  double steep_limit_deg = 0.0;   // the inclination above which a face counts, degrees
  std::vector<ValidityFeature> features;
  std::string advice;             // one sentence for the designer; empty without features
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

// The default length floor of a model (WaveDragOptions::length_floor = 0), m: see
// docs/method.md §6.
double default_length_floor(const Mesh& mesh);

// Precomputes what every Mach number shares (capture engines, symmetry); then answers Mach
// numbers one at a time. A class because that set-up is reused across a sweep.
class WaveDragModel {
 public:
  // `tubes`: closed shells whose signed areas are added at every station (ends.h: constant-
  // area wakes behind flat aft faces, inward capture tubes behind inlet faces); may be empty.
  // The station range of each roll is that of `engine`'s mesh alone.
  // `parts` (may be null): the shells as in the files, used only to name the part each
  // validity feature lies on when `engine`'s mesh is a union of them (validity.h).
  // `engine` must outlive the model: its mesh is read where it is, not copied.
  WaveDragModel(const SectionEngine& engine, std::vector<CaptureTube> captures,
                WaveDragOptions options, Mesh tubes = {}, const Mesh* parts = nullptr);

  RollSymmetry symmetry() const { return symmetry_; }

  // True when D(θ) comes from the exact slope grid; false (Eminton–Lord) when a capture is
  // given as an area.
  bool uses_grid() const { return capture_engines_.empty(); }
  // D/q at one Mach number (>= 1) with its error estimate or resolution state, and the
  // validity features at that Mach. Never throws for a model the engine accepts; a Mach number
  // without a value has ok = false and its problem.
  MachDrag at_mach(double mach) const;

  // The validity features at `mach` (shares 0) and the triangles they come from.
  std::vector<ValidityFeature> features(double mach) const;

  // The length floor used when WaveDragOptions::length_floor is 0, m.
  double default_length_floor() const { return default_length_floor_; }

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
  void add_feature_shares(double mach, int n, MachDrag& r) const;

  const SectionEngine& engine_;
  std::vector<SectionEngine> capture_engines_;
  std::vector<SectionEngine> tube_engine_;  // empty or one engine of the tubes
  SlopeMesh slope_mesh_;                    // the mesh and the tubes, for the slope grid
  std::vector<double> capture_areas_;
  WaveDragOptions options_;
  RollSymmetry symmetry_ = RollSymmetry::none;
  double default_length_floor_ = 0.0;       // m
  std::vector<std::uint32_t> part_of_;      // part of each triangle of the engine's mesh
  std::vector<std::string> part_names_;
  std::vector<bool> closed_by_tubes_;       // faces a wake or capture tube closes
};

}  // namespace machcut
