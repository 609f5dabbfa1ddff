// From files to an analysable model: the pipeline of model.h.
#include "machcut/intake/model.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <array>
#include <cstdint>
#include <map>
#include <optional>

#include "machcut/common/errors.h"
#include "machcut/common/shell_names.h"
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

// Moves the triangles of `shells` out of pm.mesh into pm.set_aside (compacted, its own shell
// names) with a LeftOut entry each. The shells keep their ids in pm.mesh (now empty) so that
// the health report's indices stay valid; compact_shells drops them before the health check.
void set_aside(PreparedModel& pm, std::vector<std::uint32_t> shells, const std::string& why) {
  std::sort(shells.begin(), shells.end());
  shells.erase(std::unique(shells.begin(), shells.end()), shells.end());
  std::vector<char> out(shell_count(pm.mesh), 0);
  std::vector<Mesh> parts;
  for (std::uint32_t s : shells) {
    out[s] = 1;
    Mesh one = extract_shell(pm.mesh, s);
    pm.left_out.push_back({pm.mesh.shell_names[s], why, one.triangles.size()});
    parts.push_back(std::move(one));
  }
  if (parts.empty()) return;
  if (!pm.set_aside.triangles.empty()) parts.insert(parts.begin(), std::move(pm.set_aside));
  pm.set_aside = concatenate(parts);
  std::vector<Tri> tris;
  std::vector<std::uint32_t> shell;
  for (std::size_t i = 0; i < pm.mesh.triangles.size(); ++i)
    if (!out[pm.mesh.shell[i]]) {
      tris.push_back(pm.mesh.triangles[i]);
      shell.push_back(pm.mesh.shell[i]);
    }
  pm.mesh.triangles = std::move(tris);
  pm.mesh.shell = std::move(shell);
}

// Drops the shells without triangles (renumbering the others in order) and the unreferenced
// vertices.
void compact_shells(Mesh& mesh) {
  std::vector<std::uint32_t> id(mesh.shell_names.size(), UINT32_MAX);
  for (std::uint32_t s : mesh.shell) id[s] = 0;
  std::vector<std::string> names;
  for (std::size_t s = 0; s < id.size(); ++s)
    if (id[s] == 0) {
      id[s] = static_cast<std::uint32_t>(names.size());
      names.push_back(mesh.shell_names[s]);
    }
  for (std::uint32_t& s : mesh.shell) s = id[s];
  mesh.shell_names = std::move(names);
  std::vector<std::uint32_t> vid(mesh.positions.size(), UINT32_MAX);
  std::vector<Vec3> pos;
  for (Tri& t : mesh.triangles)
    for (std::uint32_t& v : t) {
      if (vid[v] == UINT32_MAX) {
        vid[v] = static_cast<std::uint32_t>(pos.size());
        pos.push_back(mesh.positions[v]);
      }
      v = vid[v];
    }
  mesh.positions = std::move(pos);
}

// --skip and --only: the shells they leave out go to set_aside. A selector that names no
// shell is an input error (a typo would otherwise pass unnoticed).
void select_parts(const ModelSetup& setup, PreparedModel& pm) {
  const std::vector<std::string>& names = pm.mesh.shell_names;
  for (const auto* list : {&setup.skip, &setup.only})
    for (const std::string& sel : *list)
      if (std::none_of(names.begin(), names.end(), [&](const std::string& n) { return shell_selected(n, sel); }))
        throw InputError(list == &setup.skip ? "--skip" : "--only",
                         "no shell, part or file named '" + sel + "' in the model");
  std::vector<std::uint32_t> skipped, not_only;
  for (std::uint32_t s = 0; s < names.size(); ++s) {
    const auto named = [&](const std::vector<std::string>& l) {
      return std::any_of(l.begin(), l.end(), [&](const std::string& sel) { return shell_selected(names[s], sel); });
    };
    if (named(setup.skip)) skipped.push_back(s);
    else if (!setup.only.empty() && !named(setup.only)) not_only.push_back(s);
  }
  set_aside(pm, skipped, "left out (--skip)");
  set_aside(pm, not_only, "left out (not named by --only)");
}

