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
  pm.health.self_intersecting = u.self_intersecting;
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
  for (const ShellHealth& s : pm.health.shells)
    if (!s.oriented) pm.reason = s.name + " is non-orientable: its inside is undefined";
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
  return bound;
}

}  // namespace machcut
