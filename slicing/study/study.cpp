#include "machcut/study/study.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <set>
#include <sstream>

#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/drag/eminton_lord.h"
#include "machcut/drag/ends.h"
#include "machcut/intake/import.h"

namespace machcut {

namespace {

SignedAxis axis_option(const std::string& name, const std::string& value) {
  const auto a = parse_axis(value);
  if (!a) throw InputError(name, "'" + value + "' is not an axis; use +x, -x, +y, -y, +z or -z");
  return *a;
}

// The option values that change a wave-drag model (its progress callback does not).
auto drag_key(const WaveDragOptions& o) {
  return std::make_tuple(o.rel_tol, o.cells, o.max_cells, o.length_floor, o.time_budget, o.stations,
                         o.max_stations, o.initial_rolls, o.max_roll_evaluations, o.use_symmetry,
                         o.use_breaks);
}

// Interpolated area of the curve at x (0 outside its stations).
double area_at(const AreaCurve& c, double x) {
  for (std::size_t i = 1; i < c.x.size(); ++i)
    if (x <= c.x[i] && x >= c.x[i - 1]) {
      const double t = c.x[i] > c.x[i - 1] ? (x - c.x[i - 1]) / (c.x[i] - c.x[i - 1]) : 0.0;
      return c.area[i - 1] + t * (c.area[i] - c.area[i - 1]);
    }
  return 0.0;
}

std::string short_number(double v) { return readable_number(v); }

// Roll angles over which a jump's share of the roll-averaged D/q is taken above M = 1.
constexpr int kJumpRolls = 24;  // the jumps command says so

}  // namespace

StudySetup study_setup(const StudyOptions& o) {
  StudySetup s;
  s.files = o.files;
  const auto unit = parse_length_unit(o.units);
  if (!unit) throw InputError("--units", "'" + o.units + "' is not a unit; use m, mm, cm, in or ft");
  s.model.import.unit = *unit;
  s.model.import.axes.flow = axis_option("--flow", o.flow);
  s.model.import.axes.up = axis_option("--up", o.up);
  if (s.model.import.axes.flow.axis == s.model.import.axes.up.axis)
    throw InputError("--up", "'" + o.up + "' is along the same axis as --flow '" + o.flow + "'");
  s.model.unite = !o.sum;
  s.model.use_cache = o.cache;
  s.model.strict = o.strict;
  if (!(o.wrap_alpha >= 0.0) || !std::isfinite(o.wrap_alpha))
    throw InputError("--wrap-alpha", "give a length in m (> 0), not " + short_number(o.wrap_alpha));
  if (!(o.wrap_offset >= 0.0) || !std::isfinite(o.wrap_offset))
    throw InputError("--wrap-offset", "give a length in m (> 0), not " + short_number(o.wrap_offset));
  s.model.wrap_alpha = o.wrap_alpha;
  s.model.wrap_offset = o.wrap_offset;
  s.model.skip = o.skip;
  s.model.only = o.only;
  s.ends.captures = o.captures;
  s.ends.wakes = !o.no_wake;
  return s;
}

EndTreatment make_end_treatment(const EndSetup& ends, const PreparedModel& model) {
  EndTreatment e;
  const double x_far = far_station(model.analysis);
  std::vector<Mesh> parts;
  if (ends.wakes) {
    Tubes w = flat_face_tubes(model.analysis, +1, x_far);
    if (w.faces > 0) {
      e.wake_face_area = w.face_area;
      e.notes.push_back("constant-area wake behind the flat aft faces (bases, nozzle exits): " +
                        short_number(w.face_area) + " m²");
      parts.push_back(std::move(w.mesh));
    }
  }
  std::set<std::uint32_t> taken;  // shells captured so far (ends.h: capture_shells)
  for (const std::string& c : ends.captures) {
    const std::size_t eq = c.rfind('=');
    const std::string name = c.substr(0, eq);
    if (name.empty()) throw InputError("--capture", "give a shell or file name (NAME or NAME=AREA)");
    if (eq != std::string::npos) {
      const double area = parse_number(c.substr(eq + 1), "--capture");
      if (!(area > 0.0)) throw InputError("--capture", "the capture area must be > 0 m², not " + short_number(area));
      for (std::uint32_t s : capture_shells(model.mesh, name, taken))
        e.given.push_back({model.mesh.shell_names[s], extract_shell(model.mesh, s), area});
      e.notes.push_back("captured stream tube of " + short_number(area) +
                        " m² subtracted for each shell of " + name +
                        " (at most the shell's own area at each station)");
      continue;
    }
    for (std::uint32_t s : capture_shells(model.mesh, name, taken)) {
      Tubes t = flat_face_tubes(extract_shell(model.mesh, s), -1, x_far);
      if (t.faces == 0)
        throw InputError("--capture", model.mesh.shell_names[s] +
                                          " has no flat inlet face (normal to the flow, facing "
                                          "upstream); give NAME=AREA");
      e.notes.push_back("captured stream tube of " + model.mesh.shell_names[s] + ": inlet face " +
                        short_number(t.face_area) + " m² carried downstream and subtracted");
      parts.push_back(std::move(t.mesh));
    }
  }
  if (!parts.empty()) e.tubes = concatenate(parts);
  return e;
}

// ---- Study -------------------------------------------------------------------------------

Study::Study(const StudySetup& setup)
    : Study(prepare_model(setup.files, setup.model), setup.ends) {}

Study::Study(PreparedModel model, const EndSetup& ends) : model_(std::move(model)), ends_(ends) {
  if (model_.usable) treatment_ = make_end_treatment(ends_, model_);
}

Study::~Study() = default;

void Study::require_usable() const {
  if (!model_.usable) throw UnusableModel("model not usable: " + model_.reason);
}

const SectionEngine& Study::engine() const {
  std::lock_guard<std::mutex> lock(mutex_);
  if (!engine_) engine_ = std::make_unique<SectionEngine>(model_.analysis);
  return *engine_;
}

const SectionEngine& Study::parts_engine() const {
  std::lock_guard<std::mutex> lock(mutex_);
  if (!parts_engine_) parts_engine_ = std::make_unique<SectionEngine>(model_.mesh);
  return *parts_engine_;
}

const StudyMeasures& Study::measures() const {
  const SectionEngine& e = engine();
  {
    std::lock_guard<std::mutex> lock(mutex_);
    if (measures_) return *measures_;
  }
  auto m = std::make_unique<StudyMeasures>();
  const ModelMeasures mm = measure_model(e);
  m->volume = mm.volume;
  m->x0 = mm.x0;
  m->length = mm.length;
  m->max_area = mm.max_area;
  m->sears_haack_drag_area = mm.sears_haack_drag_area;
  if (!treatment_.tubes.triangles.empty() && mm.length > 0.0) {
    // Just downstream of the tail the model's own area is zero: what is left is the wakes'
    // area less the captured tubes' — the base the drag's ends close (docs/method.md §7).
    const double tail = mm.x0 + mm.length * (1.0 + 1e-9);
    const double a = SectionEngine(treatment_.tubes).areas({1.0, 0.0}, std::vector<double>{tail}).front();
    m->base_area = std::max(0.0, a);
  }
  std::lock_guard<std::mutex> lock(mutex_);
  if (!measures_) measures_ = std::move(m);
  return *measures_;
}

AreaResult Study::area(const AreaRequest& q) const {
  require_usable();
  checked_mach(q.mach, "--mach");
  checked_roll(q.roll_deg, "--roll");
  for (double x : q.at)
    if (!std::isfinite(x)) throw InputError("--at", "stations must be finite numbers (m)");
  const MachPlanes planes{q.mach, q.roll_deg};
  AreaResult r;
  r.range = engine().range(planes);
  std::vector<double> stations = q.at;
  if (stations.empty()) {
    if (q.stations < 2) throw InputError("--stations", "give at least 2 stations");
    stations = make_stations(r.range, q.stations, q.spacing);
  }
  r.curve = engine().curve(planes, stations);
  r.curve.united = model_.united;
  if (q.with_ends) {
    const std::vector<double> closed = drag_model({}).areas(q.mach, q.roll_deg, stations);
    r.ends.resize(stations.size());
    for (std::size_t i = 0; i < stations.size(); ++i) {
      r.ends[i] = closed[i] - r.curve.area[i];
      r.curve.area[i] = closed[i];
    }
  }
  parts_engine().areas(planes, stations, &r.curve.per_shell);
  r.part_names = part_names();
  if (!model_.holes.empty() || !model_.wraps.empty()) r.curve.error_bound = hole_error_bounds(model_, planes, stations);
  for (double x : q.at)
    if (x < r.range.lo || x > r.range.hi) r.outside.push_back(x);
  for (std::size_t i = 0; i < r.curve.error_bound.size(); ++i)
    if (r.curve.error_bound[i] > 0) r.open_stations.push_back(stations[i]);
  r.how = q.mach == 1.0 ? "normal cuts (M = 1)"
                        : "Mach-plane cuts at M = " + short_number(q.mach) + ", roll " +
                              short_number(q.roll_deg) + "°, areas projected on a plane normal to the flow";
  if (model_.united) r.how += "; overlapping shells united";
  if (q.with_ends) r.how += "; ends closed as for the drag (wakes added, captured stream tubes subtracted)";
  return r;
}

Section Study::section(const MachPlanes& planes, double station) const {
  return engine().section(planes, station);
}

const WaveDragModel& Study::drag_model(const WaveDragOptions& options) const {
  require_usable();
  const SectionEngine& e = engine();
  std::lock_guard<std::mutex> lock(mutex_);
  auto& slot = drag_models_[drag_key(options)];
  if (!slot) {
    WaveDragOptions o = options;
    o.progress = nullptr;
    // The shells as in the files name the part each validity feature lies on.
    slot = std::make_unique<WaveDragModel>(e, treatment_.given, o, treatment_.tubes, &model_.mesh);
  }
  return *slot;
}

MachDrag Study::drag_at(double mach, const WaveDragOptions& options) const {
  checked_mach(mach, "--mach");
  const WaveDragModel& wdm = drag_model(options);
  {
    std::lock_guard<std::mutex> lock(mutex_);
    const auto it = drags_.find({&wdm, mach});
    if (it != drags_.end()) return it->second;
  }
  MachDrag d = wdm.at_mach(mach);
  std::lock_guard<std::mutex> lock(mutex_);
  drags_.emplace(std::make_pair(&wdm, mach), d);
  return d;
}

DragSweep Study::drag(const std::vector<double>& machs, const WaveDragOptions& options,
                      const std::function<void(double)>& progress) const {
  DragSweep out;
  const WaveDragModel& wdm = drag_model(options);
  out.measures = measures();
  out.uses_grid = wdm.uses_grid();
  out.symmetry = wdm.symmetry();
  out.method = out.uses_grid
                   ? "supersonic area rule (Jones 1956); von Karman slender-body integral of the "
                     "exact Mach-plane area curve of the mesh on a uniform slope grid; adaptive "
                     "roll quadrature"
                   : "supersonic area rule (Jones 1956); Eminton-Lord least-drag curve through "
                     "the Mach-plane areas (Eminton 1955); adaptive roll quadrature";
  for (std::size_t k = 0; k < machs.size(); ++k) {
    if (progress) progress(static_cast<double>(k) / static_cast<double>(machs.size()));
    out.results.push_back(drag_at(machs[k], options));
  }
  if (progress) progress(1.0);
  return out;
}

std::vector<EquivalentBody> Study::equivalent_bodies(const std::vector<double>& machs,
                                                    const WaveDragOptions& options) const {
  std::vector<double> ms{1.0};
  for (double m : checked_machs(machs, "--mach", true))
    if (m > 1.0) ms.push_back(m);
  const WaveDragModel& wdm = drag_model(options);
  std::vector<EquivalentBody> bodies;
  for (double m : ms) bodies.push_back(equivalent_body(wdm, m, 201, 36));
  return bodies;
}

SurfaceSensitivity Study::sensitivity(double mach, const SensitivityOptions& options) const {
  checked_mach(mach, "--mach");
  if (options.cells < 64 || options.cells > (1 << 20)) throw InputError("--cells", "use 64 to 1048576 cells");
  if (options.rolls < 4 || options.rolls > 4096) throw InputError("--rolls", "use 4 to 4096 roll angles");
  return surface_sensitivity(drag_model({}), engine().mesh(), mach, options);
}

AreaCurve Study::design_curve(double mach, int stations) const {
  AreaRequest q;
  q.mach = mach;
  q.stations = stations;
  q.with_ends = true;
  return area(q).curve;
}

std::vector<AreaJump> Study::jumps(const std::vector<double>& machs, int stations, int keep,
                                   const std::function<void(double)>& progress) const {
  std::vector<double> ms = checked_machs(machs, "--mach", true);
  if (ms.empty() || ms.front() != 1.0) ms.insert(ms.begin(), 1.0);
  const WaveDragModel& wdm = drag_model({});
  std::vector<AreaJump> all;
  for (std::size_t mi = 0; mi < ms.size(); ++mi) {
    if (progress) progress(static_cast<double>(mi) / static_cast<double>(ms.size()));
    const double m = ms[mi];
    // The curves the drag integrates (ends closed) at evenly spaced roll angles on common
    // stations X; the jumps are found on their roll average and each one's share is that of
    // the roll-averaged D/q: the mean over the rolls of the drag change when the jump's region
    // is smoothed in that roll's curve, over the mean drag (docs/method.md §8.4).
    const int n_rolls = m > 1.0 ? kJumpRolls : 1;
    std::vector<double> rolls;
    for (int k = 0; k < n_rolls; ++k) rolls.push_back(m > 1.0 ? 360.0 * (k + 0.5) / n_rolls : 0.0);
    StationRange all_range{HUGE_VAL, -HUGE_VAL};
    for (double t : rolls) {
      const StationRange r = engine().range({m, t});
      all_range.lo = std::min(all_range.lo, r.lo);
      all_range.hi = std::max(all_range.hi, r.hi);
    }
    if (!(all_range.hi > all_range.lo)) continue;
    AreaCurve mean;
    mean.mach = m;
    mean.united = model_.united;
    mean.x = make_stations(all_range, stations, Spacing::uniform);
    mean.area.assign(mean.x.size(), 0.0);
    mean.per_shell.assign(part_names().size(), std::vector<double>(mean.x.size(), 0.0));
    std::vector<AreaCurve> per_roll;
    for (double t : rolls) {
      AreaCurve c;
      c.mach = m;
      c.roll_deg = t;
      c.x = mean.x;
      c.area = wdm.areas(m, t, c.x);
      std::vector<std::vector<double>> own;
      parts_engine().areas({m, t}, c.x, &own);
      for (std::size_t i = 0; i < c.x.size(); ++i) mean.area[i] += c.area[i] / n_rolls;
      for (std::size_t p = 0; p < own.size() && p < mean.per_shell.size(); ++p)
        for (std::size_t i = 0; i < c.x.size(); ++i) mean.per_shell[p][i] += own[p][i] / n_rolls;
      per_roll.push_back(std::move(c));
    }
    std::vector<AreaJump> found = find_jumps(mean, {});
    double d_mean = 0.0;
    for (const AreaCurve& c : per_roll) d_mean += eminton_lord_drag(c.x, c.area) / n_rolls;
    for (AreaJump& j : found) {
      double change = 0.0;
      for (const AreaCurve& c : per_roll)
        change += (eminton_lord_drag(c.x, c.area) - eminton_lord_drag(c.x, smooth_region(c, j.x_from, j.x_to, j.window))) /
                  n_rolls;
      j.drag_change = change;
      j.share = d_mean != 0.0 ? change / d_mean : 0.0;
    }
    all.insert(all.end(), found.begin(), found.end());
  }
  std::stable_sort(all.begin(), all.end(), [](const AreaJump& a, const AreaJump& b) { return a.share > b.share; });
  if (keep >= 0 && all.size() > static_cast<std::size_t>(keep)) all.resize(static_cast<std::size_t>(keep));
  return all;
}

TargetResult Study::target(const TargetRequest& q) const {
  require_usable();
  TargetResult t;
  const StudyMeasures& mm = measures();
  LeastDragProblem& p = t.problem;
  checked_mach(q.mach, "--mach");
  if (q.mach == 1.0) {
    t.curve = design_curve(1.0, q.stations);
    p.x0 = mm.x0;
    p.length = mm.length;
  } else {
    // The equivalent body at this Mach: it spans the union of the rolls' station ranges, and
    // ∫S̄ dX is the model's volume (each roll's is: docs/method.md §3.2).
    const EquivalentBody b = equivalent_body(drag_model({}), q.mach, q.stations, 36);
    t.curve.mach = q.mach;
    t.curve.x = b.x;
    t.curve.area = b.area;
    p.x0 = b.x.front();
    p.length = b.x.back() - b.x.front();
  }
  p.volume = mm.volume;
  std::vector<std::string>& lines = t.constraints;
  lines.push_back((q.mach == 1.0 ? "same length as the model: " : "same length as the model's Mach-plane station range: ") +
                  short_number(p.length) + " m, from " + (q.mach == 1.0 ? "x" : "X") + " = " + short_number(p.x0) + " m");
  lines.push_back("same volume as the model: " + short_number(mm.volume) + " m³");
  if (q.base == "model") p.base_area = mm.base_area;
  else if (q.base == "closed") p.base_area = 0.0;
  else if (q.base != "free") {
    p.base_area = parse_number(q.base, "--base-area");
    if (*p.base_area < 0.0) throw InputError("--base-area", "a base area must be >= 0 m², not " + short_number(*p.base_area));
  }
  lines.push_back(p.base_area ? "base area " + short_number(*p.base_area) + " m²" +
                                    (q.base == "model" ? " (the model's, as the drag closes it)" : "")
                              : std::string("base area free"));
  for (const std::string& f : q.fix) {
    const auto colon = f.find(':');
    AreaPin pin;
    pin.x = parse_number(f.substr(0, colon), "--fix");
    if (!(pin.x > p.x0 && pin.x < p.x0 + p.length))
      throw InputError("--fix", "station " + short_number(pin.x) + " m is not inside the body (" +
                                    short_number(p.x0) + " to " + short_number(p.x0 + p.length) + " m)");
    pin.area = colon == std::string::npos ? area_at(t.curve, pin.x) : parse_number(f.substr(colon + 1), "--fix");
    if (pin.area < 0.0) throw InputError("--fix", "an area must be >= 0 m², not " + short_number(pin.area));
    p.pins.push_back(pin);
    lines.push_back("area " + short_number(pin.area) + " m² kept at x = " + short_number(pin.x) + " m");
  }
  if (q.max_area != 0.0) {
    if (!(q.max_area > 0.0) || !std::isfinite(q.max_area))
      throw InputError("--max-area", "the largest area must be a positive number of m², not " + short_number(q.max_area));
    p.max_area = q.max_area;
    lines.push_back("area at most " + short_number(q.max_area) + " m²");
  }
  t.body = least_drag_body(p);
  t.correction = correction_to(t.curve, t.body);
  return t;
}

std::function<void(double)> progress_phase(const std::function<void(double)>& progress, double from,
                                           double span) {
  return [&progress, from, span](double f) {
    if (progress) progress(from + span * f);
  };
}

std::string drag_status(const MachDrag& d) {
  if (!d.ok) return d.problem;
  if (d.converged) return "";
  if (d.resolution_limited) return d.time_limited ? "resolution-limited: time budget" : "resolution-limited";
  return "not converged";
}

std::vector<std::string> health_lines(const PreparedModel& model) {
  const HealthReport& h = model.health;
  std::vector<std::string> lines;
  std::ostringstream s;
  s << model.mesh.shell_names.size() << " shell(s), " << h.triangles << " triangles; "
    << (h.closed ? "all shells closed" : "open shells (holes closed for the analysis; areas carry error bounds)")
    << (model.united ? "; overlapping shells united" : "");
  lines.push_back(s.str());
  for (const std::string& n : model.notes) lines.push_back(n);
  for (const std::string& w : model.warnings) lines.push_back("warning: " + w);
  return lines;
}

ReportInput Study::report_input(const ReportRequest& q, const std::function<void(double)>& progress) const {
  require_usable();
  const std::vector<double> machs = checked_machs(q.machs, "--mach", true);
  ReportInput in;
  for (const std::string& f : model_.files)
    in.title += (in.title.empty() ? "" : ", ") + std::filesystem::path(f).filename().string();
  in.version = q.version;
  in.health = health_lines(model_);
  for (const std::string& n : end_notes()) in.health.push_back("wave drag: " + n);
  in.shell_names = part_names();
  // Phases: target and design curves, the drag sweep, the jumps.
  auto curves_done = progress_phase(progress, 0.0, 0.15);
  // The target first: a bad --fix or --base-area is reported before the long sweep.
  TargetResult t = target(q.target);
  in.constraints = std::move(t.constraints);
  in.target = t.body;
  in.correction = std::move(t.correction);
  in.curves.push_back(std::move(t.curve));
  for (std::size_t k = 0; k < machs.size(); ++k)
    if (const double m = machs[k]; m > 1.0) {
      curves_done(static_cast<double>(k) / static_cast<double>(machs.size()));
      in.curves.push_back(design_curve(m, q.stations));
      TargetRequest tq = q.target;
      tq.mach = m;
      try {
        TargetResult tm = target(tq);
        in.mach_corrections.push_back({m, tm.body, std::move(tm.correction)});
      } catch (const InputError& e) {
        // e.g. a --fix station outside this Mach's station range: said in the report
        in.constraints.push_back("no correction at M = " + short_number(m) + ": " + e.what());
      }
    }
  std::vector<double> sweep = machs;
  if (sweep.empty() || sweep.front() > 1.0) sweep.insert(sweep.begin(), 1.0);
  const DragSweep d = drag(sweep, q.drag, progress_phase(progress, 0.15, 0.7));
  for (const MachDrag& r : d.results)
    in.drag.push_back({r.mach, r.drag_area, r.error_estimate, r.ok, drag_status(r), r.advice});
  const StudyMeasures& mm = measures();
  in.measures = measure_curve(in.curves.front());
  in.measures.x0 = mm.x0;
  in.measures.length = mm.length;
  in.measures.volume = mm.volume;
  in.measures.base_area = mm.base_area;
  in.sears_haack_drag_area = mm.sears_haack_drag_area;
  in.reference_area = q.reference_area;
  in.jumps = jumps(machs, q.stations, 15, progress_phase(progress, 0.85, 0.15));
  if (progress) progress(1.0);
  return in;
}

}  // namespace machcut