// Flat parts: every vertex within 1e-9 of the shell's size of the plane of its largest
// triangle — no volume, so no section area; left out with a note.
void set_aside_flat(PreparedModel& pm) {
  const Mesh& m = pm.mesh;
  const std::size_t n = shell_count(m);
  std::vector<Box3> box(n);
  std::vector<double> best(n, -1.0);
  std::vector<Vec3> normal(n), origin(n);
  for (std::size_t i = 0; i < m.triangles.size(); ++i) {
    const Tri& t = m.triangles[i];
    const std::uint32_t s = m.shell[i];
    for (std::uint32_t v : t) expand(box[s], m.positions[v]);
    const Vec3 c = cross(m.positions[t[1]] - m.positions[t[0]], m.positions[t[2]] - m.positions[t[0]]);
    const double a = norm(c);
    if (a > best[s]) {
      best[s] = a;
      normal[s] = a > 0.0 ? (1.0 / a) * c : Vec3{};
      origin[s] = m.positions[t[0]];
    }
  }
  std::vector<char> flat(n, 1);
  for (std::size_t i = 0; i < m.triangles.size(); ++i) {
    const std::uint32_t s = m.shell[i];
    if (!flat[s]) continue;
    // 1e-6 of its size, and of its distance from the origin: a plane written in single
    // precision (float32: ~6e-8 relative) and turned by an axis mapping is still flat.
    const double far = std::max({std::fabs(box[s].lo.x), std::fabs(box[s].lo.y), std::fabs(box[s].lo.z),
                                 std::fabs(box[s].hi.x), std::fabs(box[s].hi.y), std::fabs(box[s].hi.z)});
    const double tol = 1e-6 * norm(box[s].hi - box[s].lo) + 1e-7 * far;
    for (std::uint32_t v : m.triangles[i])
      if (!(std::fabs(dot(normal[s], m.positions[v] - origin[s])) <= tol)) flat[s] = 0;
    if (best[s] <= 0.0) flat[s] = 1;  // every triangle degenerate: no plane, no volume either
  }
  // A part is flat when all its shells are; a flat sheet of a part with volume stays, for the
  // part's alpha wrap to take in (a patch split off by a gap).
  std::map<std::string, bool> part_flat;
  for (std::uint32_t s = 0; s < n; ++s)
    if (best[s] >= 0.0) {
      const auto [it, fresh] = part_flat.try_emplace(shell_part(m.shell_names[s]), true);
      it->second = it->second && flat[s];
    }
  std::vector<std::uint32_t> out;
  for (std::uint32_t s = 0; s < n; ++s)
    if (flat[s] && best[s] >= 0.0 && part_flat[shell_part(m.shell_names[s])]) out.push_back(s);
  for (std::uint32_t s : out)
    pm.notes.push_back(m.shell_names[s] + ": flat part (all its vertices lie in one plane, so it "
                                          "encloses no volume); left out of the analysis");
  set_aside(pm, out, "flat part (all its vertices lie in one plane)");
}

