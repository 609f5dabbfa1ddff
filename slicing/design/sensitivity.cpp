// Surface sensitivity of the wave drag (docs/method.md §8.7); see sensitivity.h.
#include "machcut/design/sensitivity.h"

#include <tbb/parallel_for.h>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <cstdio>

#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/sections/slope_grid.h"

namespace machcut {

namespace {

// One roll's g_θ at the nodes of its grid.
struct RollGradient {
  double lo = 0.0, cell = 1.0;
  std::vector<double> g;  // 1/m at node lo + j cell
  double drag_area = 0.0;
};

double gradient_at(const RollGradient& r, double x) {
  const double t = (x - r.lo) / r.cell;
  const long n = static_cast<long>(r.g.size());
  if (!(t > 0.0)) return r.g.front();
  const long j = static_cast<long>(t);
  if (j >= n - 1) return r.g.back();
  const double f = t - static_cast<double>(j);
  return (1.0 - f) * r.g[static_cast<std::size_t>(j)] + f * r.g[static_cast<std::size_t>(j + 1)];
}

// Where roll i's curve comes from under the model's mirror symmetry (docs/method.md §5.2): the
// representative roll whose curve is the same, and the mirror that maps a point's station at
// roll i onto the representative's station of the mirrored point.
struct RollSource {
  int rep = 0;
  bool mirror_y = false, mirror_z = false;
};

RollSource roll_source(int i, int n, RollSymmetry sym) {
  RollSource s{i, false, false};
  const bool lr = sym == RollSymmetry::left_right || sym == RollSymmetry::both;
  const bool ud = sym == RollSymmetry::up_down || sym == RollSymmetry::both;
  // θ_i = −90° + 360°(i + ½)/n: y → −y maps roll i to n − 1 − i (θ → 180° − θ); z → −z maps it
  // to n/2 − 1 − i mod n (θ → −θ). Fundamental ranges: [−90°, 90°] is i < n/2; [0°, 180°] is
  // n/4 <= i < 3n/4.
  auto in_lr = [&](int k) { return k < n / 2; };
  auto in_ud = [&](int k) { return k >= n / 4 && k < 3 * n / 4; };
  if (lr && !in_lr(s.rep)) {
    s.rep = n - 1 - s.rep;
    s.mirror_y = !s.mirror_y;
  }
  if (ud && !in_ud(s.rep)) {
    s.rep = ((n / 2 - 1 - s.rep) % n + n) % n;
    s.mirror_z = !s.mirror_z;
  }
  if (lr && !in_lr(s.rep)) {
    s.rep = n - 1 - s.rep;
    s.mirror_y = !s.mirror_y;
  }
  return s;
}

}  // namespace

SurfaceSensitivity surface_sensitivity(const WaveDragModel& model, const Mesh& mesh, double mach,
                                       const SensitivityOptions& options) {
  checked_mach(mach, "--mach");
  if (!model.uses_grid())
    throw UnusableModel(
        "no sensitivity: a capture given as an area makes the drag come from sampled areas; "
        "give the capture as a shell instead");
  SurfaceSensitivity out;
  out.mach = mach;
  int cells = 64;
  while (cells < options.cells) cells *= 2;
  out.cells = cells;
  const int n = mach > 1.0 ? std::max(4, (options.rolls + 3) / 4 * 4) : 1;
  out.rolls = n;
  out.symmetry = mach > 1.0 ? (options.use_symmetry ? model.symmetry() : RollSymmetry::none)
                            : RollSymmetry::both;
  std::vector<double> roll_deg(static_cast<std::size_t>(n), 0.0);
  if (n > 1)
    for (int i = 0; i < n; ++i)
      roll_deg[static_cast<std::size_t>(i)] = -90.0 + 360.0 * (i + 0.5) / n;
  std::vector<RollSource> source(static_cast<std::size_t>(n));
  std::vector<int> reps;
  for (int i = 0; i < n; ++i) {
    source[static_cast<std::size_t>(i)] = n > 1 ? roll_source(i, n, out.symmetry) : RollSource{};
    if (source[static_cast<std::size_t>(i)].rep == i) reps.push_back(i);
  }
  out.grids = static_cast<int>(reps.size());

  // g_θ on each representative roll's grid.
  std::vector<RollGradient> grad(static_cast<std::size_t>(n));
  std::vector<std::string> problem(static_cast<std::size_t>(n));
  tbb::parallel_for(std::size_t{0}, reps.size(), [&](std::size_t k) {
    const int i = reps[k];
    const double roll = roll_deg[static_cast<std::size_t>(i)];
    const StationRange range = model.range(mach, roll);
    if (!(range.hi > range.lo)) {
      problem[static_cast<std::size_t>(i)] = "the model has no extent along the flow";
      return;
    }
    const double margin = (range.hi - range.lo) / 64.0;
    const SlopeGrid g = model.slope_grid(mach, roll, range.lo - margin, range.hi + margin, cells);
    std::size_t step_cell = 0;
    if (has_area_step(g, std::max(largest_area(g), g.tail_area), &step_cell)) {
      char buf[256];
      std::snprintf(
          buf, sizeof buf,
          "roll %.3f°: a face lies in the Mach plane at X = %.4g m with no wake or capture "
          "tube to close it; linear theory gives no finite drag there, hence no sensitivity",
          roll, g.lo + (static_cast<double>(step_cell) + 0.5) * (g.hi - g.lo) / cells);
      problem[static_cast<std::size_t>(i)] = buf;
      return;
    }
    RollGradient& r = grad[static_cast<std::size_t>(i)];
    r.lo = g.lo;
    r.cell = (g.hi - g.lo) / cells;
    const std::vector<double> a = slope_steps(g, true);
    r.g = drag_gradient(a, r.cell);
    r.drag_area = von_karman_drag_area(a);
  });
  for (const std::string& p : problem)
    if (!p.empty())
      throw UnusableModel("no sensitivity at M = " + readable_number(mach) + ": " + p);
  for (int i = 0; i < n; ++i)
    out.drag_area +=
        grad[static_cast<std::size_t>(source[static_cast<std::size_t>(i)].rep)].drag_area / n;

  // Vertex normals and area shares.
  const std::size_t nv = mesh.positions.size(), nt = mesh.triangles.size();
  out.per_volume.assign(nv, 0.0);
  out.vertex_area.assign(nv, 0.0);
  out.normal.assign(nv, Vec3{});
  std::vector<Vec3> tri_normal(nt);
  std::vector<double> tri_area(nt);
  for (std::size_t t = 0; t < nt; ++t) {
    const Tri& tr = mesh.triangles[t];
    const Vec3 c = cross(mesh.positions[tr[1]] - mesh.positions[tr[0]],
                         mesh.positions[tr[2]] - mesh.positions[tr[0]]);
    const double twice = norm(c);
    tri_area[t] = 0.5 * twice;
    tri_normal[t] = twice > 0.0 ? (1.0 / twice) * c : Vec3{};
    for (std::uint32_t v : tr) {
      out.vertex_area[v] += tri_area[t] / 3.0;
      out.normal[v] = out.normal[v] + 0.5 * c;
    }
  }
  for (Vec3& nrm : out.normal) {
    const double l = norm(nrm);
    nrm = l > 0.0 ? (1.0 / l) * nrm : Vec3{};
  }

  // ∫_T g(X(p)) φ_v(p) (n_v·n_T) dA for each triangle and each of its vertices, summed over the
  // rolls, as ∫ ρ_v(X) g(X) dX: ρ_v the station density of the hat-weighted area (the tent of
  // the triangle's area density times the mean of φ_v over the cut, piecewise quadratic), g
  // linear between the nodes. The pieces between the nodes and the middle station are
  // integrated by two-point Gauss–Legendre, exact for that cubic: the pairing of ρ with the
  // nodes' values is then exact, which matters because g of a faceted surface alternates in
  // sign from node to node near the vertex stations.
  std::vector<double> contrib(3 * nt, 0.0);
  tbb::parallel_for(std::size_t{0}, nt, [&](std::size_t t) {
    if (tri_area[t] == 0.0) return;
    const Tri& tr = mesh.triangles[t];
    double acc[3] = {0.0, 0.0, 0.0};
    for (int i = 0; i < n; ++i) {
      const RollSource& src = source[static_cast<std::size_t>(i)];
      const RollGradient& rg = grad[static_cast<std::size_t>(src.rep)];
      const MachPlanes planes{mach, roll_deg[static_cast<std::size_t>(src.rep)]};
      double f[3];
      for (int c = 0; c < 3; ++c) {
        Vec3 p = mesh.positions[tr[static_cast<std::size_t>(c)]];
        if (src.mirror_y) p.y = -p.y;
        if (src.mirror_z) p.z = -p.z;
        f[c] = station_of(p, planes);
      }
      int o[3] = {0, 1, 2};  // vertex order by station
      std::sort(o, o + 3, [&](int a, int b) { return f[a] < f[b]; });
      const double f1 = f[o[0]], f2 = f[o[1]], f3 = f[o[2]];
      const double span = f3 - f1;
      if (span <= 1e-12 * (rg.cell * static_cast<double>(rg.g.size()))) {
        // The triangle lies in the plane: its whole hat-weighted area (a third each) at f1.
        const double g = gradient_at(rg, f1) / 3.0;
        for (double& a : acc) a += g;
        continue;
      }
      // Hat weights (mean of φ over the cut) and area density at station x, per sorted vertex.
      auto integrand = [&](double x, double w) {
        const double density = 2.0 / span *
                               (x <= f2 ? (f2 > f1 ? (x - f1) / (f2 - f1) : 1.0)
                                        : (f3 > f2 ? (f3 - x) / (f3 - f2) : 1.0));
        double lam[3] = {0.0, 0.0, 0.0};
        const double s13 = (x - f1) / span;  // on edge 1–3
        lam[0] += 0.5 * (1.0 - s13);
        lam[2] += 0.5 * s13;
        if (x <= f2 && f2 > f1) {  // on edge 1–2
          const double s12 = (x - f1) / (f2 - f1);
          lam[0] += 0.5 * (1.0 - s12);
          lam[1] += 0.5 * s12;
        } else {  // on edge 2–3
          const double s23 = f3 > f2 ? (x - f2) / (f3 - f2) : 0.0;
          lam[1] += 0.5 * (1.0 - s23);
          lam[2] += 0.5 * s23;
        }
        const double g = gradient_at(rg, x) * density * w;
        for (int c = 0; c < 3; ++c) acc[o[c]] += g * lam[c];
      };
      auto piece = [&](double a, double b) {  // two-point Gauss–Legendre on [a, b]
        if (!(b > a)) return;
        const double m = 0.5 * (a + b), r = 0.5 * (b - a) / std::sqrt(3.0);
        integrand(m - r, 0.5 * (b - a));
        integrand(m + r, 0.5 * (b - a));
      };
      for (const auto& [a, b] : {std::pair{f1, f2}, std::pair{f2, f3}}) {
        if (!(b > a)) continue;
        // Breaks at the nodes inside (a, b).
        double x = a;
        long k = static_cast<long>(std::floor((a - rg.lo) / rg.cell)) + 1;
        for (;; ++k) {
          const double node = rg.lo + static_cast<double>(k) * rg.cell;
          if (node >= b) break;
          piece(x, node);
          x = node;
        }
        piece(x, b);
      }
    }
    for (int c = 0; c < 3; ++c) {
      const std::uint32_t v = tr[static_cast<std::size_t>(c)];
      contrib[3 * t + static_cast<std::size_t>(c)] =
          acc[c] / n * tri_area[t] * dot(out.normal[v], tri_normal[t]);
    }
  });
  for (std::size_t t = 0; t < nt; ++t)
    for (int c = 0; c < 3; ++c)
      out.per_volume[mesh.triangles[t][static_cast<std::size_t>(c)]] +=
          contrib[3 * t + static_cast<std::size_t>(c)];
  for (std::size_t v = 0; v < nv; ++v)
    out.per_volume[v] = out.vertex_area[v] > 0.0 ? out.per_volume[v] / out.vertex_area[v] : 0.0;

  char buf[256];
  std::snprintf(
      buf, sizeof buf,
      "first variation of von Karman's integral on the drag's slope grids (%d cells per roll), "
      "%s; ends closed as for the drag",
      cells,
      n > 1 ? ("mean over " + std::to_string(n) + " roll angles (" + std::to_string(out.grids) +
               " grids by mirror symmetry)")
                  .c_str()
            : "normal cuts (M = 1)");
  out.how = buf;
  return out;
}

double predicted_drag_change(const SurfaceSensitivity& s, const std::vector<double>& dn) {
  assert(dn.size() == s.per_volume.size());
  double sum = 0.0;
  for (std::size_t v = 0; v < dn.size(); ++v) sum += s.per_volume[v] * dn[v] * s.vertex_area[v];
  return sum;
}

}  // namespace machcut
