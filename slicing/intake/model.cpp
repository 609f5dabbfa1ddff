// From files to an analysable model: the pipeline of model.h.
#include "machcut/intake/model.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <optional>

#include "machcut/intake/holes.h"
#include "machcut/intake/model_cache.h"
#include "machcut/intake/union.h"

namespace machcut {

namespace {

void report_progress(const ModelSetup& setup, const char* stage, double fraction) {
  if (setup.progress) setup.progress(stage, fraction);
}

std::string fmt(const char* format, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

void warn_health(const HealthReport& h, PreparedModel& pm) {
  for (const ShellHealth& s : h.shells) {
    if (s.nonmanifold_edges > 0)
      pm.warnings.push_back(s.name + ": " + std::to_string(s.nonmanifold_edges) +
                            " non-manifold edge(s) (three or more triangles on one edge)");
    if (s.degenerate_triangles > 0)
      pm.warnings.push_back(s.name + ": " + std::to_string(s.degenerate_triangles) +
                            " degenerate (zero-area) triangle(s)");
    if (!s.oriented)
      pm.warnings.push_back(s.name + ": orientation could not be made consistent");
  }
}

// Closes holes and re-checks the orientation of shells that were open; false when unusable.
bool close_model_holes(PreparedModel& pm, OrientationFix& fix) {
  HoleClosing hc = close_holes(pm.mesh);
  if (!hc.ok) {
    pm.reason = "too broken to bound: " + hc.reason;
    return false;
  }
  pm.holes = std::move(hc.holes);
  merge_fix(fix, fix_orientation(pm.mesh));  // shells closed now can be turned outward
  double total = 0.0;
  for (const Hole& h : pm.holes) total += h.projected_area;
  for (const ShellHealth& s : pm.health.shells)
    if (s.boundary_edges > 0)
      pm.warnings.push_back(s.name + ": open (" + std::to_string(s.boundary_edges) +
                            " boundary edges); holes closed for the analysis");
  pm.notes.push_back(std::to_string(pm.holes.size()) + " hole(s) closed by fans; projected " +
                     "area " + fmt("%.6g", total) + " m² bounds the area error at their stations");
  pm.reason = holes_too_large(pm.mesh, pm.holes);
  return pm.reason.empty();
}

// Volumes, inversion and flip counts after hole closing (boundary counts stay as found).
void update_after_holes(PreparedModel& pm, const OrientationFix& fix) {
  const std::vector<double> vol = shell_volumes(pm.mesh);
  pm.health.volume = 0.0;
  for (std::size_t s = 0; s < pm.health.shells.size(); ++s) {
    ShellHealth& sh = pm.health.shells[s];
    sh.volume = vol[s];
    sh.flipped_faces = fix.flipped_faces[s];
    sh.inverted = fix.inverted[s];
    pm.health.volume += vol[s];
  }
}

std::vector<bool> closed_after_holes(const PreparedModel& pm) {
  std::vector<bool> closed;
  for (const ShellHealth& s : pm.health.shells)
    closed.push_back(s.closed || (s.nonmanifold_edges == 0 && s.oriented && !pm.holes.empty()));
  return closed;
}

void record_overlaps(const OverlapReport& o, PreparedModel& pm) {
  pm.health.overlaps_checked = true;
  pm.health.intersecting = o.intersecting;
  pm.health.contained = o.contained;
  for (std::uint32_t s : o.untested)
    pm.warnings.push_back(pm.mesh.shell_names[s] + ": not tested for overlaps (not a manifold "
                                                   "surface); overlaps may be counted twice");
}

// Unites overlapping shells (or sums them when setup.unite is false) into pm.analysis.
void unite_or_sum(const ModelSetup& setup, const OverlapReport& o, PreparedModel& pm) {
  const bool overlaps = !o.intersecting.empty() || !o.contained.empty();
  pm.analysis = pm.mesh;
  pm.health.volume_is_union = !overlaps;
  if (!overlaps) return;
  if (!setup.unite) {
    pm.warnings.push_back("overlapping shells are summed (--sum): their common volume counts "
                          "twice in the areas");
    return;
  }
  report_progress(setup, "union", 0.0);
  UnionResult u = unite_overlapping(pm.mesh, closed_after_holes(pm), o);
  pm.health.self_intersecting.insert(pm.health.self_intersecting.end(), u.self_intersecting.begin(),
                                     u.self_intersecting.end());
  for (const std::string& r : u.refused)
    pm.warnings.push_back(r + "; their areas are summed (overlap counted twice)");
  if (u.groups.empty()) return;
  pm.analysis = std::move(u.mesh);
  pm.united = true;
  pm.health.volume_is_union = u.refused.empty();
  std::size_t shells = 0;
  for (const auto& g : u.groups) shells += g.size();
  pm.notes.push_back(std::to_string(shells) + " overlapping shells united into " +
                     std::to_string(u.groups.size()) + " in " + fmt("%.2f", u.seconds) + " s (" +
                     std::to_string(u.triangles_in) + " triangles)");
  report_progress(setup, "union", 1.0);
}

// Shell s's own normal-cut areas at `x`.
std::vector<double> own_areas(const Mesh& mesh, std::uint32_t s, const std::vector<double>& x) {
  return SectionEngine(extract_shell(mesh, s)).areas({1.0, 0.0}, x);
}

// Triage of the shells that cannot be used as they are: a shell that intersects itself, has
// non-manifold edges or is non-orientable is replaced by its alpha wrap (union.h), with the
// change of its volume and of its areas reported (docs/method.md §2.4); with setup.strict
// the model is refused instead.
void wrap_broken_shells(const ModelSetup& setup, PreparedModel& pm) {
  std::vector<std::pair<std::uint32_t, std::string>> broken;
  std::vector<bool> closed = closed_after_holes(pm);
  for (std::uint32_t s = 0; s < pm.health.shells.size(); ++s) {
    const ShellHealth& h = pm.health.shells[s];
    if (!h.oriented) broken.push_back({s, "non-orientable (its inside is undefined)"});
    else if (h.nonmanifold_edges > 0) broken.push_back({s, std::to_string(h.nonmanifold_edges) + " non-manifold edges"});
    if (!broken.empty() && broken.back().first == s) closed[s] = false;
  }
  report_progress(setup, "self-intersections", 0.0);
  std::vector<std::uint32_t> not_manifold;
  for (std::uint32_t s : self_intersecting_shells(pm.mesh, closed, &not_manifold)) {
    broken.push_back({s, "its surface intersects itself"});
    pm.health.self_intersecting.push_back(s);
  }
  for (std::uint32_t s : not_manifold) broken.push_back({s, "its surface is not a manifold (sheets meet at a vertex)"});
  report_progress(setup, "self-intersections", 1.0);
  // A flat shell (a sheet, closed by its holes onto itself) has no volume to wrap: it is left
  // for finish() to name as flat.
  const std::vector<double> vol = shell_volumes(pm.mesh);
  const std::vector<Box3> boxes = [&] {
    std::vector<Box3> b(shell_count(pm.mesh));
    for (std::size_t i = 0; i < pm.mesh.triangles.size(); ++i)
      for (std::uint32_t v : pm.mesh.triangles[i]) expand(b[pm.mesh.shell[i]], pm.mesh.positions[v]);
    return b;
  }();
  std::erase_if(broken, [&](const auto& b) {
    const double d = is_empty(boxes[b.first]) ? 0.0 : norm(boxes[b.first].hi - boxes[b.first].lo);
    return !(std::fabs(vol[b.first]) > 1e-6 * d * d * d);
  });
  if (broken.empty()) return;
  std::sort(broken.begin(), broken.end());
  if (setup.strict) {
    pm.reason = pm.mesh.shell_names[broken.front().first] + ": " + broken.front().second +
                " (--strict: no alpha wrap)";
    return;
  }
  std::vector<std::vector<std::uint32_t>> by(shell_count(pm.mesh));
  for (std::uint32_t i = 0; i < pm.mesh.triangles.size(); ++i) by[pm.mesh.shell[i]].push_back(i);
  std::vector<Mesh> wrapped(shell_count(pm.mesh));
  for (const auto& [s, why] : broken) {
    if (!wrapped[s].triangles.empty()) continue;  // named twice (self-intersecting and more)
    Box3 box;
    for (std::uint32_t t : by[s])
      for (std::uint32_t v : pm.mesh.triangles[t]) expand(box, pm.mesh.positions[v]);
    const double diag = norm(box.hi - box.lo);
    WrappedShell w;
    w.shell = s;
    w.why = why;
    w.alpha = setup.wrap_alpha > 0.0 ? setup.wrap_alpha : diag / 100.0;
    w.offset = setup.wrap_offset > 0.0 ? setup.wrap_offset : w.alpha / 10.0;
    report_progress(setup, "alpha wrap", 0.0);
    wrapped[s] = alpha_wrap_shell(pm.mesh, s, w.alpha, w.offset);
    if (wrapped[s].triangles.empty()) {
      pm.reason = pm.mesh.shell_names[s] + ": " + why + ", and its alpha wrap failed";
      return;
    }
    w.volume_before = signed_volume(pm.mesh, s);
    w.volume_after = signed_volume(wrapped[s]);
    const std::vector<double> x = make_stations({box.lo.x - w.offset, box.hi.x + w.offset}, 201, Spacing::uniform);
    const std::vector<double> before = own_areas(pm.mesh, s, x);
    const std::vector<double> after = SectionEngine(wrapped[s]).areas({1.0, 0.0}, x);
    for (std::size_t i = 0; i < x.size(); ++i) w.area_bound = std::max(w.area_bound, std::fabs(after[i] - before[i]));
    pm.warnings.push_back(pm.mesh.shell_names[s] + ": " + why + "; replaced by its alpha wrap (alpha " +
                          fmt("%.3g", w.alpha) + " m, offset " + fmt("%.3g", w.offset) + " m): volume " +
                          fmt("%.6g", w.volume_before) + " → " + fmt("%.6g", w.volume_after) +
                          " m³, areas change by up to " + fmt("%.3g", w.area_bound) +
                          " m² (the error bound where it is cut)");
    pm.wraps.push_back(w);
  }
  // The mesh with each wrapped shell's triangles replaced by its wrap.
  Mesh out;
  out.shell_names = pm.mesh.shell_names;
  out.positions = pm.mesh.positions;
  for (std::uint32_t i = 0; i < pm.mesh.triangles.size(); ++i)
    if (wrapped[pm.mesh.shell[i]].triangles.empty()) {
      out.triangles.push_back(pm.mesh.triangles[i]);
      out.shell.push_back(pm.mesh.shell[i]);
    }
  for (std::uint32_t s = 0; s < wrapped.size(); ++s) {
    const Mesh& w = wrapped[s];
    if (w.triangles.empty()) continue;
    const auto base = static_cast<std::uint32_t>(out.positions.size());
    out.positions.insert(out.positions.end(), w.positions.begin(), w.positions.end());
    for (const Tri& t : w.triangles) {
      out.triangles.push_back({t[0] + base, t[1] + base, t[2] + base});
      out.shell.push_back(s);
    }
    ShellHealth& h = pm.health.shells[s];
    h.volume = signed_volume(w);
    h.closed = h.oriented = true;
  }
  pm.mesh = std::move(out);
  pm.health.volume = 0.0;
  for (const ShellHealth& h : pm.health.shells) pm.health.volume += h.volume;
}

// Volume and wetted area of what is analysed; usable = false for flat or inside-out models.
void finish(PreparedModel& pm) {
  pm.health.volume = signed_volume(pm.analysis);
  if (pm.united && pm.holes.empty()) pm.health.wetted_area = surface_area(pm.analysis);
  const Box3& b = pm.health.bounds;
  const double size = is_empty(b) ? 0.0 : norm(b.hi - b.lo);
  // Flat: the volume is rounding noise against the box (a sheet, a line, nothing).
  if (!(pm.health.volume > 1e-9 * size * size * size)) {
    pm.reason = pm.health.volume < 0.0
                    ? "the model encloses a negative volume (inside out and not repairable)"
                    : "the model is flat: it encloses no volume (a sheet or lines), so it has "
                      "no cross-sectional areas";
    return;
  }
  pm.usable = true;
}

}  // namespace

PreparedModel prepare_mesh(Mesh mesh, const ModelSetup& setup, std::vector<std::string> files,
                           std::vector<std::string> import_warnings) {
  PreparedModel pm;
  pm.files = std::move(files);
  pm.warnings = std::move(import_warnings);
  pm.mesh = std::move(mesh);
  report_progress(setup, "health", 0.0);
  OrientationFix fix = fix_orientation(pm.mesh);
  pm.health = check_health(pm.mesh, &fix);
  warn_health(pm.health, pm);
  report_progress(setup, "health", 1.0);
  if (pm.health.boundary_edges > 0 && !close_model_holes(pm, fix)) {
    pm.analysis = pm.mesh;
    return pm;
  }
  update_after_holes(pm, fix);
  pm.notes.insert(pm.notes.end(), fix.actions.begin(), fix.actions.end());
  wrap_broken_shells(setup, pm);
  if (!pm.reason.empty()) {
    pm.analysis = pm.mesh;
    return pm;
  }
  report_progress(setup, "overlaps", 0.0);
  const OverlapReport o = find_overlaps(pm.mesh, closed_after_holes(pm));
  record_overlaps(o, pm);
  report_progress(setup, "overlaps", 1.0);
  unite_or_sum(setup, o, pm);
  finish(pm);
  return pm;
}

namespace {

PreparedModel prepare_files(const std::vector<std::string>& files, const ModelSetup& setup) {
  report_progress(setup, "import", 0.0);
  ImportReport report;
  Mesh mesh = import_meshes(files, setup.import, &report);
  report_progress(setup, "import", 1.0);
  PreparedModel pm = prepare_mesh(std::move(mesh), setup, files, std::move(report.warnings));
  pm.notes.insert(pm.notes.begin(), "units " + std::string(unit_name(setup.import.unit)) +
                                        " → m; " + describe(setup.import.axes));
  return pm;
}

}  // namespace

// With the cache: hash the inputs (a fraction of the preparation's cost), load a sound entry
// or prepare and store. The cache is never fatal: any failure costs one note at most.
PreparedModel prepare_model(const std::vector<std::string>& files, const ModelSetup& setup) {
  if (!setup.use_cache) return prepare_files(files, setup);
  std::string limit_note;
  const std::uint64_t limit = cache_size_limit(&limit_note);
  const std::string dir = setup.cache_dir.empty() ? default_cache_dir() : setup.cache_dir;
  if (dir.empty() || limit == 0) return prepare_files(files, setup);
  report_progress(setup, "reading cache", 0.0);
  const auto key = model_cache_key(
      files, setup, [&](double f) { report_progress(setup, "reading cache", 0.9 * f); });
  std::optional<PreparedModel> hit;
  if (key) hit = load_cached_model(dir, *key);
  report_progress(setup, "reading cache", 1.0);
  if (hit) {
    hit->notes.insert(hit->notes.begin(), "prepared model from the cache (" +
                                              cache_entry_path(dir, *key) +
                                              "); --no-cache prepares it afresh");
    return std::move(*hit);
  }
  PreparedModel pm = prepare_files(files, setup);
  if (key) {
    const std::string err = store_cached_model(dir, *key, pm, limit);
    if (!err.empty()) pm.notes.push_back("prepared-model cache not written: " + err);
  }
  if (!limit_note.empty()) pm.notes.push_back(limit_note);
  return pm;
}

std::vector<double> hole_error_bounds(const PreparedModel& model, const MachPlanes& planes,
                                      std::span<const double> stations) {
  std::vector<double> bound(stations.size(), 0.0);
  for (const Hole& h : model.holes) {
    const StationRange r = hole_station_range(model.mesh, h, planes);
    for (std::size_t i = 0; i < stations.size(); ++i)
      if (stations[i] >= r.lo && stations[i] <= r.hi) bound[i] += h.projected_area;
  }
  for (const WrappedShell& w : model.wraps) {
    const StationRange r = SectionEngine(extract_shell(model.mesh, w.shell)).range(planes);
    for (std::size_t i = 0; i < stations.size(); ++i)
      if (stations[i] >= r.lo && stations[i] <= r.hi) bound[i] += w.area_bound;
  }
  return bound;
}

}  // namespace machcut