// Exact duplicate triangles (the same three vertices): a copy with the same orientation is
// removed (an export that wrote a face twice: it would count twice in every area and make its
// edges non-manifold); a back-to-back pair (opposite orientations) is removed whole (an
// internal wall between two bodies written as one: its two sides cancel in every area, and
// without them the edges are manifold again). Counts go into a note.
void remove_duplicate_faces(PreparedModel& pm) {
  Mesh& m = pm.mesh;
  struct Key {
    std::array<std::uint32_t, 3> v;
    bool odd;  // orientation against the sorted order
    std::size_t index;
  };
  std::vector<Key> keys(m.triangles.size());
  for (std::size_t i = 0; i < m.triangles.size(); ++i) {
    std::array<std::uint32_t, 3> v = m.triangles[i];
    // Rotate the smallest index first; then the orientation is the order of the other two.
    while (v[0] > v[1] || v[0] > v[2]) v = {v[1], v[2], v[0]};
    const bool odd = v[1] > v[2];
    if (odd) std::swap(v[1], v[2]);
    keys[i] = {v, odd, i};
  }
  std::sort(keys.begin(), keys.end(), [](const Key& a, const Key& b) {
    return a.v != b.v ? a.v < b.v : a.index < b.index;
  });
  std::vector<char> drop(m.triangles.size(), 0);
  std::size_t same = 0, back_to_back = 0;
  for (std::size_t i = 0; i < keys.size();) {
    std::size_t j = i;
    while (j < keys.size() && keys[j].v == keys[i].v) ++j;
    if (j - i > 1) {
      // Keep one of the orientation with more copies (none when they tie: back-to-back pairs).
      std::size_t odd = 0;
      for (std::size_t k = i; k < j; ++k) odd += keys[k].odd;
      const std::size_t even = (j - i) - odd;
      const std::size_t pairs = std::min(odd, even);
      back_to_back += pairs;
      same += (j - i) - 2 * pairs - (odd != even ? 1 : 0);
      bool kept = odd == even;
      for (std::size_t k = i; k < j; ++k) {
        const bool majority = odd > even ? keys[k].odd : !keys[k].odd;
        if (!kept && majority) kept = true;
        else drop[keys[k].index] = 1;
      }
    }
    i = j;
  }
  if (same == 0 && back_to_back == 0) return;
  std::vector<Tri> tris;
  std::vector<std::uint32_t> shell;
  for (std::size_t i = 0; i < m.triangles.size(); ++i)
    if (!drop[i]) {
      tris.push_back(m.triangles[i]);
      shell.push_back(m.shell[i]);
    }
  m.triangles = std::move(tris);
  m.shell = std::move(shell);
  if (same)
    pm.notes.push_back(std::to_string(same) + " duplicated triangle(s) removed (the same face written twice)");
  if (back_to_back)
    pm.notes.push_back(std::to_string(back_to_back) + " back-to-back pair(s) of triangles removed (an "
                       "internal wall: its two sides cancel in every area)");
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

// A shell to be replaced by its alpha wrap, and why.
using Broken = std::vector<std::pair<std::uint32_t, std::string>>;

// Closes the holes whose boundary is a set of simple loops and re-checks the orientation of
// shells that were open. A shell whose boundary cannot be closed by fans, or an open sheet
// (closed by its fans it encloses less than a layer of 1/100 of its size over its surface: the
// fans fold it onto itself), goes to `broken` with its fans taken out, for the alpha wrap.
// Holes that project to more than kMaxHoleAreaFraction of the shell's own largest section stay
// closed (their projected area is the bound) with a warning that the areas there are mostly
// the fan's guess.
void close_model_holes(PreparedModel& pm, OrientationFix& fix, Broken& broken) {
  const std::size_t before = pm.mesh.triangles.size();
  const std::size_t n = shell_count(pm.mesh);
  std::vector<double> open_area(n, 0.0);
  std::vector<Box3> box(n);
  for (std::size_t i = 0; i < before; ++i) {
    const Tri& t = pm.mesh.triangles[i];
    const Vec3 a = pm.mesh.positions[t[0]], b = pm.mesh.positions[t[1]], c = pm.mesh.positions[t[2]];
    open_area[pm.mesh.shell[i]] += 0.5 * norm(cross(b - a, c - a));
    for (const Vec3& p : {a, b, c}) expand(box[pm.mesh.shell[i]], p);
  }
  HoleClosing hc = close_holes(pm.mesh, /*per_shell=*/true);
  for (auto& u : hc.unclosable) broken.push_back({u.first, "open, and " + u.second});
  std::vector<double> hole_area(n, 0.0);
  for (const Hole& h : hc.holes) hole_area[h.shell] += h.projected_area;
  const std::vector<double> closed_volume = shell_volumes(pm.mesh);
  std::vector<char> too_large(n, 0);
  for (std::uint32_t s = 0; s < n; ++s) {
    if (!std::any_of(hc.holes.begin(), hc.holes.end(), [&](const Hole& h) { return h.shell == s; })) continue;
    const double size = norm(box[s].hi - box[s].lo);
    if (!(std::fabs(closed_volume[s]) > open_area[s] * size / 100.0)) {
      too_large[s] = 1;
      broken.push_back({s, "an open sheet (closed by fans it would enclose " + fmt("%.3g", std::fabs(closed_volume[s])) +
                               " m³ only)"});
      continue;
    }
    if (hole_area[s] == 0.0) continue;
    const double largest = largest_normal_section(extract_shell(pm.mesh, s));
    if (hole_area[s] > kMaxHoleAreaFraction * largest)
      pm.warnings.push_back(pm.mesh.shell_names[s] + ": its holes project to " + fmt("%.4g", hole_area[s]) +
                            " m², against a largest section of " + fmt("%.4g", largest) +
                            " m²: where they are cut the areas are mostly the fans' guess (see the error bound)");
  }
  if (std::any_of(too_large.begin(), too_large.end(), [](char c) { return c != 0; })) {
    std::vector<Tri> tris;
    std::vector<std::uint32_t> shell;
    for (std::size_t i = 0; i < pm.mesh.triangles.size(); ++i)
      if (i < before || !too_large[pm.mesh.shell[i]]) {
        tris.push_back(pm.mesh.triangles[i]);
        shell.push_back(pm.mesh.shell[i]);
      }
    pm.mesh.triangles = std::move(tris);
    pm.mesh.shell = std::move(shell);
    std::erase_if(hc.holes, [&](const Hole& h) { return too_large[h.shell] != 0; });
  }
  pm.holes = std::move(hc.holes);
  merge_fix(fix, fix_orientation(pm.mesh));  // shells closed now can be turned outward
  std::vector<char> closed_now(shell_count(pm.mesh), 0);
  for (const Hole& h : pm.holes) closed_now[h.shell] = 1;
  double total = 0.0;
  for (const Hole& h : pm.holes) total += h.projected_area;
  for (std::uint32_t s = 0; s < pm.health.shells.size(); ++s)
    if (closed_now[s])
      pm.warnings.push_back(pm.health.shells[s].name + ": open (" +
                            std::to_string(pm.health.shells[s].boundary_edges) +
                            " boundary edges); holes closed for the analysis");
  if (!pm.holes.empty())
    pm.notes.push_back(std::to_string(pm.holes.size()) + " hole(s) closed by fans; projected " +
                       "area " + fmt("%.6g", total) + " m² bounds the area error at their stations");
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
  std::vector<bool> closed, holed(pm.health.shells.size(), false);
  for (const Hole& h : pm.holes) holed[h.shell] = true;
  for (std::size_t s = 0; s < pm.health.shells.size(); ++s) {
    const ShellHealth& h = pm.health.shells[s];
    closed.push_back(h.closed || (h.nonmanifold_edges == 0 && h.oriented && holed[s]));
  }
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
void wrap_broken_shells(const ModelSetup& setup, PreparedModel& pm, Broken open_broken) {
  Broken broken;
  std::vector<bool> closed = closed_after_holes(pm);
  for (const auto& b : open_broken) closed[b.first] = false;
  for (std::uint32_t s = 0; s < pm.health.shells.size(); ++s) {
    const ShellHealth& h = pm.health.shells[s];
    if (std::any_of(open_broken.begin(), open_broken.end(), [&](const auto& b) { return b.first == s; }))
      continue;
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
  broken.insert(broken.end(), open_broken.begin(), open_broken.end());
  if (broken.empty()) return;
  std::sort(broken.begin(), broken.end());
  if (setup.strict) {
    const std::string& why = broken.front().second;
    pm.reason = std::string(why.rfind("open", 0) == 0 ? "too broken to bound: " : "") +
                pm.mesh.shell_names[broken.front().first] + ": " + why + " (--strict: no alpha wrap)";
    return;
  }
  // The broken shells of one part are wrapped together (into its first broken shell): gaps
  // between the patches of a part narrower than about alpha are bridged that way.
  const std::size_t n = shell_count(pm.mesh);
  std::vector<std::string> why_of(n);
  std::vector<char> is_broken(n, 0);
  for (const auto& [s, why] : broken)
    if (!is_broken[s]) {
      is_broken[s] = 1;
      why_of[s] = why;
    }
  std::vector<std::vector<std::uint32_t>> groups;
  std::map<std::string, std::size_t> group_of_part;
  std::vector<std::uint32_t> label(n);
  for (std::uint32_t s = 0; s < n; ++s) {
    label[s] = s;
    if (!is_broken[s]) continue;
    const auto [it, fresh] = group_of_part.try_emplace(shell_part(pm.mesh.shell_names[s]), groups.size());
    if (fresh) groups.emplace_back();
    groups[it->second].push_back(s);
    label[s] = groups[it->second].front();
  }
  Mesh work = pm.mesh;
  for (std::uint32_t& s : work.shell) s = label[s];
  std::vector<Mesh> wrapped(n);
  std::vector<std::uint32_t> failed;
  for (const std::vector<std::uint32_t>& g : groups) {
    const std::uint32_t s = g.front();
    Box3 box;
    for (std::size_t i = 0; i < work.triangles.size(); ++i)
      if (work.shell[i] == s)
        for (std::uint32_t v : work.triangles[i]) expand(box, work.positions[v]);
    const double diag = norm(box.hi - box.lo);
    WrappedShell w;
    w.shell = s;
    w.why = why_of[s];
    for (std::size_t k = 1; k < g.size() && k < 4; ++k)
      w.why += "; with " + pm.mesh.shell_names[g[k]] + " (" + why_of[g[k]] + ")";
    if (g.size() > 4) w.why += "; with " + std::to_string(g.size() - 4) + " more shells of its part";
    // Default alpha: 1/100 of what is wrapped, but not below 1/200 of the model (the areas
    // are read against the whole aircraft; a finer wrap of many small parts costs minutes:
    // 19 wraps of a 480k-triangle engine model took ~100 s at 1/100 of each part, measured).
    const Box3& mb = pm.health.bounds;
    const double model_diag = is_empty(mb) ? diag : norm(mb.hi - mb.lo);
    w.alpha = setup.wrap_alpha > 0.0 ? setup.wrap_alpha : std::max(diag / 100.0, model_diag / 200.0);
    w.offset = setup.wrap_offset > 0.0 ? setup.wrap_offset : w.alpha / 10.0;
    report_progress(setup, "alpha wrap", 0.0);
    wrapped[s] = alpha_wrap_shell(work, s, w.alpha, w.offset);
    if (wrapped[s].triangles.empty()) {
      failed.insert(failed.end(), g.begin(), g.end());
      pm.warnings.push_back(pm.mesh.shell_names[s] + ": " + w.why + ", and its alpha wrap failed; left out");
      continue;
    }
    w.volume_before = signed_volume(work, s);
    w.volume_after = signed_volume(wrapped[s]);
    const std::vector<double> x = make_stations({box.lo.x - w.offset, box.hi.x + w.offset}, 201, Spacing::uniform);
    const std::vector<double> before = own_areas(work, s, x);
    const std::vector<double> after = SectionEngine(wrapped[s]).areas({1.0, 0.0}, x);
    for (std::size_t i = 0; i < x.size(); ++i) w.area_bound = std::max(w.area_bound, std::fabs(after[i] - before[i]));
    pm.warnings.push_back(pm.mesh.shell_names[s] + ": " + w.why + "; replaced by its alpha wrap (alpha " +
                          fmt("%.3g", w.alpha) + " m, offset " + fmt("%.3g", w.offset) + " m): volume " +
                          fmt("%.6g", w.volume_before) + " → " + fmt("%.6g", w.volume_after) +
                          " m³, areas change by up to " + fmt("%.3g", w.area_bound) +
                          " m² (the error bound where it is cut)");
    pm.wraps.push_back(w);
  }
  // The mesh with each wrapped group's triangles replaced by its wrap (the group's other
  // shells keep their ids, empty).
  Mesh out;
  out.shell_names = pm.mesh.shell_names;
  out.positions = pm.mesh.positions;
  for (std::uint32_t i = 0; i < pm.mesh.triangles.size(); ++i)
    if (wrapped[label[pm.mesh.shell[i]]].triangles.empty()) {
      out.triangles.push_back(pm.mesh.triangles[i]);
      out.shell.push_back(pm.mesh.shell[i]);
    }
  for (std::uint32_t s = 0; s < wrapped.size(); ++s) {
    if (is_broken[s] && label[s] != s && !wrapped[label[s]].triangles.empty()) {
      ShellHealth& h = pm.health.shells[s];  // absorbed into its group's wrap
      h.volume = 0.0;
      h.closed = h.oriented = true;
    }
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
  for (std::uint32_t s : failed) pm.health.shells[s].closed = false;
  if (!failed.empty()) set_aside(pm, std::vector<std::uint32_t>(failed), "its alpha wrap failed");
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
  select_parts(setup, pm);
  set_aside_flat(pm);
  remove_duplicate_faces(pm);
  compact_shells(pm.mesh);
  if (pm.mesh.triangles.empty()) {
    pm.reason = "nothing usable remains: ";
    for (std::size_t i = 0; i < pm.left_out.size() && i < 3; ++i)
      pm.reason += (i ? "; " : "") + pm.left_out[i].name + ": " + pm.left_out[i].why;
    if (pm.left_out.size() > 3) pm.reason += "; and " + std::to_string(pm.left_out.size() - 3) + " more";
    if (pm.left_out.empty()) pm.reason += "the model is flat: it encloses no volume";
    pm.analysis = pm.mesh;
    return pm;
  }
  OrientationFix fix = fix_orientation(pm.mesh);
  pm.health = check_health(pm.mesh, &fix);
  warn_health(pm.health, pm);
  report_progress(setup, "health", 1.0);
  Broken open_broken;
  if (pm.health.boundary_edges > 0) close_model_holes(pm, fix, open_broken);
  update_after_holes(pm, fix);
  pm.notes.insert(pm.notes.end(), fix.actions.begin(), fix.actions.end());
  wrap_broken_shells(setup, pm, std::move(open_broken));
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
