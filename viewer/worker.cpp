#include "worker.h"

#include <chrono>
#include <cstdio>
#include <cmath>
#include <algorithm>
#include <exception>
#include <stdexcept>

#include "machcut/common/errors.h"
#include "machcut/design/jumps.h"
#include "machcut/intake/edge_flaws.h"
#include "machcut/design/optimum.h"
#include "machcut/sections/plane_and_slope.h"
#include "model_source.h"
#include "machcut/drag/wave_drag.h"

namespace machcut::view {

namespace {

double ms_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - t0).count();
}


}  // namespace

HealthView health_view(const PreparedModel& m) {
  HealthView h;
  h.lines = health_lines(m);
  // The mesh shown has its holes closed by fans: the loops are the file's boundary; what
  // find_edge_flaws still finds is boundary left open (a model refused before closing) and
  // non-manifold edges (a wrapped part's are gone with its surface).
  const EdgeFlaws f = find_edge_flaws(m.mesh);
  std::vector<std::vector<std::uint32_t>> loops;
  for (const Hole& hole : m.holes) loops.push_back(hole.loop);
  std::vector<std::array<std::uint32_t, 2>> open = hole_edges(loops);
  open.insert(open.end(), f.boundary.begin(), f.boundary.end());
  h.boundary_edges = m.health.boundary_edges;
  h.nonmanifold_edges = m.health.nonmanifold_edges;
  h.boundary_xyz = edge_segments(m.mesh, open);
  h.nonmanifold_xyz = edge_segments(m.mesh, f.nonmanifold);
  for (const LeftOut& l : m.left_out) h.left_out.push_back({l.name, l.why, l.triangles});
  if (!m.set_aside.triangles.empty()) {
    std::vector<std::uint32_t> all(m.set_aside.triangles.size());
    for (std::size_t i = 0; i < all.size(); ++i) all[i] = static_cast<std::uint32_t>(i);
    h.set_aside_xyz = triangle_soup(m.set_aside, all);
    h.set_aside_edges = wireframe_segments(m.set_aside);
  }
  for (const WrappedShell& w : m.wraps)
    h.parts.push_back({w.shell < m.mesh.shell_names.size() ? m.mesh.shell_names[w.shell] : "?", "wrapped", w.why});
  if (!m.usable) h.parts.push_back({"model", "refused", m.reason});
  return h;
}

std::shared_ptr<const CurveResult> compute_curve(const Study& study, const CurveKey& key) {
  const auto t0 = std::chrono::steady_clock::now();
  auto r = std::make_shared<CurveResult>();
  r->key = key;
  const MachPlanes planes = planes_of(key);
  r->range = study.engine().range(planes);
  if (r->range.hi > r->range.lo) {
    AreaRequest q;
    q.mach = planes.mach;
    q.roll_deg = planes.roll_deg;
    q.stations = key.stations;
    r->curve = study.area(q).curve;
    if (!study.end_notes().empty()) {
      q.with_ends = true;
      r->closed = study.area(q).curve.area;
    }
  } else {
    r->curve.mach = planes.mach;
    r->curve.roll_deg = planes.roll_deg;
  }
  r->curve.united = key.united;
  r->volume = measure_curve(r->curve).volume;
  // Sears–Haack body of the model's length and volume (closed, base area 0), as `machcut drag`
  // states it: the body length along the flow, not the Mach-plane station range.
  const StudyMeasures& m = study.measures();
  if (m.length > 0.0 && m.volume > 0.0) {
    for (double xi : r->curve.x) r->sears_haack.push_back(sears_haack_area(m.x0, m.length, m.volume, xi));
    r->sears_haack_dq = m.sears_haack_drag_area;
  }
  r->slope = area_slope(r->curve.x, r->curve.area);
  r->jumps = find_jumps(r->curve, {});  // ranked by size; drag shares are not needed here
  r->compute_ms = ms_since(t0);
  return r;
}

std::shared_ptr<const SensitivityView> compute_sensitivity(const Study& study, double mach) {
  auto v = std::make_shared<SensitivityView>();
  v->mach = mach;
  try {
    const SurfaceSensitivity s = study.sensitivity(mach);
    const Mesh& mesh = study.engine().mesh();
    // The clip from the vertices that carry surface (an unused vertex has s = 0 and no area).
    std::vector<double> used;
    for (std::size_t i = 0; i < s.per_volume.size(); ++i)
      if (i < s.vertex_area.size() && s.vertex_area[i] > 0.0) used.push_back(s.per_volume[i]);
    v->clip = robust_clip(used, kSensitivityClipQuantile);
    for (double x : used)
      if (std::isfinite(x)) v->max_abs = std::max(v->max_abs, std::fabs(x));
    v->paint = paint_per_vertex(mesh, s.per_volume, v->clip);
    v->drag_area = s.drag_area;
    v->how = s.how;
    v->ok = !v->paint.empty();
    if (!v->ok) v->problem = "the sensitivity does not match the analysed mesh";
  } catch (const std::exception& e) {
    v->ok = false;
    v->problem = e.what();
  }
  return v;
}

