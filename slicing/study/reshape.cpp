// Reshaping parts to lower the wave drag (docs/method.md §8.8); see reshape.h.
#include "machcut/study/reshape.h"

#include <tbb/parallel_for.h>
#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <set>

#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/intake/health.h"
#include "machcut/intake/union.h"
#include "machcut/sections/slope_grid.h"

namespace machcut {

namespace {

struct Keep {
  double x = 0.0;
  bool has_area = false;
  double area = 0.0;
};

std::vector<Keep> parse_keeps(const std::vector<std::string>& keeps) {
  std::vector<Keep> out;
  for (const std::string& k : keeps) {
    Keep p;
    const auto colon = k.find(':');
    p.x = parse_number(k.substr(0, colon), "--keep");
    if (colon != std::string::npos) {
      p.has_area = true;
      p.area = parse_number(k.substr(colon + 1), "--keep");
      if (p.area < 0.0)
        throw InputError("--keep", "an area must be >= 0 m², not " + readable_number(p.area));
    }
    out.push_back(p);
  }
  return out;
}

// Area-weighted outward vertex normals of the triangles of `shells` (zero elsewhere), and the
// vertices' area shares.
void vertex_normals(const Mesh& m, const std::vector<char>& in_part, std::vector<Vec3>& normal,
                    std::vector<double>& area) {
  normal.assign(m.positions.size(), Vec3{});
  area.assign(m.positions.size(), 0.0);
  for (std::size_t t = 0; t < m.triangles.size(); ++t) {
    if (!in_part[m.shell[t]]) continue;
    const Tri& tr = m.triangles[t];
    const Vec3 c =
        cross(m.positions[tr[1]] - m.positions[tr[0]], m.positions[tr[2]] - m.positions[tr[0]]);
    for (std::uint32_t v : tr) {
      normal[v] = normal[v] + 0.5 * c;
      area[v] += norm(c) / 6.0;
    }
  }
  for (Vec3& n : normal) {
    const double l = norm(n);
    n = l > 0.0 ? (1.0 / l) * n : Vec3{};
  }
}

// The part's triangles alone (all vertices kept, so that indices match `m`).
Mesh part_mesh(const Mesh& m, const std::vector<char>& in_part) {
  Mesh p;
  p.positions = m.positions;
  for (std::size_t t = 0; t < m.triangles.size(); ++t)
    if (in_part[m.shell[t]]) {
      p.triangles.push_back(m.triangles[t]);
      p.shell.push_back(0);
    }
  p.shell_names = {"part"};
  return p;
}

// The analysis mesh of a changed model: the shells united again when the original was.
PreparedModel with_mesh(const PreparedModel& original, Mesh mesh) {
  PreparedModel pm = original;
  pm.mesh = std::move(mesh);
  pm.analysis = pm.mesh;
  if (original.united) {
    const std::vector<bool> closed(shell_count(pm.mesh), true);
    const OverlapReport o = find_overlaps(pm.mesh, closed);
    if (!o.intersecting.empty() || !o.contained.empty()) {
      UnionResult u = unite_overlapping(pm.mesh, closed, o);
      if (!u.groups.empty()) pm.analysis = std::move(u.mesh);
    }
  }
  return pm;
}

// S at the nodes of a grid from its cell means (S = 0 at the first node), m².
std::vector<double> areas_at_nodes(const std::vector<double>& avg, double cell) {
  std::vector<double> s(avg.size() + 1, 0.0);
  for (std::size_t j = 0; j < avg.size(); ++j) s[j + 1] = s[j] + avg[j] * cell;
  return s;
}

double interpolate(const std::vector<double>& s, double lo, double cell, double x) {
  const double t = (x - lo) / cell;
  if (!(t > 0.0)) return s.front();
  const std::size_t j = static_cast<std::size_t>(t);
  if (j + 1 >= s.size()) return s.back();
  const double f = t - static_cast<double>(j);
  return (1.0 - f) * s[j] + f * s[j + 1];
}

}  // namespace

std::vector<std::uint32_t> part_shells(const Mesh& mesh, const std::vector<std::string>& parts) {
  if (parts.empty()) throw InputError("--part", "name at least one part (a file name or FILE#k)");
  std::set<std::uint32_t> out;
  for (const std::string& p : parts) {
    bool found = false;
    for (std::uint32_t s = 0; s < shell_count(mesh); ++s) {
      const std::string& n = mesh.shell_names[s];
      if (n == p || n.rfind(p + "#", 0) == 0) {
        out.insert(s);
        found = true;
      }
    }
    if (!found) {
      std::string names;
      for (const std::string& n : mesh.shell_names) names += (names.empty() ? "" : ", ") + n;
      throw InputError("--part",
                       "'" + p + "' names no part of the model (its parts: " + names + ")");
    }
  }
  return {out.begin(), out.end()};
}

ReshapeResult reshape(const Study& study, const ReshapeRequest& q) {
  checked_mach(q.mach, "--mach");
  if (q.modes < 2 || q.modes > 200) throw InputError("--modes", "use 2 to 200 modes");
  if (q.min_area < 0.0 || q.max_area < 0.0 || (q.max_area > 0.0 && q.min_area > q.max_area))
    throw InputError("--min-area", "use areas >= 0 with --min-area <= --max-area");
  study.require_usable();
  const std::vector<Keep> keeps = parse_keeps(q.keep);
  ReshapeResult r;
  const PreparedModel& original = study.model();
  r.shells = part_shells(original.mesh, q.parts);
  std::vector<char> in_part(shell_count(original.mesh), 0);
  for (std::uint32_t s : r.shells) in_part[s] = 1;
  std::vector<char> moving(original.mesh.positions.size(), 0);
  for (std::size_t t = 0; t < original.mesh.triangles.size(); ++t)
    if (in_part[original.mesh.shell[t]])
      for (std::uint32_t v : original.mesh.triangles[t]) moving[v] = 1;
  double x0 = HUGE_VAL, x1 = -HUGE_VAL;
  for (std::size_t v = 0; v < moving.size(); ++v)
    if (moving[v]) {
      x0 = std::min(x0, original.mesh.positions[v].x);
      x1 = std::max(x1, original.mesh.positions[v].x);
    }
  if (!(x1 > x0)) throw InputError("--part", "the part has no length along the flow");
  for (const Keep& k : keeps)
    if (!(k.x > x0 && k.x < x1))
      throw InputError("--keep", "station " + readable_number(k.x) +
                                     " m is not inside the part (x " + readable_number(x0) + " … " +
                                     readable_number(x1) + " m)");
  double part_volume = 0.0;
  for (std::uint32_t s : r.shells) part_volume += signed_volume(original.mesh, s);
  r.volume_before = part_volume;

  const int nm = q.modes;
  auto basis = [&](int k, double x) {
    return std::sin((k + 1) * std::numbers::pi * (x - x0) / (x1 - x0));
  };
  const bool supersonic = q.mach > 1.0;
  const int nr = supersonic ? std::max(4, (q.rolls + 3) / 4 * 4) : 1;
  std::vector<double> rolls(static_cast<std::size_t>(nr), 0.0);
  if (supersonic)
    for (int i = 0; i < nr; ++i)
      rolls[static_cast<std::size_t>(i)] = -90.0 + 360.0 * (i + 0.5) / nr;
  int cells = 64;
  while (cells < q.cells) cells *= 2;

  Mesh current = original.mesh;
  const MachDrag d0 = study.drag_at(q.mach);
  if (!d0.ok) throw UnusableModel("no drag at M = " + readable_number(q.mach) + ": " + d0.problem);
  r.drag_before = d0.drag_area;
  double d_current = d0.drag_area;
  std::vector<double> keep_target(keeps.size(), NAN);  // m², set in the first iteration
  std::unique_ptr<Study> cur;  // the study of `current` (null: `study` itself)
  double trust = 0.0;          // largest displacement per step, m
  for (int it = 0; it < q.iterations; ++it) {
    if (q.progress) q.progress(static_cast<double>(it) / q.iterations);
    const Study& s = cur ? *cur : study;
    const WaveDragModel& wdm = s.drag_model({});
    if (!wdm.uses_grid())
      throw UnusableModel("reshape needs captures given as shells, not as areas");
    std::vector<Vec3> normal;
    std::vector<double> varea;
    vertex_normals(current, in_part, normal, varea);
    // Mode meshes: the part displaced by ε B_k along the normals (one-sided difference; the
    // slope grid is exact, so ε only needs to be small against the geometry).
    const Mesh part = part_mesh(current, in_part);
    const double eps = 1e-5 * (x1 - x0);
    const SlopeMesh part_slopes(part);
    std::vector<SlopeMesh> mode_slopes;
    mode_slopes.reserve(static_cast<std::size_t>(nm));
    std::vector<double> mode_volume(static_cast<std::size_t>(nm), 0.0);
    for (int k = 0; k < nm; ++k) {
      Mesh m = part;
      for (std::size_t v = 0; v < m.positions.size(); ++v)
        if (moving[v]) {
          const double b = basis(k, m.positions[v].x);
          m.positions[v] = m.positions[v] + (eps * b) * normal[v];
          mode_volume[static_cast<std::size_t>(k)] += b * varea[v];
        }
      mode_slopes.emplace_back(m);
    }
    // The quadratic model D(c) ≈ D₀ + gᵀc + ½cᵀHc averaged over the rolls (exact for the
    // linearised steps: D is quadratic in them).
    Eigen::MatrixXd H = Eigen::MatrixXd::Zero(nm, nm);
    Eigen::VectorXd g = Eigen::VectorXd::Zero(nm);
    std::vector<Eigen::MatrixXd> Hr(static_cast<std::size_t>(nr));
    std::vector<Eigen::VectorXd> gr(static_cast<std::size_t>(nr));
    // M = 1 areas for the constraints: the model's own and each mode's, at the grid nodes.
    std::vector<double> s1;
    std::vector<std::vector<double>> ds1(static_cast<std::size_t>(nm));
    double lo1 = 0.0, cell1 = 1.0;
    tbb::parallel_for(0, nr + 1, [&](int i) {
      const double mach = i < nr ? q.mach : 1.0;
      const double roll = i < nr ? rolls[static_cast<std::size_t>(i)] : 0.0;
      const StationRange range = wdm.range(mach, roll);
      const double margin = (range.hi - range.lo) / 32.0;
      const double lo = range.lo - margin, hi = range.hi + margin, h = (hi - lo) / cells;
      const MachPlanes planes{mach, roll};
      SlopeGrid base = make_slope_grid(lo, hi, cells);
      part_slopes.add_slopes(planes, base);
      const std::vector<double> avg0 =
          slope_averages(base, false);  // exact S: no classification flips
      std::vector<std::vector<double>> steps(static_cast<std::size_t>(nm));
      std::vector<std::vector<double>> davg(static_cast<std::size_t>(nm));
      for (int k = 0; k < nm; ++k) {
        SlopeGrid gk = make_slope_grid(lo, hi, cells);
        mode_slopes[static_cast<std::size_t>(k)].add_slopes(planes, gk);
        std::vector<double> a = slope_averages(gk, false);
        for (std::size_t j = 0; j < a.size(); ++j) a[j] = (a[j] - avg0[j]) / eps;
        steps[static_cast<std::size_t>(k)] = steps_from_averages(a);
        davg[static_cast<std::size_t>(k)] = std::move(a);
      }
      if (i == nr) {  // the M = 1 areas
        SlopeGrid whole = make_slope_grid(lo, hi, cells);
        SlopeMesh(s.engine().mesh()).add_slopes(planes, whole);
        s1 = areas_at_nodes(slope_averages(whole, false), h);
        for (int k = 0; k < nm; ++k)
          ds1[static_cast<std::size_t>(k)] = areas_at_nodes(davg[static_cast<std::size_t>(k)], h);
        lo1 = lo;
        cell1 = h;
        return;
      }
      const SlopeGrid full = wdm.slope_grid(mach, roll, lo, hi, cells);
      const std::vector<double> a0 = slope_steps(full, true);
      const std::vector<double> ka0 = log_kernel_apply(a0);
      std::vector<std::vector<double>> ka(static_cast<std::size_t>(nm));
      for (int k = 0; k < nm; ++k)
        ka[static_cast<std::size_t>(k)] = log_kernel_apply(steps[static_cast<std::size_t>(k)]);
      const double f = -1.0 / std::numbers::pi;  // 2 × (−1/2π)
      Eigen::MatrixXd hm(nm, nm);
      Eigen::VectorXd gv(nm);
      for (int k = 0; k < nm; ++k) {
        const auto& sk = steps[static_cast<std::size_t>(k)];
        double dot0 = 0.0;
        for (std::size_t j = 0; j < sk.size(); ++j) dot0 += sk[j] * ka0[j];
        gv(k) = f * dot0;
        for (int l = 0; l <= k; ++l) {
          const auto& kl = ka[static_cast<std::size_t>(l)];
          double d = 0.0;
          for (std::size_t j = 0; j < sk.size(); ++j) d += sk[j] * kl[j];
          hm(k, l) = hm(l, k) = f * d;
        }
      }
      Hr[static_cast<std::size_t>(i)] = hm;
      gr[static_cast<std::size_t>(i)] = gv;
    });
    for (int i = 0; i < nr; ++i) {
      H += Hr[static_cast<std::size_t>(i)] / nr;
      g += gr[static_cast<std::size_t>(i)] / nr;
    }
    H += 1e-10 * std::max(H.trace() / nm, 1e-300) * Eigen::MatrixXd::Identity(nm, nm);

    // Equality constraints C c = d.
    std::vector<Eigen::VectorXd> rows;
    std::vector<double> rhs;
    std::vector<std::string> what;
    if (q.keep_volume) {
      Eigen::VectorXd row(nm);
      for (int k = 0; k < nm; ++k) row(k) = mode_volume[static_cast<std::size_t>(k)];
      double vol = 0.0;
      for (std::uint32_t sh : r.shells) vol += signed_volume(current, sh);
      rows.push_back(row);
      rhs.push_back(part_volume - vol);
      what.push_back("the parts' volume");
    }
    for (const Keep& k : keeps) {
      Eigen::VectorXd row(nm);
      for (int m = 0; m < nm; ++m)
        row(m) = interpolate(ds1[static_cast<std::size_t>(m)], lo1, cell1, k.x);
      const double now = interpolate(s1, lo1, cell1, k.x);
      double& target = keep_target[static_cast<std::size_t>(&k - keeps.data())];
      if (std::isnan(target)) target = k.has_area ? k.area : now;  // the original model's area
      rows.push_back(row);
      rhs.push_back(target - now);
      what.push_back("--keep " + readable_number(k.x));
    }
    // Solves the equality-constrained quadratic; the M = 1 area limits are added as equalities
    // at the worst station while violated (an active-set loop).
    auto solve = [&]() {
      const int nc = static_cast<int>(rows.size());
      Eigen::MatrixXd kkt = Eigen::MatrixXd::Zero(nm + nc, nm + nc);
      Eigen::VectorXd b = Eigen::VectorXd::Zero(nm + nc);
      kkt.topLeftCorner(nm, nm) = H;
      b.head(nm) = -g;
      for (int c = 0; c < nc; ++c) {
        kkt.block(nm + c, 0, 1, nm) = rows[static_cast<std::size_t>(c)].transpose();
        kkt.block(0, nm + c, nm, 1) = rows[static_cast<std::size_t>(c)];
        b(nm + c) = rhs[static_cast<std::size_t>(c)];
      }
      return Eigen::VectorXd(kkt.fullPivLu().solve(b).head(nm));
    };
    Eigen::VectorXd c = solve();
    if (q.min_area > 0.0 || q.max_area > 0.0) {
      for (int pass = 0; pass < 16; ++pass) {
        double worst = 0.0, limit = 0.0;
        std::size_t at = 0;
        for (std::size_t j = 0; j < s1.size(); ++j) {
          const double x = lo1 + cell1 * static_cast<double>(j);
          if (x <= x0 || x >= x1) continue;
          double a = s1[j];
          for (int k = 0; k < nm; ++k) a += c(k) * ds1[static_cast<std::size_t>(k)][j];
          if (q.max_area > 0.0 && a - q.max_area > worst)
            worst = a - q.max_area, at = j, limit = q.max_area;
          // The lower limit holds where the area reaches it (not at pointed ends).
          if (q.min_area > 0.0 && s1[j] >= q.min_area && q.min_area - a > worst)
            worst = q.min_area - a, at = j, limit = q.min_area;
        }
        if (worst <= 1e-6 * std::max(q.max_area, q.min_area)) break;
        Eigen::VectorXd row(nm);
        for (int k = 0; k < nm; ++k) row(k) = ds1[static_cast<std::size_t>(k)][at];
        rows.push_back(row);
        rhs.push_back(limit - s1[at]);
        what.push_back("area limit at x = " +
                       readable_number(lo1 + cell1 * static_cast<double>(at)));
        c = solve();
      }
    }
    // Displacements and the trust region (a quarter of the part's equivalent radius at first).
    std::vector<double> dn(current.positions.size(), 0.0);
    double largest = 0.0;
    for (std::size_t v = 0; v < dn.size(); ++v)
      if (moving[v]) {
        for (int k = 0; k < nm; ++k) dn[v] += c(k) * basis(k, current.positions[v].x);
        largest = std::max(largest, std::fabs(dn[v]));
      }
    if (trust == 0.0) {
      double smax = 0.0;
      for (std::size_t j = 0; j < s1.size(); ++j) smax = std::max(smax, s1[j]);
      trust = 0.25 * std::sqrt(smax / std::numbers::pi);
    }
    const double predicted = g.dot(c) + 0.5 * c.dot(H * c);
    if (!(largest > 0.0) || std::fabs(predicted) < 1e-5 * std::fabs(d_current)) {
      r.notes.push_back("iteration " + std::to_string(it + 1) +
                        ": the quadratic model predicts no further gain");
      break;
    }
    bool accepted = false;
    for (int attempt = 0; attempt < 4 && !accepted; ++attempt) {
      const double scale = std::min(1.0, trust / largest);
      Mesh next = current;
      for (std::size_t v = 0; v < dn.size(); ++v)
        if (moving[v]) next.positions[v] = next.positions[v] + (scale * dn[v]) * normal[v];
      auto trial = std::make_unique<Study>(with_mesh(original, next), study.end_setup());
      const MachDrag d = trial->drag_at(q.mach);
      char line[256];
      std::snprintf(line, sizeof line,
                    "iteration %d: step %.3g m (%s), D/q %.6g → %.6g m² (predicted %.6g)", it + 1,
                    scale * largest, scale < 1.0 ? "limited" : "full", d_current,
                    d.ok ? d.drag_area : NAN,
                    d_current + (scale < 1.0 ? scale * g.dot(c) + 0.5 * scale * scale * c.dot(H * c)
                                             : predicted));
      r.notes.push_back(line);
      if (d.ok && d.drag_area < d_current) {
        accepted = true;
        current = std::move(next);
        cur = std::move(trial);
        d_current = d.drag_area;
        ++r.iterations;
        if (scale == 1.0) trust *= 2.0;
      } else {
        trust = 0.5 * std::min(trust, scale * largest);
      }
    }
    if (!accepted) break;
  }
  if (q.progress) q.progress(1.0);
  // The result must stay a closed surface free of self-intersections (topology is kept, so it
  // stays closed); CGAL's test on the moved shells.
  std::vector<bool> closed(shell_count(current), false);
  for (std::uint32_t s : r.shells) closed[s] = true;
  r.self_intersecting = !self_intersecting_shells(current, closed).empty();
  if (r.self_intersecting) r.unmet.push_back("the reshaped part intersects itself");
  // Constraints as met on the result (M = 1 areas of the re-analysed model).
  if (cur) {
    double vol = 0.0;
    for (std::uint32_t s : r.shells) vol += signed_volume(current, s);
    r.volume_after = vol;
    if (q.keep_volume && std::fabs(vol - part_volume) > 1e-3 * std::fabs(part_volume))
      r.unmet.push_back("volume: " + readable_number(vol) + " m³ instead of " +
                        readable_number(part_volume) + " m³");
  } else {
    r.volume_after = part_volume;
  }
  // The kept stations and the area limits on the result, from its M = 1 areas.
  {
    const Study& s = cur ? *cur : study;
    for (std::size_t i = 0; i < keeps.size(); ++i) {
      if (std::isnan(keep_target[i])) continue;
      AreaRequest aq;
      aq.at = {keeps[i].x};
      const double a = s.area(aq).curve.area.front();
      if (std::fabs(a - keep_target[i]) > 0.01 * std::max(keep_target[i], 1e-9))
        r.unmet.push_back("--keep " + readable_number(keeps[i].x) + ": area " + readable_number(a) +
                          " m² instead of " + readable_number(keep_target[i]) + " m²");
    }
    if (q.min_area > 0.0 || q.max_area > 0.0) {
      AreaRequest aq;
      aq.stations = 201;
      const AreaResult ar = s.area(aq);
      aq.at = ar.curve.x;
      const AreaResult before = study.area(aq);
      double amax = 0.0, amin = HUGE_VAL;
      for (std::size_t j = 0; j < ar.curve.x.size(); ++j)
        if (ar.curve.x[j] > x0 && ar.curve.x[j] < x1) {
          amax = std::max(amax, ar.curve.area[j]);
          if (before.curve.area[j] >= q.min_area) amin = std::min(amin, ar.curve.area[j]);
        }
      if (q.max_area > 0.0 && amax > 1.01 * q.max_area)
        r.unmet.push_back("--max-area: the area reaches " + readable_number(amax) + " m²");
      if (q.min_area > 0.0 && amin < 0.99 * q.min_area)
        r.unmet.push_back("--min-area: the area falls to " + readable_number(amin) + " m²");
    }
  }
  for (std::size_t v = 0; v < current.positions.size(); ++v)
    r.max_displacement =
        std::max(r.max_displacement, norm(current.positions[v] - original.mesh.positions[v]));
  r.drag_after = d_current;
  r.mesh = std::move(current);
  return r;
}

}  // namespace machcut
