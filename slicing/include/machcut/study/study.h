// A study: one model and everything the front ends ask of it. The CLI commands, the viewer
// and the Python module all go parse → Study → format, so that the same options give the same
// numbers everywhere (docs/method.md §1).
//
// A Study owns the prepared model (import, repair, union: intake/model.h, through the
// prepared-model cache), the end treatment that closes the area curves for wave drag (wakes
// behind flat aft faces, captured stream tubes: drag/ends.h) and the section engines built
// from them; it caches the wave-drag models per option set and the D/q per Mach. Every analysis
// returns a plain struct that says how it was made.
//
// Thread safety: the const member functions may be called from several threads at once (the
// viewer does); the caches are guarded inside.
#pragma once

#include <functional>
#include <map>
#include <memory>
#include <mutex>
#include <string>
#include <tuple>
#include <vector>

#include "machcut/design/equivalent_body.h"
#include "machcut/design/jumps.h"
#include "machcut/design/optimum.h"
#include "machcut/design/sensitivity.h"
#include "machcut/drag/wave_drag.h"
#include "machcut/intake/model.h"
#include "machcut/output/report.h"
#include "machcut/sections/section.h"

namespace machcut {

// How the ends of the area curves are closed for wave drag.
struct EndSetup {
  std::vector<std::string> captures;  // "NAME" (flat inlet faces) or "NAME=AREA" (m²), NAME a
                                      // shell "FILE#k" or every shell of FILE
  bool wakes = true;                  // constant-area wakes behind flat aft faces
};

// The closing shells and captures built for one model (drag/ends.h).
struct EndTreatment {
  std::vector<CaptureTube> given;  // captures given as areas
  Mesh tubes;                      // wakes (outward) and inlet capture tubes (inward)
  double wake_face_area = 0.0;     // total area of the aft faces continued by wakes, m²
  std::vector<std::string> notes;  // one line per treatment
};

// Builds the end treatment. Throws InputError naming --capture for an unknown shell, a shell
// named twice, a bad area or a shell without a flat inlet face.
EndTreatment make_end_treatment(const EndSetup& ends, const PreparedModel& model);

struct StudySetup {
  std::vector<std::string> files;
  ModelSetup model;  // import options, union, cache, progress
  EndSetup ends;
};

// The model options as a person types them, with the CLI's names and defaults; the CLI, the
// viewer and the Python module fill this and call study_setup.
struct StudyOptions {
  std::vector<std::string> files;
  std::string units = "m";   // --units: m, mm, cm, in, ft
  std::string flow = "+x";   // --flow: file axis from nose to tail
  std::string up = "+z";     // --up: file axis pointing up
  bool sum = false;          // --sum: plain sum of overlapping shells instead of their union
  bool cache = true;         // false: --no-cache
  bool strict = false;       // --strict: refuse a shell that would need an alpha wrap
  double wrap_alpha = 0.0;   // --wrap-alpha, m (0: 1/100 of the shell's box diagonal)
  double wrap_offset = 0.0;  // --wrap-offset, m (0: alpha/10)
  std::vector<std::string> skip;      // --skip: parts left out (shell, part or file names)
  std::vector<std::string> only;      // --only: the only parts used (empty: all)
  std::vector<std::string> captures;  // --capture
  bool no_wake = false;      // --no-wake
};

// Checks and converts the options. Throws InputError naming the option ("--units: 'yd' is not
// a unit; …") for a bad value.
StudySetup study_setup(const StudyOptions& options);

// ---- Requests and results --------------------------------------------------------------

struct AreaRequest {
  double mach = 1.0;       // kMinMach..kMaxMach (common/limits.h)
  double roll_deg = 0.0;   // roll angle θ of the Mach planes, degrees
  int stations = 201;      // spread over the station range (>= 2), unless `at` is given
  Spacing spacing = Spacing::uniform;
  std::vector<double> at;  // explicit stations, m (model axes)
  bool with_ends = false;  // true: the curve the drag sees — the wakes' areas added and the
                           // captured stream tubes subtracted (EndSetup); `ends` holds them
};

struct AreaResult {
  AreaCurve curve;                      // x, area, per_shell (own area of each part), error_bound
  std::vector<std::string> part_names;  // names of curve.per_shell's rows
  StationRange range;                   // station range of the model at (mach, roll), m
  std::vector<double> outside;          // requested stations outside `range` (area 0 there)
  std::vector<double> open_stations;    // stations whose area carries a hole's error bound
  std::vector<double> ends;             // with_ends: area the end treatment adds (wakes) or
                                        // takes off (captures) at each station, m²; else empty
  std::string how;                      // what the areas are (one line)
};

// The Mach-free measures of the model, every front end's one source for them.
struct StudyMeasures {
  double volume = 0.0;      // m³ (divergence theorem on the analysis mesh)
  double x0 = 0.0;          // nose station, m
  double length = 0.0;      // body length along the flow, m
  double max_area = 0.0;    // largest normal-plane area of the model alone (M = 1), m²
  double base_area = 0.0;   // area the aft end leaves at M = 1 with the ends closed (the
                            // wakes' area at the tail station), m²; 0 for a closed tail
  double sears_haack_drag_area = 0.0;  // 128 V²/(π l⁴) with this volume and length, m²
};

struct DragSweep {
  std::vector<MachDrag> results;  // one per Mach, each standing alone (ok or its problem)
  StudyMeasures measures;
  bool uses_grid = true;          // exact slope grid (false: Eminton–Lord through sampled areas)
  RollSymmetry symmetry = RollSymmetry::none;
  std::string method;             // one line
};

// The least-drag target a report and a correction aim at.
struct TargetRequest {
  std::string base = "model";          // "model" (the study's base area), "closed", "free", or m²
  std::vector<std::string> fix;        // "X" (keep the model's area at X) or "X:AREA"
  double max_area = 0.0;               // m²; 0: no limit
  int stations = 201;                  // stations of the curve the correction is given on
  double mach = 1.0;                   // 1: normal cuts; above 1: the roll-averaged Mach-plane
                                       // curve (equivalent body, 36 rolls), stations X there
};

struct TargetResult {
  LeastDragProblem problem;
  LeastDragBody body;
  AreaCurve curve;                     // the curve the correction is computed on
  Correction correction;
  std::vector<std::string> constraints;  // one line each, for people
};

struct ReportRequest {
  std::vector<double> machs{1.2, 1.5, 2.0};  // besides M = 1, which is always in
  double reference_area = 0.0;         // m²; 0: no C_D
  int stations = 201;                  // per area curve
  WaveDragOptions drag;                // tolerance and cells of the sweep
  TargetRequest target;
  std::string version = "machcut";
};

class Study {
 public:
  // Prepares the model (InputError for unreadable files, as prepare_model); when it is usable,
  // builds the end treatment (InputError for a bad --capture).
  explicit Study(const StudySetup& setup);
  // From a model prepared elsewhere (the viewer's generated body, tests).
  Study(PreparedModel model, const EndSetup& ends);
  ~Study();
  Study(const Study&) = delete;
  Study& operator=(const Study&) = delete;