Worker::Worker(std::size_t lod_triangles) : lod_triangles_(lod_triangles) {
  heavy_ = std::thread([this] { heavy_loop(); });
  light_ = std::thread([this] { light_loop(); });
  drag_ = std::thread([this] { drag_loop(); });
  sensitivity_ = std::thread([this] { sensitivity_loop(); });
}

Worker::~Worker() {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    stop_ = true;
    generation_.fetch_add(1);  // cancels running drag work
  }
  heavy_cv_.notify_all();
  light_cv_.notify_all();
  heavy_.join();
  light_.join();
  drag_.join();
  sensitivity_.join();
}

void Worker::load(LoadJob job) {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    load_job_ = std::move(job);
    curve_job_.reset();
    section_job_.reset();
    drag_job_.reset();
    sensitivity_job_.reset();
    generation_.fetch_add(1);
  }
  heavy_cv_.notify_all();
}

void Worker::request_curve(const CurveKey& key) {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    curve_job_ = key;
  }
  heavy_cv_.notify_all();
}

void Worker::request_section(const MachPlanes& planes, double station) {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    section_job_ = std::make_pair(planes, station);
  }
  light_cv_.notify_all();
}

void Worker::request_drag(double mach, int stations) {
  if (!drag_available()) return;
  {
    std::lock_guard<std::mutex> lock(mutex_);
    drag_job_ = std::make_pair(mach, stations);
    drag_serial_.fetch_add(1);
  }
  light_cv_.notify_all();
}

void Worker::request_sensitivity(double mach) {
  {
    std::lock_guard<std::mutex> lock(mutex_);
    sensitivity_job_ = mach;
    sensitivity_serial_.fetch_add(1);
  }
  light_cv_.notify_all();
}

void Worker::sensitivity_loop() {
  for (;;) {
    std::unique_lock<std::mutex> lock(mutex_);
    light_cv_.wait(lock, [&] { return stop_ || (study_ && sensitivity_job_ && !load_job_); });
    if (stop_) return;
    const double mach = *sensitivity_job_;
    sensitivity_job_.reset();
    const std::uint64_t gen = generation_.load();
    const std::uint64_t serial = sensitivity_serial_.load();
    auto study = study_;
    sensitivity_running_ = true;
    lock.unlock();
    auto r = compute_sensitivity(*study, mach);
    lock.lock();
    if (!cancelled(gen) && sensitivity_serial_.load() == serial) out_.sensitivity = std::move(r);
    sensitivity_running_ = false;
  }
}

std::shared_ptr<const Study> Worker::study() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return study_;
}

WorkerOutput Worker::take() {
  std::lock_guard<std::mutex> lock(mutex_);
  WorkerOutput o = std::move(out_);
  out_ = WorkerOutput{};
  return o;
}

WorkerStatus Worker::status() const {
  std::lock_guard<std::mutex> lock(mutex_);
  WorkerStatus s;
  s.busy = heavy_running_ || load_job_ || curve_job_;
  s.progress = progress_;
  s.label = label_;
  s.drag_busy = drag_running_ || drag_job_;
  s.drag_progress = drag_progress_;
  s.drag_label = drag_label_;
  s.sensitivity_busy = sensitivity_running_ || sensitivity_job_;
  return s;
}

bool Worker::idle() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return !heavy_running_ && !light_running_ && !drag_running_ && !sensitivity_running_ && !load_job_ &&
         !curve_job_ && !section_job_ && !drag_job_ && !sensitivity_job_;
}

void Worker::set_progress(const std::string& label, float fraction) {
  std::lock_guard<std::mutex> lock(mutex_);
  label_ = label;
  progress_ = fraction;
}

void Worker::heavy_loop() {
  for (;;) {
    std::unique_lock<std::mutex> lock(mutex_);
    heavy_cv_.wait(lock, [&] { return stop_ || load_job_ || (study_ && curve_job_); });
    if (stop_) return;
    const std::uint64_t gen = generation_.load();
    heavy_running_ = true;
    if (load_job_) {
      LoadJob job = std::move(*load_job_);
      load_job_.reset();
      lock.unlock();
      run_load(job, gen);
    } else {
      const CurveKey key = *curve_job_;
      curve_job_.reset();
      auto study = study_;
      label_ = "area curve";
      progress_ = 0.0f;
      lock.unlock();
      std::shared_ptr<const CurveResult> r;
      try {
        r = compute_curve(*study, key);
      } catch (const std::exception&) {
        r = nullptr;  // a curve the core refuses (e.g. an option out of range) is not shown
      }
      lock.lock();
      if (!cancelled(gen) && r) out_.curves.push_back(std::move(r));
      lock.unlock();
    }
    lock.lock();
    heavy_running_ = false;
    label_.clear();
    progress_ = 0.0f;
  }
}