  const PreparedModel& model() const { return model_; }
  const std::vector<std::string>& part_names() const { return model_.mesh.shell_names; }
  const EndSetup& end_setup() const { return ends_; }
  // Notes of the end treatment (empty for an unusable model).
  const std::vector<std::string>& end_notes() const { return treatment_.notes; }
  // Throws UnusableModel("model not usable: …") when the model cannot be analysed.
  void require_usable() const;

  const SectionEngine& engine() const;        // the analysis mesh (united)
  const SectionEngine& parts_engine() const;  // the shells as in the files (own areas)
  const StudyMeasures& measures() const;

  // The area distribution at one Mach number and roll angle, with each part's own area and
  // the holes' error bounds.
  AreaResult area(const AreaRequest& request) const;

  // The exact section outline at one station.
  Section section(const MachPlanes& planes, double station) const;

  // The wave-drag model for `options` (its progress callback ignored), built once per option
  // set and kept.
  const WaveDragModel& drag_model(const WaveDragOptions& options) const;
  // D/q at one Mach number; kept per (options, Mach): asking again costs nothing.
  MachDrag drag_at(double mach, const WaveDragOptions& options = {}) const;
  // D/q at each Mach number; `progress` (may be empty) gets the fraction of the sweep done.
  DragSweep drag(const std::vector<double>& machs, const WaveDragOptions& options = {},
                 const std::function<void(double)>& progress = {}) const;

  // The equivalent bodies of revolution (design/equivalent_body.h) at M = 1 and at each Mach
  // of `machs` above 1, the ends closed as for the drag: 201 stations, 36 roll angles.
  std::vector<EquivalentBody> equivalent_bodies(const std::vector<double>& machs,
                                                const WaveDragOptions& options = {}) const;

  // The area curve the design aids work on at `mach`: roll 0, `stations` uniform stations,
  // with per-part areas, and the ends closed as the drag closes them (with_ends), so that
  // jumps, the least-drag target and its correction describe the curve the drag integrates.
  AreaCurve design_curve(double mach, int stations) const;
  // Jumps at M = 1 and at each of `machs`, largest share first, at most `keep`; `progress`
  // (may be empty) gets the fraction done.
  std::vector<AreaJump> jumps(const std::vector<double>& machs, int stations, int keep = 15,
                              const std::function<void(double)>& progress = {}) const;

  // The least-drag body of the model's length and volume under `request`'s constraints, and
  // the correction to it on the M = 1 curve. InputError naming the option for a bad value.
  TargetResult target(const TargetRequest& request) const;

  // The surface sensitivity at `mach` (design/sensitivity.h): per vertex of the analysis mesh
  // (engine().mesh(), whose vertex numbering is the engine's), ∂(D/q)/∂V for volume added by an
  // outward normal displacement, 1/m, on the
  // drag's slope grids with the drag's end treatment. InputError naming --mach for a bad Mach;
  // UnusableModel when no drag (hence no derivative) can be given.
  SurfaceSensitivity sensitivity(double mach, const SensitivityOptions& options = {}) const;

  // Everything the design report shows (output/report.h).
  ReportInput report_input(const ReportRequest& request,
                           const std::function<void(double)>& progress = {}) const;

 private:
  PreparedModel model_;
  EndSetup ends_;
  EndTreatment treatment_;
  mutable std::mutex mutex_;
  mutable std::unique_ptr<SectionEngine> engine_, parts_engine_;
  mutable std::unique_ptr<StudyMeasures> measures_;
  mutable std::map<std::tuple<double, int, int, double, double, int, int, int, int, bool, bool>,
                   std::unique_ptr<WaveDragModel>> drag_models_;
  mutable std::map<std::pair<const WaveDragModel*, double>, MachDrag> drags_;
};

// A progress callback for one phase of a longer task: maps the phase's fraction f to
// from + span·f of `progress` (which may be empty; it must outlive the returned callback).
std::function<void(double)> progress_phase(const std::function<void(double)>& progress, double from,
                                           double span);

// The state of a D/q result in the words every front end uses: "" when converged, else
// "not converged", or "resolution-limited" (the value still grows as the cells halve down to the
// length floor; ": time budget" when the budget stopped the refinement first),
// or the problem when there is no value.
std::string drag_status(const MachDrag& d);

// The report's lines on the model's health (one per line).
std::vector<std::string> health_lines(const PreparedModel& model);

}  // namespace machcut