void Worker::light_loop() {
  for (;;) {
    std::unique_lock<std::mutex> lock(mutex_);
    light_cv_.wait(lock, [&] { return stop_ || (study_ && section_job_); });
    if (stop_) return;
    const auto [planes, station] = *section_job_;
    section_job_.reset();
    auto study = study_;
    const std::uint64_t gen = generation_.load();
    light_running_ = true;
    lock.unlock();
    auto s = std::make_shared<const Section>(study->section(planes, station));
    lock.lock();
    if (!cancelled(gen)) out_.section = std::move(s);
    light_running_ = false;
  }
}

void Worker::drag_loop() {
  for (;;) {
    std::unique_lock<std::mutex> lock(mutex_);
    light_cv_.wait(lock, [&] { return stop_ || (study_ && drag_job_ && !load_job_); });
    if (stop_) return;
    const auto [mach, stations] = *drag_job_;
    drag_job_.reset();
    const std::uint64_t gen = generation_.load();
    drag_running_ = true;
    lock.unlock();
    run_drag(mach, stations, gen);
    lock.lock();
    drag_running_ = false;
    drag_label_.clear();
    drag_progress_ = 0.0f;
  }
}

void Worker::run_load(const LoadJob& job, std::uint64_t generation) {
  const auto t0 = std::chrono::steady_clock::now();
  LoadOutcome o;
  o.files = job.files;
  std::shared_ptr<const Study> study;
  try {
    set_progress("reading", 0.0f);
    const auto progress = [this](const std::string& stage, double f) { set_progress(stage, static_cast<float>(f)); };
    if (job.generated_triangles > 0) {
      EndSetup ends;
      ends.captures = job.controls.captures;
      study = std::make_shared<const Study>(generated_model(job.generated_triangles), ends);
    } else {
      study = open_study(job.files, job.controls, progress);
    }
    const PreparedModel& m = study->model();
    // A model whose every part was left out (e.g. one flat sheet) still shows them (set_aside).
    if (m.mesh.triangles.empty() && m.set_aside.triangles.empty()) throw InputError(job.files.empty() ? "" : job.files.front(), "no triangles");
    set_progress("preparing view", 0.9f);
    o.display = std::make_shared<const DisplayMesh>(make_display_mesh(m.mesh, lod_triangles_));
    o.summary.triangles = m.mesh.triangles.size();
    o.summary.analysis_triangles = m.analysis.triangles.size();
    o.summary.box = bounding_box(m.mesh);
    for (const Vec3& p : m.set_aside.positions) expand(o.summary.box, p);  // frame what is left out too
    o.summary.analysable = m.usable;
    o.summary.reason = m.reason;
    o.summary.volume = m.usable ? study->measures().volume : m.health.volume;
    o.summary.united = m.united;
    for (std::size_t i = 0; i < shell_count(m.mesh); ++i) {
      ShellView v;
      v.name = m.mesh.shell_names[i];
      shell_colour(i, v.colour);
      o.shells.push_back(v);
    }
    for (std::uint32_t s : m.mesh.shell) ++o.shells[std::min<std::size_t>(s, o.shells.size() - 1)].triangles;
    o.health = health_view(m);
    for (const WrappedShell& w : m.wraps)
      if (w.shell < o.shells.size()) {
        o.shells[w.shell].wrapped = true;
        o.shells[w.shell].why = w.why;
        wrapped_colour(o.shells[w.shell].colour);
      }
    o.notes = m.notes;
    for (const std::string& n : study->end_notes()) o.notes.push_back("wave drag: " + n);
    o.warnings = m.warnings;
    o.ok = true;
  } catch (const InputError& e) {
    o.error = e.what();
  } catch (const std::bad_alloc&) {
    o.error = "out of memory while loading the model";
  } catch (const std::exception& e) {
    o.error = std::string("internal error while loading: ") + e.what();
  }
  o.summary.load_ms = ms_since(t0);
  std::lock_guard<std::mutex> lock(mutex_);
  if (cancelled(generation)) return;
  if (o.ok && o.summary.analysable) study_ = std::move(study);
  else study_.reset();
  out_.load = std::move(o);
  out_.curves.clear();
  out_.section.reset();
  out_.drag.reset();
  out_.sensitivity.reset();
  light_cv_.notify_all();
}

namespace {
double wrap360(double deg) {
  double v = std::fmod(deg, 360.0);
  return v < 0 ? v + 360.0 : v;
}
}  // namespace

// D/q with the CLI's default options (study.h caches each Mach, so a Mach asked again is
// immediate and equals `machcut drag`'s value). A replaced request stops between Mach numbers.
void Worker::run_drag(double mach, int /*stations*/, std::uint64_t generation) {
  const std::shared_ptr<const Study> study = this->study();
  const std::uint64_t serial = drag_serial_.load();
  auto stale = [&] { return cancelled(generation) || drag_serial_.load() != serial; };
  auto show = [&](const char* label, float fraction) {
    std::lock_guard<std::mutex> lock(mutex_);
    drag_label_ = label;
    drag_progress_ = fraction;
  };
  auto d = std::make_shared<DragResult>();
  d->mach = mach;
  try {
    const double machs[] = {1.0, 1.1, 1.2, 1.3, 1.5, 1.75, 2.0, 2.5, 3.0};
    const int count = static_cast<int>(std::size(machs));
    show("D/q per roll angle", 0.0f);
    const MachDrag here = study->drag_at(mach);
    d->available = here.ok;
    if (!here.ok) throw std::runtime_error(here.problem);
    if (stale()) return;
    // The samples and their mirror images (D(θ) = D(180° − θ) left–right, D(−θ) up–down), so
    // that the plot covers the whole turn.
    std::vector<std::pair<double, double>> rolls;
    const bool lr = here.symmetry == RollSymmetry::left_right || here.symmetry == RollSymmetry::both;
    const bool ud = here.symmetry == RollSymmetry::up_down || here.symmetry == RollSymmetry::both;
    for (const RollSample& r : here.rolls) {
      const double v = r.ok ? r.drag_area : NAN;
      rolls.emplace_back(wrap360(r.roll_deg), v);
      if (lr) rolls.emplace_back(wrap360(180.0 - r.roll_deg), v);
      if (ud) rolls.emplace_back(wrap360(-r.roll_deg), v);
      if (lr && ud) rolls.emplace_back(wrap360(180.0 + r.roll_deg), v);
    }
    std::sort(rolls.begin(), rolls.end());
    rolls.erase(std::unique(rolls.begin(), rolls.end(),
                            [](const auto& a, const auto& b) { return std::fabs(a.first - b.first) < 1e-9; }),
                rolls.end());
    for (const auto& [t, v] : rolls) {
      d->roll_deg.push_back(t);
      d->roll_dq.push_back(v);
    }
    d->total_dq = here.drag_area;
    const std::string status = drag_status(here);
    char note[256];
    std::snprintf(note, sizeof note, "D/q %.5g m² ± %.2g%s%s%s · %d cells · %d rolls · symmetry %s",
                  here.drag_area, here.error_estimate, status.empty() ? "" : " (", status.c_str(),
                  status.empty() ? "" : ")", here.stations, here.roll_evaluations, symmetry_name(here.symmetry));
    d->note = note;
    d->resolution_limited = here.resolution_limited;
    d->time_limited = here.time_limited;
    d->growth_per_halving = here.growth_per_halving;
    d->length_floor = here.length_floor;
    d->advice = here.advice;
    // The features' triangles index the analysis mesh (the union when shells overlap), not
    // the mesh shown: paint them from the analysis mesh's own positions, feature by feature.
    for (const ValidityFeature& f : here.features) {
      FeatureView v{f.part, f.x_from, f.x_to, f.frontal_area, f.drag_share, f.growth, f.triangles.size()};
      const std::vector<float> soup = triangle_soup(study->model().analysis, f.triangles);
      v.first_painted = d->feature_xyz.size() / 9;
      v.painted = soup.size() / 9;
      d->feature_xyz.insert(d->feature_xyz.end(), soup.begin(), soup.end());
      d->features.push_back(std::move(v));
    }
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (!stale()) out_.drag = std::make_shared<const DragResult>(*d);
    }
    for (int k = 0; k < count; ++k) {
      if (stale()) return;
      show("D/q against Mach", static_cast<float>(k + 1) / (count + 1));
      const MachDrag m = study->drag_at(machs[k]);
      d->mach_values.push_back(machs[k]);
      d->mach_dq.push_back(m.ok ? m.drag_area : NAN);
      d->mach_problem.push_back(m.ok ? std::string() : m.problem);
      d->mach_limited.push_back(m.ok && m.resolution_limited);
    }
    d->mach_sweep_done = true;
  } catch (const std::exception& e) {
    d->available = false;
    d->note = std::string("drag not computed: ") + e.what();
    d->mach_sweep_done = true;
  }
  std::lock_guard<std::mutex> lock(mutex_);
  if (!stale()) out_.drag = std::move(d);
}

}  // namespace machcut::view
